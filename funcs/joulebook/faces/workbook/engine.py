"""Headless recalculation of a saved workbook.

The Excel formula language and built-ins come from the ``formulas`` library (EUPL-1.1+); we
do not write our own Excel.  References are read by :mod:`.refs` from openpyxl's tokenizer,
never by regular expressions over formula text.  Each formula is rewritten as a *template*:
every reference operand becomes a placeholder (``_JBR0``, ``_JBR1``, …) and defined names
holding a constant or an expression are spliced in.  A template is compiled by the library
once and reused by every cell that has it; each cell resolves its own placeholders (``$``,
whole rows and columns, other sheets, 3-D spans, tables, external-link caches) and hands the
compiled function the values as the library itself would: a reference is a 2-D array (or the
library's ``Ranges`` object where a function needs the reference itself, such as ROW, ISREF,
INDEX or the range operators), so text, booleans and blanks behave as in Excel.

Cells are evaluated in dependency order (:mod:`graphlib`); circular references are reported,
never looped.  Same-shape cells of a column whose functions are all elementwise are evaluated
in one vectorised call.  OFFSET and INDIRECT are evaluated cell by cell after the rest, with
their targets found (and computed) at run time.

Nothing is written silently: a cell that cannot be evaluated keeps its saved value and its
:class:`Outcome` says why (``unsupported: …``, ``circular reference``); a cell that depends on
such a cell is ``not checked: depends on Sheet!A1 (…)``; a cell whose value depends on the
clock or on chance is ``volatile``.  joulebook's own functions are registered from the catalog
and run through :func:`joulebook.catalog.call` exactly as in Excel.
"""

from __future__ import annotations

import collections
import graphlib
import logging
import os
import threading
from bisect import bisect_left, bisect_right
from dataclasses import dataclass, field
from typing import NamedTuple

import numpy as np

from joulebook.catalog import CATALOG
from joulebook.catalog.cellvalues import ERRORS_NAME, ErrorValue, error_style, message_of
from joulebook.catalog.cellvalues import cell as shared_cell

from .functions.lookup import generation as new_generation
from .functions.lookup import tag as tag_range
from .reader import Book, Cell, paused_gc
from .refs import (
    _RUNS,
    _SCIENTIFIC,
    MAX_COL,
    MAX_ROW,
    Ref,
    col_letters,
    expand_let,
    parse_ref,
    quote_sheet,
    split_sheet,
    tokens,
)
from .status import Status

__all__ = ["Engine", "Outcome", "ERROR", "VOLATILE"]

#: functions whose value changes with the clock or by chance: reported, never compared
VOLATILE = frozenset({"NOW", "TODAY", "RAND", "RANDBETWEEN", "RANDARRAY", "_XLFN.RANDARRAY"})
_DATABASE_NAMES = (
    "DAVERAGE DCOUNT DCOUNTA DGET DMAX DMIN DPRODUCT DSTDEV DSTDEVP DSUM DVAR DVARP".split()
)
#: functions (and operators) that need the reference itself, not only its values
_NEEDS_RANGES = frozenset(
    {
        "ROW",
        "COLUMN",
        "ROWS",
        "COLUMNS",
        "AREAS",
        "ISREF",
        "SUBTOTAL",
        "COUNTBLANK",
        "INDEX",
        "OFFSET",
        "INDIRECT",
        "SINGLE",
        "_XLFN.SINGLE",
        "ISFORMULA",
        "_XLFN.ISFORMULA",
        "AGGREGATE",
        "_XLFN.AGGREGATE",
        "FORMULATEXT",
        "_XLFN.FORMULATEXT",
        "SHEET",
        "_XLFN.SHEET",
        "SHEETS",
        "_XLFN.SHEETS",
        "CELL",
        *_DATABASE_NAMES,
    }
) | frozenset(f.name for f in CATALOG if f.reads_message)
_DYNAMIC = frozenset({"OFFSET", "INDIRECT"})
#: functions whose arguments are references or arrays in Excel: a single cell given as a whole
#: argument stays a reference (a 1x1 array), so text, booleans and blanks are skipped as by
#: the aggregates; elsewhere a single cell is dereferenced to its value, as Excel does for a
#: parameter that takes a value
_REF_ARGS = frozenset(
    """SUM SUMSQ PRODUCT AVERAGE AVERAGEA COUNT COUNTA COUNTBLANK MAX MAXA MIN MINA MEDIAN MODE
    MODE.SNGL STDEV STDEVA STDEVP STDEVPA STDEV.S STDEV.P VAR VARA VARP VARPA VAR.S VAR.P LARGE
    SMALL RANK RANK.EQ RANK.AVG PERCENTILE PERCENTILE.INC PERCENTILE.EXC QUARTILE QUARTILE.INC
    QUARTILE.EXC SUMPRODUCT SUMIF SUMIFS COUNTIF COUNTIFS AVERAGEIF AVERAGEIFS MAXIFS MINIFS AND
    OR XOR CONCAT TEXTJOIN NPV IRR MIRR XNPV XIRR INDEX MATCH LOOKUP VLOOKUP HLOOKUP XLOOKUP
    XMATCH ROWS COLUMNS ROW COLUMN AREAS ISREF ISFORMULA OFFSET MDETERM MINVERSE MMULT TRANSPOSE
    FREQUENCY GEOMEAN HARMEAN AVEDEV DEVSQ KURT SKEW CORREL COVAR COVARIANCE.P COVARIANCE.S
    PEARSON RSQ SLOPE INTERCEPT STEYX FORECAST FORECAST.LINEAR TREND GROWTH LINEST LOGEST
    SUBTOTAL AGGREGATE SUMX2MY2 SUMX2PY2 SUMXMY2 CHOOSE UNIQUE SORT SORTBY FILTER SEQUENCE
    HSTACK VSTACK TOCOL TOROW""".split()
)
_REF_ARGS = _REF_ARGS | {"_XLFN." + n for n in _REF_ARGS}
#: functions whose every argument is a single value in Excel: a single cell there is its
#: value, and a range takes the implicit intersection with the formula's row or column.  Any
#: function not named here or above gets its references as arrays, as the formula library
#: used as-is hands them (TRIMMEAN, FVSCHEDULE, PERCENTRANK, PROB, … take ranges), so the
#: engine is never less correct than the library on a function it does not know.
_VALUE_ARGS = frozenset(
    """ABS ACOS ACOSH ACOT ACOTH ASIN ASINH ATAN ATAN2 ATANH COS COSH COT COTH CSC CSCH SEC SECH
    SIN SINH TAN TANH DEGREES RADIANS EXP LN LOG LOG10 POWER SQRT SQRTPI PI SIGN INT TRUNC MOD
    QUOTIENT ROUND ROUNDUP ROUNDDOWN MROUND CEILING FLOOR CEILING.MATH FLOOR.MATH
    CEILING.PRECISE FLOOR.PRECISE ISO.CEILING EVEN ODD FACT FACTDOUBLE COMBIN COMBINA PERMUT
    PERMUTATIONA ROMAN ARABIC BASE DECIMAL GAMMA GAMMALN GAMMALN.PRECISE GAUSS PHI
    IF IFERROR IFNA NOT ISBLANK ISERR ISERROR ISNA ISLOGICAL ISNONTEXT ISNUMBER ISTEXT ISEVEN
    ISODD N T ERROR.TYPE
    CHAR UNICHAR CODE UNICODE CLEAN TRIM LOWER UPPER PROPER LEFT RIGHT MID LEN FIND SEARCH
    REPLACE SUBSTITUTE REPT EXACT VALUE NUMBERVALUE TEXT FIXED DOLLAR CONCATENATE HYPERLINK
    DATE DATEVALUE TIME TIMEVALUE YEAR MONTH DAY HOUR MINUTE SECOND WEEKDAY WEEKNUM ISOWEEKNUM
    EDATE EOMONTH DAYS DAYS360 DATEDIF YEARFRAC
    PMT PV FV NPER RATE IPMT PPMT CUMIPMT CUMPRINC ISPMT SLN SYD DB DDB EFFECT NOMINAL RRI
    PDURATION
    NORMDIST NORM.DIST NORMINV NORM.INV NORMSDIST NORM.S.DIST NORMSINV NORM.S.INV LOGNORMDIST
    LOGNORM.DIST LOGINV LOGNORM.INV EXPONDIST EXPON.DIST BINOMDIST BINOM.DIST BINOM.INV
    CRITBINOM POISSON POISSON.DIST TDIST T.DIST T.DIST.2T T.DIST.RT TINV T.INV T.INV.2T
    CHIDIST CHISQ.DIST CHISQ.DIST.RT CHIINV CHISQ.INV CHISQ.INV.RT FDIST F.DIST F.DIST.RT
    FINV F.INV F.INV.RT GAMMADIST GAMMA.DIST GAMMAINV GAMMA.INV BETADIST BETA.DIST BETAINV
    BETA.INV WEIBULL WEIBULL.DIST HYPGEOMDIST HYPGEOM.DIST NEGBINOMDIST NEGBINOM.DIST
    CONFIDENCE CONFIDENCE.NORM CONFIDENCE.T STANDARDIZE FISHER FISHERINV
    ERF ERFC ERF.PRECISE ERFC.PRECISE BESSELI BESSELJ BESSELK BESSELY DELTA GESTEP
    BIN2DEC BIN2HEX BIN2OCT DEC2BIN DEC2HEX DEC2OCT HEX2BIN HEX2DEC HEX2OCT OCT2BIN OCT2DEC
    OCT2HEX BITAND BITOR BITXOR BITLSHIFT BITRSHIFT CONVERT _XLJB.ADD _XLJB.SUB""".split()
)
_VALUE_ARGS = _VALUE_ARGS | {"_XLFN." + n for n in _VALUE_ARGS}
#: functions that evaluate their arguments as arrays even in a plain formula
_ARRAY_CONTEXT = frozenset(
    """SUMPRODUCT MMULT MDETERM MINVERSE TRANSPOSE FREQUENCY LOOKUP TREND GROWTH LINEST LOGEST
    SUMX2MY2 SUMX2PY2 SUMXMY2 CORREL COVAR PEARSON RSQ SLOPE INTERCEPT STEYX AGGREGATE
    _XLFN.AGGREGATE""".split()
)
#: functions that read where a reference is, never its cells' values: no dependency, and
#: no circular reference when the reference covers the cell itself
_POSITION_ONLY = frozenset({"ROW", "COLUMN", "ROWS", "COLUMNS", "AREAS", "ISREF"})


def _where_only(func: str, arg: int) -> bool:
    """True when argument *arg* (from 0) of *func* is read only for where it is."""
    return func in _POSITION_ONLY or (func == "OFFSET" and arg == 0)


def _whole_extent(func: str, arg: int) -> bool:
    """True when the argument is handed over at its full size (A:A as 1,048,576 rows), not
    cut to the used part of the sheet: sizes and places (ROWS, INDEX, OFFSET) and blank
    counts depend on it."""
    return _where_only(func, arg) or func == "COUNTBLANK" or (func == "INDEX" and arg == 0)


_POSITIONAL = frozenset({"ROW", "COLUMN", "SINGLE", "_XLFN.SINGLE"})  # ROW() needs the cell
_MAX_NAME_DEPTH = 16
_KEEP_CELLS = 200_000  # boxes up to this size are read whole; larger ones and whole rows or
# columns are cut to the used part of the sheet
_CACHED_BOX = 32  # ranges of at least this many cells are built once and kept while the
# cells run in dependency order (every formula cell inside is final by then)
_CACHED_CELLS = 5_000_000  # the most cells kept so (the kept ranges are dropped past it)


def ERROR(code: str) -> tuple[str, str]:  # noqa: N802 - reads like Excel's error values
    return ("error", code)


@dataclass(slots=True)
class Outcome:
    """The recomputed value of one cell, and why it could not be checked when it was not.

    ``problem`` is empty for a computed cell, else one of ``unsupported: …``, ``circular
    reference``, ``not checked: depends on Sheet!A1 (…)``, ``volatile: …`` or ``engine: …``.
    ``note`` carries what a checker should know about a computed value (link caches)."""

    value: object
    problem: str = ""
    note: str = ""
    message: str = ""  # the joulebook message behind a failure (its text or error value)
    kind: Status | None = None  # the typed status of ``problem`` (None: computed)
    cause: Status | None = None  # for NOT_CHECKED: the status of the cell it depends on

    @property
    def kept(self) -> bool:
        """True when the value was not computed here: the saved value must stay."""
        return bool(self.problem) and self.kind is not Status.VOLATILE


class _Unsupported(Exception):
    pass


# ---------------------------------------------------------------------------------------
# the formula library, ours registered in it


_REGISTERED = False
_LIBRARY: dict = {}  # the library's own functions that ours hand some cases back to
_LOCK = threading.Lock()
_CURRENT = threading.local()  # the engine and cell being evaluated (OFFSET, INDIRECT)


def _register_ours() -> None:
    """Add every catalog function, OFFSET and INDIRECT to the library's function table."""
    global _REGISTERED
    with _LOCK:
        if _REGISTERED:
            return
        import formulas
        from formulas.functions import wrap_func

        from .builtins import import_statistics

        logging.getLogger("schedula").setLevel(logging.CRITICAL)
        logging.getLogger("formulas").setLevel(logging.CRITICAL)
        import_statistics()  # before the table: scipy deferred until a function needs it
        table = formulas.get_functions()
        for f in CATALOG:
            table[f.name] = (
                wrap_func(_message_reader(f.name), ranges=True)
                if f.reads_message
                else _our_function(f.name)
            )
        import collections

        from formulas.functions import COMPILING, wrap_impure_func

        _LIBRARY["INDEX"] = table["INDEX"]["function"].__wrapped__  # arrays: the library
        from . import builtins

        builtins.install(table)  # built-ins the library lacks or gets wrong
        from .functions import rounding

        rounding.install(table)  # MROUND midpoints, IPMT of a negative present value
        from .functions import lookup

        lookup.install(table)  # a lookup array prepared once per range, not once per formula
        table["SUBTOTAL"] = wrap_func(_subtotal, ranges=True)
        table["COUNTBLANK"] = wrap_func(_countblank, ranges=True)
        for names, fn in (
            (("AGGREGATE", "_XLFN.AGGREGATE"), _aggregate),
            (("FORMULATEXT", "_XLFN.FORMULATEXT"), _formulatext),
            *(((name,), _database_function(name)) for name in _DATABASE),
        ):
            for name in names:
                table[name] = wrap_func(fn, ranges=True)
        for name, fn in (
            ("OFFSET", _offset),
            ("INDIRECT", _indirect),
            ("INDEX", _index),
            ("SHEET", _sheet_number),
            ("_XLFN.SHEET", _sheet_number),
            ("SHEETS", _sheet_count),
            ("_XLFN.SHEETS", _sheet_count),
            ("CELL", _cell_info),
        ):
            # run-time only: never folded into a constant while the formula is compiled
            table[name] = {
                "extra_inputs": collections.OrderedDict([(COMPILING, False)]),
                "function": wrap_impure_func(wrap_func(fn, ranges=True)),
            }
        from formulas.functions.operators import OPERATORS

        OPERATORS[":"] = wrap_func(_range_op, ranges=True)
        from .functions import operators as excel_operators

        excel_operators.install(OPERATORS)  # + - * / ^ as Excel (#NUM!, text as numbers)
        excel_operators.install_final_sums(table)  # a last + or -: Excel's cancellation
        # the library writes numpy booleans as "True" in text ("0"&ISNUMBER(A1)): TRUE, as
        # spreadsheets write them; its text functions and "&" look the helper up at call time
        from formulas.functions import operators, text

        library_str = text._str

        def as_text(x):
            if isinstance(x, (int, float, np.number)) and not isinstance(x, (bool, np.bool_)):
                return excel_operators.general_text(float(x))  # 15 digits, 1.00000013E+48
            return library_str(bool(x) if isinstance(x, np.bool_) else x)

        text._str = operators._str = as_text
        # the library's criteria test (SUMIF, COUNTIFS, …) caches its verdict per value, and
        # TRUE and 1 are one key to a cache: a range holding both gets one verdict for both
        import formulas.functions as library_functions

        criteria = library_functions.__dict__["__xfilter"]

        def criteria_apart(test_range, condition):
            raw = np.asarray(test_range["raw"], dtype=object)
            flags = np.vectorize(lambda v: isinstance(v, (bool, np.bool_)), otypes=[bool])(raw)
            if not flags.any() or flags.all():
                return criteria(test_range, condition)
            b = np.zeros(raw.shape, dtype=bool)
            b[flags] = criteria({"raw": raw[flags]}, condition)
            b[~flags] = criteria({"raw": raw[~flags]}, condition)
            return b

        from .functions.criteria import remembered

        # once per distinct value of a criteria range, remembered per (range, criterion)
        library_functions.__dict__["__xfilter"] = remembered(criteria_apart)
        _REGISTERED = True


def warm_up() -> None:
    """Do the engine's one-off imports and registrations now (before forking workers that
    then share them): the formula library and its function table, and the property library."""
    _register_ours()
    import CoolProp.CoolProp  # noqa: F401

    from .builtins import import_statistics

    import_statistics()  # what most workbooks reach for (scipy deferred to first use)


def _to_cell_value(x):
    """A value as our cell path expects it: numbers, text, None for blank, '#N/A' for errors."""
    import schedula as sh
    from formulas.tokens.operand import XlError

    if isinstance(x, np.ndarray):
        if x.size == 1 and x.ndim == 2 and x.shape == (1, 1):
            return _to_cell_value(x[0, 0])
        rows = (x if x.ndim == 2 else x.reshape(1, -1)).tolist()
        if x.dtype == object and all(type(v) in _CELL_TYPES for row in rows for v in row):
            return rows  # numbers and text as they are (a column of one batch)
        return [[_to_cell_value(v) for v in row] for row in rows]
    if x is sh.EMPTY:
        return None
    if isinstance(x, XlError):
        return str(x)
    if isinstance(x, (np.floating, np.integer)):
        return float(x)
    if isinstance(x, np.bool_):
        return bool(x)
    return x


_CELL_TYPES = frozenset({float, str, int, bool})


def _failed_type():
    from formulas.tokens.operand import XlError

    class JoulebookFailure(XlError):
        """An error value that carries its joulebook message (``why``)."""

    return JoulebookFailure


_FAILED = None


def _as_library(v):
    """One value of our cell path as the formula library takes it."""
    global _FAILED
    if v is None:
        return ""  # a blank result shows as an empty cell, as xlwings writes it
    if isinstance(v, ErrorValue):
        if _FAILED is None:
            _FAILED = _failed_type()
        out = _FAILED(v.code)
        out.why = v.message
        return out
    return v


def _style() -> str:
    eng = getattr(_CURRENT, "engine", None)
    return eng.error_style if eng is not None else "text"


def _our_function(name: str):
    def fn(*args):
        out = shared_cell(name, *(_to_cell_value(a) for a in args), errors=_style())
        if isinstance(out, list):
            arr = np.empty((len(out), len(out[0]) if out else 0), dtype=object)
            flat = [v for row in out for v in row]
            if arr.size == len(flat) and all(type(v) is float for v in flat):
                arr.reshape(-1)[:] = flat  # numbers as they are (a column of one batch)
                return arr
            for i, row in enumerate(out):
                for j, v in enumerate(row):
                    arr[i, j] = _as_library(v)
            return arr
        return _as_library(out)

    fn.__name__ = name
    return fn


def _message_reader(name: str):
    """A function that reads a cell's joulebook message (JB_WHY): a reference gives the
    message the engine kept for its top-left cell; a value gives the message it carries."""

    def fn(x):
        eng = getattr(_CURRENT, "engine", None)
        message = ""
        if hasattr(x, "ranges") and x.ranges and eng is not None:
            key = _box(eng, x.ranges[0])[:3]
            out = eng._out.get(key)
            message = (out.message or message_of(out.value)) if out is not None else ""
        else:
            message = _message_of_library(_scalar(x))
        out = _as_library(shared_cell(name, message or None, errors=_style()))
        return _Explained(out) if type(out) is str else out

    fn.__name__ = name
    return fn


_NO_MESSAGE = frozenset({float, int, bool, np.float64, np.bool_})


class _Explained(str):
    """A message shown by a message reader (JB_WHY): the cell explains a failure elsewhere
    and has not failed itself."""


def _message_of_library(x) -> str:
    """The joulebook failure a library value carries ("" for none)."""
    if type(x) in _NO_MESSAGE:
        return ""
    if isinstance(x, _Explained):
        return ""
    return getattr(x, "why", "") or message_of(x)


def _unknown_function(name: str):
    """A stand-in for a function the library does not have: #NAME?, as a spreadsheet shows."""

    def fn(*args):
        from formulas.tokens.operand import Error

        return Error.errors["#NAME?"]

    fn.__name__ = name
    fn.joulebook_unknown = True
    return fn


def _scalar(x):
    from formulas.functions import flatten

    if hasattr(x, "value"):
        x = x.value
    v = list(flatten([x], None))
    return v[0] if v else None


def _box(eng: Engine, rng: dict) -> tuple[str, int, int, int, int]:
    """(sheet, r1, c1, r2, c2) of one range of the library's reference object."""
    sheet = eng._sheet_of_id(rng.get("sheet_id") or "", _CURRENT.sheet)
    return sheet, int(rng["r1"]), int(rng["n1"]), int(rng["r2"]), int(rng["n2"])


def _whole_number(v):
    """An INDEX position as an int, None when omitted, or the error value to return."""
    from formulas.tokens.operand import Error

    if v is None:
        return None
    v = _scalar(v)
    if type(v).__name__ == "XlError":
        return v
    if v is sh_empty():
        return 0
    if isinstance(v, str):
        try:
            return int(float(v))
        except ValueError:
            return Error.errors["#VALUE!"]
    if isinstance(v, (bool, int, float, np.number)):
        return int(float(v))
    return Error.errors["#VALUE!"]


def _offset(ref, rows, cols, height=None, width=None):
    """OFFSET(reference, rows, cols, [height], [width]) on the running engine."""
    from formulas.ranges import Ranges
    from formulas.tokens.operand import Error

    _CURRENT.last_ref = None  # (an argument may have set it)
    eng: Engine = _CURRENT.engine
    if not isinstance(ref, Ranges) or len(ref.ranges) != 1:
        return Error.errors["#VALUE!"]
    sheet, r1, c1, r2, c2 = _box(eng, ref.ranges[0])
    h0, w0 = r2 - r1 + 1, c2 - c1 + 1
    import schedula as sh

    # an omitted height or width (OFFSET(A1,1,0,,)) is the reference's own
    height = None if height is sh.EMPTY else height
    width = None if width is sh.EMPTY else width
    vals = []
    for v in (rows, cols, height, width):
        v = _scalar(v) if v is not None else None
        if v is not None and not isinstance(v, (int, float, bool, np.number)):
            if hasattr(v, "code") or type(v).__name__ == "XlError":
                return v
            return Error.errors["#VALUE!"]
        vals.append(None if v is None else int(np.floor(float(v))))
    dr, dc, h, w = vals
    h = h0 if h is None else h
    w = w0 if w is None else w
    if h < 1 or w < 1:
        return Error.errors["#REF!"]
    r1, c1 = r1 + dr, c1 + dc
    r2, c2 = r1 + h - 1, c1 + w - 1
    if r1 < 1 or c1 < 1 or r2 > MAX_ROW or c2 > MAX_COL:
        return Error.errors["#REF!"]
    return _returned(eng._ranges(sheet, r1, c1, r2, c2, demand=True))


_SUBTOTAL_KINDS = {
    1: "AVERAGE", 2: "COUNT", 3: "COUNTA", 4: "MAX", 5: "MIN", 6: "PRODUCT",
    7: "STDEV", 8: "STDEVP", 9: "SUM", 10: "VAR", 11: "VARP",
}  # fmt: skip


def _is_error(v) -> bool:
    return type(v).__name__ == "XlError"


def _collected(refs, skip_hidden: bool, skip_nested: bool, who: str, filtered_ok: bool):
    """The values of the cells of the references *refs* (blanks left out) in reading order,
    leaving out cells holding a SUBTOTAL or AGGREGATE of their own (*skip_nested*) and
    hidden rows (*skip_hidden*); None when an argument is not a reference.  Where hidden
    rows must be kept but the sheet has an AutoFilter, the file does not tell filtered rows
    from hidden ones: refused (unless *filtered_ok*)."""
    from formulas.ranges import Ranges

    eng: Engine = _CURRENT.engine
    values = []
    for ref in refs:
        if not isinstance(ref, Ranges):
            return None
        for rng in ref.ranges:
            sheet, *box = _box(eng, rng)
            r1, c1, r2, c2 = eng._bounded(sheet, tuple(box))
            hidden = eng.book.hidden_rows.get(sheet, set())
            if (
                not skip_hidden
                and not filtered_ok
                and sheet in eng.book.filtered
                and any(r1 <= r <= r2 for r in hidden)
            ):
                _CURRENT.problems.append(
                    (
                        Status.UNSUPPORTED,
                        f"unsupported: {who} over hidden rows of a filtered sheet (filtered "
                        "and hidden rows are not told apart in the file)",
                    )
                )
                return "refused"
            for r in range(r1, r2 + 1) if r2 - r1 < 4096 else _rows_in(eng, sheet, r1, r2, c1, c2):
                if skip_hidden and r in hidden:
                    continue
                for c in range(c1, c2 + 1):
                    v = eng._values.get((sheet, r, c))
                    if v is None:
                        continue
                    cell = eng.book.cells.get((sheet, r, c))
                    if (
                        skip_nested
                        and cell is not None
                        and cell.formula
                        and _is_subtotal(cell.formula)
                    ):
                        continue
                    values.append(v)
    return values


def _rows_in(eng, sheet, r1, r2, c1, c2):
    """The rows between r1 and r2 that hold a cell in columns c1..c2, in order."""
    rows: set = set()
    for c in range(c1, c2 + 1):
        got = eng._rows_by_col.get((sheet, c)) or []
        rows.update(got[bisect_left(got, r1) : bisect_right(got, r2)])
    return sorted(rows)


_SUBTOTAL_KINDS = {
    1: "AVERAGE", 2: "COUNT", 3: "COUNTA", 4: "MAX", 5: "MIN", 6: "PRODUCT",
    7: "STDEV", 8: "STDEVP", 9: "SUM", 10: "VAR", 11: "VARP",
}  # fmt: skip
_AGGREGATE_KINDS = {
    **_SUBTOTAL_KINDS, 12: "MEDIAN", 13: "MODE", 14: "LARGE", 15: "SMALL",
    16: "PERCENTILE.INC", 17: "QUARTILE.INC", 18: "PERCENTILE.EXC", 19: "QUARTILE.EXC",
}  # fmt: skip


def _number_arg(x):
    """A numeric argument as a float, or the error value to return."""
    from formulas.tokens.operand import Error

    x = _scalar(x)
    if _is_error(x):
        return x
    if isinstance(x, bool) or not isinstance(x, (int, float, np.number)):
        if isinstance(x, str):
            try:
                return float(x)
            except ValueError:
                pass
        return Error.errors["#VALUE!"]
    return float(x)


def _aggregate_of(name: str, values: list, k=None):
    """*name* (a SUBTOTAL or AGGREGATE function) over cell *values*: numbers count, text and
    logical values in cells are skipped (COUNTA counts every value)."""
    from formulas.tokens.operand import Error

    if name == "COUNTA":
        return float(len(values))
    x = np.array(
        [float(v) for v in values if isinstance(v, (int, float)) and not isinstance(v, bool)]
    )
    if name == "COUNT":
        return float(x.size)
    if name in ("SUM", "MAX", "MIN", "PRODUCT") and x.size == 0:
        return 0.0
    need = 2 if name in ("STDEV", "VAR") else 1
    if x.size < need:
        none = "#DIV/0!" if name in ("AVERAGE", "STDEV", "STDEVP", "VAR", "VARP") else "#NUM!"
        return Error.errors["#N/A" if name == "MODE" else none]
    if name == "MODE":
        counts = collections.Counter(x.tolist())
        best = max(counts.values())
        if best < 2:
            return Error.errors["#N/A"]
        return next(v for v in x.tolist() if counts[v] == best)  # the first to occur
    if k is not None:
        return _ranked(name, np.sort(x), k)
    return float(
        {
            "AVERAGE": np.mean, "MAX": np.max, "MIN": np.min, "PRODUCT": np.prod, "SUM": np.sum,
            "STDEV": lambda a: np.std(a, ddof=1), "STDEVP": np.std,
            "VAR": lambda a: np.var(a, ddof=1), "VARP": np.var, "MEDIAN": np.median,
        }[name](x)
    )  # fmt: skip


def _ranked(name: str, x, k: float):
    """LARGE, SMALL and the percentiles and quartiles of the sorted numbers *x* [1]_.

    .. [1] Excel's function reference: LARGE, SMALL, PERCENTILE.INC/.EXC, QUARTILE.INC/.EXC
       (k-th value with k rounded up; inclusive rank p(n-1)+1, exclusive rank p(n+1))."""
    from formulas.tokens.operand import Error

    n = x.size
    if name in ("LARGE", "SMALL"):
        i = int(np.ceil(k))
        if i < 1 or i > n:
            return Error.errors["#NUM!"]
        return float(x[n - i] if name == "LARGE" else x[i - 1])
    if name.startswith("QUARTILE"):
        q = int(np.floor(k))
        lo, hi = (0, 4) if name.endswith("INC") else (1, 3)
        if q < lo or q > hi:
            return Error.errors["#NUM!"]
        k = q / 4
    if name.endswith("INC"):
        if k < 0 or k > 1:
            return Error.errors["#NUM!"]
        rank = k * (n - 1) + 1
    else:
        rank = k * (n + 1)
        if rank < 1 or rank > n:
            return Error.errors["#NUM!"]
    lo = int(np.floor(rank))
    frac = rank - lo
    if lo >= n:
        return float(x[n - 1])
    return float(x[lo - 1] + frac * (x[lo] - x[lo - 1]))


def _subtotal(kind, *refs):
    """SUBTOTAL(function_num, ref1, …): the aggregate of the cells of the references that do
    not hold a SUBTOTAL or AGGREGATE of their own; 101–111 also leave out hidden rows.  On a
    sheet with an AutoFilter, 1–11 would count manually hidden rows but not filtered ones,
    which the file does not tell apart: refused there."""
    from formulas.tokens.operand import Error

    k = _number_arg(kind)
    if _is_error(k):
        return k
    n = int(k)
    name = _SUBTOTAL_KINDS.get(n % 100) if n // 100 in (0, 1) else None
    if name is None or not refs:
        return Error.errors["#VALUE!"]
    values = _collected(refs, n > 100, True, "SUBTOTAL", False)
    if values is None or values == "refused":
        return Error.errors["#VALUE!"]
    for v in values:
        if isinstance(v, tuple):
            return Error.errors.get(v[1], Error.errors["#VALUE!"])
    return _aggregate_of(name, values)


def _aggregate(kind, options, *args):
    """AGGREGATE(function_num, options, ref1, …) and AGGREGATE(function_num, options, array,
    k) [1]_: functions 1–13 over references, 14–19 over a reference or an array with k.
    Options 0–7: 0–3 leave out nested SUBTOTAL and AGGREGATE cells, odd options leave out
    hidden rows, 2, 3, 6 and 7 leave out error values.

    .. [1] Excel's function reference, AGGREGATE (function numbers and options)."""
    from formulas.ranges import Ranges
    from formulas.tokens.operand import Error

    fn = _number_arg(kind)
    opt = _number_arg(0 if options is None or options is sh_empty() else options)
    for v in (fn, opt):
        if _is_error(v):
            return v
    fn, opt = int(fn), int(opt)
    name = _AGGREGATE_KINDS.get(fn)
    if name is None or not 0 <= opt <= 7 or not args:
        return Error.errors["#VALUE!"]
    skip_errors = opt in (2, 3, 6, 7)
    k = None
    if fn >= 14:
        if len(args) != 2:
            return Error.errors["#VALUE!"]
        k = _number_arg(args[1])
        if _is_error(k):
            return k
        args = args[:1]
    if isinstance(args[0], Ranges):
        values = _collected(args, opt % 2 == 1, opt <= 3, "AGGREGATE", False)
        if values == "refused":
            return Error.errors["#VALUE!"]
    elif fn >= 14:  # an array computed by the formula (AGGREGATE(14,6,A1:A9/(B1:B9="x"),1))
        raw = getattr(args[0], "value", args[0])
        values = [
            _engine_value(v) for v in np.asarray(raw, dtype=object).ravel() if v is not sh_empty()
        ]
    else:
        values = None
    if values is None:
        return Error.errors["#VALUE!"]
    kept = []
    for v in values:
        if isinstance(v, tuple):
            if skip_errors:
                continue
            return Error.errors.get(v[1], Error.errors["#VALUE!"])
        kept.append(v)
    return _aggregate_of(name, kept, k)


_DATABASE = {
    "DAVERAGE": "AVERAGE", "DCOUNT": "COUNT", "DCOUNTA": "COUNTA", "DGET": "GET",
    "DMAX": "MAX", "DMIN": "MIN", "DPRODUCT": "PRODUCT", "DSTDEV": "STDEV",
    "DSTDEVP": "STDEVP", "DSUM": "SUM", "DVAR": "VAR", "DVARP": "VARP",
}  # fmt: skip


def _grid(eng, ref) -> list[list]:
    """The values of a one-area reference, row by row (None for a blank cell)."""
    sheet, r1, c1, r2, c2 = _box(eng, ref.ranges[0])
    r2 = min(r2, eng._bounded(sheet, (r1, c1, r2, c2))[2])
    return [[eng._values.get((sheet, r, c)) for c in range(c1, c2 + 1)] for r in range(r1, r2 + 1)]


def _database_function(name: str):
    """D-function *name* (DSUM, DCOUNT, DGET, …) [1]_: the records (rows below the header
    row) of the database that meet the criteria range — each row of criteria one
    alternative, each filled cell of a row a condition on the field its header names — and
    the function of the field's values in them.  A criterion text without an operator
    matches field texts that begin with it (Excel's filter rule), ``=text`` the whole text;
    comparisons and wildcards as in COUNTIF.  Computed criteria (a header that names no
    field) are refused by name.

    .. [1] Excel's function reference: DSUM, DCOUNT, DGET, … and "Filter by using advanced
       criteria" (criteria ranges)."""
    kind = _DATABASE[name]

    def fn(database, field=None, criteria=None):
        import formulas.functions as library_functions
        from formulas.ranges import Ranges
        from formulas.tokens.operand import Error

        eng: Engine = _CURRENT.engine
        if not isinstance(database, Ranges) or not isinstance(criteria, Ranges):
            return Error.errors["#VALUE!"]
        db, crit = _grid(eng, database), _grid(eng, criteria)
        if len(db) < 1 or len(crit) < 2:
            return Error.errors["#VALUE!"]
        heads = [h.strip().casefold() if isinstance(h, str) else h for h in db[0]]
        col = None
        # the library hands an omitted argument (DCOUNT(db,,criteria)) as the number 0, which
        # names no field either: both count the records
        omitted = field is None or field is sh_empty() or (type(field) is int and field == 0)
        f = None if omitted else _scalar(field)
        if _is_error(f):
            return f
        if isinstance(f, str):
            if f.strip().casefold() not in heads:
                return Error.errors["#VALUE!"]
            col = heads.index(f.strip().casefold())
        elif isinstance(f, (int, float, np.number)) and not isinstance(f, bool):
            col = int(f) - 1
            if not 0 <= col < len(heads):
                return Error.errors["#VALUE!"]
        elif f is not None and f is not sh_empty():
            return Error.errors["#VALUE!"]
        elif kind not in ("COUNT", "COUNTA"):
            return Error.errors["#VALUE!"]
        records = db[1:]
        test = library_functions.__dict__["__xfilter"]
        chosen = np.zeros(len(records), dtype=bool)
        for row in crit[1:]:
            keep = np.ones(len(records), dtype=bool)
            for head, cond in zip(crit[0], row):
                if cond is None or cond == "":
                    continue
                h = head.strip().casefold() if isinstance(head, str) else head
                if h not in heads:
                    _CURRENT.problems.append(
                        (
                            Status.UNSUPPORTED,
                            f"unsupported: {name} with a computed criterion (the criteria "
                            f"header {head!r} names no field)",
                        )
                    )
                    return Error.errors["#VALUE!"]
                if _is_error(cond) or isinstance(cond, tuple):
                    return Error.errors["#VALUE!"]
                if isinstance(cond, str) and cond[:1] not in "<>=" and not _reads_number(cond):
                    cond = "=" + cond + "*"  # begins with
                at = heads.index(h)
                raw = np.array(
                    [sh_empty() if r[at] is None else _as_formula_value(r[at]) for r in records],
                    dtype=object,
                )
                keep &= np.asarray(test({"raw": raw}, cond), dtype=bool).reshape(-1)
            chosen |= keep
        picked = [r for r, ok in zip(records, chosen) if ok]
        if col is None:  # DCOUNT/DCOUNTA without a field: the records
            return float(len(picked))
        values = [r[col] for r in picked if r[col] is not None]
        if kind == "GET":
            if not values:
                return Error.errors["#VALUE!"]
            if len(values) > 1:
                return Error.errors["#NUM!"]
            v = values[0]
            return Error.errors.get(v[1], Error.errors["#VALUE!"]) if isinstance(v, tuple) else v
        for v in values:
            if isinstance(v, tuple):
                return Error.errors.get(v[1], Error.errors["#VALUE!"])
        if kind in ("MAX", "MIN", "PRODUCT", "SUM") and not any(
            isinstance(v, float) for v in values
        ):
            return 0.0
        return _aggregate_of(kind, values)

    fn.__name__ = name
    return fn


def _reads_number(t: str) -> bool:
    try:
        float(t)
    except ValueError:
        return False
    return True


def _engine_value(v):
    """A library value as the engine keeps cell values (an error as ("error", code))."""
    if _is_error(v):
        return ("error", str(v))
    if isinstance(v, np.bool_):
        return bool(v)
    if isinstance(v, np.number):
        return float(v)
    return v


def _formulatext(ref):
    """FORMULATEXT(reference): the formula of the reference's first cell as Excel shows it
    (without the file's ``_xlfn.`` and ``_xlpm.`` prefixes); #N/A for a cell without one."""
    from formulas.ranges import Ranges
    from formulas.tokens.operand import Error

    eng: Engine = _CURRENT.engine
    if not isinstance(ref, Ranges) or not ref.ranges:
        return Error.errors["#N/A"]
    sheet, r1, c1, _, _ = _box(eng, ref.ranges[0])
    cell = eng.book.cells.get((sheet, r1, c1))
    if cell is None or not cell.formula:
        return Error.errors["#N/A"]
    return "=" + shown_formula(cell.formula)


def _sheet_number(value=None):
    """SHEET([value]): the number of the formula's sheet, of a reference's sheet, or of the
    sheet named by a text; #NA for a text naming no sheet."""
    from formulas.ranges import Ranges
    from formulas.tokens.operand import Error

    eng: Engine = _CURRENT.engine
    sheets = [s.upper() for s in eng.book.sheets]
    if value is None or value is sh_empty():
        return float(sheets.index(_CURRENT.sheet.upper()) + 1)
    if isinstance(value, Ranges):
        return float(sheets.index(_box(eng, value.ranges[0])[0].upper()) + 1)
    v = _scalar(value)
    if _is_error(v):
        return v
    if isinstance(v, str) and v.upper() in sheets:
        return float(sheets.index(v.upper()) + 1)
    return Error.errors["#N/A"]


def _sheet_count(ref=None):
    """SHEETS([reference]): the sheets of a reference (3-D spans count each) or of the book."""
    from formulas.ranges import Ranges

    eng: Engine = _CURRENT.engine
    if ref is None or ref is sh_empty():
        return float(len(eng.book.sheets))
    if isinstance(ref, Ranges):
        return float(len({_box(eng, rng)[0] for rng in ref.ranges}))
    from formulas.tokens.operand import Error

    return Error.errors["#VALUE!"]


_CELL_KINDS = ("address", "col", "row", "contents", "type", "filename")


def _cell_info(info, ref=None):
    """CELL(info_type, [reference]) for the kinds a saved file determines: address, col, row,
    contents, type; filename is the checked file's own path (a saved value holds the path
    where it was saved, so the cell is reported volatile).  The kinds that read formatting
    or the window (format, width, color, …) are refused by name."""
    from formulas.ranges import Ranges
    from formulas.tokens.operand import Error

    eng: Engine = _CURRENT.engine
    kind = _scalar(info)
    if _is_error(kind):
        return kind
    if not isinstance(kind, str):
        return Error.errors["#VALUE!"]
    kind = kind.lower()
    if kind not in _CELL_KINDS:
        _CURRENT.problems.append(
            (Status.UNSUPPORTED, f'unsupported: CELL("{kind}") (formatting and window facts)')
        )
        return Error.errors["#VALUE!"]
    if ref is None or ref is sh_empty():
        sheet, r, c = _CURRENT.sheet, _CURRENT.row, _CURRENT.col
    elif isinstance(ref, Ranges):
        sheet, r, c, _, _ = _box(eng, ref.ranges[0])
    else:
        return Error.errors["#VALUE!"]
    if kind == "address":
        here = "" if sheet == _CURRENT.sheet else quote_sheet(sheet) + "!"
        return f"{here}${col_letters(c)}${r}"
    if kind == "row":
        return float(r)
    if kind == "col":
        return float(c)
    if kind == "filename":
        _CURRENT.problems.append(
            (Status.VOLATILE, 'volatile: CELL("filename") holds where the file is saved')
        )
        path = eng.book.path
        return f"{path.parent}{os.sep}[{path.name}]{sheet}"
    v = eng._values.get((sheet, r, c))
    if kind == "type":
        return "b" if v is None else "l" if isinstance(v, str) else "v"
    if v is None:
        return 0.0
    if isinstance(v, tuple):
        return Error.errors.get(v[1], Error.errors["#VALUE!"])
    return v


def shown_formula(formula: str) -> str:
    """*formula* as a spreadsheet shows it: without the ``_xlfn.``, ``_xlws.`` and ``_xlpm.``
    prefixes the file format adds to newer functions and LET/LAMBDA names."""
    out = []
    for v, t, sub in tokens(formula):
        if t == "FUNC" and sub == "OPEN":
            for prefix in ("_xlfn._xlws.", "_xlfn.", "_xlws."):
                if v.lower().startswith(prefix):
                    v = v[len(prefix) :]
                    break
        elif t == "OPERAND" and sub == "RANGE" and v.lower().startswith("_xlpm."):
            v = v[6:]
        out.append(v)
    return "".join(out)


def _countblank(ref):
    """COUNTBLANK(range): the cells of the whole range (A:A is 1,048,576 of them) that are
    empty or hold empty text."""
    from formulas.ranges import Ranges
    from formulas.tokens.operand import Error

    eng: Engine = _CURRENT.engine
    if not isinstance(ref, Ranges) or len(ref.ranges) != 1:
        return Error.errors["#VALUE!"]
    sheet, r1, c1, r2, c2 = _box(eng, ref.ranges[0])
    filled = 0
    for c in range(c1, c2 + 1):
        rows = eng._rows_by_col.get((sheet, c)) or []
        for r in rows[bisect_left(rows, r1) : bisect_right(rows, r2)]:
            v = eng._values.get((sheet, r, c))
            filled += v is not None and v != ""
    return float((r2 - r1 + 1) * (c2 - c1 + 1) - filled)


def _index(array, row_num=None, col_num=None, area_num=None):
    """INDEX(reference, row, [column], [area]) as a reference into the whole reference (a
    row past the used part of A:A is a blank cell, not #REF!); arrays, and row or column
    numbers given as arrays, go to the library's INDEX."""
    from formulas.ranges import Ranges
    from formulas.tokens.operand import Error

    _CURRENT.last_ref = None  # (an argument may have set it)
    eng: Engine = _CURRENT.engine
    given = [v for v in (row_num, col_num, area_num) if v is not None]
    if not isinstance(array, Ranges):
        return _LIBRARY["INDEX"](array, *given)
    if any(isinstance(v, np.ndarray) and v.size != 1 for v in given):
        # row or column numbers as arrays: the library's INDEX, on values
        parts = [eng._ranges(*_box(eng, rng)) for rng in array.ranges]
        ref = parts[0]
        for p in parts[1:]:
            ref = Ranges(ref.ranges + p.ranges, {**ref.values, **p.values})
        return _LIBRARY["INDEX"](ref, *given)
    nums = [_whole_number(v) for v in (row_num, col_num, area_num)]
    for v in nums:
        if v is not None and not isinstance(v, int):
            return v  # an error value
    row, col, area = nums
    area = 1 if area is None else area
    if area < 1 or area > len(array.ranges):
        return Error.errors["#REF!"]
    rng = array.ranges[area - 1]
    sheet, r1, c1, r2, c2 = _box(eng, rng)
    if row is None:
        row = 0
    if r1 == r2 and col is None and len(array.ranges) == 1:
        row, col = 1, row  # one row: the single number picks the column
    col = 0 if col is None else col
    if row < 0 or col < 0:
        return Error.errors["#VALUE!"]
    if (col == 0 and c1 != c2 and row == 0) or row > r2 - r1 + 1 or col > c2 - c1 + 1:
        return Error.errors["#REF!"] if row or col else _whole_ref(eng, rng)
    if col == 0 and c1 != c2 and row:
        return _returned(eng._ranges(sheet, r1 + row - 1, c1, r1 + row - 1, c2, demand=True))
    rr = (r1, r2) if row == 0 else (r1 + row - 1,) * 2
    cc = (c1, c2) if col == 0 else (c1 + col - 1,) * 2
    return _returned(eng._ranges(sheet, rr[0], cc[0], rr[1], cc[1], demand=True))


def _whole_ref(eng, rng):
    return _returned(eng._ranges(*_box(eng, rng), demand=True))


def sh_empty():
    import schedula as sh

    return sh.EMPTY


def _is_subtotal(formula: str) -> bool:
    return any(
        t == "FUNC"
        and s == "OPEN"
        and v[:-1].upper().removeprefix("_XLFN.") in ("SUBTOTAL", "AGGREGATE")
        for v, t, s in tokens(formula)
    )


def _returned(ref):
    """A reference a function returns: remembered, for the implicit intersection of a plain
    formula whose whole result it is (the library hands on only its values)."""
    _CURRENT.last_ref = ref
    return ref


def _range_op(x, y):
    """The range operator ``x:y`` (``A2:OFFSET(A3,4,0)``): the library's box, with every
    cell's value read from the running engine (the library keeps only the two ends')."""
    from formulas.ranges import Ranges

    box = Ranges(x.ranges) + Ranges(y.ranges)
    eng = getattr(_CURRENT, "engine", None)
    if eng is None or not box.ranges:
        return x + y
    return eng._ranges(*_box(eng, box.ranges[0]), demand=True)


def _indirect(ref_text, a1=True):
    """INDIRECT(ref_text, [a1]) on the running engine (A1-style text)."""
    from formulas.tokens.operand import Error

    _CURRENT.last_ref = None  # (an argument may have set it)
    eng: Engine = _CURRENT.engine
    text = _scalar(ref_text)
    a1 = _scalar(a1)
    if not isinstance(text, str):
        return Error.errors["#REF!"]
    if a1 is False or a1 == 0:
        _CURRENT.problems.append((Status.UNSUPPORTED, "unsupported: INDIRECT with R1C1-style text"))
        return Error.errors["#REF!"]
    ref = parse_ref(text.strip())
    if ref is None:
        return Error.errors["#REF!"]
    target = eng._place(ref, _CURRENT.sheet, _CURRENT.row, _CURRENT.col, 0, 0, None)
    if not isinstance(target, _Target) or len(target.sheets) != 1:
        return Error.errors["#REF!"]
    return _returned(eng._ranges(target.sheets[0], *target.box, demand=True))


# ---------------------------------------------------------------------------------------
# templates


class _Target(NamedTuple):
    """A resolved reference: one box on one or more sheets (3-D spans).  A named tuple, not
    a frozen dataclass: one is made per reference of every formula cell."""

    sheets: tuple[str, ...]
    box: tuple[int, int, int, int]  # r1, c1, r2, c2
    note: str = ""


@dataclass
class _Template:
    text: str  # the formula with placeholders
    refs: list  # per placeholder: (Ref, frame) — frame "cell" or ("name", sheet)
    funcs: frozenset
    unknown: frozenset
    needs_ranges: bool
    positional: bool
    dynamic: bool
    volatile: frozenset
    problem: str = ""  # why it cannot be evaluated at all
    implicit: tuple = ()  # placeholders that take Excel's implicit intersection
    modes: tuple = ()  # per placeholder: "ranges", "array" or "value" (see _REF_ARGS)
    position_only: frozenset = frozenset()  # placeholders read for their place, not values
    unbounded: frozenset = frozenset()  # placeholders handed over at full size (no values)
    top_ref: bool = False  # the whole formula is INDEX(…), OFFSET(…) or INDIRECT(…)
    shapes: dict = field(default_factory=dict)  # batch keys of its cells (see Engine._run)
    plain_refs: tuple | None = None  # its Refs when all are plain single cells, else ()
    compiled: object = None  # its compiled function (when not positional)
    batchable: bool | None = None  # its cells may go in one vectorised call (see _batches)


@dataclass
class _Compiled:
    fn: object
    order: list[int]  # placeholder index of each library input, in the library's order


@dataclass(slots=True)
class _Plan:
    cell: Cell
    tpl: _Template
    comp: _Compiled | None
    targets: list  # per placeholder: _Target, an error code, or None
    shape: tuple


@dataclass
class Engine:
    """Recalculate *book*; :meth:`run` returns ``{(sheet, row, col): Outcome}`` for formula
    cells (and the cells an array formula spills into)."""

    book: Book
    progress: object = None  # callable(done, total) or None
    batch: bool = True  # evaluate same-shape columns in one vectorised call
    _templates: dict = field(default_factory=dict)  # (sheet, text) -> (template, shift)
    _shapes: dict = field(default_factory=dict)  # shape key -> (template, row, col built at)
    _fast_shapes: dict = field(default_factory=dict)  # the same by _fast_shape_key
    _compiled: dict = field(default_factory=dict)
    _sheet_upper: dict = field(default_factory=dict)
    _max: dict = field(default_factory=dict)
    _rows_by_col: dict = field(default_factory=dict)
    _max_all: tuple | None = None  # the used rows and columns of the whole workbook
    _tables: dict = field(default_factory=dict)  # data-table cell -> its DataTable

    def __post_init__(self):
        _register_ours()
        # the workbook's error style, as the xlwings face reads it (joulebook.catalog.cellvalues)
        self.error_style = error_style(self.book.names.get(ERRORS_NAME))
        self._sheet_upper = {s.upper(): s for s in self.book.sheets}
        for s, r, c in self.book.cells:
            mr, mc = self._max.get(s, (0, 0))
            self._max[s] = (max(mr, r), max(mc, c))
        self._values: dict = {}
        self._plans: dict = {}
        self._out: dict = {}
        self._in_progress: set = set()
        self._late: set = set()
        self._late_now = False
        self._box_cache: dict = {}  # (generation, sheet, r1, c1, r2, c2) -> values, _array
        self._generation = new_generation()  # renewed whenever kept ranges are dropped
        self._box_cache_on = False
        self._box_cached_cells = 0

    # --- names, sheets, tables ------------------------------------------------------------
    def _sheet(self, name: str | None, here: str) -> str | None:
        if name is None:
            return here
        return self._sheet_upper.get(name.upper())

    def _sheet_of_id(self, sheet_id: str, here: str) -> str:
        if not sheet_id:
            return here
        s = sheet_id.split("]", 1)[-1].strip("'").replace("''", "'")
        return self._sheet_upper.get(s.upper(), here)

    def _name(self, name: str, sheet: str | None, here: str) -> str | None:
        """The definition of a defined name: the sheet's own first, then the workbook's."""
        local = self.book.local_names
        key = name.upper()
        if sheet is not None:
            s = self._sheet(sheet, here)
            return local.get((s, key)) if s else None
        return local.get((here, key), self.book.names.get(key))

    # --- building a template ----------------------------------------------------------
    def _is_table(self, name: str) -> bool:
        return any(t.name.upper() == name.upper() for t in self.book.tables)

    def _template(self, sheet: str, formula: str, row: int = 1, col: int = 1):
        """The template of *formula* standing in (sheet, row, col), and the shift (rows,
        columns) that moves its references to this text's.  One template serves every
        formula of the same shape (the same text in relative form): A2*2 in B2 and A3*2 in
        B3 share one, built once, the second moved by one row."""
        key = (sheet, formula)
        hit = self._templates.get(key)
        if hit is None:
            fast = _fast_shape_key(sheet, formula, row, col)
            first = self._fast_shapes.get(fast) if fast is not None else None
            if first is not None:
                tpl, r0, c0 = first
                return tpl, (row - r0, col - c0)  # not kept: the key is as quick
            try:
                formula = expand_let(formula)
            except Exception:  # refused with its reason by _build
                pass
            shape = _shape_key(sheet, formula, row, col)
            first = self._shapes.get(shape) if shape is not None else None
            if first is None:
                hit = (self._build(sheet, formula), (0, 0))
                if shape is not None:
                    self._shapes[shape] = (hit[0], row, col)
            else:
                tpl, r0, c0 = first
                hit = (tpl, (row - r0, col - c0))
            self._templates[key] = hit
            if fast is not None:
                r0, c0 = row - hit[1][0], col - hit[1][1]
                self._fast_shapes[fast] = (hit[0], r0, c0)
        return hit

    def _build(self, sheet: str, formula: str) -> _Template:
        refs: list = []
        funcs: set = set()
        implicit: list = []
        modes: list = []
        marks: dict = {"where": set(), "whole": set()}
        problem = ""
        try:
            from .functions.spelling import final_sum, normalized

            formula = final_sum(normalized(formula))  # 1e6, OFFSET(A1,1,0,,), A1-B1 → SUB
            try:
                formula = expand_let(formula)
            except ValueError as e:
                raise _Unsupported(f"LET: {e}") from None
            _refuse_lambda(formula)
            text = self._rewrite(formula, sheet, "cell", refs, funcs, implicit, 0, modes, marks)
        except _Unsupported as e:
            text, problem = "", f"unsupported: {e}"
        except Exception as e:  # the tokenizer refused the text
            text, problem = "", f"unsupported: formula text not understood ({type(e).__name__})"
        import formulas

        table = formulas.get_functions()
        unknown = frozenset(
            f for f in funcs if f not in table or getattr(table[f], "joulebook_unknown", False)
        )
        return _Template(
            text=text,
            refs=refs,
            funcs=frozenset(funcs),
            unknown=unknown,
            needs_ranges=bool(funcs & _NEEDS_RANGES) or "~ops" in funcs,
            positional="~positional" in funcs,
            dynamic=bool(funcs & _DYNAMIC) or "~rangeop" in funcs,
            volatile=frozenset(funcs & VOLATILE),
            problem=problem,
            implicit=tuple(implicit),
            modes=tuple(modes),
            position_only=frozenset(marks["where"]),
            unbounded=frozenset(marks["whole"]),
            top_ref=_returns_reference(formula),
        )

    def _rewrite(self, formula, sheet, frame, refs, funcs, implicit, depth, modes, marks) -> str:
        if depth > _MAX_NAME_DEPTH:
            raise _Unsupported("defined names nested too deeply (or defined by themselves)")
        toks = tokens(formula)
        out = []
        stack: list[str] = []  # enclosing FUNC names ("(" for plain parentheses)
        argpos: list[int] = []  # the argument of each enclosing function being written
        prev_type = ""

        def placeholder(ref: Ref, where, i: int, mode: str) -> None:
            idx = len(refs)
            refs.append((ref, where))
            modes.append(mode or _mode(toks, i, stack))
            if stack and _where_only(stack[-1], argpos[-1]):
                marks["where"].add(idx)
            if stack and _whole_extent(stack[-1], argpos[-1]):
                marks["whole"].add(idx)
            self._mark_implicit(stack, idx, implicit, modes)
            out.append(f"_JBR{idx}")

        def operand(value: str, i: int, mode: str = "") -> None:
            ref = parse_ref(value)
            if ref is None:
                out.append("#REF!")
            elif ref.kind == "name" and ref.book is None:
                definition = self._name(ref.text, ref.sheet, sheet)
                if definition is None and ref.sheet is None and self._is_table(ref.text):
                    operand(ref.text + "[#Data]", i, mode)  # a table's name: its data rows
                    return
                if definition is None:
                    out.append("#NAME?")
                    funcs.add("~unknown-name:" + ref.text)
                    return
                d = definition.lstrip("=")
                inner = parse_ref(d) if len(tokens(d)) == 1 else None
                if inner is not None and inner.kind not in ("name", "table"):
                    placeholder(inner, "name", i, mode)
                else:
                    out.append(
                        "("
                        + self._rewrite(
                            d, sheet, "name", refs, funcs, implicit, depth + 1, modes, marks
                        )
                        + ")"
                    )
            else:
                placeholder(ref, frame, i, mode)

        pending: list[int] = []  # depths where a "-(-(" opened for "--" waits for its operand
        skip = 0
        for i, (value, ttype, sub) in enumerate(toks):
            if skip:
                skip -= 1
                continue
            if ttype == "OPERATOR-PREFIX":
                # the library folds a run of signs by parity, so "--x" would not turn TRUE
                # or "3" into a number; an even run of minus signs is written -(-(x)) instead
                j, minus = i, 0
                while j < len(toks) and toks[j][1] in ("OPERATOR-PREFIX", "WHITE-SPACE"):
                    minus += toks[j][0] == "-"
                    j += 1
                if minus >= 2 and minus % 2 == 0:
                    out.append("-(-(")
                    pending.append(len(stack))
                    skip = j - i - 1
                    continue
            if ttype == "FUNC" and sub == "OPEN":
                name = value[:-1].upper()
                if ":" in name:  # A1:INDEX(…) — a range ending where a function points
                    left, _, name = value[:-1].rpartition(":")
                    if left:
                        operand(left, i, "ranges")
                    out.append(":")
                    funcs.update(("~ops", "~rangeop"))
                    name = name.upper()
                if name.startswith("_XLUDF."):
                    name = name[7:]
                funcs.add(name)
                nxt = toks[i + 1] if i + 1 < len(toks) else None
                if name in _POSITIONAL and nxt is not None and nxt[1] == "FUNC":
                    funcs.add("~positional")  # ROW() / COLUMN(): the cell's own position
                stack.append(name)
                argpos.append(0)
                out.append(name + "(")
                if name in _OURS and _next_is(toks, i, ("SEP",)):
                    out.append(_MISSING)  # JB_X(,b): the first argument omitted
            elif ttype == "FUNC" and sub == "CLOSE":
                stack.pop() if stack else None
                argpos.pop() if argpos else None
                out.append(")")
            elif ttype == "PAREN" and sub == "OPEN":
                stack.append("(")
                argpos.append(0)
                out.append("(")
            elif ttype == "PAREN" and sub == "CLOSE":
                stack.pop() if stack else None
                argpos.pop() if argpos else None
                out.append(")")
            elif ttype == "OPERAND" and sub == "RANGE" and value.startswith(":"):
                out.append(":")  # OFFSET(…):D22 — a range starting where a function points
                funcs.update(("~ops", "~rangeop"))
                operand(value[1:], i, "ranges")
            elif ttype == "OPERAND" and sub == "RANGE":
                operand(value, i)
            elif ttype == "OPERATOR-INFIX" and value in (":", ","):
                funcs.add("~ops")
                if value == ":":
                    funcs.add("~rangeop")  # its cells are known only at run time
                out.append(value)
            elif ttype == "WHITE-SPACE":
                # between two operands a space is the intersection operator
                nxt = toks[i + 1][1] if i + 1 < len(toks) else ""
                if prev_type in ("OPERAND", "CLOSE") and nxt in ("OPERAND", "FUNC", "PAREN"):
                    if not (nxt in ("FUNC",) and toks[i + 1][2] == "CLOSE"):
                        funcs.add("~ops")
                out.append(" ")
            elif ttype == "SEP" and sub == "ARG":
                if argpos:
                    argpos[-1] += 1
                out.append(value)
                if stack and stack[-1] in _OURS and _next_is(toks, i, ("SEP", "FUNC")):
                    # an omitted argument of our function reaches it as missing, as the
                    # sheet face receives it (empty text is a blank to the catalog); the
                    # library would hand over the number 0
                    out.append(_MISSING)
            elif ttype == "SEP" and sub == "ROW":
                out.append(";")
            elif ttype == "ARRAY":
                if sub == "OPEN":
                    stack.append("{")
                    argpos.append(0)
                elif stack:
                    stack.pop()
                    argpos.pop()
                out.append(value)
            else:
                out.append(value)
            if ttype != "WHITE-SPACE":
                prev_type = "CLOSE" if sub == "CLOSE" else ttype
            ended = ttype == "OPERAND" or sub == "CLOSE"
            while ended and pending and pending[-1] == len(stack):
                pending.pop()
                out.append("))")
        return "".join(out)

    @staticmethod
    def _mark_implicit(stack, idx, implicit, modes=None) -> None:
        # in a plain (non-array) formula a reference given where a value is expected (not as
        # a whole argument of a function taking references or arrays, and not inside one
        # that evaluates its arguments as arrays) takes Excel's implicit intersection
        if modes is not None and modes[idx] != "value":
            return
        if not (set(stack) & _ARRAY_CONTEXT):
            implicit.append(idx)

    def _compile(self, tpl: _Template, cell: Cell) -> _Compiled:
        import formulas

        if tpl.compiled is not None and not tpl.positional:
            return tpl.compiled
        key = (tpl.text, (cell.sheet, cell.row, cell.col) if tpl.positional else None)
        comp = self._compiled.get(key)
        if comp is not None:
            if not tpl.positional:
                tpl.compiled = comp
            return comp
        for name in tpl.unknown:
            if not name.startswith("~"):
                formulas.get_functions().setdefault(name, _unknown_function(name))
        builder = formulas.Parser().ast("=" + tpl.text)[1]
        if tpl.positional:
            from formulas.cell import CELL
            from formulas.ranges import Ranges

            here = Ranges().push(f"{quote_sheet(cell.sheet)}!{cell.ref}")
            fn = builder.compile(**{CELL: here})
        else:
            fn = builder.compile()
        order: list = []
        for k in fn.inputs:
            if k.startswith("_JBR") and k[4:].isdigit():
                order.append(int(k[4:]))
                continue
            # the library reads INDIRECT("B2") with constant text as the reference itself
            ref = parse_ref(k)
            if ref is None or ref.kind in ("name", "table"):
                raise _Unsupported(f"reference {k!r} not understood")
            order.append(ref)
        comp = _Compiled(fn, order)
        self._compiled[key] = comp
        if not tpl.positional:
            tpl.compiled = comp
        return comp

    # --- resolving references ---------------------------------------------------------
    def _place(self, ref: Ref, here: str, row: int, col: int, dr: int, dc: int, frame):
        """A reference seen from (here, row, col): a _Target or an error code."""
        if ref.kind == "table":
            return self._table(ref.text, here, row, col)
        if ref.kind == "name":
            d = self._name(ref.text, ref.sheet, here)
            inner = parse_ref(d.lstrip("=")) if d else None
            if inner is None or inner.kind in ("name", "table"):
                return "#REF!" if d else "#NAME?"
            return self._place(inner, here, row, col, row - 1, col - 1, "name")
        if ref.book is not None:
            return self._linked(ref)
        box = ref.placed(dr, dc)
        if box is None:
            return "#REF!"
        s1 = self._sheet(ref.sheet, here)
        if s1 is None:
            return "#REF!"
        if ref.sheet2 is not None:
            s2 = self._sheet(ref.sheet2, here)
            if s2 is None:
                return "#REF!"
            i, j = self.book.sheets.index(s1), self.book.sheets.index(s2)
            return _Target(tuple(self.book.sheets[min(i, j) : max(i, j) + 1]), box)
        return _Target((s1,), box)

    def _linked(self, ref: Ref):
        link = self.book.links.get(ref.book)
        if link is None or ref.sheet is None:
            return "#REF!"
        sheet = link.sheet_key(ref.sheet)
        if sheet is None:
            return "#REF!"
        box = ref.placed(0, 0)
        if box is None:
            return "#REF!"
        return _Target(
            (sheet,),
            box,
            f"{ref.sheet}!… of [{ref.book}] {link.target} read from the link cache saved in this"
            " file (the linked workbook itself was not opened)",
        )

    def _table(self, text: str, here: str, row: int, col: int):
        from .tables import resolve

        try:
            return _Target(*resolve(self.book, text, here, row, col))
        except LookupError as e:
            raise _Unsupported(str(e)) from None

    def _targets(self, tpl: _Template, cell: Cell, shift=(0, 0)) -> list:
        plain = tpl.plain_refs
        if plain is None:
            plain = tpl.plain_refs = _plain_refs(tpl)
        if plain and not cell.array_ref:
            # every reference one cell on a sheet named or this one, none intersected: the
            # references moved by the shift (what _place does for them, without its search)
            here, dr, dc = cell.sheet, shift[0], shift[1]
            out = []
            for ref in plain:
                r = ref.r1 if ref.abs_r1 else ref.r1 + dr
                c = ref.c1 if ref.abs_c1 else ref.c1 + dc
                s1 = here if ref.sheet is None else self._sheet(ref.sheet, here)
                if s1 is None or not (1 <= r <= MAX_ROW and 1 <= c <= MAX_COL):
                    out.append("#REF!")
                else:
                    out.append(_Target((s1,), (r, c, r, c)))
            return out
        out = []
        for i, (ref, frame) in enumerate(tpl.refs):
            if frame == "cell":
                t = self._place(ref, cell.sheet, cell.row, cell.col, shift[0], shift[1], frame)
            else:  # a name's reference: written from A1
                t = self._place(
                    ref, cell.sheet, cell.row, cell.col, cell.row - 1, cell.col - 1, frame
                )
            if isinstance(t, _Target) and i in tpl.implicit and not cell.array_ref:
                t = self._intersect(t, cell)
            out.append(t)
        return out

    @staticmethod
    def _intersect(t: _Target, cell: Cell):
        """Excel's implicit intersection of a reference with the formula's row or column."""
        r1, c1, r2, c2 = t.box
        if (r1, c1) == (r2, c2) or len(t.sheets) != 1:
            return t
        if c1 == c2 and r1 <= cell.row <= r2:
            return _Target(t.sheets, (cell.row, c1, cell.row, c1), t.note)
        if r1 == r2 and c1 <= cell.col <= c2:
            return _Target(t.sheets, (r1, cell.col, r1, cell.col), t.note)
        return "#VALUE!"

    # --- values -------------------------------------------------------------------------
    def _bounded(self, sheet: str, box):
        """A box cut to the used part of the workbook (whole columns and rows, and boxes
        larger than _KEEP_CELLS), never below the size of the array formula being evaluated
        (it reads blanks there).  The cut is the same on every sheet, so that A:A and
        Sheet2!A:A stay the same size (SUMPRODUCT(A:A,Sheet2!A:A))."""
        r1, c1, r2, c2 = box
        if r2 < MAX_ROW and c2 < MAX_COL and (r2 - r1 + 1) * (c2 - c1 + 1) <= _KEEP_CELLS:
            return box  # a box as written keeps its size (INDEX, ROWS, MATCH count on it)
        if self._max_all is None:
            used = self._max.values()
            self._max_all = (
                max((m[0] for m in used), default=1),
                max((m[1] for m in used), default=1),
            )
        mr, mc = self._max_all
        h, w = getattr(_CURRENT, "min_shape", None) or (1, 1)
        mr, mc = max(mr, r1 + h - 1), max(mc, c1 + w - 1)
        return r1, c1, max(r1, min(r2, max(mr, 1))), max(c1, min(c2, max(mc, 1)))

    def _array(self, sheet: str, box, demand: bool = False):
        import schedula as sh

        r1, c1, r2, c2 = self._bounded(sheet, box)
        h, w = r2 - r1 + 1, c2 - c1 + 1
        if h * w > 5_000_000:
            raise _Unsupported(f"range of {h * w} cells is too large")
        if demand:
            self._demand(sheet, r1, c1, r2, c2)
        values = self._values
        if h == 1 and w == 1:
            arr = np.empty((1, 1), dtype=object)
            arr[0, 0] = _as_formula_value(values.get((sheet, r1, c1), sh.EMPTY))
            return arr
        cache = self._box_cache if self._box_cache_on and h * w >= _CACHED_BOX else None
        if cache is not None:
            key = (self._generation, sheet, r1, c1, r2, c2)
            hit = cache.get(key)
            if hit is None:
                hit = self._fresh_array(sheet, r1, c1, r2, c2)
                self._box_cached_cells += h * w
                if self._box_cached_cells > _CACHED_CELLS:
                    cache.clear()
                    self._box_cached_cells = h * w
                cache[key] = hit
            # a copy (a function may write into what it is given), tagged with the range and
            # the generation of values: exact lookups over it are answered from an index
            return tag_range(hit.copy(), key)
        return self._fresh_array(sheet, r1, c1, r2, c2)

    def _fresh_array(self, sheet: str, r1: int, c1: int, r2: int, c2: int):
        import schedula as sh

        values = self._values
        h, w = r2 - r1 + 1, c2 - c1 + 1
        arr = np.empty((h, w), dtype=object)
        arr[:] = sh.EMPTY
        for c in range(c1, c2 + 1):
            rows = self._rows_by_col.get((sheet, c))
            if not rows:
                continue
            for r in rows[bisect_left(rows, r1) : bisect_right(rows, r2)]:
                v = values.get((sheet, r, c))
                if v is not None:
                    arr[r - r1, c - c1] = _as_formula_value(v)
        return arr

    def _ranges(self, sheet: str, r1, c1, r2, c2, demand: bool = False):
        """The library's reference object for a box, with its values."""
        from formulas.ranges import Ranges

        box = self._bounded(sheet, (r1, c1, r2, c2))
        rng = _range_dict(sheet, box)
        return Ranges((rng,), {rng["name"]: (rng, self._array(sheet, box, demand))})

    def _arg(self, t, mode: str):
        from formulas.ranges import Ranges
        from formulas.tokens.operand import Error

        if not isinstance(t, _Target):
            return Error.errors.get(t, Error.errors["#REF!"])
        if mode == "value" and len(t.sheets) == 1 and t.box[0] == t.box[2] and t.box[1] == t.box[3]:
            import schedula as sh

            return _as_formula_value(self._values.get((t.sheets[0], t.box[0], t.box[1]), sh.EMPTY))
        as_ranges = mode == "ranges"
        if len(t.sheets) > 1:  # a 3-D span: one reference of several areas
            parts = [self._ranges(s, *t.box) for s in t.sheets]
            ranges, values = (), {}
            for p in parts:
                ranges += p.ranges
                values.update(p.values)
            return Ranges(ranges, values)
        if as_ranges:
            return self._ranges(t.sheets[0], *t.box)
        return self._array(t.sheets[0], t.box)

    def _input(self, i, targets, tpl: _Template, cell: Cell):
        if isinstance(i, int):
            if (
                i in tpl.unbounded
                and isinstance(targets[i], _Target)
                and len(targets[i].sheets) == 1
            ):
                return _whole(targets[i])
            return self._arg(targets[i], tpl.modes[i])
        t = self._place(i, cell.sheet, cell.row, cell.col, 0, 0, "cell")
        return self._arg(t, "ranges")

    def _demand(self, sheet, r1, c1, r2, c2) -> None:
        """Compute, now, the formula cells in a box that a run-time reference reads (cells
        already running are read as they stand; the late passes settle them)."""
        for c in range(c1, c2 + 1):
            rows = self._rows_by_col.get((sheet, c))
            if not rows:
                continue
            for r in rows[bisect_left(rows, r1) : bisect_right(rows, r2)]:
                key = (sheet, r, c)
                if key in self._plans and key not in self._out:
                    if key in self._in_progress:
                        continue  # read as it stands: the reference may not use it
                    self._run_cell(key)

    # --- running ------------------------------------------------------------------------
    def run(self) -> dict[tuple[str, int, int], Outcome]:
        with paused_gc():
            return self._run()

    def _run(self) -> dict[tuple[str, int, int], Outcome]:
        import formulas  # noqa: F401  (registers the parser grammar before compiling)

        book = self.book
        out = self._out
        values = self._values
        plans = self._plans
        for link in book.links.values():
            for (s, r, c), v in link.values.items():
                values[(s, r, c)] = v
                self._rows_by_col.setdefault((s, c), []).append(r)
        for k, c in book.cells.items():
            if c.formula is None and c.has_cached:
                values[k] = c.cached
        table_of = {
            (t.sheet, r, c): t
            for t in book.data_tables
            for r in range(t.box[0], t.box[2] + 1)
            for c in range(t.box[1], t.box[3] + 1)
        }
        for c in book.formula_cells():
            key = (c.sheet, c.row, c.col)
            if key in table_of:
                self._tables[key] = table_of[key]
                continue
            tpl, shift = self._template(c.sheet, c.formula, c.row, c.col)
            if tpl.problem:
                out[key] = self._refused(c, tpl.problem)
                if c.array_ref:  # the cells it fills keep their saved values too
                    self._refuse_spill(c, tpl.problem)
                continue
            try:
                targets = self._targets(tpl, c, shift)
                comp = tpl.compiled or self._compile(tpl, c)
            except _Unsupported as e:
                out[key] = self._refused(c, f"unsupported: {e}")
                continue
            except Exception as e:
                out[key] = self._refused(c, f"unsupported: {type(e).__name__} while parsing")
                continue
            # cells that one compiled function evaluates alike (batched by column)
            failed = (
                tuple(i for i, t in enumerate(targets) if not isinstance(t, _Target))
                if not _ONLY_TARGETS.issuperset(map(type, targets))  # an error code, say
                else ()
            )
            shape = tpl.shapes.get(failed)
            if shape is None:  # one tuple per template and failed references, not per cell
                shape = tpl.shapes[failed] = (tpl.text, tpl.modes, tpl.implicit, failed)
            plans[key] = _Plan(c, tpl, comp, targets, shape)

        # spilled ranges of array formulas belong to their anchor
        owner: dict = {}
        for key, p in plans.items():
            if p.cell.array_ref:
                box = _array_box(p.cell)
                for r in range(box[0], box[2] + 1):
                    for cc in range(box[1], box[3] + 1):
                        if (p.cell.sheet, r, cc) != key:
                            owner[(p.cell.sheet, r, cc)] = key
        self._owner = owner
        by_col = self._rows_by_col  # every cell with a formula, a value or a spilled value
        for s, r, c in book.cells:
            by_col.setdefault((s, c), []).append(r)
        for s, r, c in owner:
            by_col.setdefault((s, c), []).append(r)
        for k, rows in by_col.items():
            by_col[k] = sorted(set(rows))  # duplicates do no harm to the bisect but cost time

        graph: dict = {}
        tables = self._tables
        box_deps: dict = {}  # (sheet, box) -> the formula cells in it
        for key, p in plans.items():
            deps = set()
            for i, t in enumerate(p.targets):
                if not isinstance(t, _Target) or i in p.tpl.position_only:
                    continue  # ROW(3:3), ISREF(A1): where, not what — no dependency
                r1, c1, r2, c2 = t.box
                if r1 == r2 and c1 == c2 and len(t.sheets) == 1:  # one cell: no search
                    dep = (t.sheets[0], r1, c1)
                    if dep == key and key not in out:
                        out[key] = self._refused(
                            p.cell,
                            "circular reference (the cell reads itself)",
                            kind=Status.CIRCULAR,
                        )
                    dep = owner.get(dep, dep)
                    if dep != key and (dep in plans or dep in out or dep in tables):
                        deps.add(dep)
                    continue
                if (
                    key[0] in t.sheets
                    and _inside(key, self._bounded(key[0], t.box))
                    and key not in out
                ):
                    # the cell reads itself (SUM(3:3) in row 3): Excel's circular reference
                    out[key] = self._refused(
                        p.cell, "circular reference (the cell reads itself)", kind=Status.CIRCULAR
                    )
                for s in t.sheets:
                    box = self._bounded(s, t.box)
                    found = box_deps.get((s, box))
                    if found is None:
                        found = self._cells_in(s, box, owner, tables)
                        if (box[2] - box[0] + 1) * (box[3] - box[1] + 1) >= _CACHED_BOX:
                            box_deps[(s, box)] = found  # read by many: found once
                    deps.update(found)
            deps.discard(key)
            graph[key] = tuple(deps)  # a tuple: a set per cell costs 216 bytes
        box_deps.clear()
        for key, t in self._tables.items():
            formula, subs = _table_parts(t, key)
            deps = {k for k in (formula, *(v for _, v in subs)) if k in plans or k in out}
            graph[key] = tuple(deps)
        self._graph = graph

        # cells with run-time references, and everything that depends on them, go last
        late = {k for k, p in plans.items() if p.tpl.dynamic}
        if late:
            rev: dict = {}
            for k, deps in graph.items():
                for d in deps:
                    rev.setdefault(d, set()).add(k)
            stack = list(late)
            while stack:
                k = stack.pop()
                for d in rev.get(k, ()):
                    if d not in late:
                        late.add(d)
                        stack.append(d)
        for key in late & set(self._tables):
            out[key] = self._refused(
                book.cells[key], "unsupported: a data table whose formula reads OFFSET or INDIRECT"
            )
        late -= set(self._tables)
        early = {k: d for k, d in graph.items() if k not in late} if late else graph
        batches = self._batches(early) if self.batch else {}
        member_of = {m: b for b, members in batches.items() for m in members}
        order = None
        if batches:
            bgraph: dict = {}
            for key, deps in early.items():
                node = member_of.get(key, key)
                into = bgraph.get(node)
                if into is None:
                    into = bgraph[node] = set()
                for d in deps:
                    into.add(member_of.get(d, d))
            for node, deps in bgraph.items():
                deps.discard(node)
            try:
                order = list(graphlib.TopologicalSorter(bgraph).static_order())
            except graphlib.CycleError:  # batching can join what a cycle test must see apart
                batches, member_of = {}, {}
        if order is None:
            order = self._order(early)
        late_order = []
        if late:
            # static dependencies over-approximate run-time references (INDEX(row):INDEX(…)
            # over the row holding the formula): where they close a loop, go in sheet order
            # and let each run-time reference compute what it reads first
            try:
                late_order = list(
                    graphlib.TopologicalSorter(
                        {k: [d for d in graph[k] if d in late] for k in late}
                    ).static_order()
                )
            except graphlib.CycleError:
                sheet_pos = {s: i for i, s in enumerate(book.sheets)}
                late_order = sorted(late, key=lambda k: (sheet_pos.get(k[0], 0), k[1], k[2]))
        self._late = set(late)

        total = len(order) + len(late_order)
        _CURRENT.engine = self
        try:
            # in dependency order a range read is final: its values are built once (_array)
            self._box_cache_on = True
            for i, node in enumerate(order):
                if node in batches:
                    self._run_batch(batches[node])
                elif node in self._tables and node not in out:
                    self._box_cache_on = False  # the table changes its inputs for a while
                    self._box_cache.clear()
                    self._run_table(node)
                    self._generation = new_generation()
                    self._box_cache_on = True
                elif node in plans and node not in out:
                    self._run_cell(node)
                if self.progress and (i % 200 == 0 or i == total - 1):
                    self.progress(i + 1, total)
            self._box_cache_on = False
            self._box_cache.clear()
            if late_order:
                self._run_late(late_order)
                if self.progress:
                    self.progress(total, total)
        finally:
            _CURRENT.engine = None
            self._box_cache_on = False
            self._box_cache.clear()
        self._taint()
        return out

    def _cells_in(self, s: str, box, owner: dict, tables: dict) -> tuple:
        """The formula cells (array anchors for the cells they fill) in *box* of sheet *s*.
        A cell refused before it could run (its formula not understood) is one too: its
        readers are not checked."""
        plans, out = self._plans, self._out
        r1, c1, r2, c2 = box
        found = set()
        for cc in range(c1, c2 + 1):
            rows = self._rows_by_col.get((s, cc))
            if not rows:
                continue
            for r in rows[bisect_left(rows, r1) : bisect_right(rows, r2)]:
                dep = owner.get((s, r, cc), (s, r, cc))
                if dep in plans or dep in out or dep in tables:
                    found.add(dep)
        return tuple(found)

    def _run_table(self, key) -> None:
        """One cell of a What-If data table: the table's formula cell recomputed with its
        input cell(s) holding this cell's row and column values, then everything put back.
        The cells recomputed are those between the inputs and the formula cell."""
        t = self._tables[key]
        cell = self.book.cells[key]
        formula, subs = _table_parts(t, key)
        plans, out, values, graph = self._plans, self._out, self._values, self._graph
        where = f"{formula[0]}!{col_letters(formula[2])}{formula[1]}"
        if formula not in plans:
            o = out.get(formula)
            if o is not None and o.problem:
                self._out[key] = self._refused(
                    cell,
                    f"not checked: depends on {where} ({o.problem})",
                    kind=Status.NOT_CHECKED,
                    cause=o.cause or o.kind,
                )
            else:
                self._out[key] = self._refused(
                    cell, f"unsupported: a data table whose formula cell {where} holds no formula"
                )
            return
        inputs = {x for x, _ in subs}
        # the formula cell and what it reads, then those of them that read an input
        above: set = set()
        stack = [formula]
        while stack:
            k = stack.pop()
            if k in above or k not in plans:
                continue
            above.add(k)
            stack.extend(graph.get(k, ()))
        try:
            order = list(
                graphlib.TopologicalSorter(
                    {k: [d for d in graph[k] if d in above] for k in above}
                ).static_order()
            )
        except graphlib.CycleError as e:  # the formula cell reads a circular reference
            loop = min(e.args[1])  # the loop's first cell: the same whatever the set order
            self._out[key] = self._refused(
                cell,
                f"not checked: depends on {loop[0]}!{col_letters(loop[2])}{loop[1]} "
                "(circular reference)",
                kind=Status.NOT_CHECKED,
                cause=Status.CIRCULAR,
            )
            return
        redo: list = []
        for k in order:
            p = plans[k]
            reads = any(
                isinstance(tg, _Target)
                and any(
                    s == x[0] and tg.box[0] <= x[1] <= tg.box[2] and tg.box[1] <= x[2] <= tg.box[3]
                    for s in tg.sheets
                    for x in inputs
                )
                for tg in p.targets
            )
            if reads or any(d in redo for d in graph[k]):
                redo.append(k)
        if any(k in self._late for k in redo):
            self._out[key] = self._refused(
                cell, "unsupported: a data table whose formula reads OFFSET or INDIRECT"
            )
            return
        kept_values = {k: values.get(k, _NOTHING) for k in (*redo, *inputs)}
        kept_out = {k: out.get(k) for k in redo}
        try:
            for x, v in subs:
                new = values.get(v)
                if new is None:
                    values.pop(x, None)
                else:
                    values[x] = new
            for k in redo:
                out.pop(k, None)
                self._run_cell(k)
            o = out.get(formula)
            result = values.get(formula)
        finally:
            for k, v in kept_values.items():
                if v is _NOTHING:
                    values.pop(k, None)
                else:
                    values[k] = v
            for k, o_ in kept_out.items():
                if o_ is None:
                    out.pop(k, None)
                else:
                    out[k] = o_
        if o is None or o.problem:
            problem = o.problem if o is not None else "not evaluated"
            self._out[key] = self._refused(
                cell,
                f"not checked: depends on {where} ({problem})",
                kind=Status.NOT_CHECKED,
                cause=(o.cause or o.kind) if o is not None else Status.NOT_CHECKED,
            )
            return
        if result is not None:
            values[key] = result
        self._out[key] = Outcome(o.value, "", o.note, o.message)

    _LATE_PASSES = 12

    def _run_late(self, late_order: list) -> None:
        """Cells with run-time references (and their dependents): their targets are known
        only while they run, so they are solved as a fixed point.  Each starts from its saved
        value and all are evaluated pass after pass until no value changes; for references
        that do not loop this ends with every cell computed from computed values.  Cells
        still changing after the last pass are reported as circular."""
        plans, values, out = self._plans, self._values, self._out
        for key in late_order:
            c = plans[key].cell
            if c.has_cached:
                values[key] = c.cached
        before: dict = {}
        for _ in range(self._LATE_PASSES):
            for key in late_order:
                out.pop(key, None)
                self._run_cell(key)
            now = {k: values.get(k) for k in late_order}
            changed = {k for k in late_order if not _same_value(now[k], before.get(k, _NOTHING))}
            if not changed:
                return
            before = now
        for key in changed:
            out[key] = self._refused(
                plans[key].cell,
                "circular reference (through run-time references)",
                kind=Status.CIRCULAR,
            )

    def _refused(
        self,
        c: Cell,
        problem: str,
        shown=None,
        kind: Status = Status.UNSUPPORTED,
        cause: Status | None = None,
    ) -> Outcome:
        """A cell not evaluated: its saved value stays, and the reason goes with it.  With
        no saved value the cell reads as *shown* (what a spreadsheet program would show,
        when that is known) or #N/A."""
        key = (c.sheet, c.row, c.col)
        v = c.cached if c.has_cached else None
        if v is not None:
            self._values[key] = v
        return Outcome(
            v if v is not None else (shown or ERROR("#N/A")), problem, kind=kind, cause=cause
        )

    def _refuse_spill(self, c: Cell, problem: str, kind: Status = Status.UNSUPPORTED) -> None:
        """The cells of array formula *c* other than its anchor refused as it is."""
        r1, c1, r2, c2 = _array_box(c)
        for r in range(r1, r2 + 1):
            for cc in range(c1, c2 + 1):
                k = (c.sheet, r, cc)
                if (r, cc) != (c.row, c.col) and k not in self._out:
                    spilled = self.book.cells.get(k) or Cell(c.sheet, r, cc)
                    self._out[k] = self._refused(spilled, problem, kind=kind)

    def _taint(self) -> None:
        """Cells reading a refused cell are not checked; cells reading a volatile one are
        volatile.  Dependency order makes one pass enough."""
        out = self._out
        if not any(o.problem for o in out.values()):
            return  # nothing refused or volatile: nothing to pass on
        try:
            order = list(graphlib.TopologicalSorter(self._graph).static_order())
        except graphlib.CycleError:
            order = [k for k in self._graph]
        for key in order:
            o = out.get(key)
            if o is None or o.problem:
                continue
            for d in sorted(self._graph.get(key, ())):
                od = out.get(d)
                if od is None or not od.problem:
                    continue
                where = f"{d[0]}!{col_letters(d[2])}{d[1]}"
                if od.kind is Status.VOLATILE:
                    o.problem, o.kind = f"volatile: depends on {where}", Status.VOLATILE
                    continue
                root = od.problem
                if od.kind is Status.NOT_CHECKED:
                    o.problem, o.cause = root, od.cause
                else:
                    o.problem, o.cause = f"not checked: depends on {where} ({root})", od.kind
                o.kind = Status.NOT_CHECKED
                break

    def evaluate(self, sheet: str, row: int, col: int, formula: str, values: dict):
        """Value of *formula* (without "=") as if it stood in (sheet, row, col), reading
        *values*; used by the audit to show the value of an argument expression."""
        cell = Cell(sheet, row, col, formula=formula)
        tpl, shift = self._template(sheet, formula, row, col)
        if tpl.problem:
            raise ValueError(tpl.problem)
        saved, self._values = self._values, values
        if not self._rows_by_col:
            for s, r, c in values:
                self._rows_by_col.setdefault((s, c), []).append(r)
            for k, rows in self._rows_by_col.items():
                self._rows_by_col[k] = sorted(set(rows))
        try:
            comp = self._compile(tpl, cell)
            targets = self._targets(tpl, cell, shift)
            args = [self._input(i, targets, tpl, cell) for i in comp.order]
            res = np.asarray(comp.fn(*args), dtype=object)
        finally:
            self._values = saved
        return _plain(res.reshape(-1)[0]) if res.size == 1 else res

    def evaluate_columns(self, cells: list, columns: dict) -> dict:
        """Values of formula *cells* for many sets of input values at once (after :meth:`run`).

        *columns* maps input cells ``(sheet, row, col)`` to sequences of n values; *cells*
        lists the formula cells to evaluate, each after the cells it reads. Each formula is
        evaluated once for all n sets in one vectorised call (the column path of
        :meth:`_run_batch`); every other cell it reads keeps its value from :meth:`run`.

        Returns
        -------
        dict
            ``{key: (values, messages)}``: n plain cell values and n joulebook messages
            (empty where the element was computed).

        Raises
        ------
        ValueError
            Naming the first cell that cannot be evaluated this way: a formula that is not
            elementwise, reads a varying cell through a range, or reads where it stands.
        """
        n = len(next(iter(columns.values()))) if columns else 0
        _CURRENT.engine = self  # the error style our functions answer in
        try:
            return self._columns(cells, dict(columns), n)
        finally:
            _CURRENT.engine = None

    def _columns(self, cells: list, varying: dict, n: int) -> dict:
        out: dict = {}
        for key in cells:
            p = self._plans.get(key)
            if p is None or key in self._tables:
                raise ValueError(f"{key}: not a formula cell the engine planned")
            tpl = p.tpl
            if tpl.positional or tpl.volatile or tpl.unknown or tpl.dynamic or p.cell.array_ref:
                raise ValueError(f"{key}: reads where it stands, or is volatile or an array")
            args = []
            moving = False
            for i in p.comp.order:
                t = p.targets[i] if isinstance(i, int) else None
                if isinstance(t, _Target) and len(t.sheets) == 1:
                    r1, c1, r2, c2 = t.box
                    one = (t.sheets[0], r1, c1)
                    if r1 == r2 and c1 == c2 and one in varying:
                        arr = np.empty((n, 1), dtype=object)
                        arr[:, 0] = [
                            _as_formula_value(v) if type(v) is tuple else v for v in varying[one]
                        ]
                        args.append(arr)
                        moving = True
                        continue
                    if any(
                        s == t.sheets[0] and r1 <= r <= r2 and c1 <= c <= c2 for s, r, c in varying
                    ):
                        raise ValueError(f"{key}: reads a varying cell through a range")
                args.append(self._input(i, p.targets, tpl, p.cell))
            if moving and not _elementwise(tpl):
                raise ValueError(f"{key}: a function that is not elementwise")
            res = np.asarray(p.comp.fn(*args), dtype=object)
            flat = res.reshape(-1)
            if flat.size not in (1, n):
                raise ValueError(f"{key}: the result is not one value per set")
            values = [_plain(flat[0] if flat.size == 1 else flat[j]) for j in range(n)]
            messages = [
                _message_of_library(flat[0] if flat.size == 1 else flat[j]) for j in range(n)
            ]
            varying[key] = values
            out[key] = (values, messages)
        return out

    def _run_cell(self, key) -> None:
        p: _Plan = self._plans[key]
        c, tpl = p.cell, p.tpl
        self._in_progress.add(key)
        names = ("sheet", "row", "col", "problems", "last_ref")
        outer = tuple(getattr(_CURRENT, a, None) for a in names)
        _CURRENT.sheet, _CURRENT.row, _CURRENT.col = c.sheet, c.row, c.col
        _CURRENT.problems, _CURRENT.last_ref = [], None
        try:
            self._run_cell_here(key, p, c, tpl)
        finally:
            for a, v in zip(names, outer):
                setattr(_CURRENT, a, v)

    def _run_cell_here(self, key, p, c, tpl) -> None:
        if c.array_ref:
            b = _array_box(c)
            _CURRENT.min_shape = (b[2] - b[0] + 1, b[3] - b[1] + 1)
        try:
            args = [self._input(i, p.targets, tpl, c) for i in p.comp.order]
            res = p.comp.fn(*args)
        except _Unsupported as e:
            self._out[key] = self._refused(c, f"unsupported: {e}")
            return
        except Exception as e:
            self._out[key] = self._refused(
                c, f"engine: {type(e).__name__} evaluating the formula", kind=Status.ERROR
            )
            return
        finally:
            self._in_progress.discard(key)
            _CURRENT.min_shape = None
        if _CURRENT.problems:
            kind, problem = _CURRENT.problems[0]
            self._out[key] = self._refused(c, problem, kind=kind)
            return
        self._store(p, res)

    def _batches(self, graph: dict) -> dict:
        """Same-shape cells of one column whose inputs are single cells and whose functions
        are all elementwise: evaluated together in one vectorised call."""
        groups: dict = {}
        for key in graph:
            p = self._plans.get(key)
            if p is None:  # a data-table cell
                continue
            tpl = p.tpl
            if tpl.batchable is None:
                tpl.batchable = not (
                    tpl.needs_ranges
                    or tpl.positional
                    or tpl.volatile
                    or tpl.unknown
                    or not _elementwise(tpl)
                )
            if not tpl.batchable or key in self._out or p.cell.array_ref:
                continue
            if tpl.plain_refs:  # single cells without notes, or error codes
                if any(type(t) is str for t in p.targets):
                    continue
            elif any(
                not isinstance(t, _Target)
                or len(t.sheets) != 1
                or t.box[0] != t.box[2]
                or t.box[1] != t.box[3]
                or t.note
                for t in p.targets
            ):
                continue
            groups.setdefault((p.cell.sheet, p.cell.col, p.shape), []).append(key)
        batches = {}
        for n, members in enumerate(groups.values()):
            if len(members) < 2:
                continue
            mset = set(members)
            if any(d in mset for m in members for d in graph[m]):  # a running total: one by one
                continue
            batches[("batch", n)] = sorted(members)
        return batches

    def _run_batch(self, members: list) -> None:
        p0: _Plan = self._plans[members[0]]
        comp = p0.comp
        k = len(members)
        args = []
        values = self._values
        import schedula as sh

        plans = self._plans
        targets = [plans[m].targets for m in members]
        empty = sh.EMPTY
        for i in comp.order:
            col = []
            for ts in targets:
                t = ts[i]
                v = values.get((t.sheets[0], t.box[0], t.box[1]), empty)
                col.append(_as_formula_value(v) if type(v) is tuple else v)
            arr = np.empty((k, 1), dtype=object)
            arr[:, 0] = col  # scalars only: numbers, text, logical values, blanks, errors
            args.append(arr)
        try:
            res = np.asarray(comp.fn(*args), dtype=object)
        except Exception:
            res = None
        if res is None or not (res.size == 1 or res.shape in ((k, 1), (k,))):
            for m in members:  # not elementwise after all: one by one
                self._run_cell(m)
            return
        flat = res.reshape(-1)
        for j, m in enumerate(members):
            raw = flat[0] if flat.size == 1 else flat[j]
            v = _plain(raw)
            values[m] = v
            self._out[m] = Outcome(v, message=_message_of_library(raw))

    def _order(self, graph: dict) -> list:
        graph = {k: set(v) for k, v in graph.items()}
        while True:
            try:
                return list(graphlib.TopologicalSorter(graph).static_order())
            except graphlib.CycleError as e:
                cycle = set(e.args[1])
                for key in cycle:
                    cell = self._plans[key].cell if key in self._plans else self.book.cells[key]
                    self._out[key] = self._refused(cell, "circular reference", kind=Status.CIRCULAR)
                    if cell.array_ref:  # the cells an array formula fills go with it
                        self._refuse_spill(cell, "circular reference", Status.CIRCULAR)
                    graph.pop(key, None)
                for deps in graph.values():
                    deps -= cycle

    def _store(self, p: _Plan, res) -> None:
        c = p.cell
        key = (c.sheet, c.row, c.col)
        note = "; ".join(sorted({t.note for t in p.targets if isinstance(t, _Target) and t.note}))
        problem, kind = "", None
        if p.tpl.volatile:
            problem = "volatile: " + ", ".join(sorted(p.tpl.volatile))
            kind = Status.VOLATILE
        last = getattr(_CURRENT, "last_ref", None)
        if p.tpl.top_ref and not c.array_ref and last is not None and len(last.ranges) == 1:
            res = _intersect_result(last, c)  # a reference as a plain formula's result
        res = getattr(res, "value", res)  # a reference as the result: its values
        arr = np.asarray(res, dtype=object)
        if arr.ndim == 1:
            arr = arr.reshape(1, -1)
        if c.array_ref:
            r1, c1, r2, c2 = _array_box(c)
            for r in range(r1, r2 + 1):
                for cc in range(c1, c2 + 1):
                    i, j = r - r1, cc - c1
                    if arr.ndim == 2 and i < arr.shape[0] and j < arr.shape[1]:
                        raw = arr[i, j]
                    elif arr.ndim == 2 and arr.shape[0] == 1 and j < arr.shape[1]:
                        raw = arr[0, j]  # a row repeats down the range
                    elif arr.ndim == 2 and arr.shape[1] == 1 and i < arr.shape[0]:
                        raw = arr[i, 0]  # a column repeats across
                    elif arr.size == 1:
                        raw = arr.reshape(-1)[0]
                    else:
                        raw = None
                    v = _plain(raw) if raw is not None else ERROR("#N/A")
                    self._values[(c.sheet, r, cc)] = v
                    self._out[(c.sheet, r, cc)] = Outcome(
                        v, problem, note, _message_of_library(raw), kind
                    )
            return
        # a plain formula shows the top-left value of an array result
        v = _plain(arr.reshape(-1)[0]) if arr.size >= 1 else ERROR("#VALUE!")
        if isinstance(v, tuple) and v[1] == "#NAME?" and p.tpl.unknown:
            names = sorted(n for n in p.tpl.unknown if not n.startswith("~"))
            missing = sorted(
                n.split(":", 1)[1] for n in p.tpl.funcs if n.startswith("~unknown-name:")
            )
            what = ", ".join(names) + (" (not a function joulebook knows)" if names else "")
            if missing:
                what += ("; " if what else "") + "undefined name " + ", ".join(missing)
            self._out[key] = self._refused(c, f"unsupported: {what}", v)
            return
        self._values[key] = v
        message = _message_of_library(arr.reshape(-1)[0]) if arr.size >= 1 else ""
        self._out[key] = Outcome(v, problem, note, message, kind)


_NOTHING = object()


def _intersect_result(res, c: Cell):
    """Excel's implicit intersection of a reference that a plain (non-array) formula returns
    (=INDEX(A1:B3,3) or =OFFSET(A1,0,0,3,1)): the cell of it in the formula's own row or
    column, #VALUE! when there is none."""
    from formulas.tokens.operand import Error

    rng = res.ranges[0]
    r1, c1, r2, c2 = int(rng["r1"]), int(rng["n1"]), int(rng["r2"]), int(rng["n2"])
    if r1 == r2 and c1 == c2:
        return res
    i = 0 if r1 == r2 else (c.row - r1 if r1 <= c.row <= r2 else None)
    j = 0 if c1 == c2 else (c.col - c1 if c1 <= c.col <= c2 else None)
    if i is None or j is None:
        return Error.errors["#VALUE!"]
    arr = np.asarray(res.value, dtype=object)
    return arr[i, j] if arr.ndim == 2 and i < arr.shape[0] and j < arr.shape[1] else arr.flat[0]


def _table_parts(t, key) -> tuple:
    """The formula cell of data-table cell *key* and its substitutions ((input cell, cell
    whose value it takes), …)."""
    sheet, r, c = key
    r1, c1 = t.box[0], t.box[1]
    if t.row_input and t.col_input:
        formula = (sheet, r1 - 1, c1 - 1)
        subs = (
            ((sheet, *t.row_input), (sheet, r1 - 1, c)),
            ((sheet, *t.col_input), (sheet, r, c1 - 1)),
        )
    elif t.col_input:  # values down the column at left, formulas in the row above
        formula = (sheet, r1 - 1, c)
        subs = (((sheet, *t.col_input), (sheet, r, c1 - 1)),)
    else:  # values across the row above, formulas in the column at left
        formula = (sheet, r, c1 - 1)
        subs = (((sheet, *t.row_input), (sheet, r1 - 1, c)),)
    return formula, subs


_MISSING = '""'  # stands for an omitted argument of one of our functions (a blank to them)


def _next_is(toks, i: int, types: tuple) -> bool:
    """Is the next token after *i* that is not blank space a separator or a closing bracket
    of a function (for types ("SEP", "FUNC")) — i.e. is the argument after *i* empty?"""
    for _v, t, sub in toks[i + 1 :]:
        if t == "WHITE-SPACE":
            continue
        return t in types and (t == "SEP" and sub == "ARG" or t == "FUNC" and sub == "CLOSE")
    return False


#: functions that read the network, a data service or linked data types: refused by name
_NETWORK = frozenset(
    """STOCKHISTORY WEBSERVICE RTD CUBEVALUE CUBEMEMBER CUBESET CUBESETCOUNT CUBERANKEDMEMBER
    CUBEMEMBERPROPERTY CUBEKPIMEMBER _FV FIELDVALUE IMAGE TRANSLATE DETECTLANGUAGE
    COPILOT""".split()
)


def _refuse_lambda(formula: str) -> None:
    """Functions a workbook defines for itself (LAMBDA, and the names bound by LAMBDA or by
    the helpers that take one) and What-If data tables are not evaluated: refused by name."""
    for v, t, sub in tokens(formula):
        if t == "FUNC" and sub == "OPEN":
            bare = v[:-1].upper().removeprefix("_XLFN.").removeprefix("_XLWS.")
            if bare in _NETWORK:
                raise _Unsupported(
                    f"{bare} needs the network or a data service (not evaluated offline; "
                    "its saved value is kept)"
                )
        if t == "FUNC" and sub == "OPEN" and v.upper() == "TABLE(":
            raise _Unsupported(
                "a What-If data table {=TABLE(…)}: each of its cells is the table's formula "
                "recomputed with other input values"
            )
        if t == "FUNC" and sub == "OPEN" and v[:-1].upper().removeprefix("_XLFN.") == "LAMBDA":
            raise _Unsupported("LAMBDA (a function defined in the formula)")
        if t == "OPERAND" and sub == "RANGE" and v.upper().startswith("_XLPM."):
            raise _Unsupported(f"the parameter {v[6:]} of a LAMBDA or LET")


def _shape_key(sheet: str, formula: str, row: int, col: int):
    """The formula seen from (row, col) in relative form, or None when it holds a reference
    the key cannot move (a range glued to a function, A1:INDEX(…) or OFFSET(…):D22)."""
    try:
        toks = tokens(formula)
    except Exception:
        return None
    parts: list = [sheet]
    for v, t, sub in toks:
        if t == "OPERAND" and sub == "RANGE":
            if v.startswith(":"):
                return None
            ref = parse_ref(v)
            parts.append(("ref", ref.key(row, col)) if ref is not None else ("text", v))
        elif t == "FUNC" and sub == "OPEN" and ":" in v:
            return None
        else:
            parts.append((v, t, sub))
    return tuple(parts)


_ONLY_TARGETS = frozenset({_Target})
_ROLES: dict = {}  # skeleton -> per run of digits: True for a relative row, else False;
# None when the skeleton has no fast key


def _fast_shape_key(sheet: str, formula: str, row: int, col: int):
    """A shape key read without the tokenizer, for formulas filled down a column: the
    formula's skeleton (its text between runs of digits, see :func:`.refs.tokens`) with each
    run that is the row of a relative reference counted from *row*, every other run as
    written, and *col* when a reference has a relative column.  Equal keys mean the same
    text but for relative rows moved by the same number of rows: the same shape.  None for
    a formula the key does not cover (LET, ``E+``/``E-``, external books, a range glued to
    a function); such formulas take :func:`_shape_key`."""
    parts = _RUNS.split(formula)
    if len(parts) == 1:
        return None
    skeleton = tuple(parts[0::2])
    roles = _ROLES.get(skeleton, _NOTHING)
    if roles is _NOTHING:
        # LET and a mantissa's E+/E- are in the skeleton: one verdict for all its formulas
        scientific_or_let = _SCIENTIFIC(formula) or "LET" in formula.upper()
        roles = None if scientific_or_let else _run_roles(formula, len(parts) // 2)
        if len(_ROLES) > 65_536:
            _ROLES.clear()
        _ROLES[skeleton] = roles
    if roles is None:
        return None
    rel, by_col = roles
    key: list = [sheet, skeleton, col if by_col else 0]
    for run, relative in zip(parts[1::2], rel):
        if relative:
            r = int(run)
            if not 1 <= r <= MAX_ROW:
                return None
            key.append(r - row)
        else:
            key.append(run)
    return tuple(key)


def _run_roles(formula: str, n_runs: int):
    """(per run of digits: is it the row of a relative reference?, does a reference have a
    relative column?) read from the tokens of *formula*; None when no fast key applies."""
    try:
        toks = tokens(formula)
    except Exception:
        return None
    rel: list = []
    by_col = False
    for v, t, sub in toks:
        n = len(_RUNS.split(v)) // 2
        if t == "FUNC" and sub == "OPEN" and ":" in v:
            return None
        if not (t == "OPERAND" and sub == "RANGE"):
            rel.extend([False] * n)
            continue
        if v.startswith(":"):
            return None
        ref = parse_ref(v)
        if ref is None or ref.kind in ("name", "table"):
            rel.extend([False] * n)
            continue
        if ref.book is not None:
            return None
        _book, _sheet, addr = split_sheet(v)
        before = len(_RUNS.split(v[: len(v) - len(addr)])) // 2
        rel.extend([False] * before)
        pieces = addr.split(":")
        flags = ((ref.abs_r1, ref.abs_c1), (ref.abs_r2, ref.abs_c2))
        for piece, (abs_r, abs_c) in zip(pieces, flags):
            digits = len(_RUNS.split(piece)) // 2
            if digits > 1:
                return None
            rel.extend([not abs_r] * digits)
            if ref.kind in ("cell", "area", "cols") and not abs_c:
                by_col = True
    if len(rel) != n_runs:
        return None
    return tuple(rel), by_col


def _plain_refs(tpl: _Template) -> tuple:
    """The Refs of a template whose references are all single cells written in the formula
    (no names, tables, 3-D spans or other books), read as values; () otherwise."""
    out = []
    for ref, frame in tpl.refs:
        if frame != "cell" or ref.kind != "cell" or ref.book is not None or ref.sheet2:
            return ()
        out.append(ref)
    return tuple(out)


def _returns_reference(formula: str) -> bool:
    """True when the whole formula is one call of a function that returns a reference."""
    try:
        toks = [t for t in tokens(formula) if t[1] != "WHITE-SPACE"]
    except Exception:
        return False
    if len(toks) < 2 or toks[0][1] != "FUNC" or toks[-1][1] != "FUNC":
        return False
    if toks[0][0][:-1].upper() not in ("INDEX", "OFFSET", "INDIRECT"):
        return False
    depth = 0
    for i, (_v, t, sub) in enumerate(toks):
        depth += (t in ("FUNC", "PAREN", "ARRAY") and sub == "OPEN") - (sub == "CLOSE")
        if depth == 0 and i < len(toks) - 1:
            return False
    return True


def _whole(t: _Target):
    """A reference at its full size, with no values: for the functions that read only where
    it is and how large (ROWS(A:A) is 1,048,576), or read its cells themselves (INDEX,
    COUNTBLANK, OFFSET)."""
    from formulas.ranges import Ranges

    return Ranges((_range_dict(t.sheets[0], t.box),), {})


def _inside(key, box) -> bool:
    return box[0] <= key[1] <= box[2] and box[1] <= key[2] <= box[3]


def _same_value(a, b) -> bool:
    if a is b:
        return True
    if isinstance(a, float) and isinstance(b, float):
        return a == b or (a != a and b != b)
    return type(a) is type(b) and a == b


def _mode(toks, i: int, stack: list) -> str:
    """How the reference operand toks[i] is handed to the library (see _REF_ARGS)."""
    blank = ("", "", "")

    def near(step: int):  # the nearest token that is not white space, and what lies between
        j, space = i + step, False
        while 0 <= j < len(toks) and toks[j][1] == "WHITE-SPACE":
            j, space = j + step, True
        return (toks[j] if 0 <= j < len(toks) else blank), space

    prev, space_before = near(-1)
    nxt, space_after = near(1)
    if (prev[1] == "OPERATOR-INFIX" and prev[0] in (":", ",")) or (
        nxt[1] == "OPERATOR-INFIX" and nxt[0] in (":", ",")
    ):
        return "ranges"
    if (space_before and (prev[1] == "OPERAND" or prev[2] == "CLOSE")) or (
        space_after and (nxt[1] == "OPERAND" or (nxt[1] in ("FUNC", "PAREN") and nxt[2] == "OPEN"))
    ):
        return "ranges"  # the intersection operator
    whole = (prev[1] == "FUNC" and prev[2] == "OPEN" or prev[1] == "SEP" and prev[2] == "ARG") and (
        nxt[1] == "FUNC" and nxt[2] == "CLOSE" or nxt[1] == "SEP" and nxt[2] == "ARG"
    )
    if whole and stack and stack[-1] in _NEEDS_RANGES:
        return "ranges"
    if whole and stack and stack[-1] in (_REF_ARGS | _OURS_RANGE_ARGS):
        return "array"
    if whole and stack and stack[-1] not in _VALUE_ARGS and stack[-1] not in _OURS:
        return "array"  # a function we do not know takes its references as the library does
    return "value"


def _array_box(c: Cell) -> tuple[int, int, int, int]:
    ref = parse_ref(c.array_ref or c.ref)
    box = ref.placed(0, 0) if ref is not None and ref.kind in ("cell", "area") else None
    return box or (c.row, c.col, c.row, c.col)


def _range_dict(sheet: str, box) -> dict:
    """The library's description of a box on a sheet (cached: it parses text)."""
    return dict(_range_dict_cached(sheet, tuple(box)))


_RD_CACHE: dict = {}


def _range_dict_cached(sheet: str, box):
    hit = _RD_CACHE.get((sheet, box))
    if hit is None:
        from formulas.ranges import Ranges

        r1, c1, r2, c2 = box
        a = f"{col_letters(c1)}{r1}" + ("" if (r1, c1) == (r2, c2) else f":{col_letters(c2)}{r2}")
        hit = Ranges.get_range(f"{quote_sheet(sheet)}!{a}")
        if len(_RD_CACHE) > 200_000:
            _RD_CACHE.clear()
        _RD_CACHE[(sheet, box)] = hit
    return hit


# built-ins that act cell by cell on arrays (aggregates such as SUM or MIN are not)
_ELEMENTWISE = {
    "_XLJB.ADD",
    "_XLJB.SUB",
    "IF",
    "IFERROR",
    "IFNA",
    "ROUND",
    "ROUNDUP",
    "ROUNDDOWN",
    "ABS",
    "SQRT",
    "EXP",
    "LN",
    "LOG10",
    "POWER",
    "SIN",
    "COS",
    "TAN",
    "PI",
    "INT",
    "MOD",
    "SIGN",
    "NOT",
    "ISNUMBER",
    "ISERROR",
    "ISERR",
    "ISTEXT",
    "ISBLANK",
    "TRUNC",
    "DEGREES",
    "RADIANS",
}
_OURS_RANGE_ARGS = frozenset(f.name for f in CATALOG if any(a.type == "range" for a in f.args))
_OURS = frozenset(f.name for f in CATALOG)
_OURS_ELEMENTWISE = {
    f.name for f in CATALOG if f.elementwise and not any(a.type == "range" for a in f.args)
}


def _elementwise(tpl: _Template) -> bool:
    return all(n in _ELEMENTWISE or n in _OURS_ELEMENTWISE for n in tpl.funcs)


def _plain(x):
    """A formula-library value as a plain cell value."""
    if type(x) is float:  # the common case first
        return x if x - x == 0.0 else ERROR("#NUM!")  # inf - inf and nan - nan are nan
    import schedula as sh
    from formulas.tokens.operand import XlError

    if isinstance(x, np.ndarray):
        return _plain(x.reshape(-1)[0]) if x.size else ERROR("#VALUE!")
    if hasattr(x, "ranges") and hasattr(x, "value"):
        return _plain(np.asarray(x.value, dtype=object))
    if isinstance(x, XlError):
        return ERROR(str(x))
    if x is sh.EMPTY:
        return 0.0
    if isinstance(x, (bool, np.bool_)):
        return bool(x)
    if isinstance(x, (int, float, np.integer, np.floating)):
        x = float(x)
        if x != x or x in (float("inf"), float("-inf")):
            return ERROR("#NUM!")
        return x
    if isinstance(x, str):
        return x
    return ERROR("#VALUE!")


def _as_formula_value(v):
    from formulas.tokens.operand import Error

    if isinstance(v, tuple) and len(v) == 2 and v[0] == "error":
        return Error.errors.get(v[1], Error.errors["#VALUE!"])
    return v
