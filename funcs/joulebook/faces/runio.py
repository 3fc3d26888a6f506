"""What the workbook verbs read and write around their work: only regular files read, every
report written atomically and never over an input or another output of the same run, file
names of any bytes shown, and a closed stdout that never changes the exit code.

Used by :mod:`joulebook.faces.cli`; nothing here imports a face.
"""

from __future__ import annotations

import os
import stat
import sys
from pathlib import Path
from urllib.parse import quote

from joulebook.core.errors import BadInput

from .files import atomic_write

__all__ = [
    "shown",
    "uri",
    "md_cell",
    "regular_file",
    "guard_outputs",
    "write_report",
    "QuietStream",
]


def shown(path) -> str:
    """A path as text that any terminal and UTF-8 file can carry: bytes that are not UTF-8
    (a Latin-1 name on a POSIX disk) as ``\\xe9`` escapes."""
    text = os.fspath(path)
    if isinstance(text, bytes):
        text = os.fsdecode(text)
    return text.encode("utf-8", "surrogateescape").decode("utf-8", "backslashreplace")


def uri(path) -> str:
    """A relative or absolute path as a URI reference (RFC 3986): its bytes percent-encoded,
    ``/`` kept."""
    raw = os.fsencode(Path(path).as_posix())
    return quote(raw, safe="/")


def md_cell(text: str) -> str:
    """Text for one cell of a Markdown table: ``|`` and ``\\`` escaped, line breaks as
    spaces, ``<`` and ``>`` as entities (a CI summary renders HTML)."""
    out = str(text).replace("\\", "\\\\").replace("|", "\\|")
    out = out.replace("<", "&lt;").replace(">", "&gt;").replace("`", "\\`")
    return " ".join(out.splitlines()) if ("\n" in out or "\r" in out) else out


def regular_file(path: Path) -> None:
    """Refuse anything but a regular file (after following symbolic links, whose loops are
    refused): a FIFO would block forever, a device (``/dev/zero``) never end, a socket not
    open.

    Raises
    ------
    BadInput
        Naming the path and what it is.
    OSError
        The file does not exist or cannot be examined.
    """
    try:
        st = os.stat(path)  # follows links; a loop raises ELOOP
    except OSError as e:
        if e.errno == 40:  # ELOOP
            raise BadInput(f"{shown(path)}: a loop of symbolic links") from None
        raise
    if stat.S_ISREG(st.st_mode):
        return
    kind = (
        "a folder"
        if stat.S_ISDIR(st.st_mode)
        else "a named pipe (FIFO)"
        if stat.S_ISFIFO(st.st_mode)
        else "a socket"
        if stat.S_ISSOCK(st.st_mode)
        else "a device"
        if stat.S_ISCHR(st.st_mode) or stat.S_ISBLK(st.st_mode)
        else "not a regular file"
    )
    raise BadInput(f"{shown(path)} is {kind}, not a workbook file; only regular files are read")


def _same_file(a: Path, b: Path) -> bool:
    try:
        if a.resolve() == b.resolve():
            return True
        return a.exists() and b.exists() and os.path.samefile(a, b)
    except OSError:
        return False


def guard_outputs(inputs: list, outputs: list[tuple[str, str | None]]) -> None:
    """Refuse an output that is an input (a hard link included) or another output of the
    same run, before any work is done.

    *outputs* holds (option, path or None) pairs, e.g. ``("--json", "r.json")``.

    Raises
    ------
    BadInput
        Naming both.
    """
    named = [(opt, Path(p)) for opt, p in outputs if p]
    for opt, out in named:
        for src in inputs:
            if _same_file(out, Path(src)):
                raise BadInput(
                    f"{opt} {shown(out)} is the input workbook; joulebook never writes over "
                    "its input"
                )
    for i, (opt, out) in enumerate(named):
        for opt2, out2 in named[:i]:
            if _same_file(out, out2):
                raise BadInput(f"{opt} and {opt2} name the same file {shown(out)}")


def write_report(path: str, text: str) -> bool:
    """Write a text report atomically (its folder created); False, with the target named on
    stderr, when it cannot be written (read-only, full disk)."""
    p = Path(path)
    data = text.encode("utf-8", "backslashreplace")
    try:
        p.parent.mkdir(parents=True, exist_ok=True)
        atomic_write(p, lambda fh: fh.write(data))
    except OSError as e:
        print(f"cannot write {shown(path)}: {e.strerror or e}", file=sys.stderr)
        return False
    return True


class QuietStream:
    """A console stream that outlives its reader: after ``| head -1`` closes the pipe the
    rest is dropped (the run, its reports and its exit code go on); text the console's
    encoding cannot carry is written with escapes."""

    def __init__(self, stream):
        self._stream = stream
        self.closed_by_reader = False

    def write(self, text: str) -> int:
        if self.closed_by_reader:
            return len(text)
        try:
            return self._stream.write(text)
        except BrokenPipeError:
            self._gone()
        except UnicodeEncodeError:
            enc = getattr(self._stream, "encoding", None) or "utf-8"
            try:
                return self._stream.write(text.encode(enc, "backslashreplace").decode(enc))
            except BrokenPipeError:
                self._gone()
        return len(text)

    def flush(self) -> None:
        if self.closed_by_reader:
            return
        try:
            self._stream.flush()
        except BrokenPipeError:
            self._gone()

    def _gone(self) -> None:
        """The reader went away: later writes, and the interpreter's final flush, go to
        the null device."""
        self.closed_by_reader = True
        try:
            fd = os.open(os.devnull, os.O_WRONLY)
            os.dup2(fd, self._stream.fileno())
            os.close(fd)
        except (OSError, ValueError, AttributeError):
            pass
        except Exception:  # io.UnsupportedOperation: a stream without a file descriptor
            pass

    def __getattr__(self, name):
        return getattr(self._stream, name)
