"""The tutorial page (docs/tutorial.md) runs, and prints what it says it prints.

The docs build executes the same blocks (matplotlib's plot directive); this test checks
their printed numbers too, with the rest of the suite.
"""

from __future__ import annotations

import doctest
from pathlib import Path

TUTORIAL = Path(__file__).resolve().parents[1] / "docs" / "tutorial.md"


def test_tutorial_runs_as_written():
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    result = doctest.testfile(
        str(TUTORIAL),
        module_relative=False,
        optionflags=doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE,
        verbose=False,
    )
    plt.close("all")
    assert result.attempted >= 20
    assert result.failed == 0
