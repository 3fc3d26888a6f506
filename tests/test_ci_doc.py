"""docs/ci.md's snippet, run as written (the check step; the install step is the README's)."""

import shutil
import subprocess
import sys
from pathlib import Path

from wbtools import build, with_saved

ROOT = Path(__file__).resolve().parents[1]


def _check_step() -> str:
    """The shell of the snippet's second `run:` step, as it stands in docs/ci.md."""
    text = (ROOT / "docs" / "ci.md").read_text(encoding="utf-8")
    block = text.split("```yaml", 1)[1].split("```", 1)[0]
    step = block.split("- run: |", 1)[1]
    lines = [ln.strip() for ln in step.strip().splitlines()]
    return " ".join(ln.rstrip("\\").strip() for ln in lines)


def test_the_ci_snippet_checks_a_folder_as_written(tmp_path):
    calcs = tmp_path / "calcs"
    calcs.mkdir()
    with_saved(
        build(tmp_path / "a.xlsx", {"S!A1": 2.0, "S!B1": "=A1*3"}), calcs / "a.xlsx", {"S!B1": 6.0}
    )
    venv_bin = tmp_path / ".venv" / "bin"
    venv_bin.mkdir(parents=True)
    joulebook = shutil.which("joulebook", path=str(Path(sys.executable).parent))
    (venv_bin / "joulebook").symlink_to(joulebook)  # the snippet's .venv/bin/joulebook
    step = _check_step()
    assert step.startswith(".venv/bin/joulebook check calcs/")
    done = subprocess.run(["bash", "-c", step], cwd=tmp_path, capture_output=True, text=True)
    assert done.returncode == 0, done.stdout + done.stderr
    for name in ("junit.xml", "check.json", "summary.md", "check.sarif"):
        assert (tmp_path / "reports" / name).exists(), name
