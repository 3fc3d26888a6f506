"""Growth of the engine's time with the size of whole-column lookups and conditional
aggregates (not part of the default test run).

    python tests/bench/bench_lookups.py [--sizes 1000,10000] [--kinds vlookup,sumifs,...]
                                        [--timeout 600]

For each size N a workbook of our own is built with openpyxl: a Data sheet of N rows (key,
group, amount) and a Calc sheet of N formulas of one kind, each reading whole columns
(``VLOOKUP($A2,Data!$A:$C,3,FALSE)``, ``SUMIFS(Data!$C:$C,Data!$B:$B,$B2)``, …), the way real
workbooks copy them down.  Each workbook is recalculated in a fresh process (imports done
before the clock starts); the table gives seconds and peak memory per kind and size, and the
growth factor from one size to the next (linear growth: the size ratio; quadratic: its square).
"""

from __future__ import annotations

import argparse
import json
import subprocess
import sys
import tempfile
import time
from pathlib import Path

KINDS = {
    "vlookup": "=VLOOKUP($A{r},Data!$A:$C,3,FALSE)",
    "match": "=MATCH($A{r},Data!$A:$A,0)",
    "index-match": "=INDEX(Data!$C:$C,MATCH($A{r},Data!$A:$A,0))",
    "sumifs": "=SUMIFS(Data!$C:$C,Data!$B:$B,$B{r})",
    "countifs": '=COUNTIFS(Data!$B:$B,$B{r},Data!$C:$C,">5")',
    "concat": "=CONCAT(Data!$B$1:$B$50)&$A{r}",
    "arithmetic": "=$A{r}*2+$B{r}",
}


def build(path: Path, n: int, kind: str) -> None:
    import openpyxl

    wb = openpyxl.Workbook()
    data = wb.active
    data.title = "Data"
    groups = max(1, n // 50)
    for r in range(1, n + 1):
        data.cell(r, 1, float(r))  # key
        data.cell(r, 2, f"g{r % groups}")  # group
        data.cell(r, 3, float(r % 97))  # amount
    calc = wb.create_sheet("Calc")
    template = KINDS[kind]
    for r in range(1, n + 1):
        calc.cell(r, 1, float((r * 7919) % n + 1))
        calc.cell(r, 2, f"g{(r * 31) % groups}")
        calc.cell(r, 3, template.format(r=r))
    wb.save(path)


def child(path: Path) -> None:
    import resource

    from joulebook.faces.workbook.engine import Engine, warm_up
    from joulebook.faces.workbook.reader import read_book

    warm_up()
    t0 = time.perf_counter()
    book = read_book(path)
    out = Engine(book).run()
    took = time.perf_counter() - t0
    bad = sum(bool(o.problem) for o in out.values())
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    print(json.dumps({"seconds": took, "peak_mb": peak, "cells": len(out), "problems": bad}))


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--sizes", default="1000,10000")
    ap.add_argument("--kinds", default=",".join(KINDS))
    ap.add_argument("--timeout", type=float, default=600)
    ap.add_argument("--child", type=Path, help=argparse.SUPPRESS)
    ns = ap.parse_args()
    if ns.child:
        child(ns.child)
        return
    sizes = [int(s) for s in ns.sizes.split(",")]
    print(f"{'kind':<12} {'N':>7} {'seconds':>9} {'peak MB':>8} {'growth':>7}")
    with tempfile.TemporaryDirectory() as tmp:
        for kind in ns.kinds.split(","):
            last = None
            for n in sizes:
                path = Path(tmp) / f"{kind}-{n}.xlsx"
                build(path, n, kind)
                try:
                    run = subprocess.run(
                        [sys.executable, __file__, "--child", str(path)],
                        capture_output=True,
                        text=True,
                        timeout=ns.timeout,
                    )
                    res = json.loads(run.stdout.strip().splitlines()[-1])
                except subprocess.TimeoutExpired:
                    print(f"{kind:<12} {n:>7} {'>' + str(int(ns.timeout)):>9}")
                    last = None
                    continue
                growth = f"{res['seconds'] / last:.1f}x" if last else ""
                print(
                    f"{kind:<12} {n:>7} {res['seconds']:>9.2f} {res['peak_mb']:>8.0f} "
                    f"{growth:>7}"
                    + (f"  ({res['problems']} not computed)" if res["problems"] else ""),
                    flush=True,
                )
                last = res["seconds"]


if __name__ == "__main__":
    main()
