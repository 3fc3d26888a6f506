"""Property-call benchmark (not part of the default test run).

    python tests/bench/bench_props.py [--rows 100000]

Prints, measured in the same run on the same machine:
1. a scalar JB_PROP call vs a bare cached low-level state update + read (target ≤ 1.3×);
2. a 100,000-state column through JB_PROP vs a per-cell loop of the property library's
   simplest high-level call (target ≥ 5× faster; aim 8×), for a logged column with repeated
   readings and for a column of all-distinct states;
3. a real-fluid column of 50,000 distinct states through JB_PROP vs a bare loop over one
   cached low-level state (update + read per state; target ≤ 1.3×);
4. the start-up time of ``joulebook --help`` (target ≤ 0.5 s).
"""

from __future__ import annotations

import argparse
import statistics
import subprocess
import sys
import time

import numpy as np


def _best(fn, repeat=5):
    times = []
    for _ in range(repeat):
        t = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t)
    return min(times)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--rows", type=int, default=100_000)
    ap.add_argument("--scalar", type=int, default=20_000)
    ap.add_argument("--distinct", type=int, default=50_000)
    ns = ap.parse_args()

    import CoolProp
    import CoolProp.CoolProp as CP

    import joulebook

    print(
        f"joulebook {joulebook.__version__}, CoolProp {CoolProp.__version__}, numpy {np.__version__}"
    )
    rng = np.random.default_rng(1)

    # 1. scalar
    n = ns.scalar
    T = 290.0 + 60.0 * rng.random(n)
    P = 101.325
    AS = CP.AbstractState("HEOS", "Water")
    key = CP.PT_INPUTS

    def bare():
        for t in T:
            AS.update(key, P * 1e3, t)
            AS.hmass()

    call = joulebook.call

    def ours():
        for t in T:
            call("JB_PROP", "water", "h in kJ/kg", "T in K", t, "P in kPa", P)

    ours()  # warm caches (units, phrases, fluid)
    # interleave the two so that machine noise hits both alike; keep the best of each
    t_bare = t_ours = float("inf")
    for _ in range(7):
        t_bare = min(t_bare, _best(bare, 1))
        t_ours = min(t_ours, _best(ours, 1))
    print(f"\n1. scalar JB_PROP vs bare AbstractState update+read ({n} calls)")
    print(
        f"   bare {1e6 * t_bare / n:7.2f} us/call   JB_PROP {1e6 * t_ours / n:7.2f} us/call   "
        f"ratio {t_ours / t_bare:.2f}x (target <= 1.3x)"
    )

    # 2. columns
    rows = ns.rows
    logged = np.round(20.0 + 60.0 * rng.random(rows), 1) + 273.15  # a logger's 0.1 K readings
    distinct = 293.15 + 60.0 * rng.random(rows)
    for label, col in (
        ("logged readings (0.1 K resolution)", logged),
        ("all distinct states", distinct),
    ):
        col2 = col.reshape(-1, 1)

        def column(col2=col2):
            joulebook.call("JB_PROP", "water", "h in kJ/kg", "T in K", col2, "P in kPa", P)

        def per_cell(col=col):
            for t in col:
                CP.PropsSI("H", "T", t, "P", P * 1e3, "Water")

        t_col = _best(column, 3)
        t_ref = _best(per_cell, 1)
        uniq = len(np.unique(col))
        print(f"\n2. {rows}-row column, {label}: {uniq} distinct")
        print(
            f"   per-cell PropsSI loop {t_ref:6.2f} s   JB_PROP column {t_col:6.2f} s   "
            f"speed-up {t_ref / t_col:.1f}x (target >= 5x, aim 8x)"
        )

    # 3. a column of distinct states against the bare cached low-level loop
    distinct = (293.15 + 60.0 * rng.random(ns.distinct)).reshape(-1, 1)
    flat = distinct.ravel()

    def bare_column():
        out = np.empty(flat.size)
        for i, t in enumerate(flat):
            AS.update(key, P * 1e3, t)
            out[i] = AS.hmass()
        return out

    def our_column():
        return joulebook.call("JB_PROP", "water", "h in kJ/kg", "T in K", distinct, "P in kPa", P)

    t_b = t_o = float("inf")
    for _ in range(5):
        t_b = min(t_b, _best(bare_column, 1))
        t_o = min(t_o, _best(our_column, 1))
    print(f"\n3. {flat.size}-state column of distinct states vs bare cached AbstractState loop")
    print(
        f"   bare {t_b:6.3f} s   JB_PROP column {t_o:6.3f} s   ratio {t_o / t_b:.2f}x "
        "(target <= 1.3x)"
    )

    # 4. start-up
    runs = []
    for _ in range(5):
        t = time.perf_counter()
        subprocess.run(
            [sys.executable, "-m", "joulebook.faces.cli", "--help"], check=True, capture_output=True
        )
        runs.append(time.perf_counter() - t)
    print(
        f"\n4. `joulebook --help` start-up: median {statistics.median(runs):.3f} s (target <= 0.5 s)"
    )


if __name__ == "__main__":
    main()
