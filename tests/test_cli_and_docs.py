"""The command line and the generated documents."""

import subprocess
import sys
from pathlib import Path

from joulebook.catalog import CATALOG
from joulebook.cli import main
from joulebook.docgen import functions_markdown

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
    code = "import sys; from joulebook.cli import main\ntry:\n main(['--help'])\nexcept SystemExit: pass\nprint('CoolProp' in sys.modules, 'pint' in sys.modules)"
    r = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert r.stdout.strip().endswith("False False")


def test_function_reference_is_fresh():
    committed = (ROOT / "docs" / "functions.md").read_text(encoding="utf-8")
    assert committed == functions_markdown(), "docs/functions.md is stale: run `joulebook docs`"
