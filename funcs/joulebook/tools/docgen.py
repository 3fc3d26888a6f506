"""Generate docs/functions.md from the catalog (the function reference is never hand-kept)."""

from __future__ import annotations

from pathlib import Path

from joulebook.catalog import CATALOG, FAMILIES, Func
from joulebook.core.units import DEFAULT_SYSTEM, KIND_WORDS, unit_system

CAUTION = (
    "> **Caution.** Results are engineering estimates. Pressure equipment, trapped liquid and "
    "stored energy are governed by the applicable codes and standards and by the judgement of a "
    "competent, licensed engineer; joulebook does not replace either."
)


def _result_unit(f: Func) -> str:
    if f.result == "asked" and any(a.name == "want" for a in f.args):
        return "the unit written in the formula (`want`), else the default of the unit system"
    if f.result == "asked":
        return "a spilled table; each quantity in the unit system's unit, named beside it"
    if f.result in ("text", "number"):
        return f.result
    unit = unit_system(None).unit(f.result)
    return f"{KIND_WORDS[f.result]}, default `{unit or '—'}`"


def _example_text(f: Func) -> str:
    def lit(a):
        return f'"{a}"' if isinstance(a, str) else repr(a)

    call = f"={f.name}({', '.join(lit(a) for a in f.example.args)})"
    val = f.example.value
    shown = (
        f'"{val}…"'
        if f.example.match == "prefix"
        else (f'"{val}"' if isinstance(val, str) else repr(val))
    )
    return f"`{call}` → {shown}"


def functions_markdown() -> str:
    """The complete text of docs/functions.md."""
    out = [
        "# Worksheet function reference",
        "",
        "Generated from `funcs/joulebook/catalog/__init__.py` by `joulebook docs`; do not edit by hand.",
        "",
        f"Numbers without a written unit use the unit system in force: the optional last argument "
        f"`units` (default `{DEFAULT_SYSTEM}`). A scalar argument also accepts a range and the "
        "result then spills, one value per cell, in every function except these, whose "
        "scalar arguments take single cells: "
        + ", ".join(f"`{f.name}`" for f in CATALOG if not f.elementwise)
        + ". Signs follow docs/sign-convention.md: heat into the system is positive, work done "
        "by the system is positive.",
        "",
        CAUTION,
        "",
    ]
    for fam, title in FAMILIES.items():
        funcs = [f for f in CATALOG if f.family == fam]
        if not funcs:
            continue
        out += [f"## {title}", ""]
        for f in funcs:
            out += [f"### {f.name}", "", f.help, "", f"`{f.signature()}`", ""]
            out += ["| argument | meaning | unit |", "| --- | --- | --- |"]
            for a in f.all_args:
                unit = (
                    a.quantity.replace("_", " ")
                    if a.quantity
                    else ("text" if a.type == "text" else "—")
                )
                opt = " (optional)" if a.optional else ""
                out.append(f"| `{a.name}`{opt} | {a.help} | {unit} |")
            out += [
                "",
                f"- **Result:** {_result_unit(f)}",
                f"- **Equation:** {f.equation}",
                *_working_lines(f),
                f"- **References:** {'; '.join(f.references)}",
                f"- **Example:** {_example_text(f)}",
            ]
            if f.notes:
                out.append(f"- **Note:** {f.notes}")
            for v in f.validity:  # read by check and the audit: "outside the model"
                out.append(f"- **Validity:** {_validity_text(v)}")
            if f.caution:
                out.append(
                    "- **Caution:** an engineering estimate; pressure equipment, trapped liquid and "
                    "stored energy are governed by the applicable codes and a competent, licensed engineer."
                )
            out.append("")
    out += _materials_section()
    return "\n".join(out).rstrip() + "\n"


def _working_lines(f) -> list[str]:
    """The entry's working as the audit shows it (steps, then the result), in its argument
    names."""
    from joulebook.core.working import show

    w = f.working
    if w is None or not (w.steps or w.result):
        return []
    parts = [f"{s.symbol} = {show(s.expr)}" for s in w.steps]
    if w.result:
        parts.append(f"{w.symbol} = {show(w.result)}")
    out = ["- **Working (audit):** " + "; ".join(f"`{p}`" for p in parts)]
    if w.band:
        name, lo, hi, what = w.band
        who = w.symbol if name == "=" else name
        out.append(f"- **Flagged by the audit:** {who} outside {lo:g}–{hi:g} ({what})")
    return out


def _validity_text(v) -> str:
    """One validity check of an entry, as docs/functions.md states it."""
    bounds = []
    if v.low is not None:
        bounds.append(f"at least {v.low:g}" if isinstance(v.low, float) else f"at least {v.low}")
    if v.high is not None:
        bounds.append(f"at most {v.high:g}" if isinstance(v.high, float) else f"at most {v.high}")
    if v.not_text:
        bounds.append("not " + " or ".join(f"'{t}'" for t in v.not_text))
    when = f" when {v.when} > 0" if v.when else ""
    item = f", item {v.item + 1} of its row" if v.item is not None else ""
    text = f"{v.says} (`{v.value}`{item}) {' and '.join(bounds)}{when}: {v.model}"
    for name, value, src in v.defaults:
        text += f"; by default {name} = {value:g} in SI units ({src})"
    return text


def _materials_section() -> list[str]:
    from joulebook.core.substances.solids import MATERIALS

    out = [
        "## Materials of the incompressible model",
        "",
        "| material | aliases | valid range, K | source |",
        "| --- | --- | --- | --- |",
    ]
    for m in MATERIALS:
        note = f" {m.note}." if m.note else ""
        out.append(
            f"| {m.name} | {', '.join(m.aliases)} | {m.T_min:g}–{m.T_max:g} | {m.source}.{note} |"
        )
    return out + [""]


def write(root: Path) -> list[Path]:
    """Write every generated document under *root*; return the paths written."""
    path = root / "docs" / "functions.md"
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(functions_markdown(), encoding="utf-8")
    return [path]
