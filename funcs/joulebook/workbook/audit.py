"""The checker's audit: every joulebook cell of a workbook, explained and re-derived.

For each cell that calls a joulebook function: where it is and what it is called (the
nearest label, defined names), its formula, every input resolved to its value with its unit
and where it came from, the result with its unit, the model behind it, the equation with the
numbers substituted, the recomputed and the saved value, and the flags a checker cares about.
Rendered as one self-contained HTML file (no network, everything from the workbook escaped).
"""

from __future__ import annotations

import datetime as _dt
import html
import io
import math
import re
from dataclasses import dataclass, field

import numpy as np

from .. import __version__
from ..catalog import Func, lookup
from ..errors import JoulebookError
from ..units import parse_phrase, parse_unit, unit_system
from .check import Row, compare, fmt, summary
from .engine import Engine
from .reader import Book, Cell, col_letters
from .refs import calls_ours, cell_refs, col_number, our_name, parse_ref, texts, tokens

__all__ = ["Entry", "Audit", "build_audit", "render_html", "CAUTION"]

CAUTION = (
    "Results are engineering estimates. Pressure equipment, trapped liquid and stored energy "
    "are governed by the applicable codes and standards and by the judgement of a competent, "
    "licensed engineer; this report supports a check, it does not replace one."
)


@dataclass
class Input:
    name: str
    value: object
    unit: str
    source: str


@dataclass
class Entry:
    sheet: str
    cell: str
    label: str
    formula: str
    function: str
    inputs: list[Input]
    result: object
    result_unit: str
    model: str
    equation: str
    row: Row | None
    flags: list[str] = field(default_factory=list)
    figure: str = ""  # inline SVG


@dataclass
class Audit:
    book: Book
    entries: list[Entry]
    rows: list[Row]
    summary: dict
    caution: bool
    generated: str
    library: str


# ---------------------------------------------------------------------------------------
# labels and arguments


def _label(book: Book, sheet: str, row: int, col: int) -> str:
    for c in range(col - 1, max(0, col - 6), -1):
        cell = book.cells.get((sheet, row, c))
        if cell and cell.formula is None and isinstance(cell.cached, str) and cell.cached.strip():
            return cell.cached.strip()
    for r in range(row - 1, max(0, row - 4), -1):
        cell = book.cells.get((sheet, r, col))
        if cell and cell.formula is None and isinstance(cell.cached, str) and cell.cached.strip():
            return cell.cached.strip()
    return ""


def _names_for(book: Book, sheet: str, ref: str) -> list[str]:
    out = []
    for name, target in book.names.items():
        t = target.replace("$", "").replace("'", "")
        if t.upper() in (f"{sheet}!{ref}".upper(),):
            out.append(name)
    return out


def _split_call(formula: str) -> tuple[str, list[str]] | None:
    """The first joulebook call in *formula*: (name, [argument texts])."""
    from .refs import tokenizer  # openpyxl's, without its workbook model (0.1 s)

    try:
        items = tokenizer()("=" + formula).items
    except Exception:
        return None
    for i, tok in enumerate(items):
        if tok.type == "FUNC" and tok.subtype == "OPEN":
            name = our_name(tok.value.replace(" ", ""))
            if not name:
                continue
            args, cur, depth = [], [], 0
            for t in items[i + 1 :]:
                if t.type == "FUNC" and t.subtype == "OPEN":
                    depth += 1
                elif t.type == "FUNC" and t.subtype == "CLOSE":
                    if depth == 0:
                        args.append("".join(cur).strip())
                        return name, [a for a in args] if any(args) else []
                    depth -= 1
                elif t.type == "SEP" and t.subtype == "ARG" and depth == 0:
                    args.append("".join(cur).strip())
                    cur = []
                    continue
                cur.append(t.value)
            return name, args
    return None


def _one_ref(text: str):
    """The reference *text* is, when it is one reference and nothing else."""
    try:
        toks = [t for t in tokens(text) if t[1] != "WHITE-SPACE"]
    except Exception:
        return None
    if len(toks) != 1 or toks[0][1:] != ("OPERAND", "RANGE"):
        return None
    return parse_ref(toks[0][0])


def _resolve_arg(text: str, here: Cell, book: Book, values: dict, engine: Engine):
    """(value, source) of one argument text."""
    if text == "":
        return None, "omitted"
    if text.startswith('"') and text.endswith('"'):
        return text[1:-1].replace('""', '"'), "constant"
    try:
        return float(text), "constant"
    except ValueError:
        pass
    target, ref = None, _one_ref(text)
    if ref is not None and ref.kind == "name" and ref.text.upper() in book.names:
        ref = _one_ref(book.names[ref.text.upper()].lstrip("="))
    if ref is not None and ref.kind == "cell" and ref.book is None and not ref.sheet2:
        target = (ref.sheet or here.sheet, ref.r1, ref.c1)
    if target is not None:
        v = values.get(target)
        src_cell = book.cells.get(target)
        kind = "formula" if src_cell is not None and src_cell.formula else "cell"
        lab = _label(book, *target)
        where = f"{target[0]}!{col_letters(target[2])}{target[1]}"
        return v, f"{kind} {where}" + (f" ({lab})" if lab else "")
    if ref is not None and ref.kind == "area":
        try:
            v = engine.evaluate(here.sheet, here.row, here.col, text, values)
        except Exception:
            return None, f"range {text}"
        arr = np.asarray(v, dtype=object)
        nums = [
            float(x)
            for x in arr.reshape(-1)
            if isinstance(x, (int, float)) and not isinstance(x, bool)
        ]
        return (nums or None), f"range {text}"
    try:
        v = engine.evaluate(here.sheet, here.row, here.col, text, values)
    except Exception:  # an argument the engine cannot evaluate on its own: show its text
        return None, f"expression {text}"
    return (v if not isinstance(v, np.ndarray) else None), f"expression {text}"


# ---------------------------------------------------------------------------------------
# units, models, equations


def _units_of(f: Func, argvals: dict, system_text) -> tuple[dict, str]:
    """Unit text of every bound argument, and of the result."""
    try:
        system = unit_system(system_text if isinstance(system_text, str) else None)
    except JoulebookError:
        system = unit_system(None)
    units: dict[str, str] = {}
    phrase_units: dict[str, str] = {}
    for a in f.all_args:
        v = argvals.get(a.name)
        if a.quantity:
            units[a.name] = system.unit(a.quantity) or "—"
        elif a.type == "text" and isinstance(v, str) and " in " in v:
            phrase_units[a.name] = v.split(" in ", 1)[1].strip()
    pairs = {"value1": "spec1", "value2": "spec2", "value": "given", "end_value": "end_spec"}
    for val_arg, spec_arg in pairs.items():
        if spec_arg in argvals:
            spec = argvals.get(spec_arg)
            if isinstance(spec, str):
                sym = spec.split(" in ", 1)[0].strip()
                units[val_arg] = phrase_units.get(spec_arg) or _default_unit(sym, system)
    if f.result == "asked":
        want = argvals.get("want")
        res = phrase_units.get("want") or (
            _default_unit(str(want).strip(), system) if isinstance(want, str) else ""
        )
    elif f.result in ("text", "number"):
        res = ""
    else:
        res = system.unit(f.result)
    return units, res


def _default_unit(sym: str, system) -> str:
    try:
        return parse_phrase(sym, system).unit
    except JoulebookError:
        return ""


def _model(f: Func, argvals: dict) -> str:
    from ..media import medium
    from ..states import is_state_text, parse_state
    from ..substances import solids

    try:
        if f.family in ("state", "process", "stored") or f.name == "JB_WORK_PATH":
            sub = argvals.get("substance") or argvals.get("state1") or argvals.get("state")
            if isinstance(sub, str):
                med = parse_state(sub).medium if is_state_text(sub) else medium(sub)
                return med.model
        if f.family == "gas" or "gas" in [a.name for a in f.args]:
            g = argvals.get("gas")
            if isinstance(g, str):
                return medium(g if "|" in g else f"{g} (ideal gas)").model
        if f.family == "solid":
            m = argvals.get("material")
            if isinstance(m, str):
                mat = solids.material(m)
                return f"incompressible {mat.name}: {mat.source}"
    except JoulebookError as e:
        return f"(model not resolved: {e.message})"
    return "closed-form relation (no property model)"


def _n(x) -> str:
    return fmt(x) if isinstance(x, (int, float)) else str(x)


def _shown(v) -> str:
    """A value for the inputs table (a range as its count and extremes)."""
    if isinstance(v, list):
        return f"{len(v)} values, {fmt(min(v))} … {fmt(max(v))}" if v else "no numbers"
    return fmt(v)


def _equation(f: Func, argvals: dict, units: dict, result, res_unit: str) -> str:
    """The equation with the numbers substituted, where the closed form is short."""
    a = argvals
    r = _n(result) if isinstance(result, str) else f"{_n(result)} {res_unit}".strip()
    try:
        if f.name == "JB_WORK_ISOBARIC":
            return f"W = P·(V2 − V1) = {_n(a['P'])}·({_n(a['V_2'])} − {_n(a['V_1'])}) = {r}"
        if f.name == "JB_WORK_LINEAR":
            return f"W = (P1 + P2)/2·(V2 − V1) = ({_n(a['P_1'])} + {_n(a['P_2'])})/2·({_n(a['V_2'])} − {_n(a['V_1'])}) = {r}"
        if f.name == "JB_WORK_ISOTHERMAL":
            return f"W = P1·V1·ln(V2/V1) = {_n(a['P_1'])}·{_n(a['V_1'])}·ln({_n(a['V_2'])}/{_n(a['V_1'])}) = {r}"
        if f.name == "JB_WORK_POLYTROPIC":
            n = math.log(a["P_2"] / a["P_1"]) / math.log(a["V_1"] / a["V_2"])
            return (
                f"n = ln(P2/P1)/ln(V1/V2) = {n:.4g}; W = (P2·V2 − P1·V1)/(1 − n) = "
                f"({_n(a['P_2'])}·{_n(a['V_2'])} − {_n(a['P_1'])}·{_n(a['V_1'])})/(1 − {n:.4g}) = {r}"
            )
        if f.name == "JB_WORK_POLYTROPIC_N":
            P2 = a["P_1"] * (a["V_1"] / a["V_2"]) ** a["n"]
            return (
                f"P2 = P1·(V1/V2)^n = {P2:.6g}; W = (P2·V2 − P1·V1)/(1 − n) = "
                f"({P2:.6g}·{_n(a['V_2'])} − {_n(a['P_1'])}·{_n(a['V_1'])})/(1 − {_n(a['n'])}) = {r}"
            )
        if f.name == "JB_POLY_EXPONENT":
            return f"n = ln(P2/P1)/ln(V1/V2) = ln({_n(a['P_2'])}/{_n(a['P_1'])})/ln({_n(a['V_1'])}/{_n(a['V_2'])}) = {r}"
        if f.name == "JB_BALANCE_HEAT":
            parts = [f"{_n(a.get(k) or 0)}" for k in ("dU", "dKE", "dPE", "W_b", "W_other")]
            return f"Q = ΔU + ΔKE + ΔPE + W_b + W_other = {' + '.join(parts)} = {r}"
        if f.name == "JB_BALANCE_GAP":
            return (
                f"gap = Q − W_b − W_other − (ΔU + ΔKE + ΔPE) = {_n(a['Q'])} − {_n(a['W_b'])} − "
                f"{_n(a.get('W_other') or 0)} − ({_n(a['dU'])} + {_n(a.get('dKE') or 0)} + {_n(a.get('dPE') or 0)}) = {r}"
            )
        if f.name == "JB_SOLID_HEAT":
            return f"Q = m·∫c dT = {_n(a['m'])}·∫c dT from {_n(a['T_1'])} to {_n(a['T_2'])} {units.get('T_1', '')} = {r}"
    except (KeyError, TypeError, ValueError, ZeroDivisionError):
        pass
    return f"{f.equation}; result = {r}"


# ---------------------------------------------------------------------------------------
# flags


def _flags(
    f: Func, argvals: dict, units: dict, inputs: list[Input], result, row: Row | None, unit_text
) -> list[str]:
    out = []
    if row is not None and row.status == "differs":
        out.append(
            f"saved value {fmt(row.cached)} differs from the recomputed {fmt(row.recomputed)}: the workbook was not recalculated, or its inputs changed"
        )
    if row is not None and row.status == "no cached value":
        out.append("no saved value in the file: open and recalculate before sending it out")
    if isinstance(result, str) and result.startswith("OutOfRange:"):
        out.append(
            "outside the model's range: joulebook refused to extrapolate (" + result[12:120] + ")"
        )
    elif isinstance(result, str) and result.split(":", 1)[0] in (
        "BadInput",
        "NoConvergence",
        "InternalError",
    ):
        out.append("the formula returns an error: " + result[:140])
    for inp in inputs:
        u = (inp.unit or "").strip()
        if (
            isinstance(inp.value, float)
            and u in ("K", "R", "degR")
            and inp.value < 200
            and _is_temperature(f, inp.name, argvals)
        ):
            out.append(
                f"{inp.name} = {fmt(inp.value)} {u}: a temperature under 200 {u} looks like a °C or °F value fed as absolute"
            )
    n = None
    if f.name in ("JB_POLY_EXPONENT",) and isinstance(result, float):
        n = result
    elif f.name == "JB_POLY_FIT" and isinstance(result, float):
        n = result
    path = argvals.get("path")
    if isinstance(path, str) and path.strip().lower().startswith("polytropic"):
        m = re.search(r"n\s*=\s*([-+0-9.eE]+)", path)
        if m:
            n = float(m.group(1))
    if n is not None and not 1.0 <= n <= 1.67:
        out.append(
            f"polytropic n = {n:.4g} lies outside the usual 1–1.67 band of gas compression and expansion"
        )
    if f.name == "JB_BALANCE_GAP" and isinstance(result, float):
        scale = max(
            abs(x)
            for x in (
                argvals.get("Q") or 0,
                argvals.get("W_b") or 0,
                argvals.get("dU") or 0,
                1e-300,
            )
        )
        if abs(result) > 1e-6 * scale:
            out.append(
                f"the first-law balance does not close: Q − W − ΔE = {fmt(result)} (check signs: heat in +, work by the system +)"
            )
    if not any(
        inp.name in ("substance", "state1", "state") and inp.source.startswith("formula ")
        for inp in inputs
    ):
        out += _state_flags(f, argvals)  # a state that comes from another cell was flagged there
    return out


_GAUGE_WORDS = ("gauge", "gage", "barg", "psig", "kpag", "mpag", "(g)")
_GAUGE_UNITS = re.compile(r"\b(kPag|barg|psig|MPag|Pag)\b", re.IGNORECASE)


def _gauge_refs(book: Book, c: Cell, formula: str) -> list[str]:
    """Cells labelled as gauge pressures that the formula reads with no gauge unit anywhere."""
    if any(_GAUGE_UNITS.search(t) for t in texts(formula)):
        return []
    out = []
    for key in cell_refs(formula, c.sheet):
        lab = _label(book, *key).lower()
        if any(w in lab for w in _GAUGE_WORDS):
            where = f"{key[0]}!{col_letters(key[2])}{key[1]}"
            out.append(
                f"{where} is labelled as a gauge pressure but this formula reads it with an"
                " absolute unit; use barg/psig/kPag"
            )
    return out


def _is_quantity(f: Func, name: str, argvals: dict, kind: str, symbol: str) -> bool:
    """Is argument *name* a *kind* quantity (directly, or through its spec phrase)?"""
    for a in f.all_args:
        if a.name == name and a.quantity == kind:
            return True
    spec = {"value1": "spec1", "value2": "spec2", "value": "given", "end_value": "end_spec"}.get(
        name
    )
    s = argvals.get(spec) if spec else None
    return isinstance(s, str) and s.strip().startswith(symbol)


def _is_temperature(f: Func, name: str, argvals: dict) -> bool:
    return _is_quantity(f, name, argvals, "temperature", "T")


def _state_flags(f: Func, argvals: dict) -> list[str]:
    """Two-phase, near-critical and near-saturation states of the real fluid involved."""
    from ..states import is_state_text, make_state, parse_state

    try:
        sub = argvals.get("state1") or argvals.get("state") or argvals.get("substance")
        if not isinstance(sub, str):
            return []
        if is_state_text(sub):
            st = parse_state(sub)
        elif all(
            isinstance(argvals.get(k), (str, float)) for k in ("spec1", "value1", "spec2", "value2")
        ):
            st = make_state(
                sub,
                argvals["spec1"],
                argvals["value1"],
                argvals["spec2"],
                argvals["value2"],
                unit_system(None),
            )
        else:
            return []
        med = st.medium
        if med.ideal:
            return []
        a, va, b, vb = st.si()
        p = med.point(a, va, b, vb, st.shows())
        info = med.info
    except (JoulebookError, ValueError, KeyError):
        return []
    out = []
    if p.x is not None and 0.0 < p.x < 1.0:
        out.append(
            f"two-phase state (x = {p.x:.4g}): T and P are tied; check the quality where it matters"
        )
    if abs(p.T / info.T_crit - 1) < 0.02 and abs(p.P / info.P_crit - 1) < 0.05:
        out.append(
            "state within 2 % of the critical temperature and 5 % of the critical pressure: properties change steeply here"
        )
    elif p.x is None and info.pure and info.T_triple <= p.T < info.T_crit:
        from ..substances.fluids import _psat

        ps = _psat(info, p.T)
        if abs(p.P / ps - 1) < 0.01:
            out.append(
                "state within 1 % of the saturation pressure: a small change of T or P changes the phase"
            )
    return out


# ---------------------------------------------------------------------------------------
# figures


def _svg(fig) -> str:
    buf = io.StringIO()
    fig.savefig(buf, format="svg", bbox_inches="tight")
    text = buf.getvalue()
    text = re.sub(r"<metadata>.*?</metadata>", "", text, flags=re.DOTALL)  # no dates or URIs
    return text[text.index("<svg") :]


_FIGURED = frozenset(
    {
        "JB_PROCESS",
        "JB_PROCESS_TABLE",
        "JB_WORK_PATH",
        "JB_WORK_PV",
        "JB_WORK_ISOBARIC",
        "JB_WORK_LINEAR",
        "JB_WORK_POLYTROPIC",
        "JB_WORK_POLYTROPIC_N",
        "JB_WORK_ISOTHERMAL",
    }
)
_DRAWN: dict = {}  # one figure per distinct path (function, arguments, units)


def _figure(f: Func, argvals: dict, units: dict | None = None) -> str:
    """P–V (and T–s for real fluids) of a process entry, as inline SVG, drawn once per
    distinct path; matplotlib is imported only when a figure is drawn."""
    if f.name not in _FIGURED:
        return ""
    key = repr((f.name, sorted(argvals.items()), sorted((units or {}).items())))
    if key not in _DRAWN:
        if len(_DRAWN) > 256:
            _DRAWN.clear()
        _DRAWN[key] = _draw(f, argvals, units)
    return _DRAWN[key]


def _draw(f: Func, argvals: dict, units: dict | None = None) -> str:
    try:
        import matplotlib

        matplotlib.use("Agg")
        matplotlib.rcParams["svg.fonttype"] = "none"
        from matplotlib.figure import Figure  # not pyplot: no window machinery to import

        class plt:  # noqa: N801 - the two calls of pyplot used here, on a bare Figure
            @staticmethod
            def subplots(nrows=1, ncols=1, figsize=None):
                fig = Figure(figsize=figsize)
                return fig, fig.subplots(nrows, ncols)

        import numpy as np
    except ImportError:  # pragma: no cover
        return ""
    a = argvals
    try:
        if f.name in ("JB_PROCESS", "JB_PROCESS_TABLE", "JB_WORK_PATH"):
            from ..formulas import _solved
            from ..processes.solve import path_points

            system = unit_system(a.get("units") if isinstance(a.get("units"), str) else None)
            mass = a.get("mass")
            m_si = None if mass is None else system.conv("mass").to_si(mass)
            med, res = _solved(a["state1"], a["path"], a["end_spec"], a["end_value"], m_si, system)
            pts = path_points(med, res, 41)
            V = np.array([res.m * p.v for p in pts])
            P = np.array([p.P for p in pts]) / 1e3
            T = np.array([p.T for p in pts])
            s = np.array([p.s for p in pts]) / 1e3
            fig, axes = plt.subplots(
                1, 1 if med.ideal else 2, figsize=(7.2 if not med.ideal else 3.8, 2.8)
            )
            ax = axes if med.ideal else axes[0]
            _pv(ax, V, P)
            if not med.ideal:
                _ts(axes[1], med, T, s)
            fig.tight_layout()
            return _svg(fig)
        if (
            f.name == "JB_WORK_PV"
            and isinstance(a.get("P_values"), list)
            and isinstance(a.get("V_values"), list)
        ):
            P, V = np.array(a["P_values"]), np.array(a["V_values"])
            if len(P) == len(V) >= 2:
                fig, ax = plt.subplots(figsize=(3.8, 2.8))
                u = units or {}
                ax.plot(V, P, "o-", color="#1d5c7a", ms=3, lw=1.4)
                ax.fill(V, P, color="#8fc1d4", alpha=0.45, lw=0)
                ax.set_xlabel(f"V [{u.get('V_values', '?')}]")
                ax.set_ylabel(f"P [{u.get('P_values', '?')}]")
                ax.set_title("measured P–V points; enclosed area = net work", fontsize=8)
                ax.grid(alpha=0.3)
                return _svg(fig)
        if f.name in (
            "JB_WORK_ISOBARIC",
            "JB_WORK_LINEAR",
            "JB_WORK_POLYTROPIC",
            "JB_WORK_POLYTROPIC_N",
            "JB_WORK_ISOTHERMAL",
        ):
            V1, V2 = a["V_1"], a["V_2"]
            V = np.linspace(V1, V2, 60)
            if f.name == "JB_WORK_ISOBARIC":
                P = np.full_like(V, a["P"])
            elif f.name == "JB_WORK_LINEAR":
                P = a["P_1"] + (a["P_2"] - a["P_1"]) * (V - V1) / (V2 - V1)
            elif f.name == "JB_WORK_ISOTHERMAL":
                P = a["P_1"] * V1 / V
            else:
                n = (
                    a["n"]
                    if f.name == "JB_WORK_POLYTROPIC_N"
                    else math.log(a["P_2"] / a["P_1"]) / math.log(V1 / V2)
                )
                P = a["P_1"] * (V1 / V) ** n
            fig, ax = plt.subplots(figsize=(3.8, 2.8))
            u = units or {}
            _pv(ax, V, P, units=(u.get("V_1", "?"), u.get("P_1") or u.get("P", "?")))
            return _svg(fig)
    except (JoulebookError, KeyError, TypeError, ValueError, ZeroDivisionError):
        return ""
    return ""


def _pv(ax, V, P, units=("m³", "kPa")) -> None:
    ax.plot(V, P, color="#1d5c7a", lw=1.8)
    ax.fill_between(V, 0, P, color="#8fc1d4", alpha=0.45, lw=0)
    ax.annotate(
        "",
        xy=(V[-1], P[-1]),
        xytext=(V[-2], P[-2]),
        arrowprops=dict(arrowstyle="->", color="#1d5c7a"),
    )
    ax.set_xlabel(f"V [{units[0]}]")
    ax.set_ylabel(f"P [{units[1]}]")
    ax.set_title("P–V path; shaded area = boundary work", fontsize=8)
    ax.set_ylim(bottom=0)
    ax.grid(alpha=0.3)


def _ts(ax, med, T, s) -> None:
    import numpy as np

    from ..substances.fluids import saturation

    info = med.info
    Ts = np.linspace(
        info.T_triple * 1.001 if info.T_triple > 0 else info.T_min, info.T_crit * 0.9999, 80
    )
    try:
        sf = [saturation(info.name, "T", t, "sf") / 1e3 for t in Ts]
        sg = [saturation(info.name, "T", t, "sg") / 1e3 for t in Ts]
        ax.plot(sf + sg[::-1], list(Ts) + list(Ts[::-1]), color="#999", lw=1)
    except JoulebookError:
        pass
    ax.plot(s, T, color="#a3432b", lw=1.8)
    ax.set_xlabel("s [kJ/(kg·K)]")
    ax.set_ylabel("T [K]")
    ax.set_title("T–s path with saturation dome", fontsize=8)
    ax.grid(alpha=0.3)


# ---------------------------------------------------------------------------------------
# building the audit


def build_audit(
    book: Book,
    outcomes: dict | None = None,
    rtol: float = 1e-9,
    atol: float = 1e-12,
    figures: bool = True,
    progress=None,
) -> Audit:
    engine = Engine(book)
    outcomes = outcomes if outcomes is not None else engine.run()
    rows = compare(book, outcomes, rtol, atol)
    by_cell = {(r.sheet, r.cell): r for r in rows}
    values = {k: c.cached for k, c in book.cells.items() if c.formula is None and c.has_cached}
    values.update({k: o.value for k, o in outcomes.items()})
    order = {s: i for i, s in enumerate(book.sheets)}
    ours = sorted(
        (c for c in book.formula_cells() if calls_ours(c.formula)),
        key=lambda c: (order.get(c.sheet, 0), c.row, c.col),
    )
    entries = []
    unit_of_cell: dict[tuple[str, int, int], str] = {}
    for i, c in enumerate(ours):
        call = _split_call(c.formula)
        if call is None:
            continue
        name, args = call
        try:
            f = lookup(name)
        except JoulebookError:
            continue
        argvals, inputs, sources = {}, [], {}
        for a, text in zip(f.all_args, args + [""] * (len(f.all_args) - len(args))):
            v, src = _resolve_arg(text, c, book, values, engine)
            argvals[a.name] = v
            sources[a.name] = src
        unit_text = argvals.get("units")
        units, res_unit = _units_of(f, argvals, unit_text)
        for a in f.all_args:
            if sources[a.name] == "omitted" and a.optional:
                continue
            inputs.append(
                Input(a.name, argvals.get(a.name), units.get(a.name, ""), sources[a.name])
            )
        key = (c.sheet, c.row, c.col)
        result = outcomes[key].value if key in outcomes else None
        row = by_cell.get((c.sheet, c.ref))
        flags = _flags(f, argvals, units, inputs, result, row, unit_text)
        for g in _gauge_refs(book, c, c.formula):
            if g not in flags and not any(g.split(" ")[0] in x for x in flags):
                flags.append(g)
        why = outcomes[key].message if key in outcomes else ""
        if why and isinstance(result, tuple):  # an error value (JB_ERRORS "values"): say why
            flags.insert(0, f"the cell shows {result[1]}: {why}")
        unit_of_cell[key] = str(unit_text or "K-kPa-kJ").strip()
        label = _label(book, c.sheet, c.row, c.col)
        names = _names_for(book, c.sheet, c.ref)
        if names:
            label = (label + " · " if label else "") + "name: " + ", ".join(names)
        entry = Entry(
            c.sheet,
            c.ref,
            label,
            c.raw_formula or c.formula,
            f.name,
            inputs,
            result,
            res_unit,
            _model(f, argvals),
            _equation(f, argvals, units, result, res_unit),
            row,
            flags,
            _figure(f, argvals, units) if figures else "",
        )
        entry._key = key  # type: ignore[attr-defined]
        entry._refs = [s for s in sources.values() if s.startswith("formula ")]  # type: ignore[attr-defined]
        entries.append(entry)
        if progress:
            progress(i + 1, len(ours))
    _unit_consistency(entries, unit_of_cell)
    _hand_balances(book, values, entries)
    from ..substances.fluids import coolprop_version

    return Audit(
        book,
        entries,
        rows,
        summary(rows),
        caution=any(
            lookup(e.function).caution or lookup(e.function).family in ("process", "stored", "work")
            for e in entries
        ),
        generated=_dt.datetime.now(_dt.timezone.utc).strftime("%Y-%m-%d %H:%M UTC"),
        library=f"joulebook {__version__}; {coolprop_version()}",
    )


def _unit_consistency(entries: list[Entry], unit_of_cell: dict) -> None:
    """Flag a joulebook cell that reads another joulebook cell's result in another unit."""
    by_key = {e._key: e for e in entries if hasattr(e, "_key")}  # type: ignore[attr-defined]
    for e in entries:
        if not hasattr(e, "_key"):
            continue
        for inp in e.inputs:
            m = re.match(r"formula (.+?)!([A-Z]+)(\d+)", inp.source)
            if not m:
                continue
            src = by_key.get((m.group(1), int(m.group(3)), col_number(m.group(2))))
            if (
                src is None
                or not src.result_unit
                or not inp.unit
                or not isinstance(src.result, float)
            ):
                continue
            if _norm_unit(src.result_unit) != _norm_unit(inp.unit):
                e.flags.append(
                    f"{inp.name} reads {m.group(1)}!{m.group(2)}{m.group(3)}, a result in {src.result_unit}, "
                    f"as {inp.unit}: the unit systems of the two cells disagree"
                )


def _norm_unit(u: str) -> tuple:
    for kind in (
        "temperature",
        "pressure",
        "energy",
        "specific_energy",
        "volume",
        "mass",
        "specific_entropy",
        "specific_volume",
    ):
        try:
            c = parse_unit(u, kind)
            return kind, round(c.factor, 12), round(c.offset, 9)
        except JoulebookError:
            continue
    return ("?", u.strip())


_Q = re.compile(r"^\s*(q\b|heat\b)", re.IGNORECASE)
_DU = re.compile(r"(Δu|du\b|delta u|internal energy)", re.IGNORECASE)
_W = re.compile(r"(^\s*w\b|work)", re.IGNORECASE)


def _hand_balances(book: Book, values: dict, entries: list[Entry]) -> None:
    """A hand-typed heat cell (label Q / heat) built from a ΔU cell and a W cell must equal
    ΔU + W (heat in +, work by the system +); a sign slip there is flagged on the ΔU entry's
    sheet as an extra entry."""
    for c in book.formula_cells():
        if calls_ours(c.formula):
            continue
        label = _label(book, c.sheet, c.row, c.col)
        if not _Q.search(label):
            continue
        du = w = None
        for key in cell_refs(c.formula, c.sheet):
            lab = _label(book, *key)
            v = values.get(key)
            if isinstance(v, float) and _DU.search(lab):
                du = v
            elif isinstance(v, float) and _W.search(lab):
                w = v
        q = values.get((c.sheet, c.row, c.col))
        if du is None or w is None or not isinstance(q, float):
            continue
        if abs(q - (du + w)) > 1e-9 * max(abs(du), abs(w), 1e-300):
            entries.append(
                Entry(
                    c.sheet,
                    c.ref,
                    label,
                    c.raw_formula or c.formula,
                    "(hand-typed first law)",
                    [],
                    q,
                    "",
                    "first law of a closed system",
                    f"expected Q = ΔU + W = {fmt(du)} + {fmt(w)} = {fmt(du + w)}",
                    None,
                    [
                        f"hand-typed heat {fmt(q)} ≠ ΔU + W = {fmt(du + w)}: a sign slip? (heat in +, work by the system +)"
                    ],
                )
            )


def audit_rows(a: Audit) -> list[list[object]]:
    """The audit as rows of a worksheet (header first)."""
    rows: list[list[object]] = [
        ["joulebook audit", a.book.path.name, a.library, a.generated, "SHA-256 " + a.book.sha256],
        [CAUTION],
        [],
        [
            "sheet",
            "cell",
            "label",
            "formula",
            "result",
            "unit",
            "model",
            "equation",
            "status",
            "flags",
        ],
    ]
    for e in a.entries:
        result = e.result if isinstance(e.result, float) else fmt(e.result)
        rows.append(
            [
                e.sheet,
                e.cell,
                e.label,
                "=" + e.formula if e.formula else "",
                result,
                e.result_unit,
                e.model,
                e.equation,
                e.row.status if e.row else "not checked",
                " | ".join(e.flags),
            ]
        )
    return rows


# ---------------------------------------------------------------------------------------
# HTML

_CSS = """
@page { size: A4; margin: 14mm 12mm; }
body { font: 10.5pt/1.45 "DejaVu Sans", "Segoe UI", sans-serif; color: #1f2a30; margin: 0 auto; max-width: 190mm; }
h1 { font-size: 17pt; margin: 10px 0 2px; color: #123e52; }
h2 { font-size: 13pt; border-bottom: 2px solid #1d5c7a; padding-bottom: 2px; margin-top: 22px; color: #123e52; }
.meta { color: #55656d; font-size: 9pt; }
table { border-collapse: collapse; width: 100%; font-size: 9.5pt; }
th, td { border: 1px solid #cfd8dc; padding: 3px 6px; text-align: left; vertical-align: top; }
th { background: #eef4f6; }
.caution { border-left: 5px solid #c0392b; background: #fbeeec; padding: 8px 12px; margin: 12px 0; }
.entry { border: 1px solid #cfd8dc; border-radius: 4px; padding: 8px 10px; margin: 10px 0; page-break-inside: avoid; }
.entry h3 { font-size: 11pt; margin: 0 0 4px; }
code, .formula { font-family: "DejaVu Sans Mono", Consolas, monospace; font-size: 9pt; word-break: break-all; }
.badge { display: inline-block; padding: 0 6px; border-radius: 3px; font-size: 8.5pt; color: #fff; }
.pass { background: #2e7d4f; } .differs, .error, .circular, .unsupported { background: #c0392b; } .none { background: #8a6d1d; }
.flags { margin: 4px 0 0 0; padding-left: 18px; color: #8a3a1d; }
.eq { background: #f6f8f9; padding: 4px 6px; margin: 4px 0; }
.figure svg { max-width: 100%; height: auto; }
.counts td:first-child { width: 45%; }
"""


def _e(x) -> str:
    return html.escape(str(x), quote=True)


def _badge(row: Row | None) -> str:
    if row is None:
        return '<span class="badge none">not checked</span>'
    cls = {"pass": "pass", "no cached value": "none"}.get(row.status, row.status.split()[0])
    return f'<span class="badge {cls}">{_e(row.status)}</span>'


def render_html(a: Audit) -> str:
    s = a.summary
    flags = sum(len(e.flags) for e in a.entries)
    out = [
        "<!DOCTYPE html>",
        '<html lang="en"><head><meta charset="utf-8">',
        f"<title>Audit of {_e(a.book.path.name)}</title>",
        f"<style>{_CSS}</style></head><body>",
        f"<h1>Audit of {_e(a.book.path.name)}</h1>",
        f'<p class="meta">{_e(a.library)} · generated {_e(a.generated)} · input SHA-256 <code>{_e(a.book.sha256)}</code></p>',
        '<h2 id="summary">Summary</h2><table class="counts">',
        f"<tr><td>joulebook cells audited</td><td>{len([e for e in a.entries if e.row is not None])}</td></tr>",
        f"<tr><td>formula cells recalculated</td><td>{s.get('cells', 0)}</td></tr>",
        f"<tr><td>passes (recomputed = saved)</td><td>{s.get('pass', 0)}</td></tr>",
        f"<tr><td>differences</td><td>{s.get('differs', 0)}</td></tr>",
        f"<tr><td>no saved value</td><td>{s.get('no cached value', 0)}</td></tr>",
        f"<tr><td>errors (unsupported, circular, engine)</td><td>{s.get('unsupported', 0) + s.get('circular', 0) + s.get('error', 0)}</td></tr>",
        f"<tr><td>cells holding error values</td><td>{s.get('errors_in_values', 0)}</td></tr>",
        f"<tr><td>flags raised</td><td>{flags}</td></tr>",
        "</table>",
    ]
    if a.caution:
        out.append(f'<div class="caution"><strong>Caution.</strong> {_e(CAUTION)}</div>')
    sheets = []
    for e in a.entries:
        if e.sheet not in sheets:
            sheets.append(e.sheet)
    for sheet in sheets:
        out.append(f"<h2>Sheet {_e(sheet)}</h2>")
        for e in [x for x in a.entries if x.sheet == sheet]:
            out.append('<div class="entry">')
            out.append(
                f"<h3>{_e(e.sheet)}!{_e(e.cell)} {('— ' + _e(e.label)) if e.label else ''} {_badge(e.row)}</h3>"
            )
            out.append(f'<div class="formula">={_e(e.formula)}</div>')
            if e.inputs:
                out.append("<table><tr><th>input</th><th>value</th><th>unit</th><th>from</th></tr>")
                for i in e.inputs:
                    out.append(
                        f"<tr><td>{_e(i.name)}</td><td>{_e(_shown(i.value))}</td><td>{_e(i.unit)}</td><td>{_e(i.source)}</td></tr>"
                    )
                out.append("</table>")
            res = (
                fmt(e.result)
                if isinstance(e.result, str)
                else f"{fmt(e.result)} {e.result_unit}".strip()
            )
            out.append(f"<p><strong>Result:</strong> {_e(res)}")
            if e.row is not None and e.row.status == "pass":
                out.append(" · the value saved in the file matches")
            elif e.row is not None:
                out.append(
                    f" · recomputed {_e(fmt(e.row.recomputed))} · saved {_e(fmt(e.row.cached))}"
                )
            out.append("</p>")
            out.append(f"<p><strong>Model:</strong> {_e(e.model)}</p>")
            out.append(f'<div class="eq">{_e(e.equation)}</div>')
            if e.flags:
                out.append(
                    '<ul class="flags">' + "".join(f"<li>{_e(fl)}</li>" for fl in e.flags) + "</ul>"
                )
            if e.figure:
                out.append(f'<div class="figure">{e.figure}</div>')
            out.append("</div>")
    if not a.entries:
        out.append("<p>No cell of this workbook calls a joulebook function.</p>")
    out.append(
        f'<p class="meta">Sign convention: heat into the system +, work done by the system +. {_e(CAUTION)}</p>'
    )
    out.append("</body></html>")
    return "\n".join(out) + "\n"
