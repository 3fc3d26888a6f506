"""The joulebook side of the Calc extension: answers cell calls over a pipe.

The extension (running in LibreOffice's own Python) starts ``python -m joulebook.faces.calc.worker``
with the interpreter joulebook is installed in, writes one JSON request per line on its
standard input and reads one JSON answer per line from its standard output:

* request: ``{"f": "JB_PROP", "a": [cell values], "e": text of the JB_ERRORS name or null}``;
  a cell value is ``null`` (blank or omitted), a number, a text, or a 2-D list of those (a
  range or an array);
* answer: ``{"v": value}``, the value being a number, a text, ``null`` (a blank result) or a
  2-D list of those, where a failure in the ``"values"`` error style is
  ``{"error": "#NUM!", "message": "OutOfRange: …"}``.

Every answer comes from :func:`joulebook.catalog.cellvalues.cell`, the call path of the other cell
faces, so Calc shows what Excel and the headless engine show.  The worker ends when its
standard input closes (LibreOffice exits).  Nothing but answers is written on the channel:
stray output goes to standard error, which the extension discards.
"""

from __future__ import annotations

import io
import json
import os
import sys

from joulebook.catalog.cellvalues import ErrorValue, cell, error_style
from joulebook.core.errors import BadInput, JoulebookError, cell_text

__all__ = ["answer", "encode", "serve", "main"]


def encode(value):
    """A cell result as JSON-ready data (error values as ``{"error", "message"}``)."""
    if isinstance(value, ErrorValue):
        return {"error": value.code, "message": value.message}
    if isinstance(value, list):
        return [[encode(v) for v in row] for row in value]
    if isinstance(value, bool) or value is None or isinstance(value, str):
        return value
    if isinstance(value, (int, float)):
        return float(value)
    return str(value)


class _Malformed(Exception):
    """A request that is not one (not JSON, not UTF-8, no function name …)."""


def _request(request) -> tuple[str, list, object]:
    """(name, arguments, error-style text) of a well-formed request, else _Malformed naming
    what is wrong."""
    if not isinstance(request, dict):
        raise _Malformed(f"a request is a JSON object, not {type(request).__name__}")
    name = request.get("f")
    if not isinstance(name, str) or not name:
        raise _Malformed('the request names no function ("f" must be a text)')
    args = request.get("a", [])
    if args is None:
        args = []
    if not isinstance(args, list):  # a text would be splatted character by character
        raise _Malformed(f'the arguments ("a") must be a list, not {type(args).__name__}')
    style = request.get("e")
    if style is not None and not isinstance(style, str):
        raise _Malformed('the error style ("e") must be a text or null')
    return name, args, style


def _bad(why: str) -> dict:
    return {"v": encode(BadInput(f"request: {why}").cell_text())}


def answer(request) -> dict:
    """The answer to one request (see the module's description); a malformed request is
    answered with a ``BadInput`` naming what is wrong."""
    try:
        name, args, style_text = _request(request)
    except _Malformed as e:
        return _bad(str(e))
    try:
        style = error_style(style_text)
    except JoulebookError:
        style = "text"  # an unknown word: the readable text style, as in Excel
    try:
        return {"v": encode(cell(name, *args, errors=style))}
    except Exception as e:  # a defect of ours: a readable cell, never a traceback
        return {"v": encode(cell_text(e))}


def _decode(line) -> dict:
    """One request line (bytes or text) as an answer."""
    if isinstance(line, bytes):
        try:
            line = line.decode("utf-8")
        except UnicodeDecodeError as e:
            return _bad(f"not UTF-8 (byte {e.start})")
    try:
        request = json.loads(line)
    except RecursionError:
        return _bad("JSON nested too deep")
    except ValueError as e:
        return _bad(f"not JSON ({str(e)[:60]})")
    return answer(request)


def serve(source, sink) -> None:
    """Answer each request line of *source* (bytes or text) on *sink* until *source* ends;
    every line gets one answer, a malformed one a ``BadInput``, and the worker goes on."""
    for line in source:
        if isinstance(line, _Stalled):
            reply = _bad(line.why)
        else:
            if not line.strip():
                continue
            try:
                reply = _decode(line)
            except Exception as e:  # a defect of ours: answered, and the worker goes on
                reply = {"v": encode(cell_text(e))}
        try:
            text = json.dumps(reply, allow_nan=False)
        except ValueError:
            text = json.dumps(_bad("the answer holds a number that is not finite"))
        sink.write(text + "\n")
        sink.flush()


class _Stalled:
    """A request line that could not be read whole: what went wrong."""

    def __init__(self, why: str):
        self.why = why


#: a request started must end (its newline) within this many seconds
READ_TIMEOUT = 60.0
#: the longest request line read (a range of a million cells fits)
MAX_LINE = 256 * 2**20


def _too_long(max_line: int) -> str:
    return f"a line longer than {max_line:,} bytes"


def lines(fd: int, timeout: float = READ_TIMEOUT, max_line: int = MAX_LINE):
    """The request lines arriving on file descriptor *fd*, as bytes, until it closes.

    Waiting for a request has no limit (Calc may be idle); a request begun must end within
    *timeout* seconds (else a :class:`_Stalled` is given and the next byte starts a new
    line) and within *max_line* bytes (else a :class:`_Stalled` is given and the rest of
    that line dropped), so one bad writer never hangs or floods the worker."""
    import select

    buf = bytearray()
    dropping = False  # inside a line already answered as too long or stalled
    while True:
        if buf or dropping:
            ready, _, _ = select.select([fd], [], [], timeout)
            if not ready:  # answered; whatever comes next starts a new line
                if not dropping:
                    yield _Stalled(f"incomplete, no newline after {timeout:g} s")
                buf.clear()
                dropping = False
                continue
        chunk = os.read(fd, 1 << 16)
        if not chunk:
            if buf and not dropping:
                yield bytes(buf)
            return
        buf += chunk
        while True:
            i = buf.find(b"\n")
            if i < 0:
                break
            if not dropping:
                yield bytes(buf[:i]) if i <= max_line else _Stalled(_too_long(max_line))
            dropping = False
            del buf[: i + 1]
        if len(buf) > max_line and not dropping:
            yield _Stalled(_too_long(max_line))
            buf.clear()
            dropping = True
        elif dropping:
            buf.clear()


def main() -> int:
    """Serve on the process's standard input and output."""
    channel = os.dup(1)
    os.dup2(2, 1)  # a stray print() goes to stderr, never into the answers
    sys.stdout = sys.stderr
    if os.name == "nt":  # no select() on pipes: whole lines, as bytes, without a timeout
        source = iter(sys.stdin.buffer.readline, b"")
    else:
        source = lines(sys.stdin.buffer.fileno())
    sink = io.TextIOWrapper(os.fdopen(channel, "wb"), encoding="utf-8", newline="\n")
    try:
        serve(source, sink)
    except (BrokenPipeError, KeyboardInterrupt):
        pass
    return 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
