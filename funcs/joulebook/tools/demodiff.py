"""The demo's revision review: a second revision of one demo workbook (an invented design
change) and ``joulebook diff`` of the two, written beside the demo's reports."""

from __future__ import annotations

from pathlib import Path

__all__ = ["REVISED", "write_revision", "review"]

#: the demo workbook revised, and what revision B changes (cell, new value, why)
REVISED = "blocked_in_line.xlsx"
_EDITS = (
    ("B10", 12, "the line is now filled from the cooler main: 12 degC, not 15 degC"),
    ("B14", 20, "the segment is re-rated for 20 barg"),
)


#: the plural of each kind of change in the console line ("2 inputs", "1 deleted")
_PLURAL = {
    "deleted": "deleted",
    "inserted": "inserted",
    "renamed": "renamed",
    "extended": "extended",
    "unexplained": "unexplained",
}


def write_revision(folder: str | Path, builders: dict, new_workbook) -> Path:
    """Revision B of the blocked-in line (see ``_EDITS``), recalculated, in *folder*;
    *builders* and *new_workbook* are the demo's (:mod:`.demo`), which calls this."""
    from joulebook.faces.workbook.engine import Engine
    from joulebook.faces.workbook.reader import read_book
    from joulebook.faces.workbook.writer import write_copy

    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    wb = new_workbook()  # as revision A was made: the same error style, nothing else changed
    builders[REVISED](wb)
    ws = wb["Line"]
    for cell, value, _why in _EDITS:
        ws[cell] = value
    raw = folder / ".revision.raw.xlsx"
    wb.save(raw)
    out = folder / (Path(REVISED).stem + "_rev_B.xlsx")
    book = read_book(raw)
    write_copy(book, Engine(book).run(), out, force=True)
    raw.unlink()
    return out


def review(old: Path, reports: Path, builders: dict, new_workbook, echo=print) -> dict:
    """Write revision B beside *old*, diff the two, and write the HTML, JSON and Markdown
    reports into *reports*; returns their paths and the counts of changes."""
    from joulebook.faces.files import atomic_write
    from joulebook.faces.workbook.diff import (
        diff_books,
        render_html,
        summary,
        to_json,
        to_markdown,
    )
    from joulebook.faces.workbook.reader import read_book

    new = write_revision(Path(old).parent.parent / "revisions", builders, new_workbook)
    d = diff_books(read_book(old), read_book(new))
    reports.mkdir(parents=True, exist_ok=True)
    stem = Path(REVISED).stem
    paths = {
        "html": reports / f"{stem}.diff.html",
        "json": reports / f"{stem}.diff.json",
        "summary": reports / f"{stem}.diff.md",
    }
    for key, text in (
        ("html", render_html(d)),
        ("json", to_json(d)),
        ("summary", to_markdown(d)),
    ):
        data = text.encode("utf-8")
        atomic_write(paths[key], lambda fh, data=data: fh.write(data))
    counts = summary(d)
    shown = ", ".join(
        f"{n} {_PLURAL.get(k, k + 's') if n != 1 else k}" for k, n in counts.items() if n
    )
    echo(f"revision B of {REVISED} ({new.name}): {shown}  -> {paths['html']}")
    return {"new": new, "counts": counts, **paths}
