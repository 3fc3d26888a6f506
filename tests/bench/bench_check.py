"""Start-up, audit and folder throughput of ``joulebook check`` (not part of the default run).

    python tests/bench/bench_check.py [--books 100] [--rows 10] [--repeat 5] [--demos all]

Prints, each measured in the same run on the same machine (the best of ``--repeat``
processes, the two sides of each ratio interleaved so that noise hits both alike):

1. ``joulebook check`` of a one-formula workbook (one property lookup) against
   ``python -c "import CoolProp.CoolProp, formulas"`` (target ≤ 1.2×);
2. ``joulebook check`` of a workbook of closed-form joulebook functions only: it must not
   import the property library (nor pint, nor scipy's statistics);
3. ``joulebook audit`` of each bundled demo workbook against its ``check`` (target ≤ 2×);
4. a folder of N small calculation workbooks (a few property lookups, boundary work and
   arithmetic, each saved with its values by joulebook's own recalc): one process per
   workbook, the folder in one process (``-j 1``) and in two (``-j 2``).

Subprocesses run with bytecode caching allowed (an installed package has its bytecode), after
one warm-up run of each command.
"""

from __future__ import annotations

import argparse
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path


def build(folder: Path, books: int, rows: int = 10) -> list[Path]:
    import openpyxl

    from joulebook.faces.cli import main

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


ROOT = Path(__file__).resolve().parents[2]
_ENV = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}
_PROBE = """
import sys
from joulebook.faces.cli import main
code = main(["check", sys.argv[1]])
print(code, *(m in sys.modules for m in ("CoolProp", "pint", "scipy.stats")))
"""


def _run(cmd: list[str]) -> tuple[float, subprocess.CompletedProcess]:
    t0 = time.perf_counter()
    done = subprocess.run(cmd, capture_output=True, text=True, env=_ENV)
    return time.perf_counter() - t0, done


def _time(args: list[str], ok=(0,)) -> float:
    dt, done = _run([sys.executable, "-m", "joulebook.faces.cli", *args])
    if done.returncode not in ok:
        raise SystemExit(f"joulebook {' '.join(args)} exited {done.returncode}:\n{done.stderr}")
    return dt


def _one_formula_book(folder: Path, formula: str, name: str) -> Path:
    import openpyxl

    from joulebook.faces.cli import main

    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Calc"
    ws["A1"], ws["B1"] = 25.0, formula
    raw = folder / f"raw_{name}.xlsx"
    wb.save(raw)
    out = folder / f"{name}.xlsx"
    main(["recalc", str(raw), "-o", str(out)])
    return out


def startup(folder: Path, repeat: int) -> None:
    import contextlib
    import io

    with contextlib.redirect_stdout(io.StringIO()):
        one = _one_formula_book(
            folder, '=JB_PROP("water","h in kJ/kg","T in degC",A1,"P in kPa",101.325)', "one"
        )
        closed = _one_formula_book(
            folder, "=ROUND(JB_WORK_POLYTROPIC_N(100,0.8,0.1+A1/1000,1.3),3)", "closed"
        )
    base_cmd = [sys.executable, "-c", "import CoolProp.CoolProp, formulas"]
    _time(["check", str(one)]), _run(base_cmd)  # warm-up: bytecode, file caches
    t_check = t_base = t_closed = float("inf")
    for _ in range(repeat):
        t_check = min(t_check, _time(["check", str(one)]))
        t_base = min(t_base, _run(base_cmd)[0])
        t_closed = min(t_closed, _time(["check", str(closed)]))
    print("1. one-formula workbook (one property lookup)")
    print(f"   joulebook check {t_check:6.2f} s   import CoolProp.CoolProp, formulas "
          f"{t_base:6.2f} s   ratio {t_check / t_base:.2f}x (target <= 1.2x)")  # fmt: skip
    _, done = _run([sys.executable, "-c", _PROBE, str(closed)])
    code, *loaded = done.stdout.split()[-4:]
    verdict = "not imported" if loaded[0] == "False" else "IMPORTED (target: not imported)"
    print("2. closed-form workbook (boundary work, no property call)")
    print(f"   joulebook check {t_closed:6.2f} s; property library {verdict}; "
          f"pint {'imported' if loaded[1] == 'True' else 'not imported'}; "
          f"scipy.stats {'imported' if loaded[2] == 'True' else 'not imported'}")  # fmt: skip


def audits(folder: Path, demos: list[Path], repeat: int) -> None:
    print("3. audit vs check of the bundled demo workbooks (target <= 2x)")
    worst = 0.0
    for demo in demos:
        html = folder / (demo.stem + ".html")
        args_a = ["audit", str(demo), "-o", str(html), "--force"]
        _time(["check", str(demo)], ok=(0, 1)), _time(args_a, ok=(0, 1))  # warm-up
        t_c = t_a = float("inf")
        for _ in range(repeat):
            t_c = min(t_c, _time(["check", str(demo)], ok=(0, 1)))
            t_a = min(t_a, _time(args_a, ok=(0, 1)))
        worst = max(worst, t_a / t_c)
        print(f"   {demo.name:44s} check {t_c:5.2f} s   audit {t_a:5.2f} s   {t_a / t_c:.2f}x")
    print(f"   worst audit/check {worst:.2f}x (target <= 2x)")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--books", type=int, default=100)
    ap.add_argument("--repeat", type=int, default=5)
    ap.add_argument("--rows", type=int, default=10, help="table rows per workbook (2 cells each)")
    ap.add_argument("--demos", default="all", help="demo workbooks to audit: all, none or names")
    ns = ap.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        startup(Path(tmp), ns.repeat)
    if ns.demos != "none":
        found = sorted((ROOT / "workbooks").glob("*.xls[xm]"))
        wanted = ns.demos.split(",")
        demos = [d for d in found if ns.demos == "all" or d.stem in wanted]
        with tempfile.TemporaryDirectory() as tmp:
            audits(Path(tmp), demos, max(1, min(ns.repeat, 2)))
    if ns.books <= 0:
        return
    print("4. folder throughput")
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
    print(f"   {n} workbooks, each {3 + 2 * ns.rows} formula cells")
    print(f"   one workbook per process   {one:7.2f} s  (x {n} = {per_process:.1f} s)")
    print(f"   folder, -j 1               {j1:7.2f} s  {n / j1:6.1f} workbooks/s  "
          f"{j1 / per_process:.3f} of {n} processes")  # fmt: skip
    print(f"   folder, -j 2               {j2:7.2f} s  {n / j2:6.1f} workbooks/s  "
          f"{j2 / per_process:.3f} of {n} processes")  # fmt: skip
    print(f"   -j 2 vs -j 1               {j1 / j2:7.2f}x")


if __name__ == "__main__":
    main()
