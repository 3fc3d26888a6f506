"""Headless-engine benchmark (not part of the default test run).

    python tests/bench/bench_engine.py [--cells 10000] [--skip-as-is]

Builds a workbook of N formula cells (property lookups, work formulas, arithmetic) with
openpyxl, then measures in the same run:
1. the general formula library used as-is (its ExcelModel: load, finish, calculate);
2. joulebook's engine (read + compile per shape + evaluate in dependency order);
3. the bare cost of calling the same functions in a Python loop;
and prints the ratios (targets: ≥ 30× faster than as-is; ≤ 3× the bare cost) and the peak
memory of the engine run (target < 500 MB).
"""

from __future__ import annotations

import argparse
import resource
import tempfile
import time
from pathlib import Path


def build(path: Path, cells: int) -> int:
    import openpyxl

    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Data"
    rows = cells // 4
    ws["G1"] = 101.325
    for r in range(2, rows + 2):
        ws[f"A{r}"] = 20.0 + (r % 600) * 0.1  # a logger column of temperatures, °C
        ws[f"B{r}"] = f'=JB_PROP("water","h in kJ/kg","T in degC",A{r},"P in kPa",$G$1)'
        ws[f"C{r}"] = f"=JB_WORK_POLYTROPIC_N(100,0.8,0.1+A{r}/1000,1.3)"
        ws[f"D{r}"] = f"=B{r}*2.5+C{r}"
        ws[f"E{r}"] = f"=IF(D{r}>300,ROUND(D{r},1),0)"
    wb.save(path)
    return rows * 4


def peak_mb() -> float:
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--cells", type=int, default=10_000)
    ap.add_argument("--skip-as-is", action="store_true", help="skip the (slow) library-as-is run")
    ns = ap.parse_args()

    import joulebook
    from joulebook.workbook.engine import Engine, _register_ours
    from joulebook.workbook.reader import read_book

    tmp = Path(tempfile.mkdtemp())
    path = tmp / "bench.xlsx"
    n = build(path, ns.cells)
    print(f"workbook: {n} formula cells")

    # warm the property library and the function table outside the timings
    joulebook.call("JB_PROP", "water", "h in kJ/kg", "T in degC", 25.0, "P in kPa", 101.325)
    _register_ours()

    t = time.perf_counter()
    out = Engine(read_book(path)).run()
    t_engine = time.perf_counter() - t
    mem = peak_mb()
    assert len(out) == n

    rows = n // 4
    t = time.perf_counter()
    call = joulebook.call
    for r in range(2, rows + 2):
        T = 20.0 + (r % 600) * 0.1
        h = call("JB_PROP", "water", "h in kJ/kg", "T in degC", T, "P in kPa", 101.325)
        w = call("JB_WORK_POLYTROPIC_N", 100.0, 0.8, 0.1 + T / 1000, 1.3)
        d = h * 2.5 + w
        _ = round(d, 1) if d > 300 else 0
    t_bare = time.perf_counter() - t

    print(
        f"engine:  {t_engine:7.2f} s   bare loop: {t_bare:6.2f} s   engine/bare = {t_engine / t_bare:.1f}x (target <= 3x)"
    )
    print(f"peak memory after the engine run: {mem:.0f} MB (target < 500 MB)")
    if not ns.skip_as_is:
        import formulas

        t = time.perf_counter()
        model = formulas.ExcelModel().loads(str(path)).finish()
        model.calculate()
        t_lib = time.perf_counter() - t
        print(
            f"library as-is: {t_lib:7.2f} s   speed-up of the engine: {t_lib / t_engine:.1f}x (target >= 30x)"
        )


if __name__ == "__main__":
    main()
