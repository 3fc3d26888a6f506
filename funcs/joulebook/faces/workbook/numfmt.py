"""Excel's number formats, as the TEXT and DOLLAR functions apply them.

A format has up to four sections separated by ``;`` (positive; negative; zero; text).  A
section is a date/time format when it holds date or time codes (``y m d h s AM/PM``, elapsed
``[h] [m] [s]``), else a number format: digit placeholders ``0 # ?``, the decimal point, a
thousands separator (``,`` between placeholders) or scaling (``,`` after the last one), ``%``,
scientific ``E+``/``E-``, fractions ``?/?``, and literal text (quoted, ``\\x``, or plain).
Halves round away from zero, as Excel displays them.  Serial dates count from 1900-01-01 = 1
with Excel's fictitious 1900-02-29 (serial 60).

References: [1] ECMA-376 Part 1, §18.8.31 (numFmt) and §18.8.30 (number format codes).
[2] Microsoft, "Number format codes" and "TEXT function", Excel function reference.
"""

from __future__ import annotations

import datetime as _dt
import math
from decimal import ROUND_HALF_UP, Decimal

__all__ = ["format_value", "general"]

_DAYS = ["Monday", "Tuesday", "Wednesday", "Thursday", "Friday", "Saturday", "Sunday"]
_MONTHS = ["January", "February", "March", "April", "May", "June", "July", "August",
           "September", "October", "November", "December"]  # fmt: skip


class FormatError(ValueError):
    """The format or the value cannot be shown (TEXT gives #VALUE!)."""


def general(x: float) -> str:
    """A number in the General format (up to 11 characters wide in a cell; TEXT shows up to
    10 significant digits the way a cell of standard width would)."""
    if x == 0:
        return "0"
    if x == int(x) and abs(x) < 1e11:
        return str(int(x))
    a = abs(x)
    if 1e-9 <= a < 1e11:
        digits = 10 - max(int(math.floor(math.log10(a))) + 1, 1)
        s = _round(x, max(digits, 0))
        s = s.rstrip("0").rstrip(".") if "." in s else s
        return s
    m, e = f"{x:.5E}".split("E")
    m = m.rstrip("0").rstrip(".")
    return f"{m}E{int(e):+03d}"


def _round(x: float, places: int) -> str:
    """*x* to *places* decimals, halves away from zero, as plain digits."""
    q = Decimal(1).scaleb(-places)
    return format(Decimal(repr(x)).quantize(q, rounding=ROUND_HALF_UP), "f")


def _sections(fmt: str) -> list[str]:
    out, cur, i, quoted = [], [], 0, False
    while i < len(fmt):
        ch = fmt[i]
        if ch == '"':
            quoted = not quoted
        elif ch == "\\" and not quoted and i + 1 < len(fmt):
            cur.append(fmt[i : i + 2])
            i += 2
            continue
        elif ch == "[" and not quoted:
            j = fmt.find("]", i)
            if j > 0:
                cur.append(fmt[i : j + 1])
                i = j + 1
                continue
        elif ch == ";" and not quoted:
            out.append("".join(cur))
            cur = []
            i += 1
            continue
        cur.append(ch)
        i += 1
    out.append("".join(cur))
    return out


def _tokens(section: str) -> list[tuple[str, str]]:
    """(kind, text): kind is 'lit' for literal text, else the code itself."""
    toks, i, n = [], 0, len(section)
    while i < n:
        ch = section[i]
        if ch == '"':
            j = section.find('"', i + 1)
            j = n if j < 0 else j
            toks.append(("lit", section[i + 1 : j]))
            i = j + 1
        elif ch == "\\" and i + 1 < n:
            toks.append(("lit", section[i + 1]))
            i += 2
        elif ch == "_" and i + 1 < n:
            toks.append(("lit", " "))
            i += 2
        elif ch == "*" and i + 1 < n:
            i += 2  # fill character: no width to fill in TEXT
        elif ch == "[":
            j = section.find("]", i)
            j = n - 1 if j < 0 else j
            inner = section[i + 1 : j]
            low = inner.lower()
            if low and low[0] in "hms" and set(low) <= set(low[0]):
                toks.append(("elapsed", low))
            elif inner.startswith("$") and "-" in inner:
                sym = inner[1 : inner.index("-")]
                if sym:
                    toks.append(("lit", sym))
            elif inner.startswith("$"):
                toks.append(("lit", inner[1:]))
            # colours and conditions are not shown
            i = j + 1
        elif section[i : i + 5].upper() == "AM/PM":
            toks.append(("ampm", section[i : i + 5]))
            i += 5
        elif section[i : i + 3].upper() == "A/P":
            toks.append(("ap", section[i : i + 3]))
            i += 3
        elif section[i : i + 7].lower() == "general":
            toks.append(("general", "General"))
            i += 7
        elif ch.lower() in "ymdhse" and not (ch.lower() == "e" and _is_sci(section, i)):
            j = i
            while j < n and section[j].lower() == ch.lower():
                j += 1
            toks.append((ch.lower(), section[i:j]))
            i = j
        elif ch in "Ee" and _is_sci(section, i):
            toks.append(("sci", section[i : i + 2]))
            i += 2
        elif ch in "0#?.,%/@":
            toks.append((ch, ch))
            i += 1
        else:
            toks.append(("lit", ch))
            i += 1
    return toks


def _is_sci(section: str, i: int) -> bool:
    return i + 1 < len(section) and section[i + 1] in "+-"


_DATE_CODES = {"y", "m", "d", "h", "s", "e", "ampm", "ap", "elapsed"}


def format_value(value, fmt: str) -> str:
    """The text Excel's TEXT(value, fmt) shows; *value* a float or a str (text)."""
    secs = _sections(fmt)
    if isinstance(value, str):
        if len(secs) >= 4:
            return "".join(t if k == "lit" else (value if k == "@" else "") for k, t in
                           _tokens(secs[3]))  # fmt: skip
        toks = _tokens(secs[0])
        if any(k == "@" for k, _ in toks):
            return "".join(t if k == "lit" else (value if k == "@" else "") for k, t in toks)
        return value
    x = float(value)
    if not math.isfinite(x):
        raise FormatError("not a finite number")
    sign = ""
    if len(secs) == 1:
        sec, sign = secs[0], ("-" if x < 0 else "")
    elif len(secs) == 2:
        sec = secs[0] if x >= 0 else secs[1]
    else:
        sec = secs[0] if x > 0 else (secs[1] if x < 0 else secs[2])
    x = abs(x)
    toks = _tokens(sec)
    kinds = {k for k, _ in toks}
    if kinds & _DATE_CODES:
        if sign:
            raise FormatError("negative date")  # Excel shows ##### (TEXT: #VALUE!)
        return _date(x, toks)
    return sign + _number(x, toks)


def _number(x: float, toks: list) -> str:
    if any(k == "general" for k, _ in toks):
        return "".join(general(x) if k == "general" else t for k, t in toks if k != "@")
    if not any(k in ("0", "#", "?") for k, _ in toks):
        return "".join(t if k == "lit" else (general(x) if k == "@" else t) for k, t in toks)
    x *= 100 ** sum(1 for k, _ in toks if k == "%")
    # commas right after the last digit placeholder, or right before the point, scale
    last = max(i for i, (k, _) in enumerate(toks) if k in ("0", "#", "?"))
    point = next((i for i, (k, _) in enumerate(toks) if k == "."), None)
    scale, j = 0, last + 1
    while j < len(toks) and toks[j][0] == ",":
        scale, j = scale + 1, j + 1
    j = point - 1 if point is not None and point < last else -1
    while j >= 0 and toks[j][0] == ",":
        scale, j = scale + 1, j - 1
    x /= 1000**scale
    sci = next((i for i, (k, _) in enumerate(toks) if k == "sci"), None)
    if any(k == "/" for k, _ in toks):
        return _fraction(x, toks)
    end_mant = sci if sci is not None else len(toks)
    mant = toks[:end_mant]
    ip = [t for t in (mant[:point] if point is not None else mant)]
    dp = mant[point + 1 :] if point is not None else []
    n_dec = sum(1 for k, _ in dp if k in ("0", "#", "?"))
    exp_text = ""
    if sci is not None:
        n_int = sum(1 for k, _ in ip if k in ("0", "#", "?")) or 1
        if x == 0:
            e = 0
        else:
            e = int(math.floor(math.log10(x)))
            e -= (e % n_int) if n_int > 1 else 0
            m = float(_round(x / 10**e, n_dec))
            if m >= 10 ** (n_int if n_int > 1 else 1):
                e += n_int if n_int > 1 else 1
        x = x / 10**e if x else 0.0
        etoks = toks[sci + 1 :]
        n_e = sum(1 for k, _ in etoks if k in ("0", "#", "?"))
        es = str(abs(e)).rjust(n_e, "0")
        esign = "-" if e < 0 else ("+" if toks[sci][1][1] == "+" else "")
        exp_text = toks[sci][1][0] + esign + es + "".join(t for k, t in etoks if k == "lit")
    s = _round(x, n_dec)
    int_digits, _, dec_digits = s.partition(".")
    int_digits = int_digits.lstrip("0")
    grouping = any(k == "," for k, _ in ip[: max(len(ip) - scale, 0)]) and sci is None
    # integer part: fill placeholders right to left
    slots = [i for i, (k, _) in enumerate(ip) if k in ("0", "#", "?")]
    chars = [t if k == "lit" else ("" if k in (",",) else t) for k, t in ip]
    digits = list(int_digits)
    for n, i in enumerate(reversed(slots)):
        if digits:
            chars[i] = digits.pop()
        else:
            chars[i] = {"0": "0", "#": "", "?": " "}[ip[i][0]]
        if n == len(slots) - 1 and digits:
            chars[i] = "".join(digits) + chars[i]
            digits = []
    if not slots:
        chars.append(int_digits)
    if grouping:
        # regroup the digits of the integer part
        body = "".join(c for i, c in enumerate(chars) if i in slots)
        lead = len(body) - len(body.lstrip(" "))
        core = body.strip(" ")
        if core:
            grouped = f"{int(core):,}"
            first = slots[0]
            for i in slots:
                chars[i] = ""
            chars[first] = " " * lead + grouped
    out = "".join(chars)
    if point is not None:
        dec = list(dec_digits)
        dchars = []
        kinds = [k for k, _ in dp if k in ("0", "#", "?")]
        # '#' drops trailing zeros, '?' shows them as spaces
        keep = len(dec)
        while keep > 0 and dec[keep - 1] == "0" and kinds[keep - 1] != "0":
            keep -= 1
        n = 0
        for k, t in dp:
            if k in ("0", "#", "?"):
                if n < keep:
                    dchars.append(dec[n])
                elif k == "?":
                    dchars.append(" ")
                n += 1
            elif k == "lit":
                dchars.append(t)
            elif k == "%":
                dchars.append("%")
        out += "." + "".join(dchars)
    return out + exp_text + ("" if sci is not None else "")


def _fraction(x: float, toks: list) -> str:
    slash = next(i for i, (k, _) in enumerate(toks) if k == "/")
    den_toks = toks[slash + 1 :]
    den_text = "".join(t for k, t in den_toks if k in ("0", "#", "?") or t.isdigit())
    fixed = int(den_text) if den_text.isdigit() and not any(
        k in ("#", "?") for k, _ in den_toks) else None  # fmt: skip
    # an integer part is shown when placeholders stand before the numerator, apart from it
    pre = toks[:slash]
    groups = []
    for i, (k, _t) in enumerate(pre):
        if k in ("0", "#", "?"):
            if groups and groups[-1][-1] == i - 1:
                groups[-1].append(i)
            else:
                groups.append([i])
    whole = int(x) if len(groups) >= 2 else 0
    frac = x - whole
    if fixed:
        num, den = int(Decimal(repr(frac * fixed)).quantize(Decimal(1), ROUND_HALF_UP)), fixed
    else:
        width = sum(1 for k, _ in den_toks if k in ("0", "#", "?")) or 1
        best = (abs(frac), 0, 1)
        for d in range(1, 10**width):
            n = round(frac * d)
            err = abs(frac - n / d)
            if err < best[0] - 1e-15:
                best = (err, n, d)
        _, num, den = best
    if num == den and len(groups) >= 2:
        whole, num = whole + 1, 0
    if len(groups) >= 2:
        w = str(whole) if whole else ""
        if num == 0:
            return (w or "0") + " " * (len(den_text) + 2)
        return f"{w} {num}/{den}".strip() if w else f"{num}/{den}"
    return f"{num}/{den}"


def _date(x: float, toks: list) -> str:
    # fractional seconds shown when ".0" follows seconds
    frac_digits = 0
    for i, (k, _t) in enumerate(toks):
        if k == "." and i + 1 < len(toks) and toks[i + 1][0] == "0":
            j = i + 1
            while j < len(toks) and toks[j][0] == "0":
                j += 1
            frac_digits = j - i - 1
    unit = 86400 * 10**frac_digits
    total = int(Decimal(repr(x * unit)).quantize(Decimal(1), ROUND_HALF_UP))
    days, rest = divmod(total, unit)
    secs, sub = divmod(rest, 10**frac_digits)
    hh, mm, ss = secs // 3600, secs // 60 % 60, secs % 60
    if days == 60:
        y, mo, d, wd = 1900, 2, 29, 2  # Excel's 1900-02-29 (a Wednesday in its count)
    elif days == 0:
        y, mo, d, wd = 1900, 1, 0, 5
    else:
        base = _dt.date(1899, 12, 31) if days < 60 else _dt.date(1899, 12, 30)
        try:
            date = base + _dt.timedelta(days=days)
        except OverflowError:
            raise FormatError("date out of range") from None
        if date.year > 9999:
            raise FormatError("date out of range")
        y, mo, d = date.year, date.month, date.day
        wd = (days + 5) % 7  # Monday = 0; Excel counts 1900-01-01 (serial 1) as a Sunday
    twelve = any(k in ("ampm", "ap") for k, _ in toks)
    out = []
    kinds = [k for k, _ in toks]
    for i, (k, t) in enumerate(toks):
        n = len(t)
        if k == "y":
            out.append(str(y)[-2:] if n <= 2 else str(y))
        elif k == "m":
            prev = next((kinds[j] for j in range(i - 1, -1, -1) if kinds[j] in _DATE_CODES), "")
            nxt = next((kinds[j] for j in range(i + 1, len(kinds)) if kinds[j] in _DATE_CODES), "")
            if n <= 2 and (prev in ("h", "elapsed") or nxt == "s"):
                out.append(f"{mm:02d}" if n == 2 else str(mm))
            elif n == 1:
                out.append(str(mo))
            elif n == 2:
                out.append(f"{mo:02d}")
            elif n == 3:
                out.append(_MONTHS[mo - 1][:3])
            elif n == 5:
                out.append(_MONTHS[mo - 1][0])
            else:
                out.append(_MONTHS[mo - 1])
        elif k == "d":
            if n == 1:
                out.append(str(d))
            elif n == 2:
                out.append(f"{d:02d}")
            elif n == 3:
                out.append(_DAYS[wd][:3])
            else:
                out.append(_DAYS[wd])
        elif k == "h":
            h = hh % 12 or 12 if twelve else hh
            out.append(f"{h:02d}" if n >= 2 else str(h))
        elif k == "s":
            out.append(f"{ss:02d}" if n >= 2 else str(ss))
        elif k == "elapsed":
            c = t[0]
            v = {"h": days * 24 + hh, "m": (days * 24 + hh) * 60 + mm,
                 "s": ((days * 24 + hh) * 60 + mm) * 60 + ss}[c]  # fmt: skip
            out.append(str(v).rjust(len(t), "0"))
        elif k == "ampm":
            out.append("AM" if hh < 12 else "PM")
        elif k == "ap":
            out.append(("A" if hh < 12 else "P") if t[0].isupper() else ("a" if hh < 12 else "p"))
        elif k == "." and frac_digits and i + 1 < len(toks) and toks[i + 1][0] == "0":
            out.append("." + str(sub).rjust(frac_digits, "0"))
        elif k == "0" and frac_digits:
            continue
        elif k == "e":
            out.append(str(y))
        elif k == "general":
            out.append(general(x))
        else:
            out.append(t)
    return "".join(out)
