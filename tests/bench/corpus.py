"""Agreement of the headless engine (and of the formula library used as-is) with the values
a spreadsheet program saved, over a folder of workbooks.

    python tests/bench/corpus.py FOLDER [--library] [--json out.json] [--table]

Each workbook runs in its own process with a time limit; its time and peak memory are
printed beside its agreement.  ``--table`` adds a table of the disagreeing cells by function
(each function named in the formula of a cell that does not agree) and by cause (the status
and the first words of its reason).  For every formula cell with a saved
value the engine's status is counted (pass, differs, unsupported, …); with ``--library`` the
``formulas`` library's ExcelModel is run on the same file and its values compared cell by cell
with the saved ones, so the two agreement figures are measured on the same cells.
"""

from __future__ import annotations

import argparse
import json
import multiprocessing as mp
import sys
import traceback
from pathlib import Path


def _ours(path: str) -> dict:
    from joulebook.faces.workbook.check import compare
    from joulebook.faces.workbook.engine import Engine
    from joulebook.faces.workbook.reader import read_book

    book = read_book(path)
    outcomes = Engine(book).run()
    rows = compare(book, outcomes)
    return {
        f"{r.sheet}!{r.cell}": [r.status, r.note, str(r.cached), str(r.recomputed), r.formula]
        for r in rows
        if r.status != "no cached value"
    }


def _library(path: str) -> dict:
    sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
    from joulebook.faces.workbook.check import _same
    from joulebook.faces.workbook.reader import col_letters, read_book
    from wbtools import library_values

    book = read_book(path)
    got = library_values(Path(path), book.sheets)
    out = {}
    for key, cell in book.cells.items():
        if cell.formula is None or not cell.has_cached:
            continue
        x = got.get(key, None)
        where = f"{key[0]}!{col_letters(key[2])}{key[1]}"
        out[where] = x is not None and _same(x, cell.cached, 1e-9, 1e-12)
    return out


def _run(kind: str, path: str, q) -> None:
    import io
    import os
    import resource
    import time

    sys.stderr = io.StringIO()  # count tracebacks instead of printing them
    try:
        t0 = time.perf_counter()
        res = (_ours if kind == "ours" else _library)(path)
        took = time.perf_counter() - t0
        peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024  # MiB (Linux: KiB)
        q.put(("ok", res, sys.stderr.getvalue(), took, peak))
    except Exception:
        q.put(("fail", traceback.format_exc(limit=3), sys.stderr.getvalue(), 0.0, 0.0))
    q.close()
    q.join_thread()
    os._exit(0)


def run_one(kind: str, path: str, timeout: float):
    q = mp.Queue()
    p = mp.Process(target=_run, args=(kind, path, q))
    p.start()
    try:
        res = q.get(timeout=timeout)
    except Exception:
        res = ("timeout", None, "", timeout, 0.0)
    p.join(5)
    if p.is_alive():
        p.kill()
    return res


def _functions(formula: str) -> set[str]:
    """The functions a formula calls (by the tokenizer), without the _xlfn. prefixes."""
    from joulebook.faces.workbook.refs import tokens

    try:
        toks = tokens(formula.lstrip("="))
    except Exception:
        return {"(formula not tokenized)"}
    return {
        v[:-1].upper().replace("_XLFN.", "").replace("_XLWS.", "")
        for v, t, sub in toks
        if t == "FUNC" and sub == "OPEN"
    }


def _cause(status: str, note: str) -> str:
    """A cell's cause of disagreement: its status and the first words of its reason."""
    if status == "differs" or not note:
        return status
    why = note.split(";")[0]
    if why.startswith("not checked"):
        inner = why.split("(", 1)[1] if "(" in why else why
        return "not checked (" + inner.split(":")[0].strip(" )") + ")"
    return why[:70]


def _table(report: dict) -> str:
    by_func: dict = {}
    by_cause: dict = {}
    for entry in report.values():
        for v in entry.get("cells", {}).values():
            status, note, formula = v[0], v[1], v[4]
            cause = _cause(status, note)
            by_cause[cause] = by_cause.get(cause, 0) + 1
            for f in _functions(formula) or {"(no function)"}:
                row = by_func.setdefault(f, {})
                row[status] = row.get(status, 0) + 1
    lines = ["", "disagreeing cells by cause", f"{'cells':>7}  cause"]
    for cause, n in sorted(by_cause.items(), key=lambda x: -x[1]):
        lines.append(f"{n:>7}  {cause}")
    lines += ["", "disagreeing cells by function (a cell counts once per function it calls)"]
    lines.append(f"{'cells':>7}  {'function':<22} statuses")
    for f, row in sorted(by_func.items(), key=lambda x: -sum(x[1].values()))[:60]:
        parts = ", ".join(f"{k} {n}" for k, n in sorted(row.items(), key=lambda x: -x[1]))
        lines.append(f"{sum(row.values()):>7}  {f:<22} {parts}")
    return "\n".join(lines)


def main() -> int:
    ap = argparse.ArgumentParser()
    ap.add_argument("folder")
    ap.add_argument("--library", action="store_true")
    ap.add_argument("--json")
    ap.add_argument("--timeout", type=float, default=120)
    ap.add_argument("--table", action="store_true", help="print the cause and function tables")
    ns = ap.parse_args()
    files = sorted(p for p in Path(ns.folder).rglob("*") if p.suffix.lower() in (".xlsx", ".xlsm"))
    total = {"cells": 0, "pass": 0, "lib_cells": 0, "lib_pass": 0, "stderr": 0}
    report = {}
    shares: list = []  # agreement of each workbook (with cells)
    slowest = (0.0, "")
    peak_max = (0.0, "")
    failures: list = []
    for f in files:
        st, res, err, took, peak = run_one("ours", str(f), ns.timeout)
        entry = {"ours": st, "stderr": bool(err.strip()), "seconds": took, "peak_mib": peak}
        slowest = max(slowest, (took, f.name))
        peak_max = max(peak_max, (peak, f.name))
        if st != "ok":
            failures.append(f"{f.name}: {st}")
        total["stderr"] += bool(err.strip())
        if st == "ok":
            statuses = {}
            for v in res.values():
                statuses[v[0]] = statuses.get(v[0], 0) + 1
            entry["statuses"] = statuses
            # a cell agrees with its saved value when it passes or holds the same error value
            agree = ("pass", "error value")
            entry["cells"] = {k: v for k, v in res.items() if v[0] not in agree}
            n, ok = len(res), statuses.get("pass", 0) + statuses.get("error value", 0)
            total["cells"] += n
            total["pass"] += ok
            if n:
                shares.append(ok / n)
        else:
            entry["error"] = res
            n = ok = 0
        line = f"{f.name:<40} ours {ok:>5}/{n:<5} {took:7.1f} s {peak:7.0f} MiB"
        if ns.library:
            lst, lres, _, _, _ = run_one("library", str(f), ns.timeout)
            lok = sum(bool(v) for v in lres.values()) if lst == "ok" else 0
            total["lib_pass"] += lok
            entry["library"] = lst
            entry["library_pass"] = lok
            if lst == "ok" and st == "ok":
                entry["library_only"] = [
                    k
                    for k, v in lres.items()
                    if v and res.get(k, ["?"])[0] not in ("pass", "error value")
                ]
            line += f"  library {lok:>5} ({lst})"
        report[str(f)] = entry
        print(line + ("  STDERR" if entry["stderr"] else ""), flush=True)
    pct = 100 * total["pass"] / max(total["cells"], 1)
    print(
        f"TOTAL ours {total['pass']}/{total['cells']} ({pct:.1f} %)"
        + (f"; library {total['lib_pass']}" if ns.library else "")
        + f"; workbooks with stderr output: {total['stderr']}"
    )
    if shares:
        print(
            f"mean agreement per workbook {100 * sum(shares) / len(shares):.1f} % ({len(shares)})"
        )
    print(
        f"slowest {slowest[0]:.1f} s ({slowest[1]}); peak memory {peak_max[0]:.0f} MiB ({peak_max[1]})"
    )
    print(f"workbooks without a result: {len(failures)}" + "".join(f"\n  {x}" for x in failures))
    if ns.table:
        print(_table(report))
    if ns.json:
        Path(ns.json).write_text(json.dumps(report, indent=1, default=str))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
