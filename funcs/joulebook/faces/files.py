"""Writing files safely, shared by every face (sheet, workbook, CLI, demo).

A face never imports another face: what two of them need lives here, below both.
"""

from __future__ import annotations

import os
import socket
import tempfile
from pathlib import Path

__all__ = ["atomic_write", "remove_stale_temporaries"]

_PREFIX = ".joulebook-"


def _tag() -> str:
    """This process's mark in the names of its temporary files: host and process id."""
    host = "".join(ch for ch in socket.gethostname() if ch.isalnum() or ch in "-.")[:40]
    return f"{_PREFIX}{host or 'host'}-{os.getpid()}-"


def remove_stale_temporaries(folder: Path) -> list[Path]:
    """Remove the temporary files that a killed joulebook run on this host left in *folder*
    (named ``.joulebook-HOST-PID-…``, their process gone); those of a live run, of another
    host, and every other file stay.

    Parameters
    ----------
    folder : pathlib.Path
        The folder to clean.

    Returns
    -------
    list of pathlib.Path
        The files removed.

    Examples
    --------
    >>> import pathlib, tempfile
    >>> remove_stale_temporaries(pathlib.Path(tempfile.mkdtemp()))
    []

    References
    ----------
    .. [1] The Open Group, "kill", POSIX.1-2017 (signal 0 tests that a process exists).
    """
    mine = _tag().rsplit("-", 2)[0] + "-"  # ".joulebook-HOST-"
    removed = []
    try:
        names = [n for n in os.listdir(folder) if n.startswith(mine)]
    except OSError:
        return removed
    for name in names:
        pid = name[len(mine) :].split("-", 1)[0]
        if not pid.isdigit() or _alive(int(pid)):
            continue
        try:
            os.unlink(Path(folder) / name)
            removed.append(Path(folder) / name)
        except OSError:
            pass
    return removed


def _alive(pid: int) -> bool:
    if pid == os.getpid() or os.name == "nt":  # Windows' os.kill would end the process
        return True
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except OSError:  # exists, another user's
        return True
    return True


def atomic_write(target: Path, write, verify=None) -> None:
    """Call ``write(fileobj)`` on a temporary file beside *target*, then rename it into place.

    A reader never sees a half-written file, and a failure leaves *target* as it was.  When
    *verify* is given it is called with the temporary file's path once it is complete; if it
    raises, the file is removed and *target* left as it was.

    Parameters
    ----------
    target : pathlib.Path
        The file to write (its folder must exist).
    write : callable
        Called once with a binary file object.
    verify : callable, optional
        Called with the complete temporary file's path before it replaces *target*.

    Examples
    --------
    >>> import pathlib, tempfile
    >>> p = pathlib.Path(tempfile.mkdtemp()) / "out.txt"
    >>> atomic_write(p, lambda fh: fh.write(b"ok"))
    >>> p.read_bytes()
    b'ok'

    References
    ----------
    .. [1] Python Software Foundation, "os.replace", The Python Standard Library
       documentation (an atomic rename on POSIX and Windows).
    """
    target = Path(target)
    remove_stale_temporaries(target.parent)
    fd, tmp = tempfile.mkstemp(prefix=_tag(), suffix=target.suffix, dir=target.parent)
    umask = os.umask(0)
    os.umask(umask)
    os.chmod(tmp, 0o666 & ~umask)  # an ordinary file, not mkstemp's private 0600
    try:
        with os.fdopen(fd, "wb") as fh:
            write(fh)
            fh.flush()
            os.fsync(fh.fileno())
        if verify is not None:
            verify(Path(tmp))
        os.replace(tmp, target)
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise
