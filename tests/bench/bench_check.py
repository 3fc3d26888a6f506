"""Throughput of ``joulebook check`` on a folder of small workbooks (not part of the default run).

    python tests/bench/bench_check.py [--books 100] [--rows 10] [--repeat 3]

Builds N small calculation workbooks (a few property lookups, boundary work and arithmetic,
each saved with its values by joulebook's own recalc), then measures in the same run:
1. start-up: one ``joulebook check`` process on one workbook (the best of ``--repeat``);
2. the whole folder in one process (``-j 1``);
3. the whole folder in two processes (``-j 2``);
and prints workbooks per second and each folder run as a fraction of N × one start-up
(the cost of one process per workbook, which CI scripts paid before folders were accepted).
"""

from __future__ import annotations

import argparse
import subprocess
import sys
import tempfile
import time
from pathlib import Path


def build(folder: Path, books: int, rows: int = 10) -> list[Path]:
    import openpyxl

    from joulebook.cli import main

    folder.mkdir(parents=True, exist_ok=True)
    made = []
    for i in range(books):
        wb = openpyxl.Workbook()
        ws = wb.active
        ws.title = "Calc"
        ws["A1"], ws["B1"] = "fill temperature, degC", 15.0 + i % 40
        ws["A2"], ws["B2"] = "fill pressure, kPa", 101.325 + 10 * (i % 7)
        ws["A3"], ws["B3"] = (
            "h, kJ/kg",
            '=JB_PROP("water","h in kJ/kg","T in degC",B1,"P in kPa",B2)',
        )
        ws["A4"], ws["B4"] = "W, kJ", "=JB_WORK_POLYTROPIC_N(B2,0.1,0.05,1.3)"
        ws["A5"], ws["B5"] = "check", "=IF(B3>0,ROUND(B3+B4,3),0)"
        for r in range(6, 6 + rows):  # a table: built-ins and a property lookup per row
            ws[f"A{r}"] = r
            ws[f"B{r}"] = f"=A{r}*$B$1+SUM($B$3:$B$4)"
            ws[f"C{r}"] = f'=JB_PROP("water","h in kJ/kg","T in degC",$B$1+A{r}/10,"P in kPa",$B$2)'

        raw = folder / f"raw_{i:03d}.xlsx"
        wb.save(raw)
        out = folder / f"calc_{i:03d}.xlsx"
        main(["recalc", str(raw), "-o", str(out)])
        raw.unlink()
        made.append(out)
    return made


def _time(args: list[str]) -> float:
    t0 = time.perf_counter()
    done = subprocess.run(
        [sys.executable, "-m", "joulebook.cli", *args], capture_output=True, text=True
    )
    dt = time.perf_counter() - t0
    if done.returncode != 0:
        raise SystemExit(f"joulebook {' '.join(args)} exited {done.returncode}:\n{done.stderr}")
    return dt


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--books", type=int, default=100)
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--rows", type=int, default=10, help="table rows per workbook (2 cells each)")
    ns = ap.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp) / "calcs"
        import contextlib
        import io

        with contextlib.redirect_stdout(io.StringIO()):
            books = build(folder, ns.books, ns.rows)
        n = len(books)
        one = min(_time(["check", str(books[0])]) for _ in range(ns.repeat))
        j1 = _time(["check", str(folder), "-j", "1"])
        j2 = _time(["check", str(folder), "-j", "2"])
    per_process = n * one
    print(f"{n} workbooks, each {3 + 2 * ns.rows} formula cells")
    print(f"one workbook per process   {one:7.2f} s  (x {n} = {per_process:.1f} s)")
    print(f"folder, -j 1               {j1:7.2f} s  {n / j1:6.1f} workbooks/s  "
          f"{j1 / per_process:.3f} of {n} processes")  # fmt: skip
    print(f"folder, -j 2               {j2:7.2f} s  {n / j2:6.1f} workbooks/s  "
          f"{j2 / per_process:.3f} of {n} processes")  # fmt: skip
    print(f"-j 2 vs -j 1               {j1 / j2:7.2f}x")


if __name__ == "__main__":
    main()
