"""check on a console and in JSON (issue 29, item 7): messages wrapped between words, never
cut; the summary line in plain words; one JSON shape for one workbook and for many, valid
against the JSON Schema shipped in the package (and the schema rejects a report that is
not of that shape)."""

import json
import re
from importlib import resources

import jsonschema
import openpyxl
import pytest

from joulebook.faces.cli import main


def _schema() -> dict:
    text = resources.files("joulebook.faces.workbook").joinpath("check.schema.json")
    return json.loads(text.read_text(encoding="utf-8"))


def _book(path, formula):
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Calc"
    ws["A1"], ws["B1"] = "Water enthalpy far too hot", formula
    ws["A2"], ws["B2"] = "Half", "=0.5"
    wb.save(path)
    return path


@pytest.fixture
def hot(tmp_path):
    return _book(tmp_path / "hot.xlsx", '=JB_PROP("water","h","T in K",5000,"P in kPa",100)')


def test_console_wraps_long_messages_between_words(hot, capsys):
    from wbtools import outcomes

    message = str(outcomes(hot)["Calc!B1"].value)  # the cell text of the refusal
    assert len(message) > 60  # long enough to need wrapping
    assert main(["check", str(hot)]) == 1
    out = capsys.readouterr().out
    words = message.split()
    shown = " ".join(out.split())
    # every word of the message is printed whole, in order (wrapping moves words to the
    # next line, it never cuts one)
    pos = 0
    for w in words:
        found = shown.find(w, pos)
        assert found >= 0, (w, out)
        pos = found + len(w)
    assert max(len(line) for line in out.splitlines()) <= 200


def test_summary_line_is_plain_words(tmp_path, capsys):
    p = _book(tmp_path / "div.xlsx", "=1/0")
    assert main(["check", str(p)]) == 1
    last = capsys.readouterr().out.strip().splitlines()[-1]
    assert last.startswith("2 formula cells: 2 no cached value"), last
    assert "_" not in last.split(";")[0]  # no raw field names such as saved_error_values


def test_one_json_shape_for_one_workbook_and_many(hot, tmp_path):
    schema = _schema()
    jsonschema.Draft202012Validator.check_schema(schema)
    one = tmp_path / "one.json"
    assert main(["check", str(hot), "--json", str(one)]) == 1
    data = json.loads(one.read_text())
    jsonschema.validate(data, schema)
    (book,) = data["workbooks"]
    assert book["workbook"] == str(hot) and book["exit"] == 1
    assert {c["cell"]: c["status"] for c in book["cells"]} == {
        "B1": "no cached value",
        "B2": "no cached value",
    }
    folder = tmp_path / "many"
    folder.mkdir()
    _book(folder / "a.xlsx", "=2*3")
    (folder / "b.xlsx").write_text("not a workbook")  # unreadable: named with its reason
    many = tmp_path / "many.json"
    assert main(["check", str(folder), "--json", str(many), "-j", "1"]) == 2
    data = json.loads(many.read_text())
    jsonschema.validate(data, schema)
    got = {re.sub(r".*/", "", w["workbook"]): w["exit"] for w in data["workbooks"]}
    assert got == {"a.xlsx": 1, "b.xlsx": 2}
    # the schema is not vacuous: the old single-workbook shape and an unknown status fail
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate({k: v for k, v in book.items() if k != "exit"}, schema)
    book["cells"][0]["status"] = "fine"
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate({"tolerance": data["tolerance"], "workbooks": [book]}, schema)
