"""``joulebook diff`` of two 10,000-formula revisions against ``joulebook check`` of one
(not part of the default run; target ≤ 2×).

    python tests/bench/bench_diff.py [--rows 2500] [--repeat 3]

The workbook is a scenario of our own: a heating log of ROWS rows, four formulas a row
(conversion, a rate against a global input, a conditional, a running total), and a block of
global inputs.  The revision changes one global input (it moves a quarter of the formulas),
changes the formula of one row, and inserts a row in the middle of the table.  Both revisions
are saved with their values by joulebook's own recalc.  Each command runs in its own process
(the best of ``--repeat``, the two sides interleaved so that noise hits both alike) and the
ratio is printed from this run's own figures.
"""

from __future__ import annotations

import argparse
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

_ENV = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}


def _cells(rows: int, revised: bool) -> dict:
    c = {
        "Log!H1": "Heat-up rate [K/h]",
        "Log!I1": 12.0,
        "Log!H2": "Alarm limit [degF]",
        "Log!I2": 150.0 if not revised else 155.0,
        "Log!A1": "Hour",
        "Log!B1": "Temperature [degC]",
        "Log!C1": "Temperature [degF]",
        "Log!D1": "Expected [degC]",
        "Log!E1": "Over limit [degF]",
        "Log!F1": "Running total [degC]",
    }
    out = 2
    for i in range(rows):
        if revised and i == rows // 2:  # a row inserted in the middle of the table
            c[f"Log!A{out}"] = i - 0.5
            c[f"Log!B{out}"] = 20.0 + 0.1 * i
            for col, f in _formulas(out).items():
                c[f"Log!{col}{out}"] = f
            out += 1
        c[f"Log!A{out}"] = i
        c[f"Log!B{out}"] = 20.0 + 0.1 * i
        for col, f in _formulas(out).items():
            c[f"Log!{col}{out}"] = f
        if revised and i == rows // 4:  # one row's formula changed
            c[f"Log!D{out}"] = f"=B{out}+$I$1*A{out}/60"
        out += 1
    return c


def _formulas(r: int) -> dict:
    return {
        "C": f"=B{r}*1.8+32",
        "D": f"=B2+$I$1*A{r}/60" if r > 2 else "=B2",
        "E": f"=IF(C{r}>$I$2,C{r}-$I$2,0)",
        "F": f"=F{r - 1}+B{r}" if r > 2 else f"=B{r}",
    }


def build(folder: Path, rows: int) -> tuple[Path, Path]:
    import openpyxl

    from joulebook.faces.cli import main

    paths = []
    for name, revised in (("rev_a", False), ("rev_b", True)):
        wb = openpyxl.Workbook()
        ws = wb.active
        ws.title = "Log"
        for key, v in _cells(rows, revised).items():
            ws[key.split("!")[1]] = v
        raw = folder / f"raw_{name}.xlsx"
        wb.save(raw)
        out = folder / f"{name}.xlsx"
        main(["recalc", str(raw), "-o", str(out), "--force"])
        paths.append(out)
    return paths[0], paths[1]


def _run(cmd: list[str]) -> tuple[float, subprocess.CompletedProcess]:
    t0 = time.perf_counter()
    done = subprocess.run(cmd, capture_output=True, text=True, env=_ENV)
    return time.perf_counter() - t0, done


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--rows", type=int, default=2500, help="table rows (4 formulas each)")
    ap.add_argument("--repeat", type=int, default=3)
    ns = ap.parse_args()
    exe = [sys.executable, "-m", "joulebook"]
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        a, b = build(folder, ns.rows)
        js = folder / "diff.json"
        check = exe + ["check", "-q", str(b)]
        diff = exe + ["diff", str(a), str(b), "--json", str(js), "--force"]
        _run(check), _run(diff)  # warm-up: bytecode, disk cache
        tc, td = [], []
        for _ in range(ns.repeat):
            t, done = _run(check)
            tc.append(t)
            t, done_d = _run(diff)
            td.append(t)
        import json

        doc = json.loads(js.read_text())
        n = sum(1 for line in done.stdout.splitlines() if line)
        print(f"workbook: {ns.rows} rows, {4 * ns.rows} formulas ({n} lines of check output)")
        print(f"diff summary: {doc['summary']}")
        print(f"check NEW:        {min(tc):.2f} s (best of {ns.repeat})")
        print(f"diff OLD → NEW:   {min(td):.2f} s (best of {ns.repeat})")
        print(f"ratio diff/check: {min(td) / min(tc):.2f}× (target ≤ 2×)")


if __name__ == "__main__":
    main()
