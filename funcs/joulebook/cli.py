"""The ``joulebook`` command.  Heavy modules (CoolProp, pint) load only inside the verbs."""

from __future__ import annotations

import argparse
import sys

from . import __version__


def _functions(ns: argparse.Namespace) -> int:
    from .catalog import CATALOG, FAMILIES

    if ns.family and ns.family not in FAMILIES:
        print(f"unknown family {ns.family!r}; use one of: {', '.join(FAMILIES)}")
        return 2
    fam = None
    for f in CATALOG:
        if ns.family and f.family != ns.family:
            continue
        if f.family != fam:
            fam = f.family
            print(f"\n{FAMILIES[fam]}")
        print(f"  {f.signature()}")
        if ns.verbose:
            print(f"      {f.help}")
    return 0


def _eval(ns: argparse.Namespace) -> int:
    from .catalog import as_rows, call
    from .errors import JoulebookError

    args = []
    for a in ns.args:
        if a == "":
            args.append(None)
            continue
        try:
            args.append(float(a))
        except ValueError:
            args.append(a)
    try:
        result = call(ns.name, *args)
    except JoulebookError as e:
        print(e.cell_text())
        return 1
    for row in as_rows(result):
        print("\t".join("" if v is None else str(v) for v in row))
    return 0


def _docs(ns: argparse.Namespace) -> int:
    from pathlib import Path

    from .docgen import write

    for p in write(Path(ns.root)):
        print(f"wrote {p}")
    return 0


def _sheet(ns: argparse.Namespace) -> int:
    from pathlib import Path

    from .sheet.generate import write

    for p in write(Path(ns.root)):
        print(f"wrote {p}")
    return 0


def build_parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(
        prog="joulebook",
        description="Worksheet formulas for closed-system energy analysis: list them, evaluate "
        "one as a cell would, and regenerate the function reference.",
    )
    p.add_argument("--version", action="version", version=f"joulebook {__version__}")
    sub = p.add_subparsers(dest="verb", metavar="VERB")

    f = sub.add_parser(
        "functions", help="list the worksheet functions", description="List the catalog."
    )
    f.add_argument(
        "--family",
        help="only this family (state, gas, solid, work, poly, balance, process, cycle, stored, util)",
    )
    f.add_argument("-v", "--verbose", action="store_true", help="show each function's help line")
    f.set_defaults(run=_functions)

    e = sub.add_parser(
        "eval",
        help="evaluate one worksheet function as a cell would",
        description="Evaluate NAME with the given cell values (numbers are parsed; '' is a blank "
        "cell). Example: joulebook eval JB_PROP water 'h in kJ/kg' 'T in degC' 25 'P in kPa' 101.325",
    )
    e.add_argument("name", help="function name, e.g. JB_PROP")
    e.add_argument("args", nargs="*", help="cell values in order")
    e.set_defaults(run=_eval)

    for verb, what, run in (
        ("docs", "docs/functions.md", _docs),
        ("sheet", "the xlwings UDF module and workbooks/joulebook_udfs.bas", _sheet),
    ):
        g = sub.add_parser(
            verb,
            help=f"regenerate {what} from the catalog",
            description=f"Write {what} under ROOT (default: current folder).",
        )
        g.add_argument("--root", default=".", help="project root (default: current folder)")
        g.set_defaults(run=run)
    return p


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    ns = parser.parse_args(argv)
    if not getattr(ns, "run", None):
        parser.print_help()
        return 0
    return ns.run(ns)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
