"""The VBA project writer, read back by an independent implementation (oletools 0.60+, olefile)."""

import io

import olefile
import pytest
from oletools.olevba import decompress_stream

from joulebook.faces.sheet.vbaproject import _pad, compress, vba_project


@pytest.mark.parametrize("n", [1, 8, 100, 3640, 4096, 4096 + 3000, 3 * 4096 + 17])
def test_compression_round_trips_through_olevba(n):
    data = _pad(bytes((i * 7 + 3) % 251 for i in range(n)))
    assert decompress_stream(bytearray(compress(data))) == data


def test_compound_file_lists_the_project_streams():
    b = vba_project(
        [("Tools", "Function TWICE(x)\r\n    TWICE = 2 * x\r\nEnd Function\r\n")], ["Sheet1"]
    )
    ole = olefile.OleFileIO(io.BytesIO(b))
    assert sorted("/".join(p) for p in ole.listdir()) == [
        "PROJECT",
        "PROJECTwm",
        "VBA/Sheet1",
        "VBA/ThisWorkbook",
        "VBA/Tools",
        "VBA/_VBA_PROJECT",
        "VBA/dir",
    ]
    project = ole.openstream("PROJECT").read().decode("cp1252")
    assert "Module=Tools" in project and 'Name="VBAProject"' in project
