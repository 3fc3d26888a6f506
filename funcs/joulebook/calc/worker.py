"""The joulebook side of the Calc extension: answers cell calls over a pipe.

The extension (running in LibreOffice's own Python) starts ``python -m joulebook.calc.worker``
with the interpreter joulebook is installed in, writes one JSON request per line on its
standard input and reads one JSON answer per line from its standard output:

* request: ``{"f": "JB_PROP", "a": [cell values], "e": text of the JB_ERRORS name or null}``;
  a cell value is ``null`` (blank or omitted), a number, a text, or a 2-D list of those (a
  range or an array);
* answer: ``{"v": value}``, the value being a number, a text, ``null`` (a blank result) or a
  2-D list of those, where a failure in the ``"values"`` error style is
  ``{"error": "#NUM!", "message": "OutOfRange: …"}``.

Every answer comes from :func:`joulebook.cellvalues.cell`, the call path of the other cell
faces, so Calc shows what Excel and the headless engine show.  The worker ends when its
standard input closes (LibreOffice exits).  Nothing but answers is written on the channel:
stray output goes to standard error, which the extension discards.
"""

from __future__ import annotations

import io
import json
import os
import sys

from ..cellvalues import ErrorValue, cell, error_style
from ..errors import JoulebookError, cell_text

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


def answer(request: dict) -> dict:
    """The answer to one request (see the module's description)."""
    try:
        style = error_style(request.get("e"))
    except JoulebookError:
        style = "text"  # an unknown word: the readable text style, as in Excel
    try:
        name = str(request["f"])
        args = request.get("a") or []
        return {"v": encode(cell(name, *args, errors=style))}
    except Exception as e:  # a malformed request: a readable cell, never a traceback
        return {"v": encode(cell_text(e))}


def serve(source, sink) -> None:
    """Answer each request line of *source* on *sink* until *source* ends."""
    for line in source:
        if not line.strip():
            continue
        try:
            request = json.loads(line)
            reply = answer(request) if isinstance(request, dict) else {"v": "BadInput: request"}
        except ValueError as e:
            reply = {"v": encode(cell_text(e))}
        sink.write(json.dumps(reply, allow_nan=False) + "\n")
        sink.flush()


def main() -> int:
    """Serve on the process's standard input and output."""
    channel = os.dup(1)
    os.dup2(2, 1)  # a stray print() goes to stderr, never into the answers
    sys.stdout = sys.stderr
    source = io.TextIOWrapper(sys.stdin.buffer, encoding="utf-8")
    sink = io.TextIOWrapper(os.fdopen(channel, "wb"), encoding="utf-8", newline="\n")
    try:
        serve(source, sink)
    except (BrokenPipeError, KeyboardInterrupt):
        pass
    return 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
