"""Writing files safely, shared by every face (sheet, workbook, CLI, demo).

A face never imports another face: what two of them need lives here, below both.
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

__all__ = ["atomic_write"]


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
    fd, tmp = tempfile.mkstemp(prefix=".joulebook-", suffix=target.suffix, dir=target.parent)
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
