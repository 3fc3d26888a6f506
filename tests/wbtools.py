"""Helpers for tests that alter a saved workbook package."""

import zipfile
from pathlib import Path


def rewrite_part(src: Path, dst: Path, name: str, change) -> Path:
    """Copy package *src* to *dst* with part *name* replaced by ``change(old_bytes)``."""
    with zipfile.ZipFile(src) as zin, zipfile.ZipFile(dst, "w", zipfile.ZIP_DEFLATED) as zout:
        for info in zin.infolist():
            data = zin.read(info)
            if info.filename == name:
                data = change(data)
            zout.writestr(info, data, compress_type=info.compress_type)
    return dst


MAIN_NS = "http://schemas.openxmlformats.org/spreadsheetml/2006/main"


def build(path: Path, cells: dict, prepare=None) -> Path:
    """Save a workbook of *cells* ({"Sheet!A1": value or formula}; the first sheet named
    in it is the workbook's first) to *path*; ``prepare(wb)`` may add names or tables."""
    import openpyxl

    wb = openpyxl.Workbook()
    first = True
    for key, value in cells.items():
        sheet, _, addr = key.rpartition("!")
        if sheet not in wb.sheetnames:
            if first:
                wb.active.title = sheet
            else:
                wb.create_sheet(sheet)
        first = False
        wb[sheet][addr] = value
    if prepare is not None:
        prepare(wb)
    wb.save(path)
    return path


def outcomes(path: Path) -> dict:
    """The engine's outcome of every formula cell, keyed "Sheet!A1"."""
    from openpyxl.utils import get_column_letter

    from joulebook.faces.workbook.engine import Engine
    from joulebook.faces.workbook.reader import read_book

    out = Engine(read_book(path)).run()
    return {f"{s}!{get_column_letter(c)}{r}": o for (s, r, c), o in out.items()}


def with_saved(src: Path, dst: Path, saved: dict) -> Path:
    """Copy *src* to *dst* with saved values ({"Sheet!A1": number, text, bool or "#N/A"})
    written into the formula cells, as a spreadsheet program saves them."""
    import xml.etree.ElementTree as ET

    import openpyxl

    wb = openpyxl.load_workbook(src)
    parts = {ws.title: f"xl/worksheets/sheet{i + 1}.xml" for i, ws in enumerate(wb.worksheets)}
    by_part: dict = {}
    for key, value in saved.items():
        sheet, _, addr = key.rpartition("!")
        by_part.setdefault(parts[sheet], {})[addr] = value
    ET.register_namespace("", MAIN_NS)
    out = src
    for part, values in by_part.items():

        def change(data: bytes, values=values) -> bytes:
            root = ET.fromstring(data)
            for c in root.iter(f"{{{MAIN_NS}}}c"):
                if c.get("r") not in values:
                    continue
                v = values[c.get("r")]
                for old in c.findall(f"{{{MAIN_NS}}}v"):
                    c.remove(old)
                el = ET.SubElement(c, f"{{{MAIN_NS}}}v")
                if isinstance(v, bool):
                    c.set("t", "b")
                    el.text = "1" if v else "0"
                elif isinstance(v, str) and v.startswith("#"):
                    c.set("t", "e")
                    el.text = v
                elif isinstance(v, str):
                    c.set("t", "str")
                    el.text = v
                else:
                    c.attrib.pop("t", None)
                    el.text = repr(float(v))
            return ET.tostring(root, xml_declaration=True, encoding="UTF-8")

        tmp = dst.with_suffix(".tmp.xlsx")
        rewrite_part(out, tmp, part, change)
        tmp.replace(dst)
        out = dst
    return dst


def library_values(path: Path, sheets: list[str]) -> dict:
    """The ``formulas`` library used as-is (its ExcelModel) on the workbook at *path*:
    {(sheet, row, col): value} in the engine's value types, ranges spread cell by cell."""
    import formulas
    import numpy as np
    import schedula as sh
    from formulas.tokens.operand import XlError
    from openpyxl.utils.cell import range_boundaries

    upper = {s.upper(): s for s in sheets}
    sol = formulas.ExcelModel().loads(str(path)).finish().calculate()
    got = {}
    for k, v in sol.items():
        k = str(k)
        if "!" not in k or not hasattr(v, "value"):
            continue
        sheet, _, addr = k.rpartition("!")
        sheet = upper.get(sheet.strip("'").split("]", 1)[-1].replace("''", "'").upper())
        try:
            c1, r1, _, _ = range_boundaries(addr)
        except ValueError:  # a defined name's node
            continue
        if sheet is None:
            continue
        arr = np.asarray(v.value, dtype=object)
        arr = arr.reshape(1, -1) if arr.ndim < 2 else arr
        for i in range(arr.shape[0]):
            for j in range(arr.shape[1]):
                x = arr[i, j]
                if isinstance(x, XlError):
                    x = ("error", str(x))
                elif x is sh.EMPTY:
                    x = 0.0
                elif isinstance(x, (bool, np.bool_)):
                    x = bool(x)
                elif isinstance(x, (int, float, np.number)):
                    x = float(x)
                got[(sheet, r1 + i, c1 + j)] = x
    return got


def chromium(page: Path, tmp: Path, size: str = "1000,3000") -> tuple[Path, str]:
    """Headless Chromium (the distribution's, as .ci/run installs it) on a local page:
    (a screenshot, the DOM as the browser built it).  No network is touched."""
    import shutil
    import subprocess

    browser = shutil.which("chromium") or shutil.which("chromium-browser")
    assert browser, "Chromium is needed: apt-get install chromium (as .ci/run does)"
    flags = [
        "--headless",
        "--no-sandbox",
        "--disable-gpu",
        "--disable-quic",
        "--no-first-run",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
        f"--user-data-dir={tmp / 'chrome'}",
    ]
    shot = tmp / (page.stem + ".png")
    run = dict(check=True, capture_output=True, timeout=120)
    subprocess.run(
        [browser, *flags, f"--screenshot={shot}", f"--window-size={size}", page.as_uri()], **run
    )
    dom = subprocess.run([browser, *flags, "--dump-dom", page.as_uri()], text=True, **run).stdout
    return shot, dom
