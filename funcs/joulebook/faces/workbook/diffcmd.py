"""``joulebook diff OLD NEW``: the command's options and its run (the command line only
registers it).  Exit codes as ``check``: 0 no change of the kinds ``--fail-on`` names, 1 such
changes, 2 an unreadable input (named) or a usage error, 3 an internal failure."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

__all__ = ["add_parser", "run", "diff_files"]

_FAIL_WORDS = ("inputs", "formulas", "results", "any")


def add_parser(sub) -> argparse.ArgumentParser:
    """Register ``diff`` on the command line's sub-parsers."""
    d = sub.add_parser(
        "diff",
        help="what changed between two revisions of a workbook, and why each result moved",
        description="Align OLD and NEW (sheets by name or content, rows and columns by labels "
        "and formula shapes), list the changed inputs, formulas, rows, columns, sheets, names "
        "and tables with their labels and units, and for each result whose saved value moved "
        "its causes ranked by share (NEW recomputed with each change put back), or "
        "'unexplained' when nothing among its precedents changed. Exit 0 when no change of "
        "the kinds --fail-on names, 1 when there is one, 2 when a workbook cannot be read, "
        "3 on an internal failure. The workbooks are never modified.",
    )
    d.add_argument("old", help="the earlier revision (.xlsx/.xlsm)")
    d.add_argument("new", help="the later revision (.xlsx/.xlsm)")
    d.add_argument("-o", "--output", help="write the HTML report here")
    d.add_argument("--json", help="write every change as JSON here (schema: joulebook-diff/1)")
    d.add_argument("--summary", help="write a Markdown summary here (CI summaries)")
    d.add_argument(
        "--fail-on",
        action="append",
        choices=_FAIL_WORDS,
        default=[],
        help="exit 1 when there are changes of this kind (results counts unexplained moves "
        "too); may be given more than once",
    )
    d.add_argument(
        "--audit",
        action="store_true",
        help="also write the audit of NEW beside the HTML report (-o), each changed cell "
        "linking to its entry",
    )
    d.add_argument(
        "--no-causes",
        action="store_true",
        help="list the causes of each moved result without recomputing NEW to rank them",
    )
    d.add_argument("--force", action="store_true", help="replace existing outputs")
    d.set_defaults(run=run)
    return d


def _read(path: str):
    from joulebook.core.errors import JoulebookError

    from .reader import read_book

    p = Path(path)
    try:
        return read_book(p), ""
    except JoulebookError as e:
        text = str(e)
        return None, text if p.name in text else f"{p.name}: {text}"
    except OSError as e:
        return None, f"cannot read {path}: {e.strerror or e}"


def diff_files(old: str, new: str, causes: bool = True):
    """(Diff, "") for two readable workbooks, else (None, a message naming the file)."""
    from .diff import diff_books

    a, msg = _read(old)
    if a is None:
        return None, msg
    b, msg = _read(new)
    if b is None:
        return None, msg
    return diff_books(a, b, causes=causes), ""


def _outputs(ns) -> list[Path]:
    out = [Path(x) for x in (ns.output, ns.json, ns.summary) if x]
    if ns.audit and ns.output:
        out.append(audit_path(Path(ns.output)))
    return out


def audit_path(html: Path) -> Path:
    """Where ``--audit`` writes the audit of NEW: beside the HTML report."""
    return html.with_name(html.stem + ".audit.html")


def run(ns: argparse.Namespace) -> int:
    from ..files import atomic_write

    if ns.audit and not ns.output:
        print("--audit writes beside the HTML report: give -o/--output too", file=sys.stderr)
        return 2
    from joulebook.core.errors import BadInput

    from ..runio import guard_outputs, regular_file, shown

    try:
        guard_outputs([ns.old, ns.new], [(str(p), str(p)) for p in _outputs(ns)])
        for p in _outputs(ns):
            if p.exists() and not ns.force:
                raise BadInput(f"{shown(p)} exists; use --force to replace it")
        for src in (ns.old, ns.new):
            regular_file(Path(src))
    except BadInput as e:
        print(e.message, file=sys.stderr)
        return 2
    except OSError as e:
        print(f"cannot read {shown(e.filename or ns.old)}: {e.strerror or e}", file=sys.stderr)
        return 2
    d, msg = diff_files(ns.old, ns.new, causes=not ns.no_causes)
    if d is None:
        print(msg, file=sys.stderr)
        return 2
    from . import diff as D

    anchors: dict = {}
    audit_href = None
    if ns.audit:
        from .audit import build_audit
        from .audit import render_html as audit_html

        report = build_audit(d.new)
        anchors = {f"{e.sheet}!{e.cell}": e.anchor for e in report.entries}
        target = audit_path(Path(ns.output))
        text = audit_html(report).encode("utf-8")
        atomic_write(target, lambda fh: fh.write(text))
        audit_href = target.name
    if ns.output:
        html = D.render_html(d, audit_href=audit_href, anchors=anchors).encode("utf-8")
        atomic_write(Path(ns.output), lambda fh: fh.write(html))
    if ns.json:
        data = D.to_json(d).encode("utf-8")
        atomic_write(Path(ns.json), lambda fh: fh.write(data))
    if ns.summary:
        md = D.to_markdown(d).encode("utf-8")
        atomic_write(Path(ns.summary), lambda fh: fh.write(md))
    for n in d.notes:
        print(f"note: {n}")
    if not d.unrelated:
        counts = D.summary(d)
        shown = ", ".join(f"{counts[k]} {k}" for k in D.KINDS if counts[k])
        print(f"{Path(ns.old).name} → {Path(ns.new).name}: {shown or 'no changes'}")
        for c in d.changes:
            if c.kind == "unexplained":
                print(f"UNEXPLAINED {c.where}: {D.why(c)}")
        for c in [c for c in d.changes if c.kind == "result"][:10]:
            print(f"moved {c.where}: {D.why(c)}")
    bad = D.failing(d, ns.fail_on)
    return 1 if bad else 0
