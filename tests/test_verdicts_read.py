"""A verdict only on what was read (issue 34, item 2): a number that is not finite never
passes; a Strict Open XML workbook is read like its transitional twin; a sheet the reader
cannot see, or a damaged member, is unreadable (exit 2) for check and recalc alike; the JSON
reports are strict JSON.  Each planted fault has a clean twin that holds."""

import json
import zipfile
from pathlib import Path

import pytest

from handmade import SHEET, _book, _sheet
from joulebook.faces.cli import main
from joulebook.faces.workbook.reader import read_book


def _strict_json(text: str):
    """json.loads refusing the NaN/Infinity tokens (not JSON, RFC 8259 §6)."""

    def refuse(token):
        raise ValueError(f"not JSON: {token}")

    return json.loads(text, parse_constant=refuse)


@pytest.mark.parametrize("saved", ["1e999", "-1e999", "NaN"])
def test_a_saved_value_that_is_not_finite_never_passes(tmp_path, saved, capsys):
    # P*V = 250 kPa × 2 m3 = 500 kJ; the saved value of B4 is planted
    sheet = _sheet().replace(b"<v>30</v>", f"<v>{saved}</v>".encode())
    sheet = sheet.replace(b"<v>0</v>", b"<v>1</v>")  # B5 (500 > 400) saved right
    src = _book(tmp_path, "inf.xlsx", sheet)
    rep = tmp_path / "r.json"
    assert main(["check", str(src), "--json", str(rep)]) == 1
    data = _strict_json(rep.read_text())
    (b4,) = [c for c in data["workbooks"][0]["cells"] if c["cell"] == "B4"]
    assert b4["status"] == "differs" and "not a finite number" in b4["note"]
    assert b4["cached"] == {"number": {"1e999": "inf", "-1e999": "-inf", "NaN": "nan"}[saved]}
    # the report keeps to the shipped schema, non-finite numbers included
    from importlib import resources

    import jsonschema

    schema = resources.files("joulebook.faces.workbook").joinpath("check.schema.json")
    jsonschema.validate(data, json.loads(schema.read_text(encoding="utf-8")))
    # the clean twin, 500 saved, holds
    twin = _book(tmp_path, "ok.xlsx", sheet.replace(f"<v>{saved}</v>".encode(), b"<v>500</v>"))
    assert main(["check", str(twin)]) == 0


def test_tolerances_must_be_finite(tmp_path, capsys):
    src = _book(tmp_path, "a.xlsx", _sheet())
    for bad in ("nan", "inf", "-1"):
        with pytest.raises(SystemExit) as e:
            main(["check", str(src), "--rtol", bad])
        assert e.value.code == 2
    assert "is not a finite number of 0 or more" in capsys.readouterr().err


STRICT = {
    b"http://schemas.openxmlformats.org/spreadsheetml/2006/main": (
        b"http://purl.oclc.org/ooxml/spreadsheetml/main"
    ),
    b"http://schemas.openxmlformats.org/officeDocument/2006/relationships": (
        b"http://purl.oclc.org/ooxml/officeDocument/relationships"
    ),
}


def _as_strict(src: Path, dst: Path) -> Path:
    """The package with every part's transitional namespaces renamed to the Strict ones
    (ISO/IEC 29500-1:2016 Strict conformance: the purl.oclc.org namespace names)."""
    with zipfile.ZipFile(src) as zin, zipfile.ZipFile(dst, "w") as zout:
        for info in zin.infolist():
            data = zin.read(info)
            if info.filename.endswith((".xml", ".rels")):
                for a, b in STRICT.items():
                    data = data.replace(a, b)
            zout.writestr(info, data)
    return dst


def test_a_strict_workbook_is_read_like_its_transitional_twin(tmp_path, capsys):
    src = _book(tmp_path, "t.xlsx", _sheet())
    strict = _as_strict(src, tmp_path / "s.xlsx")
    with zipfile.ZipFile(strict) as z:
        assert b"purl.oclc.org/ooxml/spreadsheetml/main" in z.read("xl/workbook.xml")
    a, b = read_book(src), read_book(strict)
    assert b.strict and not a.strict
    assert {k: (c.formula, c.cached) for k, c in a.cells.items()} == {
        k: (c.formula, c.cached) for k, c in b.cells.items()
    }
    assert len(b.cells) == 9
    assert main(["check", str(strict)]) == main(["check", str(src)]) == 1  # 2 stale values
    out = tmp_path / "s-out.xlsx"
    assert main(["recalc", str(strict), "-o", str(out)]) == 0
    assert read_book(out).cells[("Sheet", 4, 2)].cached == 500.0
    with zipfile.ZipFile(out) as z:  # still Strict: nothing renamed in the copy
        assert b"schemas.openxmlformats.org/spreadsheetml" not in z.read(SHEET)
    assert main(["check", str(out)]) == 0


def test_a_sheet_in_an_unknown_namespace_is_unreadable_not_zero_cells(tmp_path, capsys):
    sheet = _sheet().replace(
        b"http://schemas.openxmlformats.org/spreadsheetml/2006/main", b"urn:not-spreadsheetml"
    )
    src = _book(tmp_path, "ns.xlsx", sheet)
    assert main(["check", str(src)]) == 2
    err = capsys.readouterr().err
    assert "not a SpreadsheetML worksheet" in err and "0 cells" not in err
    assert main(["recalc", str(src), "-o", str(tmp_path / "o.xlsx")]) == 2


def _damage(src: Path, dst: Path, member: str, how: str) -> Path:
    """Copy *src* with *member* stored (not compressed), then damage it in the zip bytes:
    'crc' flips a byte of its data, 'method' names compression method 77 (none such)."""
    with zipfile.ZipFile(src) as zin, zipfile.ZipFile(dst, "w") as zout:
        for info in zin.infolist():
            data = zin.read(info)
            ctype = zipfile.ZIP_STORED if info.filename == member else zipfile.ZIP_DEFLATED
            zout.writestr(info.filename, data, compress_type=ctype)
    raw = bytearray(dst.read_bytes())
    with zipfile.ZipFile(dst) as z:
        info = z.getinfo(member)
    head = info.header_offset
    name_len = int.from_bytes(raw[head + 26 : head + 28], "little")
    extra_len = int.from_bytes(raw[head + 28 : head + 30], "little")
    data_at = head + 30 + name_len + extra_len
    if how is None:
        pass
    elif how == "crc":
        raw[data_at + 5] ^= 0x20
    else:  # the method field of the local header and of the central directory entry
        raw[head + 8 : head + 10] = (77).to_bytes(2, "little")
        cd = raw.find(b"PK\x01\x02")
        while cd >= 0:
            n = int.from_bytes(raw[cd + 28 : cd + 30], "little")
            if raw[cd + 46 : cd + 46 + n] == member.encode():
                raw[cd + 10 : cd + 12] = (77).to_bytes(2, "little")
            cd = raw.find(b"PK\x01\x02", cd + 4)
    dst.write_bytes(bytes(raw))
    return dst


@pytest.mark.parametrize("how", ["crc", "method"])
def test_a_damaged_member_check_never_reads_is_unreadable_for_both(tmp_path, how, capsys):
    src = _book(tmp_path, "a.xlsx", _sheet())
    bad = _damage(src, tmp_path / "bad.xlsx", "docProps/app.xml", how)
    assert main(["check", str(bad)]) == 2
    assert main(["recalc", str(bad), "-o", str(tmp_path / "o.xlsx")]) == 2
    err = capsys.readouterr().err
    assert err.count("'docProps/app.xml' cannot be unpacked") == 2
    assert not (tmp_path / "o.xlsx").exists()
    twin = _damage(src, tmp_path / "twin.xlsx", "docProps/app.xml", None)
    assert main(["check", str(twin)]) == 1  # the clean twin is read (its 2 stale values fail)
    assert main(["recalc", str(twin), "-o", str(tmp_path / "o.xlsx")]) == 0


def test_a_worksheet_part_outside_xl_worksheets_is_read(tmp_path):
    """A part may lie anywhere; its relationship's type says it is a worksheet (ECMA-376
    Part 2, §9.3: a relationship's target is any part name)."""
    src = _book(tmp_path, "a.xlsx", _sheet())
    moved = tmp_path / "moved.xlsx"
    with zipfile.ZipFile(src) as zin, zipfile.ZipFile(moved, "w") as zout:
        for info in zin.infolist():
            data = zin.read(info)
            name = info.filename
            if name == SHEET:
                name = "xl/data/receiver.xml"
            data = data.replace(b"worksheets/sheet1.xml", b"data/receiver.xml")
            zout.writestr(name, data)
    assert read_book(moved).sheet_parts == {"Sheet": "xl/data/receiver.xml"}
    assert len(read_book(moved).cells) == 9
    assert main(["check", str(moved)]) == 1  # its two stale values, not "0 cells, holds"
    out = tmp_path / "o.xlsx"
    assert main(["recalc", str(moved), "-o", str(out)]) == 0
    assert main(["check", str(out)]) == 0


def test_a_sheet_whose_relationship_is_missing_is_unreadable(tmp_path, capsys):
    src = _book(tmp_path, "a.xlsx", _sheet())
    bad = tmp_path / "norel.xlsx"
    with zipfile.ZipFile(src) as zin, zipfile.ZipFile(bad, "w") as zout:
        for info in zin.infolist():
            data = zin.read(info)
            if info.filename == "xl/_rels/workbook.xml.rels":
                data = data.replace(b'Id="rId1"', b'Id="rId99"')
            zout.writestr(info, data)
    assert main(["check", str(bad)]) == 2
    assert "which the workbook does not hold" in capsys.readouterr().err
