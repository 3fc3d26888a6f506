"""``joulebook sensitivity BOOK``: the command's options and its run (the command line only
registers it). Exit codes as ``check``: 0 every chosen result analysed, 1 a coefficient could
not be computed (a refusal, a chain that is not smooth) or Monte Carlo disagrees with the law
of propagation, 2 an unreadable workbook, a bad option or an output that would replace an
input, 3 an internal failure."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

__all__ = ["add_parser", "run"]


def add_parser(sub) -> argparse.ArgumentParser:
    """Register ``sensitivity`` on the command line's sub-parsers."""
    s = sub.add_parser(
        "sensitivity",
        help="sensitivity coefficients and uncertainty (GUM, Monte Carlo) of results",
        description="For each result (default: every joulebook call and every end of a "
        "calculation chain) and every numeric input among its precedents: dy/dx in the "
        "cells' units and the relative sensitivity, by central differences through the "
        "engine (two steps, checked against each other). With uncertainties (stated in the "
        "workbook, docs/uncertainty.md, or with --u): the combined standard uncertainty, "
        "each input's contribution and U = k·u_c (JCGM 100:2008); with --mc N, Monte Carlo "
        "(JCGM 101:2008) and its comparison with the first-order result. The workbook is "
        "never modified.",
    )
    s.add_argument("book", help="the .xlsx/.xlsm to analyse")
    s.add_argument(
        "--cell",
        action="append",
        default=[],
        metavar="SHEET!CELL",
        help="a result to analyse (repeat for more; default: every result)",
    )
    s.add_argument(
        "--u",
        action="append",
        default=[],
        metavar="SHEET!CELL=U[:DIST][:k=K][:dof=N]",
        help="the standard uncertainty of an input in its cell's unit; DIST normal (default), "
        "rectangular or triangular (then U is the half-width); k= for an expanded value; "
        "dof= its degrees of freedom. Overrides what the workbook states.",
    )
    s.add_argument("--mc", type=int, default=0, metavar="N", help="Monte Carlo draws")
    s.add_argument("--k", type=float, default=2.0, help="coverage factor of U (default 2)")
    s.add_argument("--seed", type=int, default=1, help="seed of the Monte Carlo draws")
    s.add_argument("-o", "--output", help="write the HTML report here")
    s.add_argument("--json", help="write every coefficient as JSON here")
    s.add_argument("--summary", help="write a Markdown summary here (CI summaries)")
    s.add_argument("--force", action="store_true", help="replace existing outputs")
    s.set_defaults(run=run)
    return s


def run(ns: argparse.Namespace) -> int:
    from joulebook.core.errors import JoulebookError

    from ..files import atomic_write
    from ..runio import guard_outputs, regular_file, shown
    from . import sensitivity as S
    from .reader import read_book

    book_path = Path(ns.book)
    try:
        guard_outputs(
            [ns.book], [("-o", ns.output), ("--json", ns.json), ("--summary", ns.summary)]
        )
        for p in [Path(x) for x in (ns.output, ns.json, ns.summary) if x]:
            if p.exists() and not ns.force:
                raise JoulebookError(f"{shown(p)} exists; use --force to replace it")
        regular_file(book_path)
    except JoulebookError as e:
        print(e.message, file=sys.stderr)
        return 2
    except OSError as e:
        print(f"cannot read {shown(ns.book)}: {e.strerror or e}", file=sys.stderr)
        return 2
    if ns.mc < 0:
        print(f"--mc = {ns.mc}: the number of draws must be 0 or more", file=sys.stderr)
        return 2
    if not ns.k > 0:
        print(f"--k = {ns.k}: the coverage factor must be above 0", file=sys.stderr)
        return 2
    try:
        book = read_book(book_path)
    except JoulebookError as e:
        text = str(e)
        print(text if book_path.name in text else f"{book_path.name}: {text}", file=sys.stderr)
        return 2
    except OSError as e:
        print(f"cannot read {ns.book}: {e.strerror or e}", file=sys.stderr)
        return 2
    try:
        cells = [S.parse_where(c, book.sheets) for c in ns.cell]
        uncs = [S.Uncertainty.parse(u, book.sheets) for u in ns.u]
        report = S.analyse(book, None, cells or None, uncs, mc=ns.mc, k=ns.k, seed=ns.seed)
    except JoulebookError as e:
        print(f"{book_path.name}: {e}", file=sys.stderr)
        return 2
    for target, text in (
        (ns.output, S.render_html),
        (ns.json, S.to_json),
        (ns.summary, S.to_markdown),
    ):
        if target:
            data = text(report).encode("utf-8", "backslashreplace")
            try:
                atomic_write(Path(target), lambda fh, data=data: fh.write(data))
            except OSError as e:  # a read-only folder, a full disk: the target is named
                print(f"cannot write {shown(target)}: {e.strerror or e}", file=sys.stderr)
                return 2
    for line in S.console_lines(report):
        print(line)
    return 0 if all(r.ok for r in report.results) else 1
