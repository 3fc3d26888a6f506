"""Write a VBA project (``vbaProject.bin``) holding joulebook's VBA wrappers.

The binary is an OLE compound file (MS-CFB, version 3, 512-byte sectors) holding the streams
of a VBA project (MS-OVBA): ``PROJECT``, ``PROJECTwm``, ``VBA/_VBA_PROJECT`` (version
0xFFFF: the host recompiles from source), ``VBA/dir`` and one stream per module with its
compressed source.  Compression writes literal-only chunks (valid under MS-OVBA 2.4.1), and the
project's protection fields carry the "no protection" values encrypted as MS-OVBA 2.4.3
prescribes.

References
----------
[MS-CFB] Compound File Binary File Format; [MS-OVBA] Office VBA File Format Structure
(Microsoft Open Specifications).
"""

from __future__ import annotations

import struct

__all__ = ["vba_project", "compress", "to_xlsm"]

ENDOFCHAIN, FREESECT, FATSECT, NOSTREAM = 0xFFFFFFFE, 0xFFFFFFFF, 0xFFFFFFFD, 0xFFFFFFFF
CODEPAGE = 1252


# ---------------------------------------------------------------------------------------
# MS-OVBA 2.4.1 compression (literal tokens only; raw 4096-byte chunks where full)


def compress(data: bytes) -> bytes:
    out = bytearray(b"\x01")
    for start in range(0, len(data), 4096):
        chunk = data[start : start + 4096]
        if len(chunk) == 4096:
            out += struct.pack("<H", 0x3FFF)  # raw chunk: size 4098 − 3, signature 0b011, flag 0
            out += chunk
            continue
        body = bytearray()
        for i in range(0, len(chunk), 8):
            body += b"\x00" + chunk[i : i + 8]
        if len(body) + 2 > 4098:
            raise ValueError("final chunk too long for literal tokens; pad the source")
        out += struct.pack("<H", (len(body) + 2 - 3) & 0x0FFF | 0x3000 | 0x8000)
        out += body
    return bytes(out)


def _pad(source: bytes) -> bytes:
    """Trailing blank lines so the last chunk fits literal tokens (≤ 3640 bytes)."""
    while 3640 < len(source) % 4096:
        source += b"\r\n"
    return source


# ---------------------------------------------------------------------------------------
# MS-OVBA 2.4.3 data encryption, for the CMG / DPB / GC fields of the PROJECT stream


def _encrypt(data: bytes, project_id: str, seed: int = 0x07) -> str:
    version = 2
    key = 0
    for ch in project_id.encode("ascii"):
        key = (key + ch) & 0xFF
    ignored_len = (seed & 6) // 2
    out = bytearray([seed, version ^ seed, key ^ seed])
    unenc1, enc1, enc2 = key, key ^ seed, version ^ seed
    for _ in range(ignored_len):
        b = 0x07  # any value
        e = b ^ (enc2 + unenc1) & 0xFF
        out.append(e)
        enc2, enc1, unenc1 = enc1, e, b
    for b in struct.pack("<I", len(data)) + data:
        e = b ^ (enc2 + unenc1) & 0xFF
        out.append(e)
        enc2, enc1, unenc1 = enc1, e, b
    return out.hex().upper()


# ---------------------------------------------------------------------------------------
# the project streams


def _rec(rid: int, payload: bytes) -> bytes:
    return struct.pack("<HI", rid, len(payload)) + payload


def _dir_stream(modules: list[tuple[str, bool]]) -> bytes:
    name = b"VBAProject"
    d = bytearray()
    d += _rec(0x0001, struct.pack("<I", 1))  # SysKind: 32-bit Windows
    d += _rec(0x0002, struct.pack("<I", 0x409))
    d += _rec(0x0014, struct.pack("<I", 0x409))
    d += _rec(0x0003, struct.pack("<H", CODEPAGE))
    d += _rec(0x0004, name)
    d += _rec(0x0005, b"") + _rec(0x0040, b"")
    d += _rec(0x0006, b"") + _rec(0x003D, b"")
    d += _rec(0x0007, struct.pack("<I", 0))
    d += _rec(0x0008, struct.pack("<I", 0))
    d += struct.pack("<HIIH", 0x0009, 4, 1, 0)  # version: Reserved = 4, major, minor
    d += _rec(0x000C, b"") + _rec(0x003C, b"")
    d += _rec(0x000F, struct.pack("<H", len(modules)))
    d += _rec(0x0013, struct.pack("<H", 0xFFFF))
    for mod, document in modules:
        n = mod.encode("ascii")
        u = mod.encode("utf-16-le")
        d += _rec(0x0019, n) + _rec(0x0047, u)
        d += _rec(0x001A, n) + _rec(0x0032, u)
        d += _rec(0x001C, b"") + _rec(0x0048, b"")
        d += _rec(0x0031, struct.pack("<I", 0))  # source starts at offset 0 of the stream
        d += _rec(0x001E, struct.pack("<I", 0))
        d += _rec(0x002C, struct.pack("<H", 0xFFFF))
        d += _rec(0x0022 if document else 0x0021, b"")
        d += _rec(0x002B, b"")
    d += _rec(0x0010, b"")
    return compress(bytes(d))


_DOC_ATTRS = (
    'Attribute VB_Name = "{name}"\r\nAttribute VB_Base = "0{{{guid}}}"\r\n'
    "Attribute VB_GlobalNameSpace = False\r\nAttribute VB_Creatable = False\r\n"
    "Attribute VB_PredeclaredId = True\r\nAttribute VB_Exposed = True\r\n"
    "Attribute VB_TemplateDerived = False\r\nAttribute VB_Customizable = True\r\n"
)
WORKBOOK_GUID = "00020819-0000-0000-C000-000000000046"
SHEET_GUID = "00020820-0000-0000-C000-000000000046"


def vba_project(standard: list[tuple[str, str]], sheets: list[str]) -> bytes:
    """vbaProject.bin with document modules ThisWorkbook and *sheets* (their code names) and
    the standard modules *standard* ([(name, VBA source)], CRLF or LF)."""
    project_id = "{00000000-0000-0000-0000-000000000000}"
    docs = [("ThisWorkbook", WORKBOOK_GUID)] + [(s, SHEET_GUID) for s in sheets]
    streams: dict[str, bytes] = {}
    for name, guid in docs:
        streams["VBA/" + name] = compress(
            _pad(_DOC_ATTRS.format(name=name, guid=guid).encode("ascii"))
        )
    for module_name, module_source in standard:
        src = module_source.replace("\r\n", "\n").replace("\n", "\r\n").encode("cp1252", "replace")
        if not src.startswith(b"Attribute VB_Name"):
            src = f'Attribute VB_Name = "{module_name}"\r\n'.encode() + src
        streams["VBA/" + module_name] = compress(_pad(src))
    modules = [(n, True) for n, _ in docs] + [(n, False) for n, _ in standard]
    streams["VBA/dir"] = _dir_stream(modules)
    streams["VBA/_VBA_PROJECT"] = b"\xcc\x61\xff\xff\x00\x00\x00"
    cmg = _encrypt(struct.pack("<I", 0), project_id)  # not protected
    dpb = _encrypt(b"\x00", project_id)  # no password
    gc = _encrypt(b"\xff", project_id)  # visible
    lines = [f'ID="{project_id}"']
    lines += [f"Document={n}/&H00000000" for n, _ in docs]
    lines += [f"Module={n}" for n, _ in standard]
    lines += [
        'Name="VBAProject"',
        'HelpContextID="0"',
        'VersionCompatible32="393222000"',
        f'CMG="{cmg}"',
        f'DPB="{dpb}"',
        f'GC="{gc}"',
        "",
        "[Host Extender Info]",
        "&H00000001={3832D640-CF90-11CF-8E43-00A0C911005A};VBE;&H00000000",
        "",
        "[Workspace]",
    ]
    lines += [f"{n}=0, 0, 0, 0, C" for n, _ in modules] + [""]
    streams["PROJECT"] = "\r\n".join(lines).encode("cp1252")
    wm = bytearray()
    for n, _ in modules:
        wm += n.encode("ascii") + b"\x00" + n.encode("utf-16-le") + b"\x00\x00"
    streams["PROJECTwm"] = bytes(wm + b"\x00\x00")
    return _cfb(streams)


# ---------------------------------------------------------------------------------------
# MS-CFB writer (version 3)


def _cfb_key(name: str) -> tuple[int, str]:
    return len(name), name.upper()


def _cfb(streams: dict[str, bytes]) -> bytes:
    """A compound file holding *streams* ('STORAGE/NAME' or 'NAME'), one level of storages."""
    SECTOR, MINI, CUTOFF = 512, 64, 4096
    # directory layout: 0 root, then storages, then streams
    storages = sorted({k.split("/")[0] for k in streams if "/" in k})
    entries = [{"name": "Root Entry", "type": 5, "parent": None}]
    index = {}
    for s in storages:
        index[s] = len(entries)
        entries.append({"name": s, "type": 1, "parent": 0})
    for path, data in streams.items():
        parent = index[path.split("/")[0]] if "/" in path else 0
        entries.append({"name": path.split("/")[-1], "type": 2, "parent": parent, "data": data})
    # children of each node as a chain of right siblings in CFB order (a valid search tree)
    for e in entries:
        e.update(left=NOSTREAM, right=NOSTREAM, child=NOSTREAM)
    for i, e in enumerate(entries):
        kids = sorted(
            [j for j, k in enumerate(entries) if k["parent"] == i],
            key=lambda j: _cfb_key(entries[j]["name"]),
        )
        if kids:
            e["child"] = kids[0]
            for a, b in zip(kids, kids[1:]):
                entries[a]["right"] = b
    # mini stream for small streams
    mini = bytearray()
    minifat: list[int] = []
    for e in entries:
        data = e.get("data")
        if data is not None and len(data) < CUTOFF:
            n = max(1, -(-len(data) // MINI)) if data else 0
            e["start"] = len(mini) // MINI if data else ENDOFCHAIN
            for k in range(n):
                minifat.append(len(minifat) + 1 if k < n - 1 else ENDOFCHAIN)
            mini += data + b"\x00" * (n * MINI - len(data))
    # regular sectors: big streams, mini stream, mini FAT, directory, FAT
    sectors: list[bytes] = []
    fat: list[int] = []

    def put(data: bytes) -> int:
        if not data:
            return ENDOFCHAIN
        n = -(-len(data) // SECTOR)
        first = len(sectors)
        for k in range(n):
            sectors.append(data[k * SECTOR : (k + 1) * SECTOR].ljust(SECTOR, b"\x00"))
            fat.append(first + k + 1 if k < n - 1 else ENDOFCHAIN)
        return first

    for e in entries:
        data = e.get("data")
        if data is not None and len(data) >= CUTOFF:
            e["start"] = put(data)
    root_start = put(bytes(mini))
    minifat_bytes = b"".join(struct.pack("<I", x) for x in minifat)
    minifat_start = put(
        minifat_bytes.ljust(-(-len(minifat_bytes) // SECTOR) * SECTOR, b"\xff") if minifat else b""
    )
    dir_bytes = bytearray()
    for e in entries:
        name = e["name"].encode("utf-16-le") + b"\x00\x00"
        data = e.get("data")
        if e["type"] == 5:
            start, size = root_start, len(mini)
        elif e["type"] == 1:
            start, size = 0, 0
        else:
            start, size = e.get("start", ENDOFCHAIN), len(data)
        dir_bytes += (
            name.ljust(64, b"\x00")
            + struct.pack("<HBB", len(name), e["type"], 1)
            + struct.pack("<III", e["left"], e["right"], e["child"])
            + b"\x00" * 16
            + struct.pack("<I", 0)
            + b"\x00" * 16
            + struct.pack("<III", start, size, 0)
        )
    while len(dir_bytes) % SECTOR:
        dir_bytes += (
            b"\x00" * 64
            + struct.pack("<HBB", 0, 0, 0)
            + struct.pack("<III", NOSTREAM, NOSTREAM, NOSTREAM)
            + b"\x00" * 16
            + b"\x00" * 4
            + b"\x00" * 16
            + struct.pack("<III", 0, 0, 0)
        )
    dir_start = put(bytes(dir_bytes))
    # FAT sectors (they list themselves as FATSECT)
    n_fat = 1
    while (len(sectors) + n_fat) * 4 > n_fat * SECTOR:
        n_fat += 1
    fat_start = len(sectors)
    fat += [FATSECT] * n_fat
    fat += [FREESECT] * (n_fat * SECTOR // 4 - len(fat))
    fat_bytes = b"".join(struct.pack("<I", x) for x in fat)
    for k in range(n_fat):
        sectors.append(fat_bytes[k * SECTOR : (k + 1) * SECTOR])
    if n_fat > 109:
        raise ValueError("VBA project too large for a header-only FAT list")
    difat = [fat_start + k for k in range(n_fat)] + [FREESECT] * (109 - n_fat)
    header = (
        bytes.fromhex("D0CF11E0A1B11AE1")
        + b"\x00" * 16
        + struct.pack("<HHHHH", 0x003E, 0x0003, 0xFFFE, 9, 6)
        + b"\x00" * 6
        + struct.pack(
            "<IIIIIIIII",
            0,
            n_fat,
            dir_start,
            0,
            CUTOFF,
            minifat_start if minifat else ENDOFCHAIN,
            -(-len(minifat_bytes) // SECTOR) if minifat else 0,
            ENDOFCHAIN,
            0,
        )
        + b"".join(struct.pack("<I", x) for x in difat)
    )
    assert len(header) == 512
    return header + b"".join(sectors)


def to_xlsm(xlsx: str, out: str, vba_bin: bytes) -> None:
    """Turn a saved .xlsx into a macro-enabled .xlsm carrying *vba_bin* (written atomically)."""
    import zipfile
    from pathlib import Path

    from ..files import atomic_write

    main_xlsx = b"application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml"
    main_xlsm = b"application/vnd.ms-excel.sheet.macroEnabled.main+xml"
    with zipfile.ZipFile(xlsx) as zin:
        items = [(i, zin.read(i)) for i in zin.infolist()]

    def write(fh):
        with zipfile.ZipFile(fh, "w", zipfile.ZIP_DEFLATED) as zout:
            for info, data in items:
                if info.filename == "[Content_Types].xml":
                    data = data.replace(main_xlsx, main_xlsm).replace(
                        b"</Types>",
                        b'<Default Extension="bin" ContentType="application/vnd.ms-office.vbaProject"/></Types>',
                    )
                elif info.filename == "xl/_rels/workbook.xml.rels":
                    data = data.replace(
                        b"</Relationships>",
                        b'<Relationship Id="rIdVBA" Type="http://schemas.microsoft.com/office/2006/relationships/'
                        b'vbaProject" Target="vbaProject.bin"/></Relationships>',
                    )
                zout.writestr(info, data)
            vinfo = zipfile.ZipInfo("xl/vbaProject.bin", date_time=(2026, 12, 1, 0, 0, 0))
            zout.writestr(vinfo, vba_bin, compress_type=zipfile.ZIP_DEFLATED)

    atomic_write(Path(out), write)
