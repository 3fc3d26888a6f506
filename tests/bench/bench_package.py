"""The calculation package on a large workbook (not part of the default run).

    python tests/bench/bench_package.py [--cells 10000] [--repeat 3]

A workbook of ``--cells`` formula cells (an indicator record: a crank angle down column A,
the cylinder volume of a slider-crank by one joulebook call down B, a scaled copy down C,
copied-down formulas, as a real record is), saved with its values by joulebook's own recalc.
Prints, measured in the same run on the same machine (best of ``--repeat`` processes,
interleaved so noise hits both sides alike):

1. ``joulebook audit BOOK -o x.html --pdf x.pdf`` against ``joulebook check BOOK``
   (target: audit + PDF ≤ 3× check);
2. the PDF's size and page count, which grouping keeps bounded: the same at 10,000 cells as
   at 1,000 (target: the page count does not grow with the cells).
"""

from __future__ import annotations

import argparse
import subprocess
import sys
import tempfile
import time
from pathlib import Path


def build(path: Path, cells: int) -> Path:
    import openpyxl

    from joulebook.faces.cli import main

    rows = cells // 2
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Record"
    ws["A1"], ws["B1"], ws["C1"] = "Crank angle (deg)", "Cylinder volume (m3)", "Volume (L)"
    ws["E1"], ws["F1"] = "Bore (m)", 0.1
    for i in range(2, rows + 2):
        ws[f"A{i}"] = (i - 2) * 360 / rows
        ws[f"B{i}"] = f"=JB_ENGINE_VOLUME(A{i},$F$1,0.12,0.25,0.0001)"
        ws[f"C{i}"] = f"=B{i}*1000"
    raw = path.with_name("raw-" + path.name)
    wb.save(raw)
    assert main(["recalc", str(raw), "-o", str(path), "--force"]) in (0, 1)
    return path


def _time(cmd: list[str]) -> float:
    t = time.perf_counter()
    subprocess.run(cmd, check=False, capture_output=True)
    return time.perf_counter() - t


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--cells", type=int, default=10_000)
    ap.add_argument("--repeat", type=int, default=3)
    ns = ap.parse_args()
    exe = [sys.executable, "-m", "joulebook"]
    with tempfile.TemporaryDirectory() as tmp:
        pages = {}
        for n in (1_000, ns.cells):
            book = build(Path(tmp) / f"record{n}.xlsx", n)
            html, pdf = Path(tmp) / f"r{n}.html", Path(tmp) / f"r{n}.pdf"
            audit = [*exe, "audit", str(book), "-o", str(html), "--pdf", str(pdf), "--force"]
            check = [*exe, "check", str(book), "-q"]
            _time(check), _time(audit)  # warm-up
            a, c = [], []
            for _ in range(ns.repeat):
                c.append(_time(check))
                a.append(_time(audit))
            from pypdf import PdfReader

            pages[n] = len(PdfReader(pdf).pages)
            print(
                f"{n:6d} formula cells: check {min(c):.2f} s, audit + PDF {min(a):.2f} s = "
                f"{min(a) / min(c):.2f}× (target ≤ 3×); PDF {pdf.stat().st_size // 1024} KiB, "
                f"{pages[n]} pages; HTML {html.stat().st_size // 1024} KiB"
            )
        print(
            f"pages at {ns.cells} cells / at 1000 cells: {pages[ns.cells]} / {pages[1_000]} "
            "(target: no growth)"
        )


if __name__ == "__main__":
    main()
