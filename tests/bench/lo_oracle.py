"""LibreOffice as an oracle for Excel's built-ins: generated calls, recomputed by LibreOffice
headless and by joulebook's engine, every disagreement listed by function.

    python tests/bench/lo_oracle.py [--seed N] [--per 12] [--only FUNC,FUNC] [--keep DIR]

A development tool (not run by the test suite): it writes a workbook of calls of many
built-ins over a data sheet of numbers, text, logical values, blanks, dates and errors, lets
LibreOffice recalculate and save it (so the saved values are LibreOffice's), then checks it
with the engine.  LibreOffice is an independent implementation of the same functions, but
not Excel: each disagreement is a lead to judge against Excel's documented behaviour, and a
confirmed defect gets a fixture test in tests/ with the expected value and its source.
"""

from __future__ import annotations

import argparse
import collections
import random
import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

HERE = Path(__file__).resolve().parent

# argument kinds: n number, i small integer, p probability, r numeric range, m mixed range,
# s text, d date, x any single cell, c criteria, b logical, t text range, k sorted range,
# trailing ? = optional
SIGNATURES = """
ABS n; ACOS p; ACOSH n; ACOT n; ASIN p; ASINH n; ATAN n; ATAN2 n n; ATANH p; COS n; COSH n;
COT n; DEGREES n; EVEN n; EXP n; FACT i; FACTDOUBLE i; GCD i i?; LCM i i?; INT n; LN n; LOG n n?;
LOG10 n; MOD n n; MROUND n n; ODD n; PI; POWER n n; PRODUCT r m?; QUOTIENT n n; RADIANS n;
ROUND n i; ROUNDDOWN n i; ROUNDUP n i; SIGN n; SIN n; SINH n; SQRT n; SQRTPI n; SUM r m?;
SUMSQ r; TAN n; TANH n; TRUNC n i?; CEILING n n; FLOOR n n; CEILING.MATH n n? i?;
FLOOR.MATH n n? i?; CEILING.PRECISE n n?; FLOOR.PRECISE n n?; ISO.CEILING n n?; COMBIN i i;
COMBINA i i; PERMUT i i; MULTINOMIAL i i i?; SERIESSUM n n n r; BASE i i i?; DECIMAL s i;
ROMAN i; ARABIC s; SUMPRODUCT r r; SUMX2MY2 r r; SUMX2PY2 r r; SUMXMY2 r r; MDETERM q;
AVERAGE r m?; AVERAGEA m; COUNT m r?; COUNTA m; COUNTBLANK m; MAX m n?; MAXA m; MIN m n?;
MINA m; MEDIAN r; MODE r; MODE.SNGL r; LARGE r i; SMALL r i; RANK n k i?; RANK.EQ n k i?;
RANK.AVG n k i?; PERCENTILE r p; PERCENTILE.INC r p; PERCENTILE.EXC r p; QUARTILE r i;
QUARTILE.INC r i; QUARTILE.EXC r i; PERCENTRANK r n i?; PERCENTRANK.INC r n;
PERCENTRANK.EXC r n; STDEV r; STDEV.S r; STDEV.P r; STDEVA m; STDEVP r; STDEVPA m; VAR r;
VAR.S r; VAR.P r; VARA m; VARP r; VARPA m; AVEDEV r; DEVSQ r; GEOMEAN k; HARMEAN k; KURT r;
SKEW r; SKEW.P r; TRIMMEAN r p; CORREL r k; COVAR r k; COVARIANCE.P r k; COVARIANCE.S r k;
PEARSON r k; RSQ r k; SLOPE r k; INTERCEPT r k; STEYX r k; FORECAST n r k;
FORECAST.LINEAR n r k; STANDARDIZE n n n; FISHER p; FISHERINV n; GAMMA n; GAMMALN n;
GAMMALN.PRECISE n; GAUSS n; PHI n; NORM.DIST n n n b; NORMDIST n n n b; NORM.INV p n n;
NORMINV p n n; NORM.S.DIST n b; NORMSDIST n; NORM.S.INV p; NORMSINV p; LOGNORM.DIST n n n b;
LOGNORM.INV p n n; EXPON.DIST n n b; EXPONDIST n n b; BINOM.DIST i i p b; BINOMDIST i i p b;
BINOM.INV i p p; CRITBINOM i p p; POISSON.DIST i n b; POISSON i n b; T.DIST n i b; T.DIST.2T n i;
T.DIST.RT n i; TDIST n i i; T.INV p i; T.INV.2T p i; TINV p i; CHISQ.DIST n i b;
CHISQ.DIST.RT n i; CHIDIST n i; CHISQ.INV p i; CHISQ.INV.RT p i; CHIINV p i; F.DIST n i i b;
F.DIST.RT n i i; FDIST n i i; F.INV p i i; F.INV.RT p i i; FINV p i i; GAMMA.DIST n n n b;
GAMMADIST n n n b; GAMMA.INV p n n; GAMMAINV p n n; BETA.DIST p n n b; BETADIST p n n;
BETA.INV p n n; BETAINV p n n; WEIBULL n n n b; WEIBULL.DIST n n n b; HYPGEOM.DIST i i i i b;
NEGBINOM.DIST i i p b; CONFIDENCE p n i; CONFIDENCE.NORM p n i; CONFIDENCE.T p n i;
ERF n n?; ERFC n; ERF.PRECISE n; ERFC.PRECISE n; BESSELJ n i; BESSELY n i; BESSELI n i;
BESSELK n i; DELTA n n?; GESTEP n n?; FREQUENCY r k; PROB k p n n?;
AND x x?; OR x x?; XOR x x?; NOT x; IF x x x?; IFERROR x x; IFNA x x; ISBLANK x; ISERR x;
ISERROR x; ISEVEN n; ISODD n; ISLOGICAL x; ISNA x; ISNONTEXT x; ISNUMBER x; ISTEXT x; N x;
T x; TYPE x; ERROR.TYPE x;
CHAR i; CLEAN s; CODE s; CONCATENATE x x x?; CONCAT m; EXACT s s; FIND s s i?; FIXED n i? b?;
DOLLAR n i?; LEFT s i?; LEN x; LOWER s; MID s i i; PROPER s; REPLACE s i i s; REPT s i;
RIGHT s i?; SEARCH s s i?; SUBSTITUTE s s s i?; TEXT n f; TRIM s; UPPER s; VALUE s;
UNICHAR i; UNICODE s; TEXTJOIN s b m; NUMBERVALUE s;
DATE i i i; DATEVALUE s; DAY d; DAYS d d; DAYS360 d d b?; EDATE d i; EOMONTH d i; HOUR n;
MINUTE n; SECOND n; MONTH d; YEAR d; TIME i i i; TIMEVALUE s; WEEKDAY d i?; WEEKNUM d i?;
ISOWEEKNUM d; NETWORKDAYS d d; WORKDAY d i; YEARFRAC d d i?; DATEDIF d d u;
FV p i n n? i?; PV p i n n? i?; PMT p i n n? i?; NPER p n n n?; RATE i n n n?; IPMT p i i n;
PPMT p i i n; NPV p r; IRR q; MIRR q p p; SLN n n i; SYD n n i i; DB n n i i; DDB n n i i;
EFFECT p i; NOMINAL p i; CUMIPMT p i n i i i; CUMPRINC p i n i i i; ISPMT p i i n; RRI i n n;
PDURATION p n n; FVSCHEDULE n r;
VLOOKUP n g i b?; HLOOKUP n h i b?; MATCH n k i?; INDEX r i i?; LOOKUP n k r; CHOOSE i x x x;
ROWS r; COLUMNS r; ROW r?; COLUMN r?; TRANSPOSE r; ADDRESS i i i? b? s?; AREAS r;
SUMIF m c r?; SUMIFS r m c; COUNTIF m c; COUNTIFS m c r c; AVERAGEIF m c r?; AVERAGEIFS r m c;
MAXIFS r m c; MINIFS r m c; SWITCH x x x x x?; IFS b x b x;
BIN2DEC s; BIN2HEX s i?; BIN2OCT s i?; DEC2BIN n i?; DEC2HEX n i?; DEC2OCT n i?; HEX2BIN s i?;
HEX2DEC s; HEX2OCT s i?; OCT2BIN s i?; OCT2DEC s; OCT2HEX s i?; BITAND i i; BITOR i i;
BITXOR i i; BITLSHIFT i i; BITRSHIFT i i; CONVERT n s s;
AGGREGATE w o m m?; AGGREGATE z o m i; AGGREGATE y o r p; FORMULATEXT x; SHEET x?; SHEETS r?;
CELL e x
"""

NUMBERS = ["2.5", "-3", "0", "7", "0.5", "100", "1E-3", "4", "-0.25", "12", "1E+15", "D!A1",
           "D!A2", "D!A3", "D!A4", "D!A6", "D!B2", "D!B3", "D!B4", "D!B6", "D!B1"]  # fmt: skip
INTS = ["1", "2", "3", "0", "5", "-1", "10", "D!E2", "D!E3", "2.7", "D!B3", "D!B4"]
PROBS = ["0.5", "0.05", "0.95", "0.25", "0", "1", "D!A5", "0.999"]
TEXTS = ['"apple"', '"Banana Split"', '"  two  spaces "', '""', '"3.5"', '"a"', '"1011"',
         '"FF"', '"777"', '"MCMXC"', '"12/25/2020"', '"3:45 PM"', "D!D1", "D!D2", "D!D4",
         "D!D7", '"ÄÖü"', '"-101"', '"1e3"', '"FFFFFFFFFF"', '"1111111111"']  # fmt: skip
DATES = ["45000", "D!C1", "D!C5", "36526", "1", "60", "61", "2958465", "-1", '"2021-03-04"',
         "D!C10", "45291.75"]  # fmt: skip
ANY = ["D!A1", "D!A3", "D!B2", "D!B3", "D!B4", "D!B7", "D!B9", "D!F1", "D!F2", "D!D1", "1",
       '"x"', "TRUE", "FALSE", "D!A2", "0", '""', "D!Z99", "#N/A", "1/0"]  # fmt: skip
BOOLS = ["TRUE", "FALSE", "1", "0", "D!B3", "D!A4"]
RANGES = ["D!A1:A10", "D!E1:E10", "D!A1:A5", "D!A2:A9", "D!E1:E6", "D!C1:C10"]
MIXED = ["D!B1:B10", "D!A1:B5", "D!B1:B4", "D!A1:A10", "D!D1:D5", "D!F1:F3", "D!B3:B4"]
SORTED = ["D!E1:E10", "D!C1:C10", "D!E1:E5"]
CRITERIA = ['">2"', '"<=0"', '"abc"', '"a*"', "3", '"<>"', '"="', '"?pple"', '">=2.5"', "TRUE",
            '"TRUE"', '"<>abc"', '"3.5"', "D!A1", '"*"', '"~*"', '">"&D!A4']  # fmt: skip
FORMATS = ['"0.00"', '"#,##0"', '"0%"', '"yyyy-mm-dd"', '"0.0E+00"', '"$#,##0.00"', '"mmm d"',
           '"h:mm"', '"@"', '"000"', '"0.###"', '"dddd"', '"General"']  # fmt: skip
UNITS = ['"d"', '"m"', '"y"', '"md"', '"ym"', '"yd"']
SQUARE = ["D!G1:H2", "D!G1:I3", "D!G1:G1"]
CASHFLOWS = ["D!J1:J5", "D!J1:J3", "D!J2:J5"]
GRID = ["D!E1:F10", "D!C1:E10", "D!E1:E10"]
HGRID = ["D!K1:T2", "D!K1:T3"]
AGG_REF = [str(n) for n in range(1, 14)]  # AGGREGATE's reference-form functions
AGG_K = ["14", "15", "17", "19"]  # its array-form functions with a whole k
AGG_P = ["16", "18"]  # its percentiles
AGG_OPTIONS = [str(n) for n in range(8)]
CELL_KINDS = ['"address"', '"row"', '"col"', '"contents"', '"type"']

POOLS = {
    "n": NUMBERS, "i": INTS, "p": PROBS, "r": RANGES, "m": MIXED, "s": TEXTS, "d": DATES,
    "x": ANY, "c": CRITERIA, "b": BOOLS, "k": SORTED, "f": FORMATS, "u": UNITS, "q": SQUARE,
    "g": GRID, "h": HGRID, "w": AGG_REF, "z": AGG_K, "y": AGG_P, "o": AGG_OPTIONS,
    "e": CELL_KINDS,
}  # fmt: skip
POOLS["q"] = SQUARE
# IRR/MIRR take cash flows: the square pool stands in for MDETERM only
IRR_LIKE = {"IRR", "MIRR"}


def signatures():
    out = []
    for chunk in SIGNATURES.replace("\n", " ").split(";"):
        parts = chunk.split()
        if parts:
            out.append((parts[0], parts[1:]))
    return out


def _prefixed() -> set:
    """Functions a file spells with Excel's ``_xlfn.`` prefix (added after Excel 2007)."""
    import formulas

    table = formulas.get_functions()
    return {k[6:] for k in table if k.startswith("_XLFN.") and "." not in k[6:].strip(".")} | {
        k[6:] for k in table if k.startswith("_XLFN.")
    }


def calls(name, kinds, rng: random.Random, per: int, prefixed=frozenset()):
    seen = set()
    spelled = ("_xlfn." + name) if name in prefixed else name
    for _ in range(per * 4):
        args = []
        for k in kinds:
            opt = k.endswith("?")
            k = k.rstrip("?")
            if opt and rng.random() < 0.4:
                break
            pool = CASHFLOWS if (k == "q" and name in IRR_LIKE) else POOLS[k]
            args.append(rng.choice(pool))
        f = f"={spelled}({','.join(args)})"
        if f not in seen:
            seen.add(f)
            yield f
        if len(seen) >= per:
            return


def data_sheet(ws) -> None:
    nums = [2.5, -3, 0, 7, 0.5, 100, 0.001, 4, 3, 12]
    mixed = [1, "abc", True, None, 5, "3.5", False, -2, "", 8]
    texts = ["apple", "Banana", "cherry pie", " spaced ", "A1B2", "x", "12", "hello world",
             "ÄÖ", "end"]  # fmt: skip
    for r in range(1, 11):
        ws.cell(r, 1, nums[r - 1])
        if mixed[r - 1] is not None:
            ws.cell(r, 2, mixed[r - 1])
        ws.cell(r, 3, 45000 + 30 * (r - 1))
        ws.cell(r, 4, texts[r - 1])
        ws.cell(r, 5, float(r))
    ws["F1"] = "=NA()"
    ws["F2"] = "=1/0"
    ws["F3"] = 4
    for i, row in enumerate([[2, 1, 3], [-1, 4, 0.5], [1, 1, 2]]):
        for j, v in enumerate(row):
            ws.cell(i + 1, 7 + j, v)
    for i, v in enumerate([-1000, 300, 400, 500, 200]):
        ws.cell(i + 1, 10, v)
    for j in range(10):
        ws.cell(1, 11 + j, float(j + 1))
        ws.cell(2, 11 + j, f"h{j}")
        ws.cell(3, 11 + j, (j + 1) * 1.5)


def build(path: Path, seed: int, per: int, only: set | None) -> int:
    import openpyxl

    rng = random.Random(seed)
    wb = openpyxl.Workbook()
    d = wb.active
    d.title = "D"
    data_sheet(d)
    t = wb.create_sheet("T")
    row = 1
    prefixed = _prefixed() | {
        "COMBINA",
        "BASE",
        "DECIMAL",
        "ARABIC",
        "CONCAT",
        "TEXTJOIN",
        "IFS",
        "SWITCH",
        "MAXIFS",
        "MINIFS",
        "DAYS",
        "ISOWEEKNUM",
        "RRI",
        "PDURATION",
        "XOR",
        "IFNA",
        "UNICHAR",
        "UNICODE",
        "NUMBERVALUE",
        "AGGREGATE",
        "FORMULATEXT",
        "SHEET",
        "SHEETS",
    }
    for name, kinds in signatures():
        if only and name not in only:
            continue
        for f in calls(name, kinds, rng, per, prefixed):
            t.cell(row, 1, f)
            row += 1
    wb.save(path)
    return row - 1


PROFILE = """<?xml version="1.0" encoding="UTF-8"?>
<oor:items xmlns:oor="http://openoffice.org/2001/registry" xmlns:xs="http://www.w3.org/2001/XMLSchema">
<item oor:path="/org.openoffice.Office.Calc/Formula/Load"><prop oor:name="OOXMLRecalcMode" oor:op="fuse"><value>0</value></prop></item>
</oor:items>
"""


def libreoffice(src: Path, work: Path) -> Path:
    soffice = shutil.which("soffice") or shutil.which("libreoffice")
    if not soffice:
        raise SystemExit("LibreOffice is needed: apt-get install libreoffice-calc-nogui")
    profile = work / "profile"
    (profile / "user").mkdir(parents=True, exist_ok=True)
    (profile / "user" / "registrymodifications.xcu").write_text(PROFILE)
    out = work / "lo"
    subprocess.run(
        [soffice, f"-env:UserInstallation={profile.as_uri()}", "--headless", "--norestore",
         "--convert-to", "xlsx:Calc MS Excel 2007 XML", "--outdir", str(out), str(src)],
        check=True, capture_output=True, timeout=600,
    )  # fmt: skip
    return out / src.name


def main() -> int:
    ap = argparse.ArgumentParser()
    ap.add_argument("--seed", type=int, default=1)
    ap.add_argument("--per", type=int, default=12)
    ap.add_argument("--only")
    ap.add_argument("--keep")
    ap.add_argument("--error-kinds", action="store_true", help="list error-kind differences")
    ns = ap.parse_args()
    only = set(ns.only.upper().split(",")) if ns.only else None
    work = Path(ns.keep or tempfile.mkdtemp(prefix="lo-oracle-"))
    work.mkdir(parents=True, exist_ok=True)
    src = work / "oracle.xlsx"
    n = build(src, ns.seed, ns.per, only)
    saved = libreoffice(src, work)

    from joulebook.faces.workbook.check import compare
    from joulebook.faces.workbook.engine import Engine
    from joulebook.faces.workbook.reader import read_book

    book = read_book(saved)
    rows = [r for r in compare(book, Engine(book).run()) if r.sheet == "T"]
    by_func = collections.defaultdict(list)
    errs = collections.Counter()
    for r in rows:
        if r.status == "pass":
            continue
        both_errors = all(isinstance(v, tuple) for v in (r.cached, r.recomputed))
        name = r.formula.split("(")[0].upper().removeprefix("_XLFN.")
        if both_errors and not ns.error_kinds:
            errs[name] += 1  # LibreOffice writes several of its own errors as #VALUE!
            continue
        by_func[name].append(r)
    bad = sum(len(v) for v in by_func.values())
    for name, rs in sorted(by_func.items(), key=lambda kv: -len(kv[1])):
        print(f"== {name}: {len(rs)}")
        for r in rs[:6]:
            print(f"   {r.formula:<50} LO {r.cached!r:<24} ours {r.recomputed!r} {r.note}")
    print("error kinds differ:", dict(errs.most_common()))
    print(
        f"{len(rows) - bad - sum(errs.values())} of {len(rows)} calls agree with LibreOffice, "
        f"{sum(errs.values())} differ only in the error kind ({n} written); {work}"
    )
    return 0


if __name__ == "__main__":
    sys.path.insert(0, str(HERE.parents[1] / "funcs"))
    raise SystemExit(main())
