"""The signed verdict on a large workbook (not part of the default run).

    python tests/bench/bench_verdict.py [--rows 1500] [--repeat 2]

Builds one calculation workbook the way engineers lay one out — ``label | value | unit``
rows of inputs in barg, kPa, degC, K, kW, kJ, then rows of ordinary arithmetic between them
and a few joulebook calls — with thousands of cells, saves it with its values by joulebook's
own recalc, and prints, measured in the same run:

1. ``joulebook check`` against ``joulebook audit`` (best of ``--repeat`` processes; target
   audit ≤ 2× check);
2. in one process, the comparison without the verdict passes against the comparison with
   them (refusals, blank inputs, validity, units): what signing a pass costs.
"""

from __future__ import annotations

import argparse
import subprocess
import sys
import tempfile
import time
from pathlib import Path

_INPUTS = [  # label, unit, value
    ("Suction pressure", "barg", 2.5),
    ("Discharge pressure", "kPa", 850.0),
    ("Inlet temperature", "degC", 20.0),
    ("Gas temperature", "K", 310.0),
    ("Motor power", "kW", 15.0),
    ("Heat in", "kJ", 500.0),
]


def build(folder: Path, rows: int) -> Path:
    import openpyxl

    from joulebook.faces.cli import main

    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Calc"
    r = 1
    for i in range(rows):
        label, unit, value = _INPUTS[i % len(_INPUTS)]
        ws.cell(r, 1, f"{label} {i}")
        ws.cell(r, 2, value + i % 7)
        ws.cell(r, 3, unit)
        r += 1
    n = r - 1
    for i in range(rows):  # arithmetic between inputs of the same unit, a few slips among them
        a = 1 + (i % n)
        b = 1 + ((i + len(_INPUTS)) % n)
        ws.cell(r, 1, f"Difference {i}")
        ws.cell(r, 2, f"=B{a}-B{b}" if i % 50 else f"=B{a}-B{1 + (a % n)}")
        ws.cell(r, 4, f"Sum {i}")
        ws.cell(r, 5, f"=SUM(B{a},B{b})*2")
        r += 1
    for i in range(20):
        ws.cell(r, 1, f"Work {i}")
        ws.cell(r, 2, f"=JB_WORK_POLYTROPIC_N(B2,0.1,0.05,{1.2 + i / 100})")
        ws.cell(r, 3, "kJ")
        r += 1
    raw = folder / "raw.xlsx"
    wb.save(raw)
    out = folder / "large.xlsx"
    main(["recalc", str(raw), "-o", str(out)])
    return out


def _time(args: list[str]) -> float:
    t = time.perf_counter()
    subprocess.run([sys.executable, "-m", "joulebook", *args], capture_output=True, check=False)
    return time.perf_counter() - t


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--rows", type=int, default=1500)
    ap.add_argument("--repeat", type=int, default=2)
    ns = ap.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        path = build(Path(tmp), ns.rows)
        from joulebook.faces.workbook.check import compare
        from joulebook.faces.workbook.engine import Engine
        from joulebook.faces.workbook.reader import read_book

        book = read_book(path)
        out = Engine(book).run()
        print(f"workbook: {len(book.cells)} cells, {len(book.formula_cells())} formulas")
        html = Path(tmp) / "a.html"
        _time(["check", str(path)]), _time(["audit", str(path), "-o", str(html), "--force"])
        t_c = t_a = float("inf")
        for _ in range(ns.repeat):
            t_c = min(t_c, _time(["check", str(path)]))
            t_a = min(t_a, _time(["audit", str(path), "-o", str(html), "--force"]))
        print(f"1. check {t_c:.2f} s   audit {t_a:.2f} s   {t_a / t_c:.2f}x (target <= 2x)")
        t0 = time.perf_counter()
        compare(book, out, signed=False)
        t1 = time.perf_counter()
        rows = compare(book, out)
        t2 = time.perf_counter()
        clashes = sum(r.status == "unit clash" for r in rows)
        print(
            f"2. compare {t1 - t0:.3f} s unsigned, {t2 - t1:.3f} s signed "
            f"({clashes} unit clashes found)"
        )


if __name__ == "__main__":
    main()
