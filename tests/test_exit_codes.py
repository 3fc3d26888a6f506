"""Exit codes that tell the truth (issue 34, items 3 and 5): every row of docs/ci.md's table
has its cases here, each with a workbook or file of our own, and the table and the cases are
the same list.  Reports are atomic and never written over an input or another output."""

import errno
import json
import os
import socket
import subprocess
import sys
import zipfile
from pathlib import Path

import pytest

from handmade import _book, _sheet
from joulebook.faces.cli import main

ROOT = Path(__file__).resolve().parents[1]


def _sha(p: Path) -> bytes:
    import hashlib

    return hashlib.sha256(p.read_bytes()).digest()


def _fresh(tmp: Path) -> Path:
    """The hand-made sheet with its saved values right (500 kJ, TRUE): it holds."""
    return _book(
        tmp,
        "fresh.xlsx",
        _sheet().replace(b"<v>30</v>", b"<v>500</v>").replace(b"<v>0</v>", b"<v>1</v>"),
    )


def _stale(tmp: Path) -> Path:
    return _book(tmp, "stale.xlsx", _sheet())  # 30 and FALSE saved: two cells differ


def _code(argv) -> int:
    try:
        return main([str(a) for a in argv])
    except SystemExit as e:  # argparse's usage errors
        return int(e.code)


# every case: (the table's case, argv builder, expected exit, words the stderr must hold)
def _holds(tmp):
    src = _fresh(tmp)
    return [
        (["check", src], ""),
        (["recalc", src, "-o", tmp / "o.xlsx"], ""),
        (["audit", src, "-o", tmp / "a.html"], ""),
    ]


def _fails(tmp):
    return [(["check", _stale(tmp)], "")]


def _usage(tmp):
    src = _fresh(tmp)
    return [
        (["check", src, "--no-such-option"], "unrecognized arguments"),
        (["check", src, "--rtol", "nan"], "not a finite number"),
        (["check", tmp / "nothing-*.xlsx"], "no such workbook"),
    ]


def _unreadable(tmp):
    fifo = tmp / "pipe.xlsx"
    os.mkfifo(fifo)
    dev = tmp / "zero.xlsx"
    dev.symlink_to("/dev/zero")
    loop = tmp / "loop.xlsx"
    loop.symlink_to(tmp / "loop2.xlsx")
    (tmp / "loop2.xlsx").symlink_to(loop)
    sock_path = tmp / "sock.xlsx"
    sock = socket.socket(socket.AF_UNIX)
    sock.bind(str(sock_path))
    folder = tmp / "folder-of-fifo"
    folder.mkdir()
    os.mkfifo(folder / "inside.xlsx")
    csv = tmp / "data.xlsx"
    csv.write_text("P,V\n250,2\n")
    bad_int = _book(
        tmp,
        "badint.xlsx",
        _sheet().replace(b'<c r="B3"><v>2</v></c>', b'<c r="B3" t="s"><v>two</v></c>'),
    )
    return [
        (["check", tmp / "missing.xlsx"], "missing.xlsx: cannot read: No such file or directory"),
        (["check", fifo], "named pipe (FIFO)"),
        (["check", folder], "named pipe (FIFO)"),
        (["check", dev], "a device"),
        (["check", loop], "a loop of symbolic links"),
        (["check", sock_path], "a socket"),
        (["recalc", fifo, "-o", tmp / "o.xlsx"], "named pipe (FIFO)"),
        (["audit", dev, "-o", tmp / "o.html"], "a device"),
        (["check", csv], "looks like CSV"),
        (["check", bad_int], "badint.xlsx"),
        (["recalc", bad_int, "-o", tmp / "o.xlsx"], "badint.xlsx"),
    ]


def _over_a_limit(tmp):
    long = "+".join(["B2"] * 2_800)  # 8,399 characters
    deep = "(" * 65 + "B2" + ")" * 65
    return [
        (
            [
                "check",
                _book(
                    tmp,
                    "arr.xlsx",
                    _sheet().replace(b"<f>B2*B3</f>", b'<f t="array" ref="B4:B300000">B2*B3</f>'),
                ),
            ],
            "declares 299,997 cells",
        ),
        (
            ["check", _book(tmp, "long.xlsx", _sheet().replace(b"B2*B3", long.encode()))],
            "Sheet!B4: formula of 8,399 characters; the limit is 8,192",
        ),
        (
            [
                "recalc",
                _book(tmp, "deep.xlsx", _sheet().replace(b"B2*B3", deep.encode())),
                "-o",
                tmp / "o.xlsx",
            ],
            "nests more than 64 levels",
        ),
    ]


def _unwritable(tmp):
    src = _fresh(tmp)
    exists = tmp / "exists.xlsx"
    exists.write_bytes(b"old")
    return [
        (["recalc", src, "-o", exists], "exists; use --force"),
        (["check", src, "--json", src], "--json"),
        (["check", src, "--junit", tmp / "r.xml", "--sarif", tmp / "r.xml"], "name the same file"),
        (["recalc", src, "-o", tmp / "o.xlsx", "--json", tmp / "o.xlsx"], "name the same file"),
        (["recalc", src, "-o", tmp / "no" / "such" / "o.xlsx"], "does not exist"),
        (["audit", src, "-o", tmp / "a.html", "--json", src], "is the input workbook"),
    ]


def _cluster(tmp):
    return []  # its own test below (a Dask cluster with no worker)


def _defect(tmp):
    return []  # their own tests below (planted defects)


CASES = {
    (0, "holds"): _holds,
    (1, "fails"): _fails,
    (2, "usage"): _usage,
    (2, "unreadable input"): _unreadable,
    (2, "over a limit"): _over_a_limit,
    (2, "unwritable output"): _unwritable,
    (2, "cluster"): _cluster,
    (3, "defect"): _defect,
}


def test_the_table_in_docs_ci_is_the_list_of_cases():
    text = (ROOT / "docs" / "ci.md").read_text(encoding="utf-8")
    table = text.split("## Exit codes", 1)[1].split("\n\n", 3)[2]
    rows = [ln.split("|")[1:3] for ln in table.splitlines() if ln.startswith("| ")]
    listed = {(int(a), b.strip()) for a, b in rows[1:] if a.strip().isdigit()}
    assert listed == set(CASES)


@pytest.mark.parametrize("case", [c for c in CASES if c[1] not in ("cluster", "defect")])
def test_each_row_of_the_table(tmp_path, case, capsys):
    code, _name = case
    for argv, words in CASES[case](tmp_path):
        inputs = [a for a in argv[1:2] if isinstance(a, Path) and a.is_file()]
        before = [_sha(p) for p in inputs]
        got = _code(argv)
        err = capsys.readouterr().err
        assert got == code, (argv, err)
        assert words in err, (argv, err)
        assert "Traceback" not in err
        assert [_sha(p) for p in inputs] == before  # the input never changes


def test_a_lost_cluster_is_exit_2_naming_what_was_not_checked(tmp_path, capsys):
    distributed = pytest.importorskip("distributed")  # in the test extras: never skipped in CI
    src = _fresh(tmp_path)
    with distributed.LocalCluster(
        n_workers=0, processes=False, dashboard_address=None
    ) as cluster:  # a scheduler whose workers are all gone
        argv = ["check", src, "--cluster", cluster.scheduler_address, "--cluster-wait", "1"]
        assert _code(argv + ["--json", tmp_path / "r.json"]) == 2
    err = capsys.readouterr().err
    assert "fresh.xlsx: not checked: the cluster" in err and "no result for 1 s" in err
    report = json.loads((tmp_path / "r.json").read_text())
    assert report["workbooks"][0]["exit"] == 2 if "workbooks" in report else report["exit"] == 2


def test_an_internal_failure_is_exit_3_with_a_message(tmp_path, monkeypatch, capsys):
    from joulebook.faces.workbook import engine

    src = _fresh(tmp_path)

    def broken(self):
        raise RuntimeError("planted defect")

    monkeypatch.setattr(engine.Engine, "run", broken)
    assert _code(["check", src, "--junit", tmp_path / "r.xml"]) == 3
    err = capsys.readouterr().err
    assert "internal error (RuntimeError): planted defect" in err and "Traceback" not in err
    assert 'errors="1"' in (tmp_path / "r.xml").read_text()
    monkeypatch.undo()
    assert _code(["check", src]) == 0  # the clean twin


# ---------------------------------------------------------------------------------------
# a closed stdout, names of any bytes, atomic and guarded reports


def test_a_closed_stdout_changes_neither_the_exit_code_nor_the_reports(tmp_path):
    folder = tmp_path / "calcs"
    folder.mkdir()
    _stale(folder)  # and its base, which holds: two workbooks
    r, w = os.pipe()
    os.close(r)  # the reader is gone before a byte is written (`| head -0`)
    proc = subprocess.run(
        [
            sys.executable,
            "-m",
            "joulebook",
            "check",
            str(folder),
            "--json",
            str(tmp_path / "r.json"),
            "--junit",
            str(tmp_path / "r.xml"),
        ],
        stdout=w,
        stderr=subprocess.PIPE,
        timeout=300,
    )
    os.close(w)
    assert proc.returncode == 1, proc.stderr  # the stale workbook fails
    assert b"Traceback" not in proc.stderr and b"Exception ignored" not in proc.stderr
    books = json.loads((tmp_path / "r.json").read_text())["workbooks"]
    assert sorted((Path(b["workbook"]).name, b["exit"]) for b in books) == [
        ("base-stale.xlsx", 0),
        ("stale.xlsx", 1),
    ]
    assert "<testsuite" in (tmp_path / "r.xml").read_text()


def test_a_file_name_that_is_not_utf8_is_checked_and_reported(tmp_path, capsys):
    name = os.fsdecode(b"caf\xe9|\nrow.xlsx")  # Latin-1 é, a pipe and a newline
    folder = tmp_path / "calcs"
    folder.mkdir()
    src = _stale(tmp_path)
    (folder / name).write_bytes(src.read_bytes())
    outs = {k: tmp_path / f"r.{k}" for k in ("json", "junit", "summary", "sarif")}
    argv = ["check", folder] + [x for k, p in outs.items() for x in (f"--{k}", p)]
    assert _code(argv) == 1
    book = json.loads(outs["json"].read_text())["workbooks"][0]
    assert book["workbook"].endswith("caf\\xe9|\nrow.xlsx")
    assert "caf\\xe9" in outs["junit"].read_text()
    sarif = json.loads(outs["sarif"].read_text())
    uri = sarif["runs"][0]["artifacts"][0]["location"]["uri"]
    assert uri.endswith("/caf%E9%7C%0Arow.xlsx") and " " not in uri
    table = outs["summary"].read_text().splitlines()
    assert len(table) == 3 and "caf\\\\xe9\\| row.xlsx" in table[2]  # one row, | escaped


def test_a_full_disk_leaves_the_old_report_and_names_the_target(tmp_path, monkeypatch, capsys):
    import joulebook.faces.files as files

    src = _stale(tmp_path)
    rep = tmp_path / "r.json"
    rep.write_text("old report")
    real = os.fsync

    def full(fd):
        raise OSError(errno.ENOSPC, "No space left on device")

    monkeypatch.setattr(files.os, "fsync", full)
    assert _code(["check", src, "--json", rep]) == 2
    err = capsys.readouterr().err
    assert f"cannot write {rep}: No space left on device" in err and ".joulebook-" not in err
    assert rep.read_text() == "old report"
    assert [p.name for p in tmp_path.iterdir() if p.name.startswith(".")] == []
    monkeypatch.setattr(files.os, "fsync", real)
    assert _code(["check", src, "--json", rep]) == 1  # the clean twin: written


def test_a_read_only_target_is_exit_2_naming_it(tmp_path, monkeypatch, capsys):
    import joulebook.faces.files as files

    src = _stale(tmp_path)

    def refused(*a, dir=None, **k):
        raise PermissionError(errno.EACCES, "Permission denied", str(Path(dir) / ".joulebook-x"))

    monkeypatch.setattr(files.tempfile, "mkstemp", refused)
    for argv in (
        ["check", src, "--junit", tmp_path / "ro" / "r.xml"],
        ["recalc", src, "-o", tmp_path / "o.xlsx"],
        ["audit", src, "-o", tmp_path / "a.html"],
    ):
        assert _code(argv) == 2
        err = capsys.readouterr().err
        assert f"cannot write {argv[-1]}: Permission denied" in err, err
    monkeypatch.undo()
    assert _code(["recalc", src, "-o", tmp_path / "o.xlsx"]) == 0


def test_temporary_files_of_a_killed_run_are_removed_by_the_next(tmp_path):
    src = _stale(tmp_path)
    dead = subprocess.run(
        [sys.executable, "-c", "import os; print(os.getpid())"], capture_output=True, text=True
    ).stdout.strip()
    host = "".join(ch for ch in socket.gethostname() if ch.isalnum() or ch in "-.")[:40]
    stale = tmp_path / f".joulebook-{host}-{dead}-abc.json"
    stale.write_text("{ half a rep")
    live = tmp_path / f".joulebook-{host}-{os.getppid()}-abc.json"  # a live process's
    live.write_text("in progress")
    other = tmp_path / ".joulebook-otherhost-1-abc.json"
    other.write_text("another machine's")
    assert _code(["check", src, "--json", tmp_path / "r.json"]) == 1
    assert not stale.exists() and live.exists() and other.exists()


def test_recalc_json_equal_to_the_output_is_refused_before_any_work(tmp_path, capsys):
    src = _stale(tmp_path)
    out = tmp_path / "o.xlsx"
    assert _code(["recalc", src, "-o", out]) == 0
    h = _sha(out)
    assert _code(["recalc", src, "-o", out, "--force", "--json", out]) == 2
    assert _sha(out) == h
    with zipfile.ZipFile(out) as z:  # still the workbook, not report text
        assert "xl/workbook.xml" in z.namelist()


def test_a_lone_surrogate_escape_is_read_reported_and_written(tmp_path, capsys):
    # _xD800_ (ECMA-376 Part 1, §22.9.2.19) decodes to a lone surrogate, which UTF-8 cannot
    # carry: the label and a formula showing it are read, reported and written back
    sheet = _sheet().replace(b"Receiver R-7 (invented)", b"Receiver _xD800_ R-7")
    sheet = sheet.replace(
        b"</row></sheetData>",
        b'</row><row r="6"><c r="B6" t="str"><f>A1</f><v>old</v></c></row></sheetData>',
    )
    src = _book(tmp_path, "sur.xlsx", sheet)
    outs = {k: tmp_path / f"r.{k}" for k in ("json", "junit", "summary", "sarif")}
    argv = ["check", src] + [x for k, p in outs.items() for x in (f"--{k}", p)]
    assert _code(argv) == 1  # three stale values, no internal error
    assert "Traceback" not in capsys.readouterr().err
    cells = {c["cell"]: c for c in json.loads(outs["json"].read_text())["workbooks"][0]["cells"]}
    assert cells["B6"]["recomputed"] == "Receiver \ud800 R-7"
    assert "<testsuite" in outs["junit"].read_text()
    out = tmp_path / "o.xlsx"
    assert _code(["recalc", src, "-o", out]) == 0
    with zipfile.ZipFile(out) as z:
        assert b"Receiver _xD800_ R-7" in z.read("xl/worksheets/sheet1.xml")
    assert _code(["check", out]) == 0
