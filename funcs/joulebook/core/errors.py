"""Error types of joulebook and the cell text they become.

Every failure the user can cause is one of the types below, with a message under 200
characters that names the argument, the value given and the valid range.  Both cell faces
show it the same way (:mod:`joulebook.catalog.cellvalues`): the cell text ``Label: message``, or, in
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
    """Base of every error joulebook raises on purpose.

    Parameters
    ----------
    message : str
        What went wrong, naming the argument, the value and the valid range; whitespace is
        collapsed and the text clipped to 200 characters.

    References
    ----------
    .. [1] docs/design.md §4 (errors: one type per kind, a message naming the argument, the
       value and the valid range).

    Examples
    --------
    >>> e = JoulebookError("T = -5 K is below absolute zero")
    >>> e.message
    'T = -5 K is below absolute zero'
    """

    #: short word shown before the message in a cell
    label = "Error"

    def __init__(self, message: str):
        super().__init__(_clip(message))

    @property
    def message(self) -> str:
        """The message as clipped (at most 200 characters)."""
        return self.args[0]

    def cell_text(self) -> str:
        """The text a cell shows for this error: ``Label: message``."""
        return f"{self.label}: {self.message}"


class BadInput(JoulebookError):
    """An argument is missing, of the wrong type, or not a known name or unit.

    Parameters
    ----------
    message : str
        What went wrong, naming the argument, the value and the valid range.

    References
    ----------
    .. [1] docs/design.md §4 (errors: one type per kind, a message naming the argument, the
       value and the valid range).

    Examples
    --------
    >>> BadInput("unknown unit 'degK'").cell_text()
    "BadInput: unknown unit 'degK'"
    """

    label = "BadInput"


class BlankInput(BadInput):
    """A required argument is blank.  The Python face raises it; the cell faces show a blank
    result (a copied-down row whose inputs are not filled in yet).

    Parameters
    ----------
    message : str
        What went wrong, naming the argument, the value and the valid range.

    References
    ----------
    .. [1] docs/design.md §4 (errors: one type per kind, a message naming the argument, the
       value and the valid range).

    Examples
    --------
    >>> BlankInput('value1 is blank').cell_text()
    'BadInput: value1 is blank'
    """


class OutOfRange(JoulebookError):
    """A value lies outside the valid range of the property model or of the physics.

    Parameters
    ----------
    message : str
        What went wrong, naming the argument, the value and the valid range.

    References
    ----------
    .. [1] docs/design.md §4 (errors: one type per kind, a message naming the argument, the
       value and the valid range).

    Examples
    --------
    >>> OutOfRange("T = 5000 K is above the model's 2273.15 K").cell_text()
    "OutOfRange: T = 5000 K is above the model's 2273.15 K"
    """

    label = "OutOfRange"


class NoConvergence(JoulebookError):
    """An iterative solution did not converge; nothing is returned rather than a guess.

    Parameters
    ----------
    message : str
        What went wrong, naming the argument, the value and the valid range.

    References
    ----------
    .. [1] docs/design.md §4 (errors: one type per kind, a message naming the argument, the
       value and the valid range).

    Examples
    --------
    >>> NoConvergence('T from h did not converge').cell_text()
    'NoConvergence: T from h did not converge'
    """

    label = "NoConvergence"


INTERNAL_LABEL = "InternalError"  # the cell text of a failure that is a defect of ours


def cell_text(exc: BaseException) -> str:
    """Text a cell shows for *exc* (``Label: message``).

    Parameters
    ----------
    exc : BaseException
        A project error, or any other exception (a defect of ours, labelled ``InternalError``).

    Returns
    -------
    str
        ``Label: message``, at most 200 characters after the label.

    References
    ----------
    .. [1] docs/design.md §4 (errors: one type per kind, a message naming the argument, the
       value and the valid range).

    Examples
    --------
    >>> cell_text(OutOfRange("x = 1.2 is outside 0–1"))
    'OutOfRange: x = 1.2 is outside 0–1'
    >>> cell_text(ZeroDivisionError("division by zero"))
    'InternalError: ZeroDivisionError: division by zero'
    """
    if isinstance(exc, JoulebookError):
        return exc.cell_text()
    return f"{INTERNAL_LABEL}: {_clip(type(exc).__name__ + ': ' + str(exc))}"


#: every label a failure's cell text starts with
LABELS = ("BadInput", "OutOfRange", "NoConvergence", INTERNAL_LABEL)
_PREFIXES = tuple(f"{label}: " for label in LABELS)


def message_in(value: object) -> str:
    """*value* when it is a failure's cell text (``Label: message``), else "".

    Parameters
    ----------
    value : object
        A cell's value.

    Returns
    -------
    str
        The text itself when it starts with a failure label, otherwise the empty string.

    References
    ----------
    .. [1] docs/design.md §4 (errors: one type per kind, a message naming the argument, the
       value and the valid range).

    Examples
    --------
    >>> message_in("BadInput: unknown fluid 'wtaer'")
    "BadInput: unknown fluid 'wtaer'"
    >>> message_in(42.0)
    ''
    """
    return value if isinstance(value, str) and value.startswith(_PREFIXES) else ""


def fmt_value(value: object) -> str:
    """Short, unambiguous rendering of a user value for messages.

    Parameters
    ----------
    value : object
        The value as the user gave it.

    Returns
    -------
    str
        Floats to 6 significant digits, anything else by ``repr`` clipped to 40 characters.

    References
    ----------
    .. [1] docs/design.md §4 (errors: one type per kind, a message naming the argument, the
       value and the valid range).

    Examples
    --------
    >>> fmt_value(1 / 3)
    '0.333333'
    >>> fmt_value("water")
    "'water'"
    """
    if isinstance(value, float):
        return f"{value:.6g}"
    text = repr(value)
    return text if len(text) <= 40 else text[:37] + "..."
