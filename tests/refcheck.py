"""Checks against the outside world, recorded for the validation report.

``check(ours, ref, rtol=…, quantity=…, conditions=…, source=…)`` asserts like
``pytest.approx`` and records the comparison; ``pytest --validation-report docs/validation.md``
writes every recorded check (quantity, conditions, source, our value, reference, deviation,
tolerance) as a table when the run ends.
"""

from __future__ import annotations

import pytest

RECORDS: list[dict] = []


def check(
    ours: float, ref: float, *, rtol: float, quantity: str, conditions: str, source: str
) -> None:
    dev = abs(ours - ref) / abs(ref) if ref else abs(ours - ref)
    RECORDS.append(
        {
            "quantity": quantity,
            "conditions": conditions,
            "source": source,
            "ours": ours,
            "ref": ref,
            "dev": dev,
            "rtol": rtol,
        }
    )
    assert ours == pytest.approx(ref, rel=rtol), (
        f"{quantity} at {conditions}: {ours!r} vs {ref!r} ({source})"
    )


def report(records: list[dict]) -> str:
    lines = [
        "# Validation report",
        "",
        "Generated from the reference tests by `python -m pytest tests --validation-report docs/validation.md`;",
        "every row is one assertion of the test suite against a published or independent source.",
        "Deviation is relative: |ours − reference| / |reference|.",
        "",
    ]
    by_source: dict[str, list[dict]] = {}
    for r in records:
        by_source.setdefault(r["source"], []).append(r)
    for source in sorted(by_source):
        rows = by_source[source]
        worst = max(r["dev"] for r in rows)
        lines += [
            f"## {source}",
            "",
            f"{len(rows)} checks; largest deviation {worst:.2e}.",
            "",
            "| quantity | conditions | ours | reference | deviation | tolerance |",
            "| --- | --- | --- | --- | --- | --- |",
        ]
        for r in sorted(rows, key=lambda r: (r["quantity"], r["conditions"])):
            lines.append(
                f"| {r['quantity']} | {r['conditions']} | {r['ours']:.10g} | {r['ref']:.10g} | "
                f"{r['dev']:.1e} | {r['rtol']:.0e} |"
            )
        lines.append("")
    return "\n".join(lines)
