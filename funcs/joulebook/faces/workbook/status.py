"""The one list of verdicts a formula cell can carry, shared by check, audit, diff,
sensitivity, the command line and every report format.

A cell is :attr:`Status.PASS` only when it recomputes to the saved value, its units are
consistent, nothing it depends on is a refusal, an error or a blank required input, and the
catalog's validity checks of every joulebook call in it hold. Otherwise it carries exactly one
other status with its reason.

``Status`` is a ``str`` enum: a member compares equal to its plain-English word
(``Status.PASS == "pass"``), which is also what JSON, JUnit and SARIF carry.

Examples
--------
>>> from joulebook.faces.workbook.status import Status
>>> Status("unit clash") is Status.UNIT_CLASH
True
>>> Status.DIFFERS.describe()
'the saved value differs from the recomputed one'
>>> Status.PASS.holds
True
"""

from __future__ import annotations

from enum import Enum

__all__ = ["Status", "STATUSES"]


class Status(str, Enum):
    """The verdict of one formula cell (its value is the word reports carry)."""

    PASS = "pass"
    DIFFERS = "differs"
    ERROR = "error"
    ERROR_VALUE = "error value"
    UNIT_CLASH = "unit clash"
    REFUSAL_USED = "refusal used"
    BLANK_INPUT = "blank input"
    OUTSIDE_MODEL = "outside the model"
    NO_CACHED_VALUE = "no cached value"
    VOLATILE = "volatile"
    UNSUPPORTED = "unsupported"
    NOT_CHECKED = "not checked"
    CIRCULAR = "circular"
    TOO_LARGE = "too large"

    def __str__(self) -> str:  # the word, in f-strings and reports
        return self.value

    @property
    def holds(self) -> bool:
        """True only for a pass."""
        return self is Status.PASS

    def describe(self) -> str:
        """One line saying what the status means (SARIF rule text, docs, legends)."""
        return _MEANING[self]


_MEANING = {
    Status.PASS: "the cell recomputes to the saved value and nothing it depends on failed",
    Status.DIFFERS: "the saved value differs from the recomputed one",
    Status.ERROR: "the cell holds a joulebook or engine error",
    Status.ERROR_VALUE: "the cell holds a spreadsheet error value (#DIV/0!, #N/A …), as saved",
    Status.UNIT_CLASH: "the cell combines quantities whose units do not agree",
    Status.REFUSAL_USED: "the cell depends on a joulebook refusal or error",
    Status.BLANK_INPUT: "a required input of the cell's chain is blank",
    Status.OUTSIDE_MODEL: "a validity check of the model used by the cell does not hold",
    Status.NO_CACHED_VALUE: "the file holds no saved value for the cell",
    Status.VOLATILE: "the cell depends on NOW, TODAY, RAND or RANDBETWEEN",
    Status.UNSUPPORTED: "the cell uses a function or feature the engine does not evaluate",
    Status.NOT_CHECKED: "the cell reads a cell that could not be evaluated",
    Status.CIRCULAR: "the cell is part of a circular reference",
    Status.TOO_LARGE: "the workbook could not be checked within its time or memory budget",
}

#: every status, in the order reports list them
STATUSES: tuple[Status, ...] = tuple(Status)
