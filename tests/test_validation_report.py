"""docs/validation.md is regenerated from the reference tests; fail when it is stale."""

import re
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
REFERENCE_TESTS = [
    "tests/test_fluids_reference.py",
    "tests/test_gases_reference.py",
    "tests/test_solids_reference.py",
    "tests/test_processes_reference.py",
    "tests/test_daily_cases.py",
    "tests/test_fluid_transport.py",
    "tests/test_if97.py",
    "tests/test_api.py",
    "tests/test_round3_processes.py",
    "tests/test_round3_units.py",
    "tests/test_props_round3.py",
    "tests/test_cases_round3.py",
]


def _rows(text: str) -> set[tuple[str, str, str]]:
    rows, source = set(), None
    for line in text.splitlines():
        if line.startswith("## "):
            source = line[3:]
        m = re.match(r"^\| (?!quantity|---)(.+?) \| (.+?) \| ", line)
        if m and source:
            rows.add((source, m.group(1), m.group(2)))
    return rows


def test_validation_report_is_fresh(tmp_path):
    out = tmp_path / "validation.md"
    subprocess.run(
        [
            sys.executable,
            "-m",
            "pytest",
            "-q",
            "-p",
            "no:cacheprovider",
            *REFERENCE_TESTS,
            "--validation-report",
            str(out),
        ],
        cwd=ROOT,
        check=True,
        capture_output=True,
        timeout=600,
    )
    fresh = _rows(out.read_text(encoding="utf-8"))
    committed = _rows((ROOT / "docs" / "validation.md").read_text(encoding="utf-8"))
    assert len(fresh) >= 150
    assert committed == fresh, (
        "docs/validation.md is stale: python -m pytest tests --validation-report docs/validation.md"
    )
