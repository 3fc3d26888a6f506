"""The ``joulebook`` command.  Heavy modules (CoolProp, pint) load only inside the verbs."""

from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path

from joulebook.core.version import __version__


def _functions(ns: argparse.Namespace) -> int:
    from joulebook.catalog import CATALOG, FAMILIES

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
    from joulebook.catalog import as_rows, call
    from joulebook.core.errors import JoulebookError

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

    from joulebook.tools.docgen import write

    for p in write(Path(ns.root)):
        print(f"wrote {p}")
    return 0


def _sheet(ns: argparse.Namespace) -> int:
    from pathlib import Path

    from joulebook.tools.sheetgen import write

    for p in write(Path(ns.root)):
        print(f"wrote {p}")
    return 0


def _calc_extension(ns: argparse.Namespace) -> int:
    from joulebook.tools.calcgen import write

    out = Path(ns.output)
    if out.exists() and not ns.force:
        print(f"joulebook: {out} exists; use --force to replace it", file=sys.stderr)
        return 2
    python = ns.python or sys.executable
    if not Path(python).exists():
        print(f"joulebook: --python {python} does not exist", file=sys.stderr)
        return 2
    write(out, python)
    print(f"wrote {out}: install it with `unopkg add {out}` (calls run in {python})")
    return 0


class _Bar:
    """A progress bar (tqdm) on a terminal's stderr; silent when stderr is not a terminal or
    with ``-q``, so CI logs and redirected output never carry it."""

    def __init__(self, total: int, unit: str, quiet: bool = False, least: int = 1):
        self._bar = None
        self._total, self._unit = total, unit
        self._on = not quiet and total >= least and sys.stderr.isatty()

    def __call__(self, done: int, total: int | None = None) -> None:
        """Engine callback form: *done* of *total* so far."""
        if not self._on:
            return
        if self._bar is None:
            from tqdm import tqdm

            self._bar = tqdm(total=total or self._total, unit=self._unit, file=sys.stderr)
        self._bar.update(done - self._bar.n)

    def step(self) -> None:
        self(self._bar.n + 1 if self._bar is not None else 1)

    def close(self) -> None:
        if self._bar is not None:
            self._bar.close()


def _progress(quiet: bool = False) -> _Bar:
    """The cell progress of one large workbook (shown from 2,000 formula cells)."""
    return _Bar(0, "cells", quiet, least=0)


def _load(path: str, budget=None):
    from joulebook.core.errors import JoulebookError

    from .runio import regular_file, shown
    from .workbook.budget import TooLarge, run_within
    from .workbook.engine import Engine
    from .workbook.reader import read_book

    bar = _progress()

    def work():
        regular_file(Path(path))
        book = read_book(path)
        return book, Engine(book, progress=_cells_only(bar)).run()

    try:
        return run_within(budget, work)
    except (JoulebookError, OSError) as e:
        msg = (
            e.cell_text()
            if isinstance(e, JoulebookError)
            else f"cannot read {shown(path)}: {e.strerror}"
        )
        name = shown(Path(path).name)
        print(msg if name in msg else f"{shown(path)}: {msg}", file=sys.stderr)
        return None, None
    except TooLarge as e:
        print(_too_large(shown(path), e), file=sys.stderr)
        return None, None
    finally:
        bar.close()


def _cells_only(bar: _Bar):
    def report(done: int, total: int) -> None:
        if total >= 2000:
            bar(done, total)

    return report


def _recalc(ns: argparse.Namespace) -> int:
    import json

    from joulebook.core.errors import JoulebookError

    from .runio import guard_outputs, shown
    from .workbook.check import _same, compare, fmt, summary
    from .workbook.roundtrip import CopyMismatch
    from .workbook.writer import write_copy

    try:
        guard_outputs([ns.book], [("-o", ns.output), ("--json", ns.json)])
    except JoulebookError as e:
        print(e.cell_text(), file=sys.stderr)
        return 2
    budget = _budget(ns)
    if budget is None:
        return 2
    book, outcomes = _load(ns.book, budget)
    if book is None:
        return 2
    try:
        write_copy(book, outcomes, ns.output, force=ns.force)
    except JoulebookError as e:
        print(e.cell_text(), file=sys.stderr)
        return 2
    except OSError as e:  # a read-only folder, a full disk: the target is named
        print(f"cannot write {shown(ns.output)}: {e.strerror or e}", file=sys.stderr)
        return 2
    except CopyMismatch as e:  # the proof of the copy failed: a defect of ours
        print(
            f"joulebook: internal error: nothing written to {ns.output}: the copy would "
            f"differ from {ns.book} beyond the recomputed values ({e}); please report it",
            file=sys.stderr,
        )
        return 3
    rows = compare(book, outcomes, signed=False)  # what changed; no verdict is signed here
    s = summary(rows)
    kept = [r for r in rows if _kept(r)]
    changed = [
        r
        for r in rows
        if r.status == "differs"
        or (r.status == "volatile" and not _same(r.recomputed, r.cached, 1e-9, 1e-12))
    ]
    new = [r for r in rows if r.status == "no cached value"]
    print(
        f"wrote {ns.output}: {s['cells'] - len(kept)} formula cells recalculated, "
        f"{len(changed)} changed from the saved values"
        + (f", {len(new)} had no saved value" if new else "")
        + (f", {len(kept)} left as saved" if kept else "")
        + (
            f", {_n(s['errors_in_values'], 'holds an error value', 'hold error values')}"
            if s["errors_in_values"]
            else ""
        )
    )
    for title, group in (("changed", changed), ("left as saved", kept)):
        for r in group[:_SHOWN]:
            why = r.note if title == "left as saved" else f"{fmt(r.cached)} -> {fmt(r.recomputed)}"
            print(f"  {title}: {r.sheet}!{r.cell}  {why}")
        if len(group) > _SHOWN:
            more = "see --json" if not ns.json else f"all in {ns.json}"
            print(f"  … and {len(group) - _SHOWN} more {title} ({more})")
    if ns.json:
        from .workbook.check import json_value as enc

        def cell(r):
            return {
                "cell": f"{r.sheet}!{r.cell}",
                "formula": r.formula,
                "saved": enc(r.cached),
                "recomputed": enc(r.recomputed),
                "status": r.status,
                "note": r.note,
            }

        report = {
            "workbook": shown(book.path),
            "output": shown(ns.output),
            "summary": {**s, "changed": len(changed), "left_as_saved": len(kept)},
            "changed": [cell(r) for r in changed],
            "no_saved_value": [cell(r) for r in new],
            "left_as_saved": [cell(r) for r in kept],
        }
        if not _write_text(ns.json, json.dumps(report, indent=2, default=str, allow_nan=False)):
            return 2
    return 0


_SHOWN = 10  # cells listed on the console per group


def _kept(r) -> bool:
    """A row of a cell that recalc left with its saved value."""
    from .workbook.status import Status

    return r.status in (Status.UNSUPPORTED, Status.CIRCULAR, Status.ERROR, Status.NOT_CHECKED)


def _write_text(path: str, text: str) -> bool:
    from .runio import write_report

    return write_report(path, text)


def _check(ns: argparse.Namespace) -> int:
    from joulebook.core.errors import BadInput

    from .runio import guard_outputs, shown
    from .workbook.console import failing_rows, summary_words

    paths, unmatched = _workbook_paths(ns.books)
    for spec in unmatched:
        print(
            f"{shown(spec)}: no such workbook (nor a folder or pattern matching any)",
            file=sys.stderr,
        )
    if not paths:
        return 2
    try:
        guard_outputs(
            paths,
            [
                ("--json", ns.json),
                ("--junit", ns.junit),
                ("--summary", ns.summary),
                ("--sarif", ns.sarif),
            ],
        )
    except BadInput as e:
        print(e.cell_text(), file=sys.stderr)
        return 2
    budget = _budget(ns, min(len(paths), ns.jobs or os.cpu_count() or 1))
    if budget is None:
        return 2
    allow = (ns.allow_errors, ns.allow_unsupported, ns.allow_refusals, ns.allow_unit_clash)
    jobs = [(str(p), ns.rtol, ns.atol, *allow[:2], budget, *allow[2:]) for p in paths]
    bar = _Bar(len(jobs), "workbooks", ns.quiet, least=2)
    try:
        if ns.cluster:
            results = _on_cluster(ns.cluster, jobs, bar, ns.cluster_wait)
            if results is None:
                return 2
        else:
            results = _on_this_machine(jobs, ns.jobs, bar)
    finally:
        bar.close()
    many = len(results) > 1
    code = 2 if unmatched else 0
    for res in results:
        code = max(code, res["code"])
        if res["message"]:
            print(f"{res['path']}: {res['message']}", file=sys.stderr)
            continue
        bad = res["failing"]
        if bad:
            print("\n".join(failing_rows(bad[: ns.max_rows])))
            for r in bad[: ns.max_rows]:  # why a cell that recomputes cannot be signed
                if r["status"] in _SIGNED_REASONS and r["note"]:
                    print(f"  {r['sheet']}!{r['cell']} {r['status']}: {r['note'][:300]}")
            if len(bad) > ns.max_rows:
                print(f"… {len(bad) - ns.max_rows} more (see --json)")
        relaxed = [
            w
            for w, on in (
                ("errors", ns.allow_errors),
                ("unsupported", ns.allow_unsupported),
                ("refusals", ns.allow_refusals),
                ("unit clash", ns.allow_unit_clash),
            )
            if on
        ]
        print(
            (f"{res['path']}: " if many else "")
            + summary_words(res["summary"])
            + f"; tolerance rtol={ns.rtol:g}, atol={ns.atol:g}"
            + (f"; relaxed: {', '.join(relaxed)} allowed" if relaxed else "")
            + f"; {len(bad)} failing"
        )
    if many:
        print(
            f"{len(results)} workbooks: {sum(r['code'] == 0 for r in results)} hold, "
            f"{sum(r['code'] == 1 for r in results)} fail, "
            f"{sum(r['code'] >= 2 for r in results)} could not be checked"
        )
    if ns.json and not _write_text(ns.json, _combined_json(results, ns, many)):
        return 2
    if ns.junit and not _write_text(ns.junit, _combined_junit(results, many)):
        return 2
    if ns.summary and not _write_text(ns.summary, _summary_markdown(results)):
        return 2
    if ns.sarif and not _write_text(ns.sarif, _sarif(results)):
        return 2
    return code


#: the statuses of a value that recomputes but cannot be signed: their reason is printed
_SIGNED_REASONS = ("unit clash", "refusal used", "blank input", "outside the model")


def _on_this_machine(jobs: list, n: int, bar: _Bar) -> list[dict]:
    """Check each workbook in one of *n* processes (0: one per core); results in job order."""
    workers = max(1, min(n or os.cpu_count() or 1, len(jobs)))
    if workers == 1:
        out = []
        for j in jobs:
            out.append(check_one(j))
            bar.step()
        return out
    import multiprocessing
    from concurrent.futures import ProcessPoolExecutor, as_completed

    context = None
    if "fork" in multiprocessing.get_all_start_methods() and sys.platform != "darwin":
        # the engine's imports are done once here and shared with forked workers (each
        # would otherwise pay them again); where fork is not offered, workers import anew
        from .workbook.engine import warm_up

        warm_up()
        context = multiprocessing.get_context("fork")
    results: list = [None] * len(jobs)
    with ProcessPoolExecutor(max_workers=workers, mp_context=context) as pool:
        futures = {pool.submit(check_one, j): i for i, j in enumerate(jobs)}
        for fut in as_completed(futures):
            results[futures[fut]] = fut.result()
            bar.step()
    return results


def _on_cluster(address: str, jobs: list, bar: _Bar, wait: float = 300.0) -> list[dict] | None:
    """Check each workbook on a Dask distributed cluster at *address*.

    The workbook's bytes travel with its job, so the workers need joulebook (the same
    version) but not the files; each result is the one :func:`check_one` gives here.  A job
    the cluster loses (its worker died, or no result came for *wait* seconds) is reported
    as a workbook not checked (exit 2), never waited for forever."""
    try:
        from distributed import Client
        from distributed import wait as dask_wait
    except ImportError:
        print("--cluster needs Dask distributed: pip install 'joulebook[cluster]'", file=sys.stderr)
        return None
    try:
        client = Client(address, timeout=_CLUSTER_CONNECT)
    except (OSError, TimeoutError, ValueError) as e:
        print(f"--cluster {address}: cannot connect ({type(e).__name__}: {e})", file=sys.stderr)
        return None
    results: list = [None] * len(jobs)
    with client:
        futures = {}
        for i, job in enumerate(jobs):
            try:
                data = Path(job[0]).read_bytes()
            except OSError as e:
                results[i] = _unreadable(job[0], f"cannot read: {e.strerror}")
                bar.step()
                continue
            futures[client.submit(check_bytes, job, data, pure=False)] = i
        pending = set(futures)
        while pending:
            done, pending = _next_done(dask_wait, pending, wait)
            if not done:  # nothing came back in time: the work is lost, not waited for
                for fut in pending:
                    results[futures[fut]] = _unreadable(
                        jobs[futures[fut]][0],
                        f"not checked: the cluster at {address} returned no result for "
                        f"{wait:g} s (workers lost or busy); see --cluster-wait",
                    )
                    fut.cancel()
                break
            for fut in done:
                i = futures[fut]
                try:
                    results[i] = fut.result()
                except Exception as e:  # a worker lost (KilledWorker), a cancelled job
                    results[i] = _unreadable(
                        jobs[i][0], f"not checked: lost on the cluster ({type(e).__name__})"
                    )
                bar.step()
    return results


def _next_done(dask_wait, pending: set, wait: float):
    """(done, still pending) once at least one job finished, or (empty, pending) after
    *wait* seconds without any."""
    try:
        done, rest = dask_wait(list(pending), timeout=wait, return_when="FIRST_COMPLETED")
    except Exception:  # TimeoutError; a scheduler gone (its connection closed)
        return set(), pending
    return set(done), set(rest)


_CLUSTER_CONNECT = "15s"  # how long to keep trying to reach the scheduler


def _unreadable(path: str, why: str, code: int = 2) -> dict:
    from .runio import shown, uri

    return {
        "path": shown(path),
        "uri": uri(path),
        "code": code,
        "message": why,
        "failing": [],
        "summary": {},
    }


def check_bytes(job, data: bytes) -> dict:
    """:func:`check_one` for a workbook sent as bytes (a cluster worker has no copy of the
    file): written to a private temporary folder under its own name, checked, removed; the
    verdict names the original path."""
    import tempfile

    path = job[0]
    with tempfile.TemporaryDirectory(prefix="joulebook-") as tmp:
        local = Path(tmp) / Path(path).name
        local.write_bytes(data)
        return check_one((str(local), *job[1:]), shown_as=path)


_WORKBOOK_SUFFIXES = (".xlsx", ".xlsm")
# found in folders too, so that a legacy or binary file is reported rather than passed over
_REPORTED_SUFFIXES = (".xls", ".xlsb")


def _workbook_paths(specs: list[str]):
    """Files, folders (searched recursively for .xlsx/.xlsm, lock files ``~$…`` skipped) and
    glob patterns (expanded here, so they work unquoted or quoted) → workbook paths."""
    import glob

    out, unmatched = [], []
    for spec in specs:
        p = Path(spec)
        if p.is_dir():
            found = sorted(
                q
                for q in p.rglob("*")
                if q.suffix.lower() in _WORKBOOK_SUFFIXES + _REPORTED_SUFFIXES
                and not q.name.startswith("~$")
            )
        elif any(ch in spec for ch in "*?["):
            found = sorted(Path(q) for q in glob.glob(spec, recursive=True) if Path(q).is_file())
        else:
            found = [p]
        if not found:
            unmatched.append(spec)
        out.extend(q for q in found if q not in out)
    return out, unmatched


def check_one(job, shown_as: str | None = None) -> dict:
    """Check one workbook (in this process or a worker): its verdict as plain data.

    *shown_as* is the path the verdict names when the file checked is a copy."""
    from joulebook.core.errors import JoulebookError

    from .runio import regular_file, shown, uri
    from .workbook.budget import TooLarge, run_within
    from .workbook.check import compare, failing, summary, to_json, to_junit
    from .workbook.engine import Engine
    from .workbook.reader import read_book
    from .workbook.status import Status

    path, rtol, atol, allow_errors, allow_unsupported, *rest = job
    budget = rest[0] if rest else None
    allow = (allow_errors, allow_unsupported, *rest[1:3])
    name = shown(shown_as or path)
    res = {
        "path": name,
        "uri": uri(shown_as or path),
        "code": 0,
        "message": "",
        "failing": [],
        "summary": {},
    }

    def work():
        regular_file(Path(path))
        book = read_book(path)
        if shown_as or name != path:
            book.path = Path(name)
        return book, compare(book, Engine(book).run(), rtol=rtol, atol=atol)

    try:
        book, rows = run_within(budget, work)
    except (JoulebookError, OSError) as e:
        why = e.cell_text() if isinstance(e, JoulebookError) else f"cannot read: {e.strerror}"
        return {**res, "code": 2, "message": why}
    except TooLarge as e:
        return {**res, "code": 2, "message": _too_large(None, e), "status": Status.TOO_LARGE.value}
    except Exception as e:  # a defect of ours, reported with this workbook's name
        return {**res, "code": 3, "message": f"internal error ({type(e).__name__}): {e}"}
    bad = failing(rows, *allow)
    res.update(
        code=1 if bad else 0,
        summary=summary(rows),
        failing=[vars(r) for r in bad],
        json=to_json(book, rows, rtol, atol),
        junit=to_junit(book, rows, bad),
    )
    return res


def _combined_json(results: list, ns, many: bool) -> str:
    import json

    # one shape for one workbook and for many: a list of workbooks (schema:
    # joulebook/faces/workbook/check.schema.json, docs/ci.md)
    books = []
    for r in results:
        if r["message"]:
            books.append(
                {"workbook": r["path"], "exit": r["code"], "reason": r["message"]}
                | ({"status": r["status"]} if r.get("status") else {})
            )
        else:
            books.append({**json.loads(r["json"]), "exit": r["code"]})
    return json.dumps(
        {"tolerance": {"rtol": ns.rtol, "atol": ns.atol}, "workbooks": books},
        indent=2,
        allow_nan=False,
    )


def _combined_junit(results: list, many: bool) -> str:
    from xml.sax.saxutils import quoteattr

    if not many and not results[0]["message"]:
        return results[0]["junit"]
    head = '<?xml version="1.0" encoding="utf-8"?>'
    suites = []
    for r in results:
        if r["message"]:
            name = quoteattr("joulebook check " + Path(r["path"]).name)
            suites.append(
                f'<testsuite name={name} tests="1" failures="0" errors="1">\n'
                f'  <testcase classname="workbook" name={quoteattr(r["path"])}>'
                f"<error message={quoteattr(r['message'])}/></testcase>\n</testsuite>"
            )
        else:
            suites.append(r["junit"].replace(head, "").strip())
    return head + "\n<testsuites>\n" + "\n".join(suites) + "\n</testsuites>\n"


def _sarif_rules() -> dict[str, str]:
    """One SARIF rule per failing status (the one Status list), and an unreadable workbook."""
    from .workbook.status import STATUSES, Status

    rules = {s.value: s.describe() for s in STATUSES if s is not Status.PASS}
    return {**rules, "unreadable": "the workbook could not be read"}


def _sarif(results: list) -> str:
    """SARIF 2.1.0 (OASIS): one result per failing cell, each workbook an artifact, the
    cell (Sheet!A1) in the region's message."""
    import json

    from .workbook.check import VALUE_STATUSES, fmt

    rules = _sarif_rules()
    ids = list(rules)
    artifacts, found = [], []
    from .runio import uri as as_uri

    for i, r in enumerate(results):
        uri = r.get("uri") or as_uri(r["path"])
        artifacts.append({"location": {"uri": uri}})
        where = {"artifactLocation": {"uri": uri, "index": i}}
        if r["message"]:
            found.append(
                {
                    "ruleId": "unreadable",
                    "ruleIndex": ids.index("unreadable"),
                    "level": "error",
                    "message": {"text": r["message"]},
                    "locations": [{"physicalLocation": where}],
                }
            )
        for c in r["failing"]:
            cell = f"{c['sheet']}!{c['cell']}"
            text = (
                f"{cell}: {c['status']}; saved {fmt(c['cached'])}, recomputed "
                f"{fmt(c['recomputed'])}" + (f"; {c['note']}" if c["note"] else "")
            )
            found.append(
                {
                    "ruleId": c["status"],
                    "ruleIndex": ids.index(c["status"]) if c["status"] in ids else 0,
                    "level": "error" if c["status"] in VALUE_STATUSES else "warning",
                    "message": {"text": text},
                    "locations": [
                        {
                            "physicalLocation": {
                                **where,
                                "region": {"startLine": 1, "message": {"text": cell}},
                            },
                            "logicalLocations": [{"name": cell, "kind": "member"}],
                        }
                    ],
                    "properties": {"formula": "=" + c["formula"]},
                }
            )
    log = {
        "$schema": "https://json.schemastore.org/sarif-2.1.0.json",
        "version": "2.1.0",
        "runs": [
            {
                "tool": {
                    "driver": {
                        "name": "joulebook check",
                        "version": __version__,
                        "rules": [
                            {"id": k, "shortDescription": {"text": v}} for k, v in rules.items()
                        ],
                    }
                },
                "artifacts": artifacts,
                "results": found,
            }
        ],
    }
    return json.dumps(log, indent=2, default=str, allow_nan=False)


def _summary_markdown(results: list) -> str:
    lines = [
        "| workbook | verdict | cells | pass | failing |",
        "| --- | --- | ---: | ---: | ---: |",
    ]
    from .runio import md_cell

    verdicts = {0: "holds", 1: "fails", 2: "could not be read", 3: "internal error"}
    for r in results:
        s = r["summary"]
        name = md_cell(Path(r["path"]).name)
        lines.append(
            f"| {name} | {verdicts[r['code']]}"
            + (f": {md_cell(r['message'])}" if r["message"] else "")
            + f" | {s.get('cells', 0)} | {s.get('pass', 0)} | {len(r['failing'])} |"
        )
    return "\n".join(lines) + "\n"


def _uncertain(package, book, ns: argparse.Namespace) -> None:
    """± U on each result of the package, when input uncertainties are given or stated."""
    from .workbook import sensitivity as S

    stated = [S.Uncertainty.parse(u, book.sheets) for u in ns.u]
    keys = [S.parse_where(r.where, book.sheets) for r in package.results]
    if not keys or not (
        stated or (S.may_state_uncertainties(book) and S.uncertainties_in_book(S.Chain(book, {})))
    ):
        return
    report = S.analyse(book, None, keys, stated, k=ns.k)
    package.uncertainty = {S.where(r.key): r for r in report.results if r.U is not None}


def _audit(ns: argparse.Namespace) -> int:
    import time

    from joulebook.core.errors import BadInput

    from .files import atomic_write
    from .runio import guard_outputs, regular_file, shown
    from .workbook.reader import read_book

    out = Path(ns.output)
    t0 = time.perf_counter()
    try:
        guard_outputs(
            [ns.book],
            [("-o", ns.output), ("--json", ns.json), ("--xlsx", ns.xlsx), ("--pdf", ns.pdf)],
        )
        for target in (out, Path(ns.pdf) if ns.pdf else None):
            if target is not None and target.exists() and not ns.force:
                raise BadInput(f"{shown(target)} exists; use --force to replace it")
        regular_file(Path(ns.book))
        book = read_book(ns.book)
    except (BadInput, OSError) as e:
        msg = (
            e.cell_text()
            if isinstance(e, BadInput)
            else f"cannot read {shown(ns.book)}: {e.strerror or e}"
        )
        named = shown(Path(ns.book).name) in msg
        print(msg if named else f"{shown(ns.book)}: {msg}", file=sys.stderr)
        return 2
    budget = _budget(ns)
    if budget is None:
        return 2
    from .workbook.budget import TooLarge, run_within

    bar = _progress()
    try:
        report, package, text = run_within(budget, _audit_work, book, ns, bar)
    except TooLarge as e:
        print(_too_large(shown(ns.book), e), file=sys.stderr)
        return 2
    except BadInput as e:  # a stated uncertainty not understood (--u)
        print(f"{shown(Path(ns.book).name)}: {e.message}", file=sys.stderr)
        return 2
    finally:
        bar.close()
    from .workbook.package import write_pdf

    target = out
    pages = 0
    try:
        atomic_write(out, lambda fh: fh.write(text))
        if ns.pdf:
            target = Path(ns.pdf)
            pages = write_pdf(text.decode("utf-8"), target)
        if ns.json:
            from .workbook.audit import to_json

            data = to_json(report).encode("utf-8", "backslashreplace")
            target = Path(ns.json)
            target.parent.mkdir(parents=True, exist_ok=True)
            atomic_write(target, lambda fh: fh.write(data))
        if ns.xlsx:
            from .workbook.audit import audit_rows
            from .workbook.writer import add_sheet_copy

            target = Path(ns.xlsx)
            add_sheet_copy(ns.book, ns.xlsx, "joulebook audit", audit_rows(report), force=ns.force)
    except BadInput as e:
        print(e.cell_text(), file=sys.stderr)
        return 2
    except OSError as e:  # a read-only folder, a full disk: the target is named
        print(f"cannot write {shown(target)}: {e.strerror or e}", file=sys.stderr)
        return 2
    if ns.pdf:
        print(f"wrote {ns.pdf}: {_n(pages, 'page')} on {package.paper} paper")
    if ns.xlsx:
        print(f"wrote {ns.xlsx}: a copy of the workbook with a 'joulebook audit' sheet")
    es = report.entries
    passes = sum(e.status == "pass" for e in es)
    differs = sum(e.status == "differs" for e in es)
    print(
        f"wrote {out} ({len(text) // 1024} KiB, {time.perf_counter() - t0:.1f} s): "
        f"{_n(len(es), 'formula cell')} in {_n(len(package.items), 'entry', 'entries')} "
        f"(copied-down cells grouped), {_n(passes, 'pass', 'passes')}, "
        f"{_n(differs, 'difference')}, {_n(len(package.flags), 'flag')}"
    )
    if ns.fail_on_flags and report.flags:
        for e, f in report.flags:
            print(f"flag {e.sheet}!{e.cell}: {f}", file=sys.stderr)
        return 1
    return 0


def _audit_work(book, ns: argparse.Namespace, bar):
    """The audit's report, its calculation package (with ± U where uncertainties are given
    or stated) and the package's HTML: the work the budget bounds."""
    from .workbook.audit import build_audit
    from .workbook.package import build_package, render_package

    report = build_audit(book, progress=_cells_only(bar), copies=False, maps=False)
    package = build_package(report, ns.paper)
    _uncertain(package, book, ns)
    return report, package, render_package(package).encode("utf-8", "backslashreplace")


# --- the budget of one workbook: --max-seconds, --max-memory (every verb on workbooks) -----
def _add_budget(p: argparse.ArgumentParser) -> None:
    p.add_argument(
        "--max-seconds",
        type=float,
        default=600.0,
        help="stop a workbook taking longer than this and report it too large to check "
        "(exit 2; nothing written); default 600",
    )
    p.add_argument(
        "--max-memory",
        metavar="SIZE",
        help="stop a workbook whose run needs more memory than this (800M, 2G; a plain number "
        "is MiB) and report it too large (exit 2; nothing written); default half the "
        "machine's memory shared by the workbooks run at once",
    )


def _budget(ns: argparse.Namespace, jobs: int = 1):
    """The Budget of the options, or None (after saying why) when one is not valid."""
    from .workbook.budget import Budget, default_memory, parse_memory

    try:
        memory = parse_memory(ns.max_memory) if ns.max_memory else default_memory(jobs)
        return Budget(max_seconds=ns.max_seconds, max_memory=memory)
    except ValueError as e:
        msg = str(e).replace("max_seconds", "--max-seconds").replace("max_memory", "--max-memory")
        print(msg, file=sys.stderr)
        return None


def _budgeted(p: argparse.ArgumentParser) -> None:
    """Give a verb registered by its own module (diff, sensitivity) the budget options, and
    run it within them: past the budget it stops and the workbook is too large (exit 2)."""
    _add_budget(p)
    run = p.get_default("run")

    def within(ns: argparse.Namespace) -> int:
        budget = _budget(ns)
        if budget is None:
            return 2
        from .runio import shown
        from .workbook.budget import TooLarge, run_within

        outputs = [Path(x) for x in (ns.output, ns.json, ns.summary) if x]
        before = {p for p in outputs if p.exists()}
        try:
            return run_within(budget, run, ns)
        except TooLarge as e:
            # the budget passed while the reports were being written: none of them stands
            for p in outputs:
                if p not in before:
                    p.unlink(missing_ok=True)
            print(_too_large(shown(getattr(ns, "book", None) or ns.new), e), file=sys.stderr)
            return 2

    p.set_defaults(run=within)


def _too_large(path, e) -> str:
    return (f"{path}: " if path else "") + f"too large to check within the budget: {e.reason}"


def _workbooks(ns: argparse.Namespace) -> int:
    from joulebook.tools.demo import build_workbooks

    for p in build_workbooks(Path(ns.root) / "workbooks"):
        print(f"wrote {p}")
    return 0


def _demo(ns: argparse.Namespace) -> int:
    from joulebook.tools.demo import run_demo

    results = run_demo(ns.folder, pdf=not ns.no_pdf)
    return 0 if results else 1


def _seconds(text: str) -> float:
    """A time in seconds: a finite number above 0."""
    import math

    try:
        x = float(text)
    except ValueError:
        x = math.nan
    if not (math.isfinite(x) and x > 0):
        raise argparse.ArgumentTypeError(f"{text!r} is not a number of seconds above 0")
    return x


def _tolerance(text: str) -> float:
    """A tolerance: a finite number, zero or more (a NaN or infinite one would pass anything)."""
    import math

    try:
        x = float(text)
    except ValueError:
        x = math.nan
    if not (math.isfinite(x) and x >= 0):
        raise argparse.ArgumentTypeError(f"{text!r} is not a finite number of 0 or more")
    return x


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

    r = sub.add_parser(
        "recalc",
        help="write a copy of a workbook with every formula's saved value recalculated",
        description="Recalculate BOOK headless and write OUT: the same package with fresh "
        "cached values (formulas, styles, VBA untouched). BOOK is never written.",
    )
    r.add_argument("book", help="the .xlsx/.xlsm to recalculate")
    r.add_argument("-o", "--output", required=True, help="where to write the recalculated copy")
    r.add_argument("--force", action="store_true", help="replace OUTPUT if it exists")
    r.add_argument(
        "--json", help="write every changed cell and every cell left as saved (with why) here"
    )
    _add_budget(r)
    r.set_defaults(run=_recalc)

    c = sub.add_parser(
        "check",
        help="recompute a workbook and compare with the values Excel saved",
        description="Exit 0 when every formula cell holds; 1 when at least one cell fails "
        "(differs, holds a joulebook or engine error, unit clash, refusal used, blank input, "
        "outside the model, unsupported, not checked, circular; --allow-errors, "
        "--allow-unsupported, --allow-refusals and --allow-unit-clash relax it by name); "
        "2 on a usage error or a "
        "workbook that cannot be read; 3 on an internal failure.",
    )
    c.add_argument(
        "books",
        nargs="+",
        metavar="PATH",
        help="workbooks (.xlsx/.xlsm), folders (searched recursively) or patterns such as "
        "'calcs/**/*.xlsx'",
    )
    c.add_argument(
        "-j", "--jobs", type=int, default=0, help="workbooks checked at once (default: the cores)"
    )
    c.add_argument("--summary", help="write a Markdown table of the verdicts here (CI summaries)")
    c.add_argument("--sarif", help="write a SARIF 2.1.0 log of the failing cells here")
    c.add_argument(
        "--rtol", type=_tolerance, default=1e-9, help="relative tolerance (default 1e-9)"
    )
    c.add_argument(
        "--atol", type=_tolerance, default=1e-12, help="absolute tolerance (default 1e-12)"
    )
    c.add_argument("--json", help="write a JSON report here")
    c.add_argument("--junit", help="write a JUnit XML report here (for CI)")
    c.add_argument(
        "--allow-errors",
        action="store_true",
        help="do not fail on cells holding joulebook or engine errors (they are still counted)",
    )
    c.add_argument(
        "--allow-unsupported",
        action="store_true",
        help="do not fail on unsupported cells and the cells depending on them",
    )
    c.add_argument(
        "--allow-refusals",
        action="store_true",
        help="do not fail on cells computing on a joulebook refusal or a blank required input "
        "(they are still counted)",
    )
    c.add_argument(
        "--allow-unit-clash",
        action="store_true",
        help="do not fail on cells combining quantities whose units disagree (still counted)",
    )
    c.add_argument(
        "--max-rows", type=int, default=50, help="rows of the table printed (default 50)"
    )
    c.add_argument(
        "--cluster",
        metavar="ADDRESS",
        help="check on an existing Dask distributed cluster (e.g. tcp://10.0.0.5:8786); "
        "needs joulebook[cluster] here and on the workers",
    )
    c.add_argument(
        "--cluster-wait",
        type=_seconds,
        default=300.0,
        metavar="SECONDS",
        help="with --cluster: the longest wait for the next result before the workbooks "
        "still out are reported as not checked (exit 2); default 300",
    )
    c.add_argument(
        "-q",
        "--quiet",
        action="store_true",
        help="no progress bar (it is shown only on a terminal)",
    )
    _add_budget(c)
    c.set_defaults(run=_check)

    dm = sub.add_parser(
        "demo",
        help="build, recalculate, check and audit the bundled demo workbooks",
        description="Write the demo calculation workbooks into FOLDER/workbooks, recalculated "
        "copies into FOLDER/recalculated and an audit report for each into FOLDER/reports.",
    )
    dm.add_argument(
        "folder",
        nargs="?",
        default="joulebook-demo",
        help="where to write (default ./joulebook-demo)",
    )
    dm.add_argument("--no-pdf", action="store_true", help="write the HTML packages only, no PDF")
    dm.set_defaults(run=_demo)

    a = sub.add_parser(
        "audit",
        help="write a checker's calculation package (HTML, and PDF with --pdf) of a workbook",
        description="Explain and re-derive every formula cell of BOOK: inputs with units and "
        "sources, the formula with numbers, each joulebook call with its model and working, "
        "recomputed vs saved value with one status, flags a checker raises by eye, a "
        "calculation map per sheet, P–V / T–s diagrams; the title block read from the workbook, "
        "inputs, results, references, cautions and a sign-off block. One self-contained HTML "
        "file; --pdf prints it with numbered pages. Copied-down formulas are one entry.",
    )
    a.add_argument("book", help="the .xlsx/.xlsm to audit")
    a.add_argument("-o", "--output", required=True, help="the HTML report to write")
    a.add_argument("--xlsx", help="also write a copy of the workbook with an added audit sheet")
    a.add_argument("--json", help="also write every entry, flag and figure as JSON")
    a.add_argument(
        "--pdf",
        help="also print the calculation package to this PDF (title block, numbered pages, "
        "sign-off block; through WeasyPrint, which needs the Pango library)",
    )
    a.add_argument(
        "--paper",
        choices=("a4", "letter"),
        default="a4",
        help="the paper the package prints on (default a4)",
    )
    a.add_argument(
        "--u",
        action="append",
        default=[],
        metavar="SHEET!CELL=U[:DIST][:k=K]",
        help="the uncertainty of an input, as for 'joulebook sensitivity'; with it (or with "
        "uncertainties the workbook states) each result carries ± U (docs/uncertainty.md)",
    )
    a.add_argument("--k", type=float, default=2.0, help="coverage factor of ± U (default 2)")
    a.add_argument(
        "--fail-on-flags",
        action="store_true",
        help="exit 1 when any flag is raised (the reports are written first)",
    )
    a.add_argument("--force", action="store_true", help="replace existing outputs")
    _add_budget(a)
    a.set_defaults(run=_audit)

    # joulebook diff OLD NEW: two revisions compared (options and run in workbook/diffcmd.py)
    from .workbook.diffcmd import add_parser as add_diff_parser

    _budgeted(add_diff_parser(sub))

    # joulebook sensitivity BOOK: coefficients and uncertainty (workbook/sensitivitycmd.py)
    from .workbook.sensitivitycmd import add_parser as add_sensitivity_parser

    _budgeted(add_sensitivity_parser(sub))

    x = sub.add_parser(
        "calc-extension",
        help="write the LibreOffice Calc extension (.oxt) of the worksheet functions",
        description="Write a LibreOffice Calc extension exposing every JB_ function; Calc hands "
        "the calls to this Python (or --python), where joulebook is installed. See docs/calc.md.",
    )
    x.add_argument("-o", "--output", required=True, help="the .oxt to write")
    x.add_argument(
        "--python", help="the Python that runs the calls (default: the one running this command)"
    )
    x.add_argument("--force", action="store_true", help="replace an existing file")
    x.set_defaults(run=_calc_extension)

    for verb, what, run in (
        ("docs", "docs/functions.md", _docs),
        ("sheet", "the xlwings UDF module and workbooks/joulebook_udfs.bas", _sheet),
        ("workbooks", "the demo calculation workbooks in workbooks/", _workbooks),
    ):
        g = sub.add_parser(
            verb,
            help=f"regenerate {what} from the catalog",
            description=f"Write {what} under ROOT (default: current folder).",
        )
        g.add_argument("--root", default=".", help="project root (default: current folder)")
        g.set_defaults(run=run)
    return p


def _n(n: int, one: str, many: str | None = None) -> str:
    """``1 flag``, ``2 flags``: a count with its noun."""
    return f"{n} {one if n == 1 else (many or one + 's')}"


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    ns = parser.parse_args(argv)
    if not getattr(ns, "run", None):
        parser.print_help()
        return 0
    from .runio import QuietStream

    out, err = sys.stdout, sys.stderr
    sys.stdout, sys.stderr = QuietStream(out), QuietStream(err)
    try:
        code = ns.run(ns)
        sys.stdout.flush()  # a reader gone now changes nothing: the reports are written
        return code
    except BrokenPipeError:
        # the reader went away (`joulebook functions | head -1`): stop quietly, as Unix tools
        # do; stdout is pointed at devnull so the interpreter's final flush cannot fail again
        import os

        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        return 0
    except Exception as e:  # a defect of ours: exit 3 with the message, never a traceback
        print(f"joulebook: internal error ({type(e).__name__}): {e}", file=sys.stderr)
        return 3
    finally:
        sys.stdout, sys.stderr = out, err


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
