"""The Calc face without LibreOffice: the extension's files, its type library read back by an
independent reader, the worker's protocol, and the component's conversions and rewriting.

LibreOffice itself computing the workbooks is tests/test_calc_libreoffice.py (marker
``client``, run by .ci/run).
"""

import importlib.util
import io
import json
import math
import struct
import subprocess
import sys
import zipfile
from pathlib import Path
from xml.etree import ElementTree

import pytest

import joulebook
from joulebook.catalog import CATALOG
from joulebook.catalog.arghelp import arg_doc
from joulebook.catalog.cellvalues import cell
from joulebook.faces import calc as joulebook_calc
from joulebook.faces.calc.typelib import MAGIC, type_library
from joulebook.faces.calc.worker import answer, serve
from joulebook.faces.cli import main
from joulebook.tools import calcgen as generate

COMPONENT = Path(joulebook_calc.__file__).with_name("component.py")


def _component():
    spec = importlib.util.spec_from_file_location("jb_calc_component", COMPONENT)
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)  # no `uno` here: only the helpers are defined
    return mod


# ---------------------------------------------------------------------------------------------
# the type library, read back


def _read_types(data: bytes) -> dict:
    """An independent reader of the UNOIDL layout (modules and interfaces): {name: methods}."""
    u32 = lambda at: struct.unpack_from("<I", data, at)[0]  # noqa: E731

    def name_at(at):
        n = u32(at)
        assert n & 0x80000000 == 0
        return data[at + 4 : at + 4 + n].decode("ascii"), at + 4 + n

    def cstr(at):
        return data[at : data.index(b"\0", at)].decode("ascii")

    def entity(at, prefix, out):
        kind = data[at] & 0x3F
        if kind == 0:  # module
            walk(at + 5, u32(at + 1), prefix, out)
            return
        assert kind == 5, kind  # interface
        at += 1
        bases = []
        count, at = u32(at), at + 4
        for _ in range(count):
            base, at = name_at(at)
            bases.append(base)
        assert u32(at) == 0 and u32(at + 4) == 0  # no optional bases, no attributes
        at += 8
        methods = {}
        count, at = u32(at), at + 4
        for _ in range(count):
            mname, at = name_at(at)
            ret, at = name_at(at)
            params = []
            n, at = u32(at), at + 4
            for _ in range(n):
                assert data[at] == 0  # an "in" parameter
                pname, at = name_at(at + 1)
                ptype, at = name_at(at)
                params.append((pname, ptype))
            assert u32(at) == 0  # no exceptions
            at += 4
            methods[mname] = (ret, params)
        out[prefix] = (bases, methods)

    def walk(at, count, prefix, out):
        names = []
        for i in range(count):
            nm, ent = u32(at + 8 * i), u32(at + 8 * i + 4)
            names.append(cstr(nm))
            entity(ent, f"{prefix}.{cstr(nm)}" if prefix else cstr(nm), out)
        assert names == sorted(names)  # LibreOffice finds entries by binary search

    assert data[:8] == MAGIC
    out = {}
    walk(u32(8), u32(12), "", out)
    return out


def test_type_library_declares_every_function_with_a_caller_and_its_arguments():
    types = _read_types(type_library(generate.INTERFACE, generate.methods()))
    assert list(types) == [generate.INTERFACE]
    bases, methods = types[generate.INTERFACE]
    assert bases == ["com.sun.star.uno.XInterface"]
    assert sorted(methods) == sorted(f.name for f in CATALOG)
    for f in CATALOG:
        ret, params = methods[f.name]
        assert ret == "[][]any"
        assert params[0] == ("caller", "com.sun.star.beans.XPropertySet")
        assert [t for _, t in params[1:]] == ["any"] * len(f.all_args)


def test_type_library_modules_are_sorted_and_names_checked():
    types = _read_types(type_library("a.b.XT", [("Z", "any", []), ("A", "any", [("x", "any")])]))
    assert types["a.b.XT"][1] == {"Z": ("any", []), "A": ("any", [("x", "any")])}
    with pytest.raises(ValueError, match="qualified"):
        type_library("XT", [])
    with pytest.raises(ValueError, match="qualified"):
        type_library("a.b-c.XT", [])


# ---------------------------------------------------------------------------------------------
# the extension's files


def test_extension_files_are_consistent(tmp_path):
    path = generate.write(tmp_path / "jb.oxt", python="/opt/py/bin/python")
    with zipfile.ZipFile(path) as z:
        names = set(z.namelist())
        manifest = ElementTree.fromstring(z.read("META-INF/manifest.xml"))
        listed = {
            e.get("{http://openoffice.org/2001/manifest}full-path"): e.get(
                "{http://openoffice.org/2001/manifest}media-type"
            )
            for e in manifest
        }
        for member in listed:
            assert member in names
        assert listed["types.rdb"].endswith("typelibrary;type=RDB")
        components = ElementTree.fromstring(z.read("joulebook.components"))
        comp = components[0]
        assert comp.get("uri") in names and comp.get("loader") == "com.sun.star.loader.Python"
        impls = {i.get("name"): [s.get("name") for s in i] for i in comp}
        assert impls["org.joulebook.calc.Functions"] == ["com.sun.star.sheet.AddIn"]
        jobs = ElementTree.fromstring(z.read("Jobs.xcu"))
        assert b"org.joulebook.calc.OpenedWorkbook" in z.read("Jobs.xcu")
        assert jobs.get("{http://openoffice.org/2001/registry}name") == "Jobs"
        ElementTree.fromstring(z.read("description.xml"))
        assert z.read("joulebook_calc.py") == COMPONENT.read_bytes()
        meta = json.loads(z.read("joulebook_calc.json"))
        assert "competent, licensed engineer" in z.read("description-en.txt").decode()
    assert meta["python"] == "/opt/py/bin/python" and meta["service"] == "_xludf"
    assert [m["name"] for m in meta["functions"]] == [f.name for f in CATALOG]
    for m, f in zip(meta["functions"], CATALOG):
        assert m["help"] == f.help
        assert [a["name"] for a in m["args"]] == [a.name for a in f.all_args]
        assert [a["help"] for a in m["args"]] == [arg_doc(a) for a in f.all_args]
        assert [a["optional"] for a in m["args"]] == [a.optional for a in f.all_args]


def test_extension_bytes_are_reproducible(tmp_path):
    a = generate.write(tmp_path / "a.oxt", python="/x/python").read_bytes()
    b = generate.write(tmp_path / "b.oxt", python="/x/python").read_bytes()
    assert a == b


def test_cli_writes_the_extension_and_refuses_to_overwrite(tmp_path, capsys):
    out = tmp_path / "joulebook.oxt"
    assert main(["calc-extension", "-o", str(out)]) == 0
    assert "unopkg add" in capsys.readouterr().out
    with zipfile.ZipFile(out) as z:
        assert json.loads(z.read("joulebook_calc.json"))["python"] == sys.executable
    assert main(["calc-extension", "-o", str(out)]) == 2
    assert "--force" in capsys.readouterr().err
    assert main(["calc-extension", "-o", str(out), "--force"]) == 0
    assert main(["calc-extension", "-o", str(out), "--force", "--python", "/no/py"]) == 2
    assert "/no/py" in capsys.readouterr().err


# ---------------------------------------------------------------------------------------------
# the worker: joulebook's cell path over a pipe


ARGS = ["water", "h in kJ/kg", "T in degC", 25.0, "P in kPa", 101.325]


def test_worker_answers_as_the_cell_path():
    assert answer({"f": "JB_PROP", "a": ARGS})["v"] == joulebook.call("JB_PROP", *ARGS)
    column = ["water", "h in kJ/kg", "T in degC", [[25.0], [None], [5000.0]], "P in kPa", 101.325]
    text = answer({"f": "JB_PROP", "a": column, "e": None})["v"]
    assert text == cell("JB_PROP", *column)
    assert text[1] == [None] and text[2][0].startswith("OutOfRange: ")
    values = answer({"f": "JB_PROP", "a": column, "e": '"values"'})["v"]
    assert values[0] == [joulebook.call("JB_PROP", *ARGS)]
    assert values[2][0]["error"] == "#NUM!" and values[2][0]["message"] == text[2][0]
    # a blank required input: a blank result; an unknown style word: the text style
    assert answer({"f": "JB_CONVERT", "a": [None, "bar", "kPa"]})["v"] is None
    assert answer({"f": "JB_PROP", "a": ARGS, "e": "loud"})["v"] == joulebook.call("JB_PROP", *ARGS)
    assert answer({"f": "JB_NOPE", "a": []})["v"].startswith("BadInput: ")
    assert (
        answer({"a": []})["v"]
        == 'BadInput: request: the request names no function ("f" must be a text)'
    )


def test_worker_serves_lines_and_never_a_traceback():
    source = io.StringIO(
        json.dumps({"f": "JB_PROP", "a": ARGS}) + "\n\nnot json\n" + json.dumps([1]) + "\n"
    )
    sink = io.StringIO()
    serve(source, sink)
    lines = [json.loads(x) for x in sink.getvalue().splitlines()]
    assert lines[0]["v"] == pytest.approx(joulebook.call("JB_PROP", *ARGS), rel=1e-15)
    assert (
        lines[1]["v"].startswith("BadInput: request: not JSON") and "Traceback" not in lines[1]["v"]
    )
    assert lines[2]["v"].startswith("BadInput: ")


def test_worker_process_keeps_its_channel_clean():
    code = (
        "import joulebook.faces.calc.worker as w; plain = w.answer; "
        "w.answer = lambda r: (print('noise'), plain(r))[1]; w.main()"
    )
    proc = subprocess.run(
        [sys.executable, "-c", code],
        input=json.dumps({"f": "JB_CONVERT", "a": [1.0, "bar", "kPa"]}) + "\n",
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert proc.returncode == 0
    assert [json.loads(x) for x in proc.stdout.splitlines()] == [{"v": 100.0}]
    assert "noise" in proc.stderr


# ---------------------------------------------------------------------------------------------
# the component's helpers (LibreOffice's side), run here without `uno`


def test_component_converts_calc_values():
    comp = _component()
    assert comp.to_request(None) is None and comp.to_request(2) == 2.0
    assert comp.to_request(((1.0, ""), ("x", None))) == [[1.0, None], ["x", None]]
    assert comp.to_calc(1.5) == ((1.5,),) and comp.to_calc(None) == ((None,),)
    assert comp.to_calc([[1.0, None], ["a", 2]]) == ((1.0, None), ("a", 2.0))
    err = comp.to_calc({"error": "#NUM!", "message": "OutOfRange: x"})[0][0]
    assert math.isnan(err)
    bits = struct.unpack("<Q", struct.pack("<d", err))[0]
    assert bits & 0xFFFFFFFF == 503  # Calc's code of #NUM! (FormulaError::IllegalFPOperation)
    for code, calc in (("#VALUE!", 519), ("#N/A", 32767)):
        bits = struct.unpack("<Q", struct.pack("<d", comp.error_value(code)))[0]
        assert bits >> 51 == 0xFFF and bits & 0xFFFFFFFF == calc


@pytest.mark.parametrize(
    ("text", "fixed"),
    [
        ('=jb_prop("water";"T";A1)', '=JB_PROP("water";"T";A1)'),
        ('=_xludf.jb_prop("w")+_xludf.JB_GAS_K("air")', '=JB_PROP("w")+JB_GAS_K("air")'),
        ('=[1]!_XLUDF.JB_PROP("w")', '=JB_PROP("w")'),
        ("{=[2]!JB_CHART_DOME(B1)}", "{=JB_CHART_DOME(B1)}"),
        ('=_XLUDF.JB_PROP("jb_prop(")', None),  # resolved; text in quotes is text
        ('=IF(A1>2;"_xludf.jb_prop(x";SUM(A1:A3))', None),
        ('=jb_unknown(1)+SUM(A1)+JB_PROPX(2)', None),
        ('=_XLUDF.JB_PROP("a""b";jb_convert(1;"bar";"kPa"))', '=_XLUDF.JB_PROP("a""b";JB_CONVERT(1;"bar";"kPa"))'),
    ],
)  # fmt: skip
def test_component_rewrites_only_unresolved_calls_of_ours(text, fixed):
    comp = _component()
    names = {f.name for f in CATALOG}
    assert comp.fix_formula(text, names, "_XLUDF.") == fixed


class _Names:
    def __init__(self, content):
        self.content = content

    def hasByName(self, name):  # noqa: N802 (UNO's names)
        return self.content is not None and name == "JB_ERRORS"

    def getByName(self, name):  # noqa: N802
        return type("Named", (), {"getContent": lambda _s: self.content})()


class _Caller:
    def __init__(self, content):
        self.names = _Names(content)

    def getPropertyValue(self, name):  # noqa: N802
        assert name == "NamedRanges"
        return self.names


def test_component_computes_through_a_worker_in_the_workbook_error_style(monkeypatch):
    comp = _component()
    monkeypatch.setenv(comp.PYTHON_ENV, sys.executable)
    comp._WORKER = None
    try:
        row = ("water", "h in kJ/kg", "T in degC", 25.0, "P in kPa", 101.325, None)
        assert comp.compute("JB_PROP", _Caller(None), row) == ((joulebook.call("JB_PROP", *ARGS),),)
        bad = ("water", "h in kJ/kg", "T in degC", 5000.0, "P in kPa", 101.325)
        text = comp.compute("JB_PROP", _Caller(None), bad)[0][0]
        assert text == cell("JB_PROP", *bad)
        err = comp.compute("JB_PROP", _Caller('"values"'), bad)[0][0]
        assert struct.unpack("<Q", struct.pack("<d", err))[0] & 0xFFFFFFFF == 503
        column = ((20.0,), ("",), (5000.0,))  # a range: an empty cell is ""
        out = comp.compute("JB_PROP", _Caller(None), bad[:3] + (column,) + bad[4:])
        assert out[1] == (None,) and out[2][0].startswith("OutOfRange: ")
        # the worker is restarted when it has gone
        comp.worker().stop()
        assert comp.compute("JB_CONVERT", None, (1.0, "bar", "kPa")) == ((100.0,),)
    finally:
        comp.worker().stop()


def test_component_names_a_missing_python(monkeypatch, tmp_path):
    comp = _component()
    monkeypatch.setenv(comp.PYTHON_ENV, str(tmp_path / "no-python"))
    comp._WORKER = None
    text = comp.compute("JB_CONVERT", None, (1.0, "bar", "kPa"))[0][0]
    assert text.startswith("InternalError: ") and "no-python" in text
    assert "JOULEBOOK_PYTHON" in text and "joulebook calc-extension" in text
    err = comp.compute("JB_CONVERT", _Caller("values"), (1.0, "bar", "kPa"))[0][0]
    assert struct.unpack("<Q", struct.pack("<d", err))[0] & 0xFFFFFFFF == 519
