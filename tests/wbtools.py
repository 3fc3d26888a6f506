"""Helpers for tests that alter a saved workbook package."""

import zipfile
from pathlib import Path


def rewrite_part(src: Path, dst: Path, name: str, change) -> Path:
    """Copy package *src* to *dst* with part *name* replaced by ``change(old_bytes)``."""
    with zipfile.ZipFile(src) as zin, zipfile.ZipFile(dst, "w", zipfile.ZIP_DEFLATED) as zout:
        for info in zin.infolist():
            data = zin.read(info)
            if info.filename == name:
                data = change(data)
            zout.writestr(info, data, compress_type=info.compress_type)
    return dst
