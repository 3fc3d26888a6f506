"""References in formula text: one place that knows ``$``, whole rows and columns, quoted sheet
names, 3-D spans, external books, defined names and structured table references.

A formula is split by openpyxl's tokenizer (never by regular expressions over the formula
text); each reference operand is then read by :func:`parse_ref` into a :class:`Ref`, whose
:meth:`Ref.key` is its relative (R1C1-like) form seen from the cell that holds it, so two
cells whose formulas have equal keys have the same *shape*.  The engine and the audit share
this module.

References
----------
.. [1] ECMA-376 Part 1, Office Open XML File Formats, §18.17 (formulas: cell references,
   sheet names, structured references).
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from functools import lru_cache

__all__ = [
    "Ref",
    "parse_ref",
    "tokens",
    "split_sheet",
    "quote_sheet",
    "MAX_ROW",
    "MAX_COL",
    "col_number",
    "col_letters",
]

MAX_ROW, MAX_COL = 1_048_576, 16_384


def col_number(letters: str) -> int:
    n = 0
    for ch in letters.upper():
        n = n * 26 + (ord(ch) - 64)
    return n


def col_letters(n: int) -> str:
    if n < 1:
        raise ValueError(f"column number {n} is off the sheet")
    s = ""
    while n:
        n, r = divmod(n - 1, 26)
        s = chr(65 + r) + s
    return s


@lru_cache(maxsize=4_096)  # a column filled down is split afresh from its skeleton, quickly
def tokens(formula: str) -> tuple:
    """The tokens of *formula* (without its leading ``=``) as ``(value, type, subtype)``.

    Formulas filled down a column differ only in their runs of digits (``A2*2``, ``A3*2``):
    the tokenizer's split of the first is kept by its *skeleton* (the text between the runs)
    and the next one's tokens are that split with its own digits, the tokenizer not run
    again.  The tokenizer decides nothing on the value of a run of digits (a number is a
    number whatever its digits) except after a mantissa's ``E`` (``1E+5``), so formulas
    holding ``E+``/``E-`` are always tokenized; a split is kept only when putting the
    formula's own digits back gives exactly its tokens."""
    parts = _RUNS.split(formula)
    if len(parts) == 1 or _SCIENTIFIC(formula):
        return _tokenized(formula)
    skeleton = tuple(parts[0::2])
    runs = parts[1::2]
    split = _SPLITS.get(skeleton)
    if split is not None:
        return _filled(split, runs)
    toks = _tokenized(formula)
    split = tuple((tuple(_RUNS.split(v)[0::2]), t, sub) for v, t, sub in toks)
    if sum(len(p) - 1 for p, _, _ in split) == len(runs) and _filled(split, runs) == toks:
        if len(_SPLITS) > 65_536:
            _SPLITS.clear()
        _SPLITS[skeleton] = split
    return toks


def _tokenized(formula: str) -> tuple:
    tokenizer = _TOKENIZER or _load_tokenizer()
    return tuple((t.value, t.type, t.subtype) for t in tokenizer("=" + formula).items)


_TOKENIZER = None


def tokenizer():
    """openpyxl's ``Tokenizer`` class, without importing openpyxl's workbook model."""
    return _TOKENIZER or _load_tokenizer()


def _load_tokenizer():
    """openpyxl's formula tokenizer class.  When openpyxl is not imported yet, its tokenizer
    module (which needs only ``re``) is loaded from openpyxl's own file, without the
    package's ``__init__``, which imports the whole workbook model (about 0.1 s a check of a
    workbook without shared formulas would pay for nothing)."""
    global _TOKENIZER
    import sys

    mod = sys.modules.get("openpyxl.formula.tokenizer")
    if mod is None:
        import importlib.util
        from pathlib import Path

        spec = importlib.util.find_spec("openpyxl")  # found, not executed
        path = Path(spec.origin).parent / "formula" / "tokenizer.py"
        own = importlib.util.spec_from_file_location("joulebook._openpyxl_tokenizer", path)
        mod = importlib.util.module_from_spec(own)
        own.loader.exec_module(mod)
    _TOKENIZER = mod.Tokenizer
    return _TOKENIZER


_RUNS = re.compile(r"([0-9]+)")  # runs of digits: the tokenizer's cache key, see tokens()
_SPLITS: dict = {}  # skeleton -> the tokens' texts between runs of digits, type, subtype


def _SCIENTIFIC(formula: str) -> bool:  # noqa: N802 - a predicate on the text
    return "E+" in formula or "E-" in formula or "e+" in formula or "e-" in formula


def _filled(split: tuple, runs: list) -> tuple:
    out = []
    k = 0
    for pieces, t, sub in split:
        if len(pieces) == 1:
            out.append((pieces[0], t, sub))
            continue
        v = pieces[0]
        for piece in pieces[1:]:
            v += runs[k] + piece
            k += 1
        out.append((v, t, sub))
    return tuple(out)


@dataclass(frozen=True)
class Ref:
    """One reference operand as written.

    ``kind`` is ``"cell"``, ``"area"``, ``"cols"`` (``A:C``), ``"rows"`` (``3:5``),
    ``"name"`` (a defined name, ``text`` holds it) or ``"table"`` (a structured reference,
    ``text`` holds it).  Rows and columns are 1-based as written; ``abs_*`` say which carry a
    ``$``.  ``sheet`` is None for the sheet holding the formula; ``sheet2`` ends a 3-D span;
    ``book`` is the external-book index of ``[1]Sheet1!A1``.
    """

    kind: str
    sheet: str | None = None
    sheet2: str | None = None
    book: str | None = None
    r1: int = 0
    c1: int = 0
    r2: int = 0
    c2: int = 0
    abs_r1: bool = False
    abs_c1: bool = False
    abs_r2: bool = False
    abs_c2: bool = False
    text: str = ""

    def key(self, row: int, col: int) -> tuple:
        """The reference seen from (row, col): equal keys mean the same relative reference."""
        if self.kind in ("name", "table"):
            return (self.kind, self.book, self.sheet, self.text.upper())
        return (
            self.kind,
            self.book,
            self.sheet and self.sheet.upper(),
            self.sheet2 and self.sheet2.upper(),
            self.r1 if self.abs_r1 else ("r", self.r1 - row),
            self.c1 if self.abs_c1 else ("c", self.c1 - col),
            self.r2 if self.abs_r2 else ("r", self.r2 - row),
            self.c2 if self.abs_c2 else ("c", self.c2 - col),
        )

    def placed(self, dr: int, dc: int) -> tuple[int, int, int, int] | None:
        """(r1, c1, r2, c2), ordered, after moving the relative parts by (dr, dc); None when a
        part falls off the sheet (Excel's ``#REF!``).  Whole columns span every row and whole
        rows every column."""
        r1 = self.r1 if self.abs_r1 else self.r1 + dr
        r2 = self.r2 if self.abs_r2 else self.r2 + dr
        c1 = self.c1 if self.abs_c1 else self.c1 + dc
        c2 = self.c2 if self.abs_c2 else self.c2 + dc
        if self.kind == "cols":
            r1, r2 = 1, MAX_ROW
        elif self.kind == "rows":
            c1, c2 = 1, MAX_COL
        if min(r1, r2, c1, c2) < 1 or max(r1, r2) > MAX_ROW or max(c1, c2) > MAX_COL:
            return None
        return min(r1, r2), min(c1, c2), max(r1, r2), max(c1, c2)


def quote_sheet(name: str) -> str:
    """A sheet name as a formula writes it: quoted when it is not a plain word."""
    plain = (
        name
        and (name[0].isalpha() or name[0] == "_")
        and all(ch.isalnum() or ch in "_." for ch in name)
        and _addr(name) is None
        and not _looks_r1c1(name)
    )
    return name if plain else "'" + name.replace("'", "''") + "'"


def _looks_r1c1(name: str) -> bool:
    u = name.upper()
    return u in ("R", "C") or (u[:1] in "RC" and u[1:].isdigit())


def split_sheet(text: str) -> tuple[str | None, str | None, str]:
    """``[1]'My sheet'!A1`` → (book, sheet, address); sheet is None when absent.  A 3-D span
    keeps its colon (``Sheet1:Sheet3``)."""
    book = None
    if text.startswith("["):
        end = text.find("]")
        if end > 0:
            book, text = text[1:end], text[end + 1 :]
    if text.startswith("'"):
        i, out = 1, []
        while i < len(text):
            ch = text[i]
            if ch == "'":
                if text[i + 1 : i + 2] == "'":
                    out.append("'")
                    i += 2
                    continue
                break
            out.append(ch)
            i += 1
        rest = text[i + 1 :]
        if rest.startswith("!"):
            sheet = "".join(out)
            if book is None and sheet.startswith("["):  # '[1]My sheet'!A1
                index, close, name = sheet[1:].partition("]")
                if close and index.isdigit():
                    book, sheet = index, name
            return book, sheet, rest[1:]
        return book, None, text
    bang = text.rfind("!")
    if bang < 0:
        return book, None, text
    sheet = text[:bang]
    if sheet.startswith("["):  # [1]Sheet1 written inside the quotes' place
        b2, _, sheet = sheet[1:].partition("]")
        book = book or b2
    return book, sheet, text[bang + 1 :]


def _part(s: str):
    """``$AB$12`` → (col, abs col, row, abs row); ``$AB`` → (col, abs, None, None);
    ``$12`` → (None, None, row, abs); None when *s* is not such a piece."""
    i, n = 0, len(s)
    abs_c = abs_r = False
    if i < n and s[i] == "$":
        abs_c, i = True, i + 1
    j = i
    while j < n and s[j].isascii() and s[j].isalpha():
        j += 1
    letters = s[i:j]
    k = j
    if k < n and s[k] == "$":
        abs_r, k = True, k + 1
    m = k
    while m < n and s[m].isdigit():
        m += 1
    digits = s[k:m]
    if m != n or (not letters and not digits):
        return None
    if letters and (len(letters) > 3 or col_number(letters) > MAX_COL):
        return None
    if digits and not (1 <= int(digits) <= MAX_ROW):
        return None
    if letters and not digits:
        if abs_r:
            return None
        return col_number(letters), abs_c, None, None
    if digits and not letters:
        # "$12" has its dollar before the digits: read as the row's
        return None, None, int(digits), abs_c or abs_r
    return col_number(letters), abs_c, int(digits), abs_r


def _addr(addr: str):
    """An address (no sheet) → (kind, r1, c1, r2, c2, abs flags) or None."""
    pieces = addr.split(":")
    if len(pieces) > 2 or not all(pieces):
        return None
    parts = [_part(p) for p in pieces]
    if any(p is None for p in parts):
        return None
    a = parts[0]
    b = parts[-1]
    if a[0] is not None and a[2] is not None and b[0] is not None and b[2] is not None:
        kind = "cell" if len(parts) == 1 else "area"
        return kind, a[2], a[0], b[2], b[0], (a[3], a[1], b[3], b[1])
    if len(parts) == 2 and a[2] is None and b[2] is None:  # A:C
        return "cols", 1, a[0], MAX_ROW, b[0], (True, a[1], True, b[1])
    if len(parts) == 2 and a[0] is None and b[0] is None:  # 3:5
        return "rows", a[2], 1, b[2], MAX_COL, (a[3], True, b[3], True)
    return None


@lru_cache(maxsize=65_536)
def _external(text: str) -> bool:
    """True for a reference into another book: "[1]Sheet1!A1", "'[1]Sheet 1'!A1", "[1]!Name"."""
    body = text[1:] if text.startswith("'") else text
    if not body.startswith("["):
        return False
    index, close, rest = body[1:].partition("]")
    return bool(close) and index.isdigit() and "!" in rest


@lru_cache(maxsize=65_536)
def parse_ref(text: str) -> Ref | None:
    """Read one reference operand as the tokenizer gives it; None when it is not one."""
    if "[" in text and not _external(text):
        # Table1[Amount], [@Qty], Table1[[#Totals],[Amount]] (an external book is "[1]S!A1")
        return Ref("table", text=text)
    book, sheet, addr = split_sheet(text)
    sheet2 = None
    if sheet and ":" in sheet:  # Sheet1:Sheet3 (":" cannot stand in a sheet's name)
        sheet, _, sheet2 = sheet.partition(":")
    a = _addr(addr)
    if a is None:
        if addr and (addr[0].isalpha() or addr[0] in "_\\") and "!" not in addr:
            return Ref("name", sheet=sheet, book=book, text=addr)
        return None
    kind, r1, c1, r2, c2, (ar1, ac1, ar2, ac2) = a
    return Ref(kind, sheet, sheet2, book, r1, c1, r2, c2, ar1, ac1, ar2, ac2)


def our_name(func_token: str) -> str | None:
    """The joulebook function a FUNC token opens (``JB_X(``, ``_xludf.JB_X(``,
    ``[1]!JB_X(``), upper case, or None."""
    name = func_token[:-1] if func_token.endswith("(") else func_token
    name = name.strip()
    if name.startswith("[") and "]!" in name:
        index, _, rest = name[1:].partition("]!")
        if index.isdigit():
            name = rest
    if name.upper().startswith("_XLUDF."):
        name = name[7:]
    name = name.upper()
    if not name.startswith("JB_") or len(name) < 4:
        return None
    if not (name.isascii() and name.replace("_", "").isalnum()) or name[3].isdigit():
        return None
    return name


def calls_ours(formula: str) -> bool:
    """True when *formula* calls a joulebook function."""
    try:
        toks = tokens(formula)
    except Exception:
        return False
    return any(t == "FUNC" and sub == "OPEN" and our_name(v) for v, t, sub in toks)


def normalise(formula: str) -> str:
    """*formula* with our functions as plain names (add-in link and ``_xludf.`` prefixes
    dropped); any other text as it was."""
    upper = formula.upper()
    if "JB_" not in upper:
        return formula  # calls none of ours (every name of ours holds JB_)
    if "_XLUDF." not in upper and "]!" not in formula and _names_upper(formula, upper):
        return formula  # no prefix to drop and every JB_ word written in capitals already
    try:
        toks = tokens(formula)
    except Exception:
        return formula
    if not any(t == "FUNC" and sub == "OPEN" and our_name(v) for v, t, sub in toks):
        return formula
    out = []
    for v, t, sub in toks:
        name = our_name(v) if t == "FUNC" and sub == "OPEN" else None
        out.append(name + "(" if name else v)
    text = "".join(out)
    return formula if text == formula else text  # one string kept, not two equal ones


def _names_upper(formula: str, upper: str) -> bool:
    """True when every word starting with JB_ (in any case) is written in capitals."""
    i = upper.find("JB_")
    n = len(upper)
    while i >= 0:
        j = i + 3
        while j < n and (upper[j].isalnum() or upper[j] == "_"):
            j += 1
        if formula[i:j] != upper[i:j]:
            return False
        i = upper.find("JB_", j)
    return True


def cell_refs(formula: str, here: str) -> list[tuple[str, int, int]]:
    """The single cells *formula* names directly, as (sheet, row, column), in order."""
    try:
        toks = tokens(formula)
    except Exception:
        return []
    out = []
    for v, t, sub in toks:
        if t == "OPERAND" and sub == "RANGE":
            ref = parse_ref(v)
            if ref is not None and ref.kind == "cell" and ref.book is None and not ref.sheet2:
                out.append((ref.sheet or here, ref.r1, ref.c1))
    return out


def texts(formula: str) -> list[str]:
    """The text constants of *formula*, unquoted."""
    try:
        toks = tokens(formula)
    except Exception:
        return []
    return [v[1:-1].replace('""', '"') for v, t, sub in toks if t == "OPERAND" and sub == "TEXT"]


#: the longest formula a LET may expand to (Excel's own limit on formula text is 8,192)
MAX_EXPANDED = 65_536
_LET = ("LET(", "_XLFN.LET(")


def _args(toks: tuple, i: int) -> tuple[list[list], int]:
    """The arguments (token lists, blank space dropped at their ends) of the call whose
    opening token is ``toks[i]``, and the index of its closing token."""
    args: list[list] = [[]]
    depth = 0
    for j in range(i + 1, len(toks)):
        v, t, sub = toks[j]
        if sub == "OPEN":
            depth += 1
        elif sub == "CLOSE":
            if depth == 0:
                return [[x for x in a if x[1] != "WHITE-SPACE"] or a for a in args], j
            depth -= 1
        elif t == "SEP" and sub == "ARG" and depth == 0:
            args.append([])
            continue
        args[-1].append(toks[j])
    raise ValueError("unbalanced call")


def expand_let(formula: str) -> str:
    """*formula* with every ``LET(name1, value1, …, calculation)`` replaced by its
    calculation, each name standing for its value's text (in parentheses unless it is one
    operand).  The innermost LET goes first, so a name bound again inside shadows the outer
    one, as in Excel.  LET's values are pure expressions, so the result is the same
    formula; only a volatile value (RAND) would be drawn once per use instead of once.
    Raises ValueError for a LET that is not well formed or expands past MAX_EXPANDED."""
    while True:
        toks = tokens(formula)
        opens = [i for i, (v, t, sub) in enumerate(toks) if t == "FUNC" and sub == "OPEN"]
        lets = [i for i in opens if toks[i][0].upper() in _LET]
        if not lets:
            return formula
        # the LET that closes first holds no other LET
        spans = [(i, *_args(toks, i)) for i in lets]
        i, args, j = min(spans, key=lambda s: s[2])
        if len(args) < 3 or len(args) % 2 == 0:
            raise ValueError("LET needs name, value pairs and a calculation")
        bound: dict[str, str] = {}

        def text(arg: list, bound: dict = bound) -> str:
            return "".join(
                bound.get(v.upper(), v) if t == "OPERAND" and sub == "RANGE" else v
                for v, t, sub in arg
            )

        for k in range(0, len(args) - 1, 2):
            name = args[k]
            if len(name) != 1 or name[0][1] != "OPERAND" or name[0][2] != "RANGE":
                raise ValueError("a LET name must be a plain name")
            value = args[k + 1]
            body = text(value)
            single = len(value) == 1 and value[0][1] == "OPERAND"
            bound[name[0][0].upper()] = body if single else f"({body})"
        calc = text(args[-1])
        head = "".join(v for v, _, _ in toks[:i])
        tail = "".join(v for v, _, _ in toks[j + 1 :])
        formula = f"{head}({calc}){tail}"
        if len(formula) > MAX_EXPANDED:
            raise ValueError(f"LET expands past {MAX_EXPANDED:,} characters")
