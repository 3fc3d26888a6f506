"""Monte Carlo through the engine's column path (not part of the default run).

    python tests/bench/bench_sensitivity.py [--draws 100000] [--cells 50] [--repeat 3]

Builds a 50-cell calculation chain of our own (three inputs with stated uncertainties, a
gas-law pressure, then a chain of arithmetic and closed-form joulebook functions down to one
result), and prints, measured in the same run on the same machine (best of ``--repeat``):

1. one recompute of the workbook (read + engine), the reference;
2. the sensitivity coefficients of the result to its inputs (central differences, two steps);
3. ``--draws`` Monte Carlo draws of the chain: the chain copied once per draw in bands of rows
   and evaluated block by block, each formula for a whole block in one vectorised call;

with each time's ratio to the recompute, and the time per draw and per cell-draw.
"""

from __future__ import annotations

import argparse
import tempfile
import time
from pathlib import Path


def build(path: Path, cells: int) -> Path:
    import openpyxl

    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Chain"
    ws["A1"], ws["B1"], ws["C1"], ws["D1"] = "Mass", 2.0, "kg", "u"
    ws["D2"] = 0.01
    ws["A2"], ws["B2"], ws["C2"] = "Mass", 2.0, "kg"
    ws["A3"], ws["B3"], ws["C3"], ws["D3"] = "Temperature", 300.0, "K", 1.5
    ws["A4"], ws["B4"], ws["C4"], ws["D4"] = "Volume", 0.5, "m3", 0.004
    ws["A6"], ws["B6"] = "Pressure, kPa", "=B2*0.28705*B3/B4"
    ws["A7"], ws["B7"] = "Polytropic work, kJ", "=JB_WORK_POLYTROPIC_N(B6,B4,B4/2,1.3)"
    # every row its own formula (its own constants): a chain as engineers write it, each row
    # one step of the calculation, not one formula filled down
    for i in range(8, 6 + cells):
        if i % 3 == 0:
            ws[f"B{i}"] = f"=B{i - 1}*{1 + i / 10000}+B{i - 2}*{i / 1000000}"
        elif i % 3 == 1:
            ws[f"B{i}"] = f"=JB_WORK_ISOBARIC(B6,B4,B4+B{i - 1}/{1000000 + i})"
        else:
            ws[f"B{i}"] = f"=B{i - 1}+B{i - 2}/{1000 + i}-B6/{1000000 + i}"
    ws[f"A{6 + cells}"] = "Result"
    ws[f"B{6 + cells}"] = f"=B{5 + cells}+B7"
    wb.save(path)
    return path


def best(fn, repeat: int) -> float:
    times = []
    for _ in range(repeat):
        t = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t)
    return min(times)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--draws", type=int, default=100_000)
    ap.add_argument("--cells", type=int, default=50)
    ap.add_argument("--repeat", type=int, default=3)
    ns = ap.parse_args()

    from joulebook.faces.workbook.engine import Engine
    from joulebook.faces.workbook.reader import read_book
    from joulebook.faces.workbook.sensitivity import Chain, Uncertainty, analyse, monte_carlo

    with tempfile.TemporaryDirectory() as tmp:
        path = build(Path(tmp) / "chain.xlsx", ns.cells)
        result = ("Chain", 6 + ns.cells, 2)
        Engine(read_book(path)).run()  # warm-up: imports and the library's grammar

        def recompute():
            Engine(read_book(path)).run()

        t_one = best(recompute, ns.repeat)
        book = read_book(path)
        out = Engine(book).run()
        t_sens = best(lambda: analyse(book, out, [result]), ns.repeat)
        chain = Chain(book, out)
        uncs = [Uncertainty(("Chain", r, 2), u) for r, u in ((2, 0.01), (3, 1.5), (4, 0.004))]
        n_live = len(chain.between([u.key for u in uncs], result))
        t = time.perf_counter()
        mc = monte_carlo(chain, result, uncs, ns.draws, seed=3)
        t_mc = time.perf_counter() - t
    print(f"chain: {n_live} formula cells between 3 inputs and the result")
    print(f"one recompute (read + engine):        {t_one * 1e3:9.1f} ms   1.00×")
    print(f"sensitivity (3 inputs × 4 runs):       {t_sens * 1e3:9.1f} ms  {t_sens / t_one:5.1f}×")
    print(
        f"Monte Carlo, {ns.draws:,} draws:         {t_mc:9.2f} s  {t_mc / t_one:7.0f}×  "
        f"({t_mc / ns.draws * 1e6:.0f} µs per draw, "
        f"{t_mc / ns.draws / n_live * 1e6:.1f} µs per cell-draw; {mc['how']})"
    )
    print(
        f"   mean {mc['mean']:.6g}, std {mc['std']:.4g}, 95 % [{mc['low']:.6g}, {mc['high']:.6g}]"
    )


if __name__ == "__main__":
    main()
