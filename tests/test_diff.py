"""joulebook diff: fixture pairs of revisions, each giving exactly the expected changes and
causes (JSON), the reports, the command's exit codes and bad input.

The fixtures are scenarios of our own: a small pressure-design sheet whose saved values are
written by the engine (as a spreadsheet program saves them), then revised one way at a time.
Expected shares are worked by hand from the sheet's own arithmetic (common practice: the
effect of one input is the result's move with that input put back).
"""

import json
import re
import shutil

import pytest

from joulebook.faces.cli import main
from joulebook.faces.workbook.diff import diff_books, render_html, schema, to_json, to_markdown
from joulebook.faces.workbook.engine import Engine
from joulebook.faces.workbook.reader import read_book
from joulebook.faces.workbook.status import Status
from joulebook.faces.workbook.writer import write_copy
from wbtools import build, with_saved

BASE = {
    "Design!A1": "Fill temperature [degC]",
    "Design!B1": 18,
    "Design!C1": "degC",
    "Design!A2": "Wall thickness [mm]",
    "Design!B2": 9.5,
    "Design!C2": "mm",
    "Design!A3": "Design pressure [bar]",
    "Design!B3": "=B1*0.2+B2*0.5+1",
    "Design!C3": "bar",
    "Design!A4": "Test pressure [bar]",
    "Design!B4": "=B3*1.43",
    "Design!A6": "Nozzle",
    "Design!B6": "Load [kN]",
    "Design!A7": 1,
    "Design!B7": "=A7*B$2",
    "Design!A8": 2,
    "Design!B8": "=A8*B$2",
    "Design!A9": "Total load [kN]",
    "Design!B9": "=SUM(B7:B8)",
}


def saved(tmp_path, name: str, cells: dict, edit: dict | None = None):
    """The workbook of *cells*, its formulas' saved values computed as a program saves
    them; *edit* then types saved values over (a property library's other numbers)."""
    raw = build(tmp_path / f"raw_{name}.xlsx", cells)
    book = read_book(raw)
    path = write_copy(book, Engine(book).run(), tmp_path / f"{name}.xlsx", force=True)
    if edit:
        path = with_saved(path, tmp_path / f"{name}_edited.xlsx", edit)
    return path


def changes(tmp_path, old_cells, new_cells, old_edit=None, new_edit=None):
    old = saved(tmp_path, "old", old_cells, old_edit)
    new = saved(tmp_path, "new", new_cells, new_edit)
    d = diff_books(read_book(old), read_book(new))
    doc = json.loads(to_json(d))
    _validate(doc)
    return d, doc["changes"]


def _validate(doc):
    jsonschema = pytest.importorskip("jsonschema")  # a test dependency (pyproject [test])
    jsonschema.validate(doc, schema())


def brief(cs):
    """(kind, what, sheet, cell, old, new, causes) of each change, in report order (numbers
    to 9 decimals: the sheet's arithmetic in binary floating point)."""

    def r(v):
        return round(v, 9) if isinstance(v, float) else v

    return [
        (c["kind"], c["what"], c["sheet"], c["cell"], r(c["old"]), r(c["new"]), c.get("causes"))
        for c in cs
    ]


def shift_rows(cells: dict, at: int) -> dict:
    """*cells* with a row inserted at *at*, references moved as a spreadsheet program moves
    them (the fixtures' formulas hold only plain A1 references)."""

    def move(m):
        r = int(m.group(3))
        return f"{m.group(1)}{m.group(2)}{r + 1 if r >= at else r}"

    out = {}
    for k, v in cells.items():
        sheet, _, a = k.partition("!")
        col, row = re.match(r"([A-Z]+)(\d+)", a).groups()
        if isinstance(v, str) and v.startswith("="):
            v = re.sub(r"([A-Z]+)(\$?)(\d+)", move, v)
        out[f"{sheet}!{col}{int(row) + 1 if int(row) >= at else int(row)}"] = v
    return out


def shift_cols(cells: dict, at: int) -> dict:
    from openpyxl.utils import column_index_from_string as number
    from openpyxl.utils import get_column_letter as letters

    def move(m):
        c = number(m.group(1))
        return f"{letters(c + 1 if c >= at else c)}{m.group(2)}"

    out = {}
    for k, v in cells.items():
        sheet, _, a = k.partition("!")
        col, row = re.match(r"([A-Z]+)(\d+)", a).groups()
        if isinstance(v, str) and v.startswith("="):
            v = re.sub(r"([A-Z]+)(\$?\d+)", move, v)
        c = number(col)
        out[f"{sheet}!{letters(c + 1 if c >= at else c)}{row}"] = v
    return out


# ---------------------------------------------------------------------------------------
# the fixture pairs


def test_identical_revisions_have_no_changes(tmp_path):
    d, cs = changes(tmp_path, BASE, BASE)
    assert cs == [] and not d.unrelated and d.results_compared and d.aligned == 1.0


def test_changed_input(tmp_path):
    new = dict(BASE, **{"Design!B1": 20})
    d, cs = changes(tmp_path, BASE, new)
    assert brief(cs) == [
        ("result", "cell", "Design", "B3", 9.35, 9.75, ["Design!B1"]),
        ("result", "cell", "Design", "B4", 13.3705, 13.9425, ["Design!B1"]),
        ("input", "cell", "Design", "B1", 18, 20, None),
    ]
    b3 = cs[0]
    assert b3["label"] == "Design pressure [bar]" and b3["unit"] == "bar"
    assert b3["delta"] == pytest.approx(0.4) and b3["delta_pct"] == pytest.approx(0.4 / 9.35 * 100)
    # B3 = 0.2·B1 + …: putting 18 back takes 0.2·2 = 0.4 bar off, the whole move (by hand)
    assert b3["shares"] == [
        {
            "cell": "Design!B1",
            "label": "Fill temperature [degC]",
            "effect": pytest.approx(0.4),
            "share": pytest.approx(1.0),
        }
    ]
    assert b3["interaction"] is None and b3["unexplained_part"] is None
    assert b3["status"] is None  # a move with its cause: the verdict is check's (docs/diff.md)
    assert cs[2]["unit"] == "degC" and cs[2]["delta"] == 2
    assert d.runs == 1  # NEW recomputed once, with the change put back


def test_two_inputs_ranked_by_share(tmp_path):
    new = dict(BASE, **{"Design!B1": 20, "Design!B2": 10})
    d, cs = changes(tmp_path, BASE, new)
    b3 = next(c for c in cs if c["cell"] == "B3")
    # 0.2·(20−18) = 0.4 bar and 0.5·(10−9.5) = 0.25 bar (by hand): the larger first
    assert b3["causes"] == ["Design!B1", "Design!B2"]
    assert [s["effect"] for s in b3["shares"]] == [pytest.approx(0.4), pytest.approx(0.25)]
    assert [s["share"] for s in b3["shares"]] == [
        pytest.approx(0.4 / 0.65),
        pytest.approx(0.25 / 0.65),
    ]
    assert b3["interaction"] is None and b3["unexplained_part"] is None
    b7 = next(c for c in cs if c["cell"] == "B7")
    assert b7["causes"] == ["Design!B2"]


def test_interacting_changes_are_said_to_interact(tmp_path):
    old = dict(BASE, **{"Design!B3": "=B1*B2/10"})
    new = dict(old, **{"Design!B1": 36, "Design!B2": 19})
    d, cs = changes(tmp_path, old, new)
    b3 = next(c for c in cs if c["cell"] == "B3")
    # 18·9.5/10 = 17.1 → 36·19/10 = 68.4: singly 68.4 − 18·19/10 = 34.2 and
    # 68.4 − 36·9.5/10 = 34.2; together 51.3, so 17.1 is the interaction (by hand)
    assert sorted(b3["causes"]) == ["Design!B1", "Design!B2"]
    assert [s["effect"] for s in b3["shares"]] == [pytest.approx(34.2)] * 2
    assert b3["interaction"] == pytest.approx(-17.1)
    assert "interact" in to_markdown(d)


def test_changed_formula(tmp_path):
    new = dict(BASE, **{"Design!B3": "=B1*0.2+B2*0.55+1"})
    d, cs = changes(tmp_path, BASE, new)
    assert brief(cs) == [
        ("result", "cell", "Design", "B3", 9.35, 9.825, ["Design!B3"]),
        ("result", "cell", "Design", "B4", 13.3705, 14.04975, ["Design!B3"]),
        ("formula", "cell", "Design", "B3", "=B1*0.2+B2*0.5+1", "=B1*0.2+B2*0.55+1", None),
    ]


def test_inserted_row_above_a_block(tmp_path):
    new = shift_rows(BASE, 3)
    new["Design!A3"] = "Corrosion allowance [mm]"
    new["Design!B3"] = 1.5
    d, cs = changes(tmp_path, BASE, new)
    # one change: the row; every cell below it moved down without being "changed"
    assert brief(cs) == [
        ("inserted", "row", "Design", "3:3", None, "Corrosion allowance [mm] | 1.5", None)
    ]


def test_inserted_row_inside_a_summed_block_moves_the_total(tmp_path):
    new = shift_rows(BASE, 8)
    new["Design!A8"] = 1.5
    new["Design!B8"] = "=A8*B$2"
    new["Design!B10"] = "=SUM(B7:B9)"
    d, cs = changes(tmp_path, BASE, new)
    # the new row continues the copied-down formula: extended, and (as one change, put back
    # whole) the cause of the total: 1.5 × 9.5 = 14.25 kN more (by hand)
    assert brief(cs) == [
        ("result", "cell", "Design", "B10", 28.5, 42.75, ["Design!A8:B8"]),
        ("extended", "row", "Design", "A8:B8", None, "1.5 | =A8*B$2", None),
    ]


def test_inserted_column(tmp_path):
    new = shift_cols(BASE, 2)
    new["Design!B1"] = "checked"
    new["Design!B2"] = "checked"
    d, cs = changes(tmp_path, BASE, new)
    assert brief(cs) == [("inserted", "column", "Design", "B:B", None, "checked", None)]


def test_sheet_renamed(tmp_path):
    old = dict(BASE, **{"Notes!A1": "scenario of our own", "Notes!B1": "=Design!B3*2"})
    new = {k.replace("Design!", "Vessel!"): v for k, v in BASE.items()}
    new["Notes!A1"], new["Notes!B1"] = "scenario of our own", "=Vessel!B3*2"
    d, cs = changes(tmp_path, old, new)
    # the formula reading the renamed sheet is the same formula: no change but the name
    assert brief(cs) == [("renamed", "sheet", "Vessel", None, "Design", "Vessel", None)]


def test_formula_copied_one_row_further(tmp_path):
    new = dict(BASE)
    new["Design!A9"], new["Design!B9"] = 3, "=A9*B$2"
    new["Design!A10"], new["Design!B10"] = "Total load [kN]", "=SUM(B7:B8)"
    d, cs = changes(tmp_path, BASE, new)
    assert brief(cs) == [("extended", "row", "Design", "A9:B9", None, "3 | =A9*B$2", None)]


def test_saved_value_overwritten_by_hand(tmp_path):
    new = dict(BASE, **{"Design!B3": 9.8})
    d, cs = changes(tmp_path, BASE, new)
    assert brief(cs) == [
        ("result", "cell", "Design", "B4", 13.3705, 14.014, ["Design!B3"]),
        ("formula", "cell", "Design", "B3", "=B1*0.2+B2*0.5+1", 9.8, None),
    ]
    assert "a formula replaced by a typed value (it saved 9.35)" in cs[1]["note"]
    assert cs[0]["shares"][0]["share"] == pytest.approx(1.0)


def test_result_moved_by_a_property_library_change(tmp_path):
    # OLD saved other numbers for B3 and B4 (an earlier library), nothing else differs
    d, cs = changes(tmp_path, BASE, BASE, old_edit={"Design!B3": 9.3, "Design!B4": 13.299})
    assert brief(cs) == [
        ("unexplained", "cell", "Design", "B3", 9.3, 9.35, []),
        ("result", "cell", "Design", "B4", 13.299, 13.3705, ["Design!B3"]),
    ]
    assert cs[0]["status"] == "pass"  # NEW holds: the move came from elsewhere
    assert "moved without a cause" in to_markdown(d).lower()


def test_clean_twin_of_the_property_change_is_quiet(tmp_path):
    # the same edit in both revisions: no move, nothing unexplained
    edit = {"Design!B3": 9.3}
    d, cs = changes(tmp_path, BASE, BASE, old_edit=edit, new_edit=edit)
    assert cs == []


def test_stale_save_in_new_is_unexplained_with_its_verdict(tmp_path):
    d, cs = changes(tmp_path, BASE, BASE, new_edit={"Design!B3": 9.9})
    assert brief(cs) == [("unexplained", "cell", "Design", "B3", 9.35, 9.9, [])]
    assert cs[0]["status"] == Status.DIFFERS and cs[0]["recomputed"] == pytest.approx(9.35)


def test_joulebook_call_arguments_changed(tmp_path):
    call = '=JB_PROP("water","rho in kg/m3","T in degC",B1,"P in bar",{p})'
    old = dict(BASE, **{"Design!A5": "Density [kg/m3]", "Design!B5": call.format(p=5)})
    new = dict(old, **{"Design!B5": call.format(p=8)})
    d, cs = changes(tmp_path, old, new)
    f = next(c for c in cs if c["kind"] == "formula")
    assert f["calls"] == [{"function": "JB_PROP", "argument": 6, "old": "5", "new": "8"}]
    moved = next(c for c in cs if c["cell"] == "B5" and c["kind"] == "result")
    assert moved["causes"] == ["Design!B5"] and moved["unit"] == "kg/m3"
    # liquid water is nearly incompressible: 3 bar more raises its density a little (IAPWS-95
    # by CoolProp; the sign and size are common practice, about 0.45 kg/m³ per 10 bar)
    assert 0 < moved["delta"] < 0.5


def test_defined_names_and_tables(tmp_path):
    from openpyxl.workbook.defined_name import DefinedName
    from openpyxl.worksheet.table import Table

    def prep(ref, box):
        def go(wb):
            wb.defined_names["WALL"] = DefinedName("WALL", attr_text=ref)
            wb["Design"].add_table(Table(displayName="Loads", ref=box))

        return go

    cells = {"Design!D1": "a", "Design!E1": "b", "Design!D2": 1, "Design!E2": 2}
    cells.update({"Design!D3": 3, "Design!E3": 4, **BASE})
    old = build(tmp_path / "o.xlsx", cells, prep("Design!$B$2", "D1:E2"))
    new = build(tmp_path / "n.xlsx", cells, prep("Design!$B$1", "D1:E3"))
    d = diff_books(read_book(old), read_book(new))
    got = [(c.kind, c.what, c.cell, c.old, c.new) for c in d.changes]
    assert ("formula", "name", "WALL", "Design!$B$2", "Design!$B$1") in got
    assert ("extended", "table", "Loads", "D1:E2 [a, b]", "D1:E3 [a, b]") in got
    assert len(got) == 2


def test_deleted_row_reported_once_in_old_addresses(tmp_path):
    old = shift_rows(BASE, 3)
    old["Design!A3"] = "Corrosion allowance [mm]"
    old["Design!B3"] = 1.5
    d, cs = changes(tmp_path, old, BASE)
    assert brief(cs) == [
        ("deleted", "row", "Design", "3:3", "Corrosion allowance [mm] | 1.5", None, None)
    ]


# ---------------------------------------------------------------------------------------
# bad input


def test_unrelated_workbooks_say_so(tmp_path):
    other = {"Log!A1": "pump hours", "Log!C4": 17, "Log!D9": "=C4*3"}
    d, cs = changes(tmp_path, BASE, other)
    assert d.unrelated and cs == []
    assert "unrelated" in d.notes[0]


def test_related_twin_is_not_unrelated(tmp_path):
    d, _ = changes(tmp_path, BASE, dict(BASE, **{"Design!B1": 19}))
    assert not d.unrelated and d.aligned > 0.9


def test_without_saved_values_results_are_not_compared(tmp_path):
    old = build(tmp_path / "o.xlsx", BASE)  # openpyxl saves no values of formulas
    new = build(tmp_path / "n.xlsx", dict(BASE, **{"Design!B1": 20}))
    d = diff_books(read_book(old), read_book(new))
    assert not d.results_compared
    assert [(c.kind, c.cell) for c in d.changes] == [("input", "B1")]
    assert "results were not compared" in d.notes[0]


def test_cli_exit_codes_and_outputs(tmp_path, capsys):
    old = saved(tmp_path, "old", BASE)
    new = saved(tmp_path, "new", dict(BASE, **{"Design!B1": 20}))
    before = (old.read_bytes(), new.read_bytes())
    out = tmp_path / "out"
    out.mkdir()
    html, js, md = out / "diff.html", out / "diff.json", out / "diff.md"
    argv = ["diff", str(old), str(new), "-o", str(html), "--json", str(js)]
    assert main(argv + ["--summary", str(md), "--audit", "--fail-on", "formulas"]) == 0
    text = html.read_text()
    assert main(argv + ["--fail-on", "inputs", "--force"]) == 1
    assert main(argv + ["--fail-on", "results", "--force"]) == 1
    assert main(argv + ["--fail-on", "any", "--force"]) == 1
    assert main(["diff", str(old), str(old), "--fail-on", "any"]) == 0
    assert (old.read_bytes(), new.read_bytes()) == before  # inputs never modified
    _validate(json.loads(js.read_text()))
    # summary first, then the moved results; each kind marked by a symbol and a word
    assert text.index('id="summary"') < text.index('id="moved"') < text.index('id="sheet-1"')
    assert "Δ moved" in text and "✎ input" in text
    audit = out / "diff.audit.html"
    anchor = re.search(r'href="diff\.audit\.html#([^"]+)">Design!B3<', text).group(1)
    assert f'id="{anchor}"' in audit.read_text()
    assert "Design!B3" in md.read_text() and "Fill temperature" in md.read_text()
    assert not list(out.glob(".joulebook-*"))  # atomic writes leave no temporary file


def test_html_escapes_workbook_text(tmp_path):
    new = dict(BASE, **{"Design!A1": "<script>alert(1)</script> [degC]", "Design!B1": 20})
    old = dict(BASE, **{"Design!A1": "<script>alert(1)</script> [degC]"})
    d, _ = changes(tmp_path, old, new)
    text = render_html(d)
    assert "<script>alert" not in text and "&lt;script&gt;" in text


@pytest.mark.parametrize("which", ["old", "new"])
def test_unreadable_input_exits_2_naming_the_file(tmp_path, capsys, which):
    good = saved(tmp_path, "good", BASE)
    bad = tmp_path / "broken.xlsx"
    bad.write_bytes(b"PK\x03\x04 not really a zip")
    args = [str(bad), str(good)] if which == "old" else [str(good), str(bad)]
    assert main(["diff", *args]) == 2
    assert "broken.xlsx" in capsys.readouterr().err


def test_protected_workbook_exits_2_naming_the_file(tmp_path, capsys):
    msoffcrypto = pytest.importorskip("msoffcrypto")  # a test dependency (pyproject [test])
    import io

    from msoffcrypto.format.ooxml import OOXMLFile

    good = saved(tmp_path, "good", BASE)
    locked = tmp_path / "locked.xlsx"
    buf = io.BytesIO()
    with open(good, "rb") as fh:
        OOXMLFile(fh).encrypt("secret", buf)
    locked.write_bytes(buf.getvalue())
    assert msoffcrypto is not None
    assert main(["diff", str(good), str(locked)]) == 2
    assert "locked.xlsx" in capsys.readouterr().err


def test_outputs_never_overwrite_inputs(tmp_path, capsys):
    old = saved(tmp_path, "old", BASE)
    new = tmp_path / "new.xlsx"
    shutil.copy(old, new)
    before = new.read_bytes()
    assert main(["diff", str(old), str(new), "--json", str(new), "--force"]) == 2
    assert new.read_bytes() == before


def test_demo_writes_a_revision_and_its_review(tmp_path):
    from joulebook.tools.demo import WORKBOOKS, new_workbook
    from joulebook.tools.demodiff import REVISED, review

    wb = new_workbook()  # revision A as the demo makes it (its error style declared)
    WORKBOOKS[REVISED](wb)
    raw = tmp_path / "raw.xlsx"
    wb.save(raw)
    book = read_book(raw)
    (tmp_path / "recalculated").mkdir()
    old = write_copy(book, Engine(book).run(), tmp_path / "recalculated" / REVISED)
    lines = []
    r = review(old, tmp_path / "reports", WORKBOOKS, new_workbook, echo=lines.append)
    assert r["new"].parent == tmp_path / "revisions" and r["html"].exists()
    doc = json.loads(r["json"].read_text())
    _validate(doc)
    got = {(c["cell"], c["old"], c["new"]) for c in doc["changes"] if c["kind"] == "input"}
    assert got == {("B10", 15, 12), ("B14", 16, 20)}
    assert doc["summary"]["unexplained"] == 0 and doc["summary"]["formula"] == 0
    # revision B changes the two inputs and nothing else (its error-style name kept)
    assert {c["kind"] for c in doc["changes"]} == {"input", "result"}
    p2 = next(c for c in doc["changes"] if c["cell"] == "B19")
    # a colder fill warms through more kelvin to the same 45 degC: the trapped pressure rises
    # (common practice), all of it from the fill temperature
    assert p2["kind"] == "result" and p2["causes"] == ["Line!B10"] and p2["delta"] > 0
    assert p2["shares"][0]["share"] == pytest.approx(1.0) and p2["unit"] == "bar"
    assert "revision B" in lines[0]


def test_spilled_values_are_results_not_inputs(tmp_path):
    from openpyxl.worksheet.formula import ArrayFormula

    def arr(text):
        def go(wb):
            ws = wb["Design"]
            ws["D1"] = ArrayFormula("D1:D2", text)

        return go

    cells = dict(BASE)
    old = build(tmp_path / "o_raw.xlsx", cells, arr("=B1:B2*2"))
    new = build(tmp_path / "n_raw.xlsx", dict(cells, **{"Design!B2": 10}), arr("=B1:B2*2"))
    paths = []
    for raw, name in ((old, "o.xlsx"), (new, "n.xlsx")):
        book = read_book(raw)
        paths.append(write_copy(book, Engine(book).run(), tmp_path / name))
    d = diff_books(read_book(paths[0]), read_book(paths[1]))
    got = [(c.kind, c.cell, c.old, c.new, [x.where for x in c.causes]) for c in d.changes]
    # the spilled D2 moved (2·9.5 → 2·10): a result of the array formula, caused by B2 with
    # its whole share (by hand), never an "input"; the anchor D1 (2·18) did not move
    assert ("result", "D2", 19, 20, ["Design!B2"]) in got
    d2 = next(c for c in d.changes if c.cell == "D2")
    assert d2.causes[0].share == pytest.approx(1.0)
    assert not [g for g in got if g[1] == "D1"]
    assert [g[0] for g in got].count("input") == 1


@pytest.mark.client
def test_html_report_renders_in_a_browser(tmp_path):
    from wbtools import chromium

    new = dict(BASE, **{"Design!B1": 20, "Design!B3": "=B1*0.2+B2*0.55+1"})
    d, _ = changes(tmp_path, BASE, new)
    page = tmp_path / "diff.html"
    page.write_text(render_html(d), encoding="utf-8")
    shot, dom = chromium(page, tmp_path, "1100,1400")
    assert shot.stat().st_size > 10_000
    # each kind is told by a symbol and a word, not by colour alone
    assert "Δ moved" in dom and "✎ input" in dom and "ƒ formula" in dom
    assert dom.index("Summary") < dom.index("Moved results")


def test_internal_failure_exits_3_without_a_traceback(tmp_path, capsys, monkeypatch):
    import joulebook.faces.workbook.diff as diff_module

    def broken(*args, **kwargs):
        raise RuntimeError("planted defect")

    monkeypatch.setattr(diff_module, "diff_books", broken)
    old = saved(tmp_path, "old", BASE)
    assert main(["diff", str(old), str(old)]) == 3
    err = capsys.readouterr().err
    assert "planted defect" in err and "Traceback" not in err


def test_a_formula_changed_down_a_column_is_one_change(tmp_path):
    old = dict(BASE)
    new = dict(BASE, **{"Design!B7": "=A7*B$2*1.1", "Design!B8": "=A8*B$2*1.1"})
    d, cs = changes(tmp_path, old, new)
    f = [c for c in cs if c["kind"] == "formula"]
    # copied down alike: one change over B7:B8 (DESIGN §4: one group where a person reads)
    assert [(c["cell"], c["old"], c["new"]) for c in f] == [("B7:B8", "=A7*B$2", "=A7*B$2*1.1")]
    total = next(c for c in cs if c["cell"] == "B9")
    # (1 + 2)·9.5·0.1 = 2.85 kN, all of it from the one edit put back whole (by hand)
    assert total["causes"] == ["Design!B7:B8"] and total["delta"] == pytest.approx(2.85)
    assert total["shares"][0]["share"] == pytest.approx(1.0)


def test_moved_results_of_one_copied_down_formula_read_as_one(tmp_path):
    new = dict(BASE, **{"Design!B2": 10})
    d, cs = changes(tmp_path, BASE, new)
    # JSON keeps every cell; the reports group B7:B8 (one formula copied down, one cause)
    assert [c["cell"] for c in cs if c["kind"] == "result"] == ["B3", "B4", "B7", "B8", "B9"]
    text = render_html(d)
    assert "2 cells of one copied-down formula" in text
    assert "`Design!B7:B8` (2 cells of one copied-down formula)" in to_markdown(d)


def test_a_deleted_row_is_the_cause_of_the_total_it_fed(tmp_path):
    old = shift_rows(BASE, 8)
    old["Design!A8"] = 1.5
    old["Design!B8"] = "=A8*B$2"
    old["Design!B10"] = "=SUM(B7:B9)"
    d, cs = changes(tmp_path, old, BASE)
    # OLD's SUM(B7:B9) less its row 8 is NEW's SUM(B7:B8): no formula change; the total
    # moved by −1.5 × 9.5 = −14.25 kN (by hand), and the deletion (OLD's 8:8) is its cause
    assert brief(cs) == [
        ("result", "cell", "Design", "B9", 42.75, 28.5, ["Design!8:8"]),
        ("deleted", "row", "Design", "8:8", "1.5 | =A8*B$2", None, None),
    ]
    assert "cannot be put back" in cs[0]["note"] and cs[0]["shares"][0]["effect"] is None


def test_a_volatile_result_is_said_to_be_volatile(tmp_path):
    cells = dict(BASE, **{"Design!A11": "Drawn at random", "Design!B11": "=RAND()"})
    d, cs = changes(tmp_path, cells, cells, old_edit={"Design!B11": 0.25})
    c = next(c for c in cs if c["cell"] == "B11")
    assert c["kind"] == "unexplained" and c["status"] == Status.VOLATILE
    assert "moves at every recalculation" in c["note"]
