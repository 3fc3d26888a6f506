"""The workbook face on fixture workbooks built with openpyxl in the tests.

Expected numbers come from the same catalog functions called directly (the engine must agree
with the Python face exactly) and from Excel's built-in semantics (common practice).
"""

import hashlib
import re
import zipfile
from pathlib import Path

import openpyxl
import pytest
from openpyxl.workbook.defined_name import DefinedName
from openpyxl.worksheet.formula import ArrayFormula

import joulebook
from joulebook.core.errors import BadInput
from joulebook.faces.cli import main
from joulebook.faces.workbook.engine import Engine
from joulebook.faces.workbook.reader import Limits, read_book
from joulebook.faces.workbook.writer import patch_sheet_xml
from wbtools import rewrite_part


def _sha(p: Path) -> str:
    return hashlib.sha256(p.read_bytes()).hexdigest()


def _make(path: Path) -> Path:
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Inputs"
    ws["A1"], ws["B1"] = "mass", 2.5
    ws["A2"], ws["B2"] = "P", 101.325
    ws["A3"], ws["B3"] = "label <script>x</script>", None
    for r in range(5, 15):
        ws[f"A{r}"] = 10.0 * (r - 4)
        ws[f"B{r}"] = f'=JB_PROP("water","h in kJ/kg","T in degC",A{r},"P in kPa",$B$2)'
        ws[f"C{r}"] = f"=ROUND(B{r},3)"
    ws["D1"] = '=JB_PROP("water","h","T in degC",5000,"P in kPa",B2)'
    ws["D2"] = '=IFERROR(D1*1,"flagged")'
    ws["D3"] = "=INDEX(B5:B14,MATCH(50,A5:A14,0))"
    ws["D4"] = "=1/0"
    ws["E1"] = ArrayFormula(
        "E1:E3", '=JB_PROP("water","h in kJ/kg","T in degC",A5:A7,"P in kPa",101.325)'
    )
    calc = wb.create_sheet("Calc Sheet")
    calc["A1"] = "=SUM(Inputs!B5:B14)"
    calc["A2"] = '=Inputs!B1*JB_GAS_DELTA_U("air",300,400)'
    calc["A3"] = "=pressure*2"
    calc["A4"] = "=JB_WORK_PV(Inputs!A5:A8,Inputs!A5:A8)"
    calc["A5"] = "=A6+1"
    calc["A6"] = "=A5+1"
    wb.defined_names["pressure"] = DefinedName("pressure", attr_text="Inputs!$B$2")
    wb.save(path)
    return path


@pytest.fixture(scope="module")
def fixture_book(tmp_path_factory) -> Path:
    return _make(tmp_path_factory.mktemp("wb") / "fixture.xlsx")


@pytest.fixture(scope="module")
def recalculated(fixture_book, tmp_path_factory) -> Path:
    out = tmp_path_factory.mktemp("out") / "fresh.xlsx"
    before = _sha(fixture_book)
    assert main(["recalc", str(fixture_book), "-o", str(out)]) == 0
    assert _sha(fixture_book) == before  # the input is never touched
    return out


def test_engine_agrees_with_the_python_face(fixture_book):
    book = read_book(fixture_book)
    out = Engine(book).run()
    call = joulebook.call
    for r in range(5, 15):
        want = call(
            "JB_PROP", "water", "h in kJ/kg", "T in degC", 10.0 * (r - 4), "P in kPa", 101.325
        )
        assert out[("Inputs", r, 2)].value == want
        assert out[("Inputs", r, 3)].value == round(want, 3)
    assert out[("Inputs", 1, 4)].value.startswith("OutOfRange: water: T = 5000 degC")
    assert out[("Inputs", 2, 4)].value == "flagged"  # text in arithmetic is #VALUE!, as in Excel
    assert out[("Inputs", 3, 4)].value == out[("Inputs", 9, 2)].value  # INDEX/MATCH
    assert out[("Inputs", 4, 4)].value == ("error", "#DIV/0!")
    for i in range(3):  # array formula spilled over E1:E3
        assert out[("Inputs", 1 + i, 5)].value == out[("Inputs", 5 + i, 2)].value
    assert out[("Calc Sheet", 1, 1)].value == pytest.approx(
        sum(out[("Inputs", r, 2)].value for r in range(5, 15))
    )
    assert out[("Calc Sheet", 2, 1)].value == pytest.approx(
        2.5 * call("JB_GAS_DELTA_U", "air", 300, 400)
    )
    assert out[("Calc Sheet", 3, 1)].value == pytest.approx(202.65)  # defined name
    assert out[("Calc Sheet", 5, 1)].problem == "circular reference"


def test_check_reports_missing_values_then_passes_after_recalc(
    fixture_book, recalculated, tmp_path
):
    before = _sha(fixture_book), _sha(recalculated)
    assert main(["check", str(fixture_book)]) == 1  # openpyxl saves no values
    rep = tmp_path / "r.json"
    junit = tmp_path / "r.xml"
    code = main(["check", str(recalculated), "--json", str(rep), "--junit", str(junit)])
    import json

    (data,) = json.loads(rep.read_text())["workbooks"]  # one workbook: a list of one
    open_ = {(c["sheet"], c["cell"]): c["status"] for c in data["cells"] if c["status"] != "pass"}
    # left: the deliberate cycle, the out-of-range call in D1 (a joulebook error fails
    # the check even though the file saved the same text) and D4 = 1/0 (an error value is
    # no pass, even saved alike); the spill cells E2:E3 that openpyxl wrote no <c> element
    # for were inserted by the writer, so they hold values now; D2 = IFERROR(D1*1, …)
    # swallows D1's refusal: "refusal used" (design §3)
    assert open_ == {
        ("Calc Sheet", "A5"): "circular",
        ("Calc Sheet", "A6"): "circular",
        ("Inputs", "D1"): "error",
        ("Inputs", "D2"): "refusal used",
        ("Inputs", "D4"): "error value",
    }
    assert code == 1
    assert data["summary"]["circular"] == 2 and data["summary"]["saved_error_values"] == 1
    xml = junit.read_text()
    assert 'errors="2"' in xml and 'failures="3"' in xml
    assert (_sha(fixture_book), _sha(recalculated)) == before  # check never writes its input


def test_check_catches_a_wrong_saved_value(recalculated, tmp_path):
    bad = rewrite_part(
        recalculated,
        tmp_path / "tampered.xlsx",
        "xl/worksheets/sheet1.xml",
        lambda x: patch_sheet_xml(x, {(6, 2): 999.0}),  # Inputs!B6
    )
    rows_json = tmp_path / "t.json"
    assert main(["check", str(bad), "--json", str(rows_json)]) == 1
    import json

    differs = [
        c
        for c in json.loads(rows_json.read_text())["workbooks"][0]["cells"]
        if c["status"] == "differs"
    ]
    assert [(c["sheet"], c["cell"]) for c in differs] == [("Inputs", "B6")]


def test_recalc_patches_only_cached_values(fixture_book, recalculated):
    with zipfile.ZipFile(fixture_book) as a, zipfile.ZipFile(recalculated) as b:
        assert a.namelist() == b.namelist()
        for name in a.namelist():
            if name.startswith("xl/worksheets/"):
                old, new = a.read(name), b.read(name)

                def strip(x):
                    x = re.sub(rb"<v>.*?</v>|<v\s*/>|\s+t=\"[^\"]*\"", b"", x)
                    return re.sub(rb'<c r="[A-Z]+\d+"></c>', b"", x)  # spill cells the writer added

                assert strip(old) == strip(new)  # formulas, styles, everything else kept
            elif name != "xl/workbook.xml":
                assert a.read(name) == b.read(name)
    # the recalculated copy opens in openpyxl with values and formulas
    wb = openpyxl.load_workbook(recalculated, data_only=True)
    assert wb["Inputs"]["B5"].value == pytest.approx(
        joulebook.call("JB_PROP", "water", "h in kJ/kg", "T in degC", 10, "P in kPa", 101.325)
    )
    assert openpyxl.load_workbook(recalculated)["Inputs"]["B5"].value.startswith("=JB_PROP(")


def test_recalc_refuses_to_overwrite(fixture_book, recalculated, capsys):
    assert main(["recalc", str(fixture_book), "-o", str(recalculated)]) == 2
    assert "--force" in capsys.readouterr().err
    assert main(["recalc", str(fixture_book), "-o", str(fixture_book), "--force"]) == 2


def test_addin_linked_formulas_are_ours(tmp_path):
    p = _make(tmp_path / "a.xlsx")
    q = rewrite_part(
        p,
        tmp_path / "linked.xlsx",
        "xl/worksheets/sheet1.xml",
        lambda x: x.replace(b"JB_PROP(", b"[1]!JB_PROP("),
    )
    out = Engine(read_book(q)).run()
    assert isinstance(out[("Inputs", 5, 2)].value, float)


def test_unusable_input(tmp_path, capsys):
    csv = tmp_path / "data.xlsx"
    csv.write_text("a,b\n1,2\n")
    assert main(["check", str(csv)]) == 2
    assert "looks like CSV" in capsys.readouterr().err
    with pytest.raises(BadInput, match="limit"):
        read_book(_make(tmp_path / "b.xlsx"), Limits(max_cells=5))


def test_batched_columns_equal_cell_by_cell(fixture_book, tmp_path):
    import sys

    sys.path.insert(0, str(Path(__file__).parent / "bench"))
    from bench_engine import build

    big = tmp_path / "cols.xlsx"
    build(big, 400)
    for path in (fixture_book, big):
        book = read_book(path)
        fast, slow = Engine(book).run(), Engine(book, batch=False).run()
        assert fast.keys() == slow.keys()
        for k in fast:
            assert fast[k].value == slow[k].value, k


def test_shared_formulas_are_expanded(tmp_path):
    # Excel writes a column of copied formulas once, as a shared formula; openpyxl does not,
    # so the fixture is rewritten into that form here.
    p = _make(tmp_path / "s.xlsx")

    def share(m):
        r = int(m.group(1))
        if r == 5:
            return b'<c r="C5"><f t="shared" ref="C5:C14" si="0">ROUND(B5,3)</f><v></v></c>'
        return b'<c r="C%d"><f t="shared" si="0"/><v></v></c>' % r

    def to_shared(data):
        data = re.sub(rb'<c r="C(\d+)"><f>ROUND\(B\d+,3\)</f><v\s*/?>(?:</v>)?</c>', share, data)
        assert data.count(b't="shared"') == 10
        return data

    q = rewrite_part(p, tmp_path / "shared.xlsx", "xl/worksheets/sheet1.xml", to_shared)
    book = read_book(q)
    assert book.cells[("Inputs", 9, 3)].formula == "ROUND(B9,3)"
    out = Engine(book).run()
    assert out[("Inputs", 9, 3)].value == round(out[("Inputs", 9, 2)].value, 3)


def test_strict_check_relaxed_by_name_and_its_exit_codes(recalculated, tmp_path, capsys):
    # D1 holds an out-of-range joulebook error; A5/A6 are a deliberate cycle
    assert main(["check", str(recalculated), "--allow-errors"]) == 1  # the cycle still fails
    out = capsys.readouterr().out
    assert "relaxed: errors allowed" in out and "rtol=1e-09" in out
    assert "\nInputs!D1 " not in out  # relaxed: no row of its own
    # D2 = IFERROR(D1*1, …) swallows D1's refusal: a row with its reason, naming D1
    assert "\nInputs!D2 " in out and "holds the refusal 'OutOfRange" in out
    reports = tmp_path / "reports" / "deep"  # output folders are created
    code = main(
        [
            "check",
            str(recalculated),
            "--junit",
            str(reports / "x.xml"),
            "--json",
            str(reports / "x.json"),
        ]
    )
    assert code == 1 and (reports / "x.xml").exists() and (reports / "x.json").exists()
    assert main(["check", str(tmp_path / "missing.xlsx")]) == 2
    assert "missing.xlsx" in capsys.readouterr().err
    with pytest.raises(SystemExit) as e:
        main(["check"])  # usage error
    assert e.value.code == 2


def test_an_internal_failure_exits_3_with_its_message(recalculated, monkeypatch, capsys):
    import joulebook.faces.workbook.check as check

    def broken(*a, **k):
        raise RuntimeError("simulated defect")

    monkeypatch.setattr(check, "compare", broken)
    assert main(["check", str(recalculated)]) == 3
    err = capsys.readouterr().err
    assert "internal error (RuntimeError): simulated defect" in err and "Traceback" not in err


def _mixed_folder(recalculated: Path, tmp_path: Path) -> Path:
    """calcs/: fresh, stale and error-holding workbooks beside unreadable ones."""
    import shutil

    from test_hardening import _encrypted, _legacy_xls
    from wbtools import build, with_saved

    calcs = tmp_path / "calcs"
    (calcs / "sub").mkdir(parents=True)
    fresh = with_saved(
        build(tmp_path / "f.xlsx", {"S!A1": 2.0, "S!B1": "=A1*3"}),
        calcs / "fresh.xlsx",
        {"S!B1": 6.0},
    )
    with_saved(
        build(tmp_path / "s.xlsx", {"S!A1": 2.0, "S!B1": "=A1*3"}),
        calcs / "sub" / "stale.xlsx",
        {"S!B1": 5.0},
    )
    shutil.copy(recalculated, calcs / "errors.xlsx")  # holds an out-of-range joulebook cell
    (calcs / "corrupt.xlsx").write_bytes(b"PK\x03\x04 not really a zip")
    (calcs / "table.xlsx").write_text("a,b\n1,2\n")  # a CSV renamed
    (calcs / "locked.xlsx").write_bytes(_encrypted())  # password-protected
    (calcs / "sub" / "old.xls").write_bytes(_legacy_xls())
    shutil.copy(fresh, calcs / "~$fresh.xlsx")  # Excel's lock file: skipped
    return calcs


_MIXED_EXITS = {
    "fresh.xlsx": 0,
    "stale.xlsx": 1,
    "errors.xlsx": 1,
    "corrupt.xlsx": 2,
    "table.xlsx": 2,
    "locked.xlsx": 2,
    "old.xls": 2,
}


def test_check_a_folder_of_mixed_workbooks_in_two_processes(recalculated, tmp_path, capsys):
    import json

    calcs = _mixed_folder(recalculated, tmp_path)
    out = tmp_path / "reports"
    code = main(
        [
            "check",
            str(calcs),
            "-j",
            "2",
            "--json",
            str(out / "all.json"),
            "--junit",
            str(out / "all.xml"),
            "--summary",
            str(out / "summary.md"),
            "--sarif",
            str(out / "check.sarif"),
        ]
    )
    assert code == 2  # an input could not be read; the others were still checked
    text = capsys.readouterr()
    assert "corrupt.xlsx: a damaged zip package" in text.err
    assert "table.xlsx: text (it looks like CSV)" in text.err
    assert "locked.xlsx: password-protected" in text.err
    assert "old.xls: a legacy binary .xls workbook" in text.err
    assert "7 workbooks: 1 hold, 2 fail, 4 could not be checked" in text.out
    assert "workbooks/s" not in text.err  # no progress bar when stderr is not a terminal
    data = json.loads((out / "all.json").read_text())
    exits = {Path(w["workbook"]).name: w["exit"] for w in data["workbooks"]}
    assert exits == _MIXED_EXITS
    xml = (out / "all.xml").read_text()
    assert xml.count("<testsuite ") == 7 and "<testsuites>" in xml
    assert "| stale.xlsx | fails |" in (out / "summary.md").read_text()
    # SARIF 2.1.0 (OASIS): one result per failing cell or unreadable workbook
    sarif = json.loads((out / "check.sarif").read_text())
    run = sarif["runs"][0]
    assert sarif["version"] == "2.1.0" and len(run["artifacts"]) == 7
    texts = [r["locations"][0]["physicalLocation"].get("region", {}) for r in run["results"]]
    assert {"text": "S!B1"} in [t.get("message") for t in texts]  # the stale cell
    assert sorted(r["ruleId"] for r in run["results"]).count("unreadable") == 4
    rules = [d["id"] for d in run["tool"]["driver"]["rules"]]
    assert all(rules[r["ruleIndex"]] == r["ruleId"] for r in run["results"])
    # the same verdicts in one process, and for the two good ones alone
    assert main(["check", str(calcs / "fresh.xlsx"), str(calcs / "sub" / "*.xlsx"), "-j", "1"]) == 1
    assert main(["check", str(calcs / "fresh.xlsx")]) == 0
    assert main(["check", str(tmp_path / "nothing-*.xlsx")]) == 2


def test_check_on_a_dask_cluster_gives_the_local_verdicts(
    recalculated, tmp_path, capsys, monkeypatch
):
    import json

    distributed = pytest.importorskip("distributed")  # in the test extras: never skipped in CI
    calcs = _mixed_folder(recalculated, tmp_path)
    local, remote = tmp_path / "local", tmp_path / "remote"
    args = ["check", str(calcs), "--rtol", "1e-9"]
    reports = (
        "--json",
        "all.json",
        "--junit",
        "all.xml",
        "--sarif",
        "c.sarif",
        "--summary",
        "s.md",
    )

    def outputs(folder):
        return [a if a.startswith("--") else str(folder / a) for a in reports]

    assert main([*args, "-j", "2", *outputs(local)]) == 2
    with distributed.LocalCluster(
        n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None
    ) as cluster:
        assert main([*args, "--cluster", cluster.scheduler_address, *outputs(remote)]) == 2
    capsys.readouterr()
    for name in ("all.json", "all.xml", "c.sarif", "s.md"):
        assert (local / name).read_text() == (remote / name).read_text(), name
    exits = {
        Path(w["workbook"]).name: w["exit"]
        for w in json.loads((remote / "all.json").read_text())["workbooks"]
    }
    assert exits == _MIXED_EXITS
    # no cluster there: a usage error that names the address, never a traceback
    monkeypatch.setattr("joulebook.faces.cli._CLUSTER_CONNECT", "2s")
    assert main(["check", str(calcs / "fresh.xlsx"), "--cluster", "tcp://127.0.0.1:9"]) == 2
    err = capsys.readouterr().err
    assert "tcp://127.0.0.1:9" in err and "Traceback" not in err


def test_progress_bar_only_on_a_terminal_and_never_with_quiet(monkeypatch):
    import io

    from joulebook.faces.cli import _Bar

    class Terminal(io.StringIO):
        def isatty(self):
            return True

    for quiet, shown in ((False, True), (True, False)):
        err = Terminal()
        monkeypatch.setattr("sys.stderr", err)
        bar = _Bar(3, "workbooks", quiet, least=2)
        for _ in range(3):
            bar.step()
        bar.close()
        assert ("3/3" in err.getvalue() and "workbooks" in err.getvalue()) is shown
    err = io.StringIO()  # a CI log: not a terminal
    monkeypatch.setattr("sys.stderr", err)
    bar = _Bar(3, "workbooks")
    bar.step()
    bar.close()
    assert err.getvalue() == ""
