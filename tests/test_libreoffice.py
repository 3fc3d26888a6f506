"""A real second client: LibreOffice opens joulebook's recalculated copy.

LibreOffice (installed by .ci/run from the distribution's packages) is run headless twice on
a `joulebook recalc` output:
* keeping the saved values (its default for Excel files): every cell must show exactly what
  joulebook computed — our function cells included, which LibreOffice itself cannot compute;
* recalculating everything it can: Excel's built-ins that do not depend on our functions must
  come out equal to joulebook's engine (an independent implementation of the same built-ins).
"""

import csv
import shutil
import subprocess
from pathlib import Path

import openpyxl
import pytest

from joulebook.cli import main
from joulebook.workbook.engine import Engine
from joulebook.workbook.reader import read_book

SOFFICE = shutil.which("soffice") or shutil.which("libreoffice")
# not in the default run (it needs LibreOffice); .ci/run installs it and runs `pytest -m client`
pytestmark = pytest.mark.client

PROFILE = """<?xml version="1.0" encoding="UTF-8"?>
<oor:items xmlns:oor="http://openoffice.org/2001/registry" xmlns:xs="http://www.w3.org/2001/XMLSchema">
<item oor:path="/org.openoffice.Office.Calc/Formula/Load"><prop oor:name="OOXMLRecalcMode" oor:op="fuse"><value>{mode}</value></prop></item>
</oor:items>
"""


def _book(path: Path) -> Path:
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Calc"
    for r in range(1, 11):
        ws[f"A{r}"] = 15.0 * r
        ws[f"B{r}"] = f'=JB_PROP("water","h in kJ/kg","T in degC",A{r},"P in kPa",500)'
        ws[f"C{r}"] = f"=ROUND(A{r}*1.8+32,2)"
        ws[f"D{r}"] = f'=IF(A{r}>70,"hot",TEXT(A{r},"0.0"))'
        ws[f"E{r}"] = f"=SQRT(A{r})+MOD(A{r},7)^2/3"
    ws["F1"] = "=SUM(A1:A10)/COUNT(A1:A10)"
    ws["F2"] = "=INDEX(A1:A10,MATCH(60,A1:A10,0))"
    wb.save(path)
    return path


def _as_csv(xlsx: Path, workdir: Path, mode: int) -> list[list[str]]:
    profile = workdir / f"profile{mode}"
    (profile / "user").mkdir(parents=True)
    (profile / "user" / "registrymodifications.xcu").write_text(PROFILE.format(mode=mode))
    outdir = workdir / f"csv{mode}"
    subprocess.run(
        [
            SOFFICE,
            f"-env:UserInstallation={profile.as_uri()}",
            "--headless",
            "--norestore",
            "--convert-to",
            "csv:Text - txt - csv (StarCalc):44,34,76,1,,0,false,true,true",
            "--outdir",
            str(outdir),
            str(xlsx),
        ],
        check=True,
        capture_output=True,
        timeout=180,
    )
    with open(outdir / (xlsx.stem + ".csv"), newline="", encoding="utf-8") as fh:
        return list(csv.reader(fh))


def _num(s: str) -> float:
    return float(s)


def test_libreoffice_shows_our_values_and_agrees_on_builtins(tmp_path):
    assert SOFFICE, (
        "LibreOffice is needed: apt-get install libreoffice-calc-nogui (as .ci/run does)"
    )
    src = _book(tmp_path / "lo.xlsx")
    out = tmp_path / "lo-recalc.xlsx"
    assert main(["recalc", str(src), "-o", str(out)]) == 0
    ours = Engine(read_book(out)).run()

    kept = _as_csv(out, tmp_path, mode=1)  # 1 = never recalculate: show the saved values
    for r in range(1, 11):
        assert _num(kept[r - 1][1]) == pytest.approx(ours[("Calc", r, 2)].value, rel=1e-12)

    fresh = _as_csv(out, tmp_path, mode=0)  # 0 = always recalculate
    for r in range(1, 11):
        assert _num(fresh[r - 1][2]) == pytest.approx(ours[("Calc", r, 3)].value, rel=1e-12)
        assert fresh[r - 1][3] == ours[("Calc", r, 4)].value
        assert _num(fresh[r - 1][4]) == pytest.approx(ours[("Calc", r, 5)].value, rel=1e-12)
        assert fresh[r - 1][1].startswith("#NAME") or fresh[r - 1][1].startswith(
            "Err"
        )  # LibreOffice lacks JB_PROP
    assert _num(fresh[0][5]) == pytest.approx(ours[("Calc", 1, 6)].value, rel=1e-12)
    assert _num(fresh[1][5]) == pytest.approx(ours[("Calc", 2, 6)].value, rel=1e-12)
