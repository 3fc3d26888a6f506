"""A per-workbook budget (--max-seconds, --max-memory) on check, recalc and audit: past it
the run stops cleanly, the workbook is reported too large (exit 2) and nothing is written.

Fixtures are workbooks of our own built with openpyxl; budgets are made tiny so that they
trip on any machine, and each has a clean twin that passes with the default budget."""

import json
import threading
import time
from pathlib import Path

import pytest

from joulebook.faces.cli import main
from joulebook.faces.workbook.budget import (
    DEFAULT_SECONDS,
    Budget,
    TooLarge,
    default_memory,
    parse_memory,
    run_within,
)
from joulebook.faces.workbook.status import Status
from wbtools import build


def _slow_book(path: Path) -> Path:
    """A workbook whose recalculation takes well over a second: 400 SUMPRODUCTs over 20,000
    numbers each."""
    cells: dict = {f"S!A{r}": float(r % 97) for r in range(1, 20_001)}
    for r in range(1, 401):
        cells[f"S!C{r}"] = f"=SUMPRODUCT($A$1:$A$20000,$A$1:$A$20000)+{r}"
    return build(path, cells)


def _small_book(path: Path) -> Path:
    return build(path, {"S!A1": 2.0, "S!B1": "=A1*3"})


@pytest.fixture(scope="module")
def slow_book(tmp_path_factory) -> Path:
    return _slow_book(tmp_path_factory.mktemp("budget") / "slow.xlsx")


def test_check_stops_past_max_seconds_and_reports_too_large(slow_book, tmp_path, capsys):
    t0 = time.perf_counter()
    code = main(
        ["check", str(slow_book), "--max-seconds", "0.3", "--json", str(tmp_path / "r.json")]
    )
    took = time.perf_counter() - t0
    err = capsys.readouterr().err
    assert code == 2
    assert "too large to check within the budget" in err and "--max-seconds 0.3" in err
    assert took < 30  # stopped, not run to the end (the full run takes far longer)
    data = json.loads((tmp_path / "r.json").read_text())
    (wb,) = data["workbooks"]
    assert wb["exit"] == 2 and wb["status"] == Status.TOO_LARGE
    from importlib import resources

    import jsonschema

    schema = json.loads(
        resources.files("joulebook.faces.workbook").joinpath("check.schema.json").read_text()
    )
    jsonschema.Draft202012Validator(schema).validate(data)  # the shipped schema holds it


def test_check_stops_past_max_memory(tmp_path, capsys):
    book = _small_book(tmp_path / "small.xlsx")
    assert main(["check", str(book), "--max-memory", "1M"]) == 2
    err = capsys.readouterr().err
    assert "too large" in err and "--max-memory 1 MiB" in err


def test_clean_twin_passes_within_the_default_budget(tmp_path, capsys):
    from wbtools import with_saved

    book = with_saved(_small_book(tmp_path / "a.xlsx"), tmp_path / "b.xlsx", {"S!B1": 6.0})
    assert main(["check", str(book)]) == 0  # 2 * 3 = 6 (hand derivation)


def test_a_folder_exits_2_for_the_file_over_budget_only(slow_book, tmp_path, capsys):
    from wbtools import with_saved

    folder = tmp_path / "f"
    folder.mkdir()
    with_saved(_small_book(tmp_path / "a.xlsx"), folder / "ok.xlsx", {"S!B1": 6.0})
    (folder / "slow.xlsx").write_bytes(slow_book.read_bytes())
    out = tmp_path / "r.json"
    code = main(["check", str(folder), "-j", "1", "--max-seconds", "0.5", "--json", str(out)])
    assert code == 2
    books = {Path(b["workbook"]).name: b for b in json.loads(out.read_text())["workbooks"]}
    assert books["ok.xlsx"]["exit"] == 0 and books["slow.xlsx"]["exit"] == 2
    assert books["slow.xlsx"]["status"] == "too large"


def test_recalc_over_budget_writes_nothing(slow_book, tmp_path, capsys):
    out = tmp_path / "out.xlsx"
    assert main(["recalc", str(slow_book), "-o", str(out), "--max-seconds", "0.3"]) == 2
    assert not out.exists()
    assert "too large" in capsys.readouterr().err
    small = _small_book(tmp_path / "s.xlsx")
    assert main(["recalc", str(small), "-o", str(out), "--max-memory", "1M"]) == 2
    assert not out.exists()
    assert main(["recalc", str(small), "-o", str(out)]) == 0 and out.exists()  # clean twin


def test_audit_over_budget_writes_nothing(slow_book, tmp_path, capsys):
    out = tmp_path / "a.html"
    assert main(["audit", str(slow_book), "-o", str(out), "--max-seconds", "0.3"]) == 2
    assert not out.exists() and "too large" in capsys.readouterr().err
    small = _small_book(tmp_path / "s.xlsx")
    assert main(["audit", str(small), "-o", str(out)]) == 0 and out.exists()  # clean twin


@pytest.mark.parametrize(
    "args, words",
    [
        (["--max-seconds", "0"], "--max-seconds = 0"),
        (["--max-seconds", "nan"], "--max-seconds = nan"),
        (["--max-memory", "lots"], "--max-memory 'lots'"),
        (["--max-memory=-5G"], "--max-memory '-5G'"),
    ],
)
def test_a_budget_that_is_no_budget_is_refused_by_name(tmp_path, capsys, args, words):
    book = _small_book(tmp_path / "s.xlsx")
    assert main(["check", str(book), *args]) == 2
    err = capsys.readouterr().err
    assert words in err and "above 0" in err


def test_memory_sizes_and_defaults():
    assert parse_memory("800") == 800 * 2**20  # a plain number is MiB
    assert parse_memory("2G") == parse_memory("2GiB") == 2 * 2**30
    assert parse_memory("1.5g") == int(1.5 * 2**30)
    assert parse_memory("512K") == 512 * 2**10
    assert DEFAULT_SECONDS == 600
    assert default_memory(4) <= default_memory(1) and default_memory(64) >= 256 * 2**20


def test_a_loop_that_swallows_exceptions_is_still_stopped():
    def spin():
        while True:
            try:
                sum(range(1000))
            except Exception:  # a handler of a failed formula: must not keep the run alive
                pass

    t0 = time.perf_counter()
    with pytest.raises(TooLarge, match="--max-seconds 0.2"):
        run_within(Budget(max_seconds=0.2), spin)
    assert time.perf_counter() - t0 < 5
    time.sleep(0.3)  # nothing raised later in this thread once the run has returned
    assert threading.active_count() >= 1


def test_work_within_budget_returns_its_value_and_raises_its_own_errors():
    assert run_within(Budget(max_seconds=5), sorted, [3, 1, 2]) == [1, 2, 3]
    with pytest.raises(ZeroDivisionError):
        run_within(Budget(max_seconds=5), lambda: 1 / 0)
    with pytest.raises(ValueError, match="max_seconds = -1"):
        Budget(max_seconds=-1)


def test_diff_and_sensitivity_keep_the_budget_of_every_verb(slow_book, tmp_path, capsys):
    # the slow workbook compared with itself and analysed: both stop past 0.3 s, exit 2,
    # nothing written; the clean twin (a small workbook) runs within the same budget
    out = tmp_path / "d.json"
    t0 = time.perf_counter()
    assert (
        main(["diff", str(slow_book), str(slow_book), "--json", str(out), "--max-seconds", "0.3"])
        == 2
    )
    assert main(["sensitivity", str(slow_book), "--json", str(out), "--max-seconds", "0.3"]) == 2
    assert time.perf_counter() - t0 < 60 and not out.exists()
    err = capsys.readouterr().err
    assert err.count("too large to check within the budget") == 2
    small = _small_book(tmp_path / "small.xlsx")
    assert main(["diff", str(small), str(small), "--max-seconds", "30"]) == 0
    assert main(["sensitivity", str(small), "--json", str(out), "--max-seconds", "30"]) == 0
    assert main(["sensitivity", str(small), "--max-memory", "nonsense"]) == 2
