"""The one-line help of a worksheet argument, shared by the generated faces (xlwings, Calc).

Both spreadsheet programs show it in their function wizard; it is built from the catalog
entry alone, so the two faces say the same thing.
"""

from __future__ import annotations

from joulebook.catalog import Arg
from joulebook.core.units import unit_system

__all__ = ["arg_doc"]


def arg_doc(a: Arg) -> str:
    """The help of argument *a*: its text, "(optional)", and its kind and unit (≤ 255
    characters, the limit of Excel's function wizard)."""
    if a.type == "text":
        kind = "text"
    elif a.type == "range":
        kind = "range"
    else:
        kind = "number or range"
    unit = ""
    if a.quantity and a.quantity != "dimensionless":
        default = unit_system(None).unit(a.quantity)
        unit = (
            f"; {a.quantity.replace('_', ' ')} in the units argument's unit ({default} by default)"
        )
    opt = " (optional)" if a.optional else ""
    doc = f"{a.help}{opt} [{kind}{unit}]"
    return doc if len(doc) <= 255 else doc[:254] + "…"
