"""The newcomer path, followed literally: the README's two commands on a fresh copy.

Marked `readme` (not in the default run: it creates a virtual environment and installs from
the package index); .ci/run runs it.  The second command is what .ci/run itself runs, so it
is checked to be the same text rather than run recursively.
"""

import re
import shutil
import subprocess
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
pytestmark = pytest.mark.readme


def _commands() -> list[str]:
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    return re.findall(r"```bash\n(.+?)\n```", text)[:2]


def test_readme_has_exactly_two_commands_up_front():
    first, second = _commands()
    assert "joulebook demo" in first and "pytest" in second
    assert second in (ROOT / ".ci" / "run").read_text(encoding="utf-8")


def test_first_command_on_a_fresh_copy(tmp_path):
    first, _ = _commands()
    work = tmp_path / "joulebook"
    ignore = shutil.ignore_patterns(
        ".venv", ".git", "*.egg-info", "__pycache__", "joulebook-demo", ".pytest_cache"
    )
    shutil.copytree(ROOT, work, ignore=ignore)
    r = subprocess.run(
        ["bash", "-c", first], cwd=work, capture_output=True, text=True, timeout=1800
    )
    assert r.returncode == 0, r.stderr[-2000:]
    reports = sorted((work / "joulebook-demo" / "reports").glob("*.html"))
    assert len(reports) >= 5
    # the calculation package printed for each (WeasyPrint, a dependency; Pango from .ci/run)
    assert len(list((work / "joulebook-demo" / "reports").glob("*.pdf"))) == len(reports)
    assert "Open the reports" in r.stdout
