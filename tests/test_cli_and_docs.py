"""The command line and the generated documents."""

import subprocess
import sys
from pathlib import Path

from joulebook.catalog import CATALOG
from joulebook.faces.cli import main
from joulebook.tools.docgen import functions_markdown

ROOT = Path(__file__).resolve().parents[1]


def test_functions_lists_every_catalog_entry(capsys):
    assert main(["functions"]) == 0
    out = capsys.readouterr().out
    for f in CATALOG:
        assert f.name in out


def test_eval_prints_value(capsys):
    assert (
        main(["eval", "JB_PROP", "water", "h in kJ/kg", "T in degC", "25", "P in kPa", "101.325"])
        == 0
    )
    assert capsys.readouterr().out.startswith("104.920")
    assert main(["eval", "JB_PROP", "water", "h", "T", "99999", "P", "100"]) == 1
    assert "OutOfRange" in capsys.readouterr().out


def test_help_does_not_import_the_property_library():
    code = "import sys; from joulebook.faces.cli import main\ntry:\n main(['--help'])\nexcept SystemExit: pass\nprint('CoolProp' in sys.modules, 'pint' in sys.modules)"
    r = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert r.stdout.strip().endswith("False False")


def test_function_reference_is_fresh():
    committed = (ROOT / "docs" / "functions.md").read_text(encoding="utf-8")
    assert committed == functions_markdown(), "docs/functions.md is stale: run `joulebook docs`"


def test_result_labels_come_from_the_quantity_table_for_every_entry():
    from pathlib import Path

    from joulebook.catalog import CATALOG
    from joulebook.core.units import KIND_WORDS

    doc = (Path(__file__).resolve().parents[1] / "docs" / "functions.md").read_text()
    for f in CATALOG:
        assert f.result in KIND_WORDS or f.result in ("text", "asked", "number"), f.name
        section = doc.split(f"`{f.name}(", 1)[1].split("\n## ", 1)[0].split("\n### ", 1)[0]
        if f.result in KIND_WORDS:
            assert f"- **Result:** {KIND_WORDS[f.result]}," in section, f.name
        if f.result == "asked" and not any(a.name == "want" for a in f.args):
            assert "`want`" not in section, f.name
    # the specific heats are labelled as such, not as an entropy
    for name in ("JB_GAS_CP", "JB_GAS_CV", "JB_GAS_R", "JB_SOLID_C", "JB_SOLID_C_MEAN"):
        assert next(f for f in CATALOG if f.name == name).result == "specific_heat"


def test_python_dash_m_joulebook_is_the_command():
    import subprocess
    import sys

    out = subprocess.run(
        [sys.executable, "-m", "joulebook", "--help"], capture_output=True, text=True, timeout=120
    )
    assert out.returncode == 0 and "check" in out.stdout and not out.stderr


def test_a_closed_pipe_is_no_internal_error():
    """`joulebook functions | head -1`: the reader leaves early; exit 0, nothing on stderr
    (common practice of command-line tools)."""
    import subprocess
    import sys

    p = subprocess.Popen(
        [sys.executable, "-m", "joulebook", "functions"],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
    )
    p.stdout.close()  # before the command writes: its first write finds the pipe closed
    err = p.stderr.read()
    assert p.wait(timeout=60) == 0 and b"internal error" not in err, err
