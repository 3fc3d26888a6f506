"""API and worker hardening (issue 34, item 6): every argument conversion names an overflow,
lists deeper than a block are refused, and the Calc worker answers every malformed request
with a BadInput naming what is wrong, survives it, and never waits forever on half a line."""

import json
import os
import subprocess
import sys
import threading

import pytest

import joulebook
from joulebook.catalog import CATALOG, call
from joulebook.catalog.cellvalues import cell
from joulebook.core.errors import BadInput
from joulebook.faces.calc.worker import lines, serve

HUGE = 10**400  # beyond the largest float, 1.797e308 (IEEE 754 binary64)

NUMBER_ARGS = [
    (f.name, i, a.name) for f in CATALOG for i, a in enumerate(f.args) if a.type == "number"
]


def test_every_number_argument_names_an_overflow():
    assert len(NUMBER_ARGS) > 100
    for name, i, arg in NUMBER_ARGS:
        for huge in (HUGE, -HUGE):
            args = [None] * i + [huge]
            with pytest.raises(
                BadInput, match=f"^{arg}(?: \\(item 1,1\\))? = .* is beyond the range"
            ):
                call(name, *args)
            text = cell(name, *args)
            assert text.startswith(f"BadInput: {arg}") and "beyond the range" in text, (name, text)


def test_the_largest_integers_that_are_floats_still_convert():
    # 2**1023 is a float (binary64 holds it exactly); 1 MPa = 145.0377 psi (NIST SP 811 B.8)
    assert call("JB_CONVERT", 2**1000, "m", "m") == float(2**1000)
    assert call("JB_CONVERT", 1, "MPa", "psi") == pytest.approx(145.0377377)


@pytest.mark.parametrize(
    "value", [[[[1.0]]], [[1.0], [2.0, [3.0]]], ((((1.0,),),),)], ids=["1x1x1", "ragged", "tuples"]
)
def test_lists_deeper_than_a_block_are_refused(value):
    with pytest.raises(BadInput, match="value is a list nested more than 2 levels deep"):
        call("JB_CONVERT", value, "m", "ft")
    assert cell("JB_CONVERT", value, "m", "ft").startswith("BadInput: value is a list nested")
    # the clean twins: a value, a row, a 1x1 block (1 m = 3.28084 ft, exact by definition)
    assert cell("JB_CONVERT", [[1.0]], "m", "ft") == pytest.approx(1 / 0.3048)
    assert call("JB_CONVERT", [[1.0, 2.0]], "m", "ft").shape == (1, 2)


MALFORMED = {
    b"\xff\xfe not utf-8\n": "not UTF-8",
    b"[" * 100_000 + b"\n": "JSON nested too deep",
    b"{not json\n": "not JSON",
    b'"a text"\n': "a request is a JSON object, not str",
    b'{"a": [1.0, "m", "ft"]}\n': "names no function",
    b'{"f": "JB_CONVERT", "a": "1mft"}\n': 'the arguments ("a") must be a list, not str',
    b'{"f": "JB_CONVERT", "a": [1.0, "m", "ft"], "e": 3}\n': '"e") must be a text or null',
}
GOOD = b'{"f": "JB_CONVERT", "a": [1.0, "m", "ft"]}\n'


def test_the_worker_process_answers_every_malformed_request_and_survives():
    feed = GOOD + b"".join(MALFORMED) + GOOD
    proc = subprocess.run(
        [sys.executable, "-m", "joulebook.faces.calc.worker"],
        input=feed,
        capture_output=True,
        timeout=120,
    )
    assert proc.returncode == 0 and b"Traceback" not in proc.stderr
    answers = [json.loads(x)["v"] for x in proc.stdout.decode().splitlines()]
    assert len(answers) == len(MALFORMED) + 2
    assert answers[0] == answers[-1] == pytest.approx(1 / 0.3048)
    for got, why in zip(answers[1:-1], MALFORMED.values()):
        assert got.startswith("BadInput: request: ") and why in got, (got, why)


def test_half_a_request_is_answered_after_the_read_timeout(tmp_path):
    r, w = os.pipe()
    out = []

    def run():
        class Sink:
            def write(self, text):
                out.append(json.loads(text)["v"])

            def flush(self):
                pass

        serve(lines(r, timeout=0.3), Sink())

    t = threading.Thread(target=run)
    t.start()
    os.write(w, b'{"f": "JB_CONVERT", "a": [1.0')  # a writer that stops mid-request
    t.join(1.0)
    assert out == ["BadInput: request: incomplete, no newline after 0.3 s"]
    os.write(w, b', "m", "ft"]}\n' + GOOD)  # the rest of the stalled line, then a request
    os.close(w)
    t.join(10)
    assert not t.is_alive()
    assert out[1].startswith("BadInput: request: not JSON")
    assert out[2] == pytest.approx(joulebook.call("JB_CONVERT", 1.0, "m", "ft"))
    os.close(r)


def test_a_line_over_the_limit_is_answered_and_dropped():
    r, w = os.pipe()
    out = []

    class Sink:
        def write(self, text):
            out.append(json.loads(text)["v"])

        def flush(self):
            pass

    t = threading.Thread(target=lambda: serve(lines(r, timeout=5, max_line=1000), Sink()))
    t.start()
    os.write(w, b'{"f": "JB_CONVERT", "a": ["' + b"x" * 5000 + b'"]}\n' + GOOD)
    os.close(w)
    t.join(10)
    os.close(r)
    assert out[0] == "BadInput: request: a line longer than 1,000 bytes"
    assert out[1] == pytest.approx(1 / 0.3048) and len(out) == 2
