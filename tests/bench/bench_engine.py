"""Headless-engine benchmark (not part of the default test run).

    python tests/bench/bench_engine.py [--cells 10000] [--repeat 5] [--skip-as-is]
                                       [--sizes 1000,10000,100000]

Builds a workbook of N formula cells (property lookups, work formulas, arithmetic) with
openpyxl, then prints, each measured in the same run on the same machine:

1. joulebook's engine (read + compile per shape + evaluate in dependency order) against the
   bare cost of calling the same functions in a Python loop (target: engine ≤ 3× the bare
   loop), and against the general formula library used as-is (its ExcelModel: load, finish,
   calculate; target: the engine ≥ 30× faster);
2. how engine time and peak memory grow with the number of formula cells, one fresh process
   per size (start-up, imports and the first property call done before the clock starts;
   peak memory is the process's maximum resident set): target at 100,000 cells ≤ 8 s beyond
   start-up and ≤ 300 MB.

Timings on a shared machine are noisy: each figure is the best of ``--repeat`` runs, the
engine and the bare loop interleaved so that noise hits both alike.
"""

from __future__ import annotations

import argparse
import json
import os
import resource
import subprocess
import sys
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
    """This process's peak resident memory, MB: the kernel's high-water mark of its own
    address space (Linux), else ru_maxrss (which Linux carries over from the parent across
    exec, so a child of a large parent would show the parent's peak)."""
    try:
        with open("/proc/self/status", encoding="ascii") as fh:
            for line in fh:
                if line.startswith("VmHWM:"):
                    return int(line.split()[1]) / 1024
    except OSError:
        pass
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024


def _warm() -> None:
    """Start-up: the engine's imports and registrations, the property library, a state."""
    import joulebook
    from joulebook.faces.workbook.engine import warm_up

    warm_up()
    joulebook.call("JB_PROP", "water", "h in kJ/kg", "T in degC", 25.0, "P in kPa", 101.325)


def _engine_once(path: Path) -> tuple[float, int]:
    from joulebook.faces.workbook.engine import Engine
    from joulebook.faces.workbook.reader import read_book

    t = time.perf_counter()
    out = Engine(read_book(path)).run()
    dt = time.perf_counter() - t
    bad = [k for k, o in out.items() if o.problem]
    if bad:
        raise SystemExit(f"the engine refused {len(bad)} cells, e.g. {bad[0]}: {out[bad[0]]}")
    return dt, len(out)


def _bare_once(rows: int) -> float:
    import joulebook

    call = joulebook.call
    t = time.perf_counter()
    for r in range(2, rows + 2):
        T = 20.0 + (r % 600) * 0.1
        h = call("JB_PROP", "water", "h in kJ/kg", "T in degC", T, "P in kPa", 101.325)
        w = call("JB_WORK_POLYTROPIC_N", 100.0, 0.8, 0.1 + T / 1000, 1.3)
        d = h * 2.5 + w
        _ = round(d, 1) if d > 300 else 0
    return time.perf_counter() - t


def child(path: Path) -> None:
    """One size in a fresh process: prints JSON {engine_s, cells, peak_mb, start_mb}."""
    _warm()
    start = peak_mb()
    dt, n = _engine_once(path)
    print(json.dumps({"engine_s": dt, "cells": n, "peak_mb": peak_mb(), "start_mb": start}))


def _env() -> dict:
    env = dict(os.environ)
    env.pop("PYTHONDONTWRITEBYTECODE", None)  # an installed package has its bytecode
    return env


def scaling(sizes: list[int], tmp: Path, repeat: int) -> list[dict]:
    rows = []
    for n in sizes:
        path = tmp / f"scale_{n}.xlsx"
        build(path, n)
        runs = []
        for _ in range(max(1, repeat if n <= 10_000 else min(repeat, 2))):
            done = subprocess.run(
                [sys.executable, __file__, "--child", str(path)],
                capture_output=True,
                text=True,
                env=_env(),
            )
            if done.returncode != 0:
                raise SystemExit(f"the {n}-cell run failed:\n{done.stderr}")
            runs.append(json.loads(done.stdout.strip().splitlines()[-1]))
        best = min(runs, key=lambda r: r["engine_s"])
        best["peak_mb"] = min(r["peak_mb"] for r in runs)
        rows.append(best)
    return rows


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--cells", type=int, default=10_000)
    ap.add_argument("--repeat", type=int, default=5)
    ap.add_argument("--skip-as-is", action="store_true", help="skip the (slow) library-as-is run")
    ap.add_argument("--sizes", default="1000,10000,100000", help="cell counts of the growth table")
    ap.add_argument("--child", type=Path, help=argparse.SUPPRESS)
    ns = ap.parse_args()
    if ns.child:
        child(ns.child)
        return

    tmp = Path(tempfile.mkdtemp())
    path = tmp / "bench.xlsx"
    n = build(path, ns.cells)
    print(f"workbook: {n} formula cells")
    _warm()  # start-up outside the timings

    t_engine = t_bare = float("inf")
    for _ in range(ns.repeat):
        dt, got = _engine_once(path)
        assert got == n
        t_engine = min(t_engine, dt)
        t_bare = min(t_bare, _bare_once(n // 4))
    ratio = t_engine / t_bare
    print(f"\n1. engine {t_engine:6.3f} s   bare loop {t_bare:6.3f} s   (best of {ns.repeat})")
    print(f"   engine / bare loop          {ratio:6.2f}x   (target <= 3x)")
    if not ns.skip_as_is:
        import formulas

        t = time.perf_counter()
        model = formulas.ExcelModel().loads(str(path)).finish()
        model.calculate()
        t_lib = time.perf_counter() - t
        print(f"   library as-is {t_lib:6.2f} s: engine speed-up {t_lib / t_engine:6.1f}x   "
              "(target >= 30x)")  # fmt: skip

    sizes = [int(s) for s in ns.sizes.split(",") if s.strip()]
    if sizes:
        print("\n2. growth, one fresh process per size (engine time beyond start-up, peak memory)")
        print("   formula cells   engine s   us/cell   peak MB   (start-up MB)")
        rows = scaling(sizes, tmp, ns.repeat)
        for r in rows:
            print(f"   {r['cells']:13,d}   {r['engine_s']:8.2f}   {1e6 * r['engine_s'] / r['cells']:7.1f}"
                  f"   {r['peak_mb']:7.0f}   ({r['start_mb']:.0f})")  # fmt: skip
        big = max(rows, key=lambda r: r["cells"])
        if big["cells"] >= 100_000:
            print(f"   {big['cells']:,d} cells: {big['engine_s']:.2f} s (target <= 8 s), "
                  f"{big['peak_mb']:.0f} MB (target <= 300 MB)")  # fmt: skip
        if len(rows) >= 2:
            a, b = rows[0], rows[-1]
            grow_t = (b["engine_s"] / a["engine_s"]) / (b["cells"] / a["cells"])
            print(f"   time per cell at {b['cells']:,d} / at {a['cells']:,d}: {grow_t:.2f} "
                  "(1.00 = linear growth)")  # fmt: skip


if __name__ == "__main__":
    main()
