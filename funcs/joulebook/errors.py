"""Error types of joulebook and the cell text they become.

Every failure the user can cause is one of the types below, with a message under 200
characters that names the argument, the value given and the valid range.  Both cell faces
show it the same way (:mod:`joulebook.cellvalues`): the cell text ``Label: message``, or, in
a workbook whose ``JB_ERRORS`` name is ``"values"``, an error value with the message kept.
"""

from __future__ import annotations

__all__ = [
    "JoulebookError",
    "BadInput",
    "OutOfRange",
    "NoConvergence",
    "BlankInput",
    "cell_text",
    "MAX_MESSAGE",
]

MAX_MESSAGE = 200


def _clip(message: str) -> str:
    message = " ".join(str(message).split())
    if len(message) > MAX_MESSAGE:
        message = message[: MAX_MESSAGE - 1] + "…"
    return message


class JoulebookError(Exception):
    """Base of every error joulebook raises on purpose."""

    #: short word shown before the message in a cell
    label = "Error"

    def __init__(self, message: str):
        super().__init__(_clip(message))

    @property
    def message(self) -> str:
        return self.args[0]

    def cell_text(self) -> str:
        return f"{self.label}: {self.message}"


class BadInput(JoulebookError):
    """An argument is missing, of the wrong type, or not a known name or unit."""

    label = "BadInput"


class BlankInput(BadInput):
    """A required argument is blank.  The Python face raises it; the cell faces show a blank
    result (a copied-down row whose inputs are not filled in yet)."""


class OutOfRange(JoulebookError):
    """A value lies outside the valid range of the property model or of the physics."""

    label = "OutOfRange"


class NoConvergence(JoulebookError):
    """An iterative solution did not converge; nothing is returned rather than a guess."""

    label = "NoConvergence"


INTERNAL_LABEL = "InternalError"  # the cell text of a failure that is a defect of ours


def cell_text(exc: BaseException) -> str:
    """Text a cell shows for *exc* (``Label: message``)."""
    if isinstance(exc, JoulebookError):
        return exc.cell_text()
    return f"{INTERNAL_LABEL}: {_clip(type(exc).__name__ + ': ' + str(exc))}"


#: every label a failure's cell text starts with
LABELS = ("BadInput", "OutOfRange", "NoConvergence", INTERNAL_LABEL)
_PREFIXES = tuple(f"{label}: " for label in LABELS)


def message_in(value: object) -> str:
    """*value* when it is a failure's cell text (``Label: message``), else ""."""
    return value if isinstance(value, str) and value.startswith(_PREFIXES) else ""


def fmt_value(value: object) -> str:
    """Short, unambiguous rendering of a user value for messages."""
    if isinstance(value, float):
        return f"{value:.6g}"
    text = repr(value)
    return text if len(text) <= 40 else text[:37] + "..."
