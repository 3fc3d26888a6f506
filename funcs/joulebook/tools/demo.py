"""The bundled demo: calculation workbooks in invented scenarios, and `joulebook demo`.

Every workbook is laid out the way a calc sheet is: a title block, inputs with their units,
the calculation, results and checks.  The equipment, sites and numbers are invented for the
demo; they are not design data.  ``build_workbooks(folder)`` writes them (openpyxl), and
``run_demo(folder)`` recalculates, checks and audits each one.
"""

from __future__ import annotations

import time
from pathlib import Path

__all__ = ["WORKBOOKS", "build_workbooks", "run_demo"]

_TITLE = ("Project", "Subject", "Prepared by", "Checked by", "Date", "Revision")


def _array(ref: str, text: str):
    from openpyxl.worksheet.formula import ArrayFormula as _AF

    return _AF(ref, text)


ArrayFormula = _array


def _sheet(wb, title: str, subject: str, project: str):
    from openpyxl.styles import Font, PatternFill

    ws = wb.active if wb.active.title == "Sheet" else wb.create_sheet()
    ws.title = title
    ws["A1"] = subject
    ws["A1"].font = Font(bold=True, size=14)
    for i, (k, v) in enumerate(
        zip(_TITLE, (project, subject, "demo author", "", "2026-12-01", "A"))
    ):
        ws.cell(row=2 + i, column=1, value=k).font = Font(italic=True)
        ws.cell(row=2 + i, column=2, value=v)
    ws["D2"] = "Invented scenario for the joulebook demo - not design data."
    ws["D3"] = (
        "Results are engineering estimates; pressure equipment is governed by the applicable codes and a competent, licensed engineer."
    )
    ws.column_dimensions["A"].width = 38
    ws.column_dimensions["B"].width = 16
    ws.column_dimensions["C"].width = 14
    ws._jb_fill = PatternFill("solid", fgColor="FFF4D6")  # inputs are shaded
    return ws


def _rows(ws, start: int, heading: str, rows: list[tuple]) -> int:
    """Write a block: heading, then (label, value or formula, unit) rows; returns next row."""
    from openpyxl.styles import Font

    ws.cell(row=start, column=1, value=heading).font = Font(bold=True)
    r = start + 1
    for label, value, unit in rows:
        ws.cell(row=r, column=1, value=label)
        c = ws.cell(row=r, column=2, value=value)
        if not (isinstance(value, str) and value.startswith("=")):
            c.fill = ws._jb_fill
        ws.cell(row=r, column=3, value=unit)
        r += 1
    return r + 1


def _side(ws, start: int, rows: list[tuple]) -> None:
    """Inputs beside a block (label in E, value in F, unit in G), where a block has no room."""
    for i, (label, value, unit) in enumerate(rows):
        ws.cell(row=start + i, column=5, value=label)
        ws.cell(row=start + i, column=6, value=value).fill = ws._jb_fill
        ws.cell(row=start + i, column=7, value=unit)


def blocked_in_line(wb) -> None:
    ws = _sheet(
        wb,
        "Line",
        "Blocked-in cooling-water line warmed by the sun",
        "Kestrel Bay pump house (invented)",
    )
    r = _rows(
        ws,
        9,
        "Inputs",
        [
            ("Line fill temperature", 15, "degC"),
            ("Line pressure when blocked in (absolute)", 4, "bar"),
            ("Pipe-wall temperature in the afternoon sun", 45, "degC"),
            ("Water mass in the segment", 312, "kg"),
            ("Design pressure of the segment (gauge)", 16, "barg"),
        ],
    )
    _rows(
        ws,
        r,
        "Calculation (rigid: the pipe is taken as rigid, a conservative bound)",
        [
            ("Initial state", '=JB_STATE("water","T in degC",B10,"P in bar",B11)', "state"),
            ("Phase at fill", "=JB_PHASE(B17)", ""),
            (
                "Pressure after warming (absolute)",
                '=JB_PROCESS(B17,"rigid","T2 in degC",B12,"P2 in bar",B13)',
                "bar",
            ),
            ("Heat absorbed", '=JB_PROCESS(B17,"rigid","T2 in degC",B12,"Q in kJ",B13)', "kJ"),
            (
                "Boundary work (rigid)",
                '=JB_PROCESS(B17,"rigid","T2 in degC",B12,"W in kJ",B13)',
                "kJ",
            ),
            ("Check: pressure rise per kelvin", "=(B19-B11)/(B12-B10)", "bar/K"),
            (
                "Pressure after warming (gauge)",
                '=JB_PROCESS(B17,"rigid","T2 in degC",B12,"P2 in barg",B13)',
                "barg",
            ),
            ("Check: exceeds design pressure?", '=IF(B23>B14,"YES - relieve the line","no")', ""),
        ],
    )
    r = _rows(
        ws,
        26,
        "The real pipe: its steel wall stretches with pressure and temperature",
        [
            ("Pipe mean diameter", 0.1063, "m"),
            ("Pipe wall thickness", 0.006, "m"),
            ("Young's modulus of the steel", 200, "GPa"),
            ("Poisson's ratio of the steel", 0.3, "-"),
            ("Linear expansion coefficient of the steel", 1.2e-5, "1/K"),
            ("Sun's heat input to the segment", 1.5, "kW"),
        ],
    )
    _rows(
        ws,
        r,
        "Rigid bound and elastic pipe side by side",
        [
            (
                "Pressure after warming, rigid pipe (absolute)",
                '=JB_BLOCKED_IN_P2(B17,B12,"rigid",,,,,,"degC-bar-kJ")',
                "bar",
            ),
            (
                "Pressure after warming, elastic steel pipe (absolute)",
                '=JB_BLOCKED_IN_P2(B17,B12,"cylinder",B27,B28,B29,B30,B31,"degC-bar-kJ")',
                "bar",
            ),
            ("Check: elastic rise over rigid rise", "=(B36-B11)/(B35-B11)", "-"),
            (
                "Relief state (design pressure, 45 degC)",
                '=JB_STATE("water","T in degC",B12,"P in barg",B14)',
                "state",
            ),
            (
                "Thermal-relief flow needed for the sun's heat",
                '=JB_RELIEF_THERMAL_FLOW(B38,B32,"degC-bar-kJ, q_v=L/h")',
                "L/h",
            ),
            ("Water viscosity at fill (for a flow check)", '=JB_PROP(B17,"mu in mPa*s")', "mPa*s"),
            (
                "Check: elastic pipe exceeds design pressure?",
                '=IF(JB_CONVERT(B36,"bar","barg")>B14,"YES - relieve the line","no")',
                "",
            ),
        ],
    )


def wet_steam_vessel(wb) -> None:
    ws = _sheet(
        wb,
        "Vessel",
        "Sealed vessel of wet steam heated to a set pressure",
        "Marlow Street autoclave (invented)",
    )
    r = _rows(
        ws,
        9,
        "Inputs",
        [
            ("Initial pressure", 2, "bar"),
            ("Initial quality", 0.1, "-"),
            ("Vessel volume", 0.6, "m3"),
            ("Final pressure", 10, "bar"),
        ],
    )
    r = _rows(
        ws,
        r,
        "Calculation",
        [
            ("Initial state", '=JB_STATE("water","P in bar",B10,"x",B11)', "state"),
            ("Specific volume", '=JB_PROP(B16,"v in m3/kg")', "m3/kg"),
            ("Mass of water", "=B12/B17", "kg"),
            (
                "Heat to reach the final pressure",
                '=JB_PROCESS(B16,"rigid","P2 in bar",B13,"Q in kJ",B18)',
                "kJ",
            ),
            ("Final quality", '=JB_PROCESS(B16,"rigid","P2 in bar",B13,"x2",B18)', "-"),
            (
                "Final temperature",
                '=JB_PROCESS(B16,"rigid","P2 in bar",B13,"T2 in degC",B18)',
                "degC",
            ),
            (
                "Saturation temperature at final pressure",
                '=JB_PROP_SAT("water","Tsat in degC","P in bar",B13)',
                "degC",
            ),
            (
                "Check: first-law gap (Q - W - dU)",
                '=JB_BALANCE_GAP(B19,JB_PROCESS(B16,"rigid","P2 in bar",B13,"W in kJ",B18),JB_PROCESS(B16,"rigid","P2 in bar",B13,"dU in kJ",B18))',
                "kJ",
            ),
        ],
    )
    ws.cell(row=r, column=1, value="Full end state (spilled table)")
    ref = f"A{r + 1}:C{r + 13}"
    ws[f"A{r + 1}"] = ArrayFormula(ref, '=JB_PROCESS_TABLE(B16,"rigid","P2 in bar",B13,B18)')
    ws["E9"] = "Saturation dome for a T-s chart of the process (spilled table)"
    ws["E10"] = ArrayFormula("E10:F32", '=JB_CHART_DOME("water","T-s",11,"degC-bar-kJ")')
    ws["K9"] = "Plant-table check: final enthalpy of the saturated vapour by IF97 and IAPWS-95"
    ws["K10"] = '=JB_PROP("water (IF97)","h in kJ/kg","P in bar",B13,"x",1)'
    ws["K11"] = '=JB_PROP("water","h in kJ/kg","P in bar",B13,"x",1)'
    ws["K12"] = "=K10/K11-1"
    ws["H9"] = "Isobar at the final pressure across the chart"
    ws["H10"] = ArrayFormula(
        "H10:I21", '=JB_CHART_ISOLINE("water","T-s","P in bar",B13,1,8,11,"degC-bar-kJ")'
    )


def receiver_test(wb) -> None:
    ws = _sheet(
        wb,
        "Receiver",
        "Pneumatic test of an air receiver: stored energy",
        "Harrowgate compressor house (invented)",
    )
    r = _rows(
        ws,
        9,
        "Inputs",
        [
            ("Test pressure (gauge)", 11, "barg"),
            ("Test gas temperature", 12, "degC"),
            ("Receiver volume", 2.5, "m3"),
            ("Ratio of specific heats of air", 1.4, "-"),
        ],
    )
    _rows(
        ws,
        r,
        "Calculation",
        [
            ("Test pressure, absolute", '=JB_CONVERT(B10,"barg","kPa")', "kPa"),
            ("Test gas state", '=JB_STATE("air","P in kPa",B16,"T in degC",B11)', "state"),
            ("Stored energy, real-gas isentropic", "=JB_STORED_ISENTROPIC(B17,B12)", "kJ"),
            (
                "Stored energy, ideal-gas isentropic",
                "=JB_STORED_IDEAL_ISENTROPIC(B16,B12,B13)",
                "kJ",
            ),
            (
                "Stored energy, constant-volume release (upper bound)",
                "=JB_STORED_ISOCHORIC(B16,B12,B13)",
                "kJ",
            ),
            ("Compressibility factor at test", '=JB_PROP(B17,"Z")', "-"),
            ("Check: real vs ideal (ratio)", "=B18/B19", "-"),
        ],
    )
    _rows(
        ws,
        26,
        "Pneumatic or hydrostatic? The same test both ways",
        [
            ("Stored energy, code formula (pneumatic)", "=JB_TEST_PNEUMATIC_ENERGY(B16,B12)", "kJ"),
            ("TNT equivalent (4.184 MJ/kg basis)", "=JB_TEST_TNT(B27)", "kg"),
            ("Scaled distance from the applicable code (input)", 20, "m/kg^(1/3)"),
            ("Distance by cube-root scaling", "=JB_TEST_DISTANCE(B28,B29)", "m"),
            (
                "Water at the test pressure",
                '=JB_STATE("water","P in kPa",B16,"T in degC",B11)',
                "state",
            ),
            (
                "Stored energy, hydrostatic (water and shell)",
                '=JB_TEST_HYDRO_ENERGY(B31,B12,"cylinder",F27,F28,F29,F30,,"K-kPa-kJ, E_mod=GPa")',
                "kJ",
            ),
            ("Check: pneumatic over hydrostatic (ratio)", "=B27/B32", "-"),
        ],
    )
    _side(
        ws,
        27,
        [
            ("Shell inside diameter", 1.2, "m"),
            ("Shell wall thickness", 0.01, "m"),
            ("Young's modulus of the shell steel", 200, "GPa"),
            ("Poisson's ratio of the shell steel", 0.3, "-"),
        ],
    )
    _rows(
        ws,
        35,
        "In service: water the receiver condenses (real humid air)",
        [
            ("Intake air temperature", 30, "degC"),
            ("Intake air relative humidity", 0.7, "-"),
            ("Working pressure (gauge)", 8, "barg"),
            ("Receiver temperature", 35, "degC"),
            (
                "Intake dew point",
                '=JB_HUMID_AIR("Tdp in degC",101.325,"T in degC",B36,"RH",B37)',
                "degC",
            ),
            (
                "Water condensed per receiver volume of air",
                '=JB_HUMID_CONDENSATE(101.325,B36,B37,JB_CONVERT(B38,"barg","kPa"),B39,B12,"degC-kPa-kJ")',
                "kg",
            ),
        ],
    )


def indicator_record(wb) -> None:
    ws = _sheet(
        wb,
        "Indicator",
        "Compressor cylinder: measured pressure-volume record",
        "Tarn Fell gas station, unit 2 (invented)",
    )
    ws["A9"] = "Record (compression stroke, then discharge, expansion, suction; last point = first)"
    ws["A10"], ws["B10"], ws["C10"] = "Point", "P [kPa]", "V [L]"
    pts = []
    Vc, Vs = 0.8, 8.0  # clearance and swept volume, L (invented)
    P1, P2, n = 101.0, 420.0, 1.28
    for i in range(9):  # compression from bottom dead centre
        V = Vc + Vs - i * (Vs * 0.62) / 8
        pts.append((P1 * ((Vc + Vs) / V) ** n, V))
    V_d = (Vc + Vs) * (P1 / P2) ** (1 / n)
    for i in range(1, 5):  # discharge at constant pressure
        pts.append((P2, V_d - i * (V_d - Vc) / 4))
    V_e = Vc * (P2 / P1) ** (1 / n)
    for i in range(1, 5):  # re-expansion of the clearance gas
        V = Vc + i * (V_e - Vc) / 4
        pts.append((P2 * (Vc / V) ** n, V))
    for i in range(1, 5):  # suction
        pts.append((P1, V_e + i * (Vc + Vs - V_e) / 4))
    pts[-1] = pts[0]
    for i, (p, v) in enumerate(pts):
        ws.cell(row=11 + i, column=1, value=i + 1)
        ws.cell(row=11 + i, column=2, value=round(p, 2))
        ws.cell(row=11 + i, column=3, value=round(v, 4))
    last = 10 + len(pts)
    r = last + 2
    _rows(
        ws,
        r,
        "Results",
        [
            (
                "Compression exponent (fit of points 1-9)",
                '=JB_POLY_FIT(B11:B19,C11:C19,"n","P=kPa, V=L")',
                "-",
            ),
            (
                "Exponent from end points of compression",
                '=JB_POLY_EXPONENT(B11,C11,B19,C19,"P=kPa, V=L")',
                "-",
            ),
            (
                "Net indicated work per cycle (trapezoid)",
                f'=JB_WORK_PV(B11:B{last},C11:C{last},"trapezoid","P=kPa, V=L, E=J")',
                "J",
            ),
            (
                "Net indicated work per cycle (polytropic segments)",
                f'=JB_WORK_PV(B11:B{last},C11:C{last},"polytropic","P=kPa, V=L, E=J")',
                "J",
            ),
            (
                "Compression work, points 1-9",
                '=JB_WORK_PV(B11:B19,C11:C19,"polytropic","P=kPa, V=L, E=J")',
                "J",
            ),
        ],
    )
    ws.cell(row=r + 8, column=1, value="Check: fit statistics n, C, R2 (kPa, L)")
    ws[f"B{r + 8}"] = ArrayFormula(
        f"B{r + 8}:D{r + 8}", '=JB_POLY_FIT(B11:B19,C11:C19,"all","P=kPa, V=L")'
    )
    q = r + 10
    _rows(
        ws,
        q,
        "Power and efficiency",
        [
            ("Shaft speed", 720, "rev/min"),
            ("Number of cylinders", 2, "-"),
            (
                "Indicated power (negative: the pistons do work on the gas)",
                f'=JB_ENGINE_POWER(B{r + 3},B{q + 1},B{q + 2},1,"K-Pa-J, Pow=kW")',
                "kW",
            ),
            (
                "Mean effective pressure (negative for a compressor)",
                f'=JB_ENGINE_MEP(B{r + 3},F{q + 1},"K-kPa-J, V=L")',
                "kPa",
            ),
            ("Clearance ratio (0.8 L over 8 L swept)", 0.1, "-"),
            (
                "Clearance volumetric efficiency",
                f"=JB_COMPRESSOR_VOLUMETRIC_EFFICIENCY(B{q + 5},F{q + 2},F{q + 3},B{r + 1})",
                "-",
            ),
            (
                "Check: re-expansion exponent (fit of points 14-17)",
                '=JB_POLY_FIT(B24:B27,C24:C27,"n","P=kPa, V=L")',
                "-",
            ),
        ],
    )
    _side(
        ws,
        q + 1,
        [
            ("Swept volume", 8, "L"),
            ("Suction pressure (absolute)", 101, "kPa"),
            ("Discharge pressure (absolute)", 420, "kPa"),
        ],
    )


def piston_stops(wb) -> None:
    ws = _sheet(
        wb,
        "Piston",
        "Batch heating under a weighted piston resting on stops",
        "Ashcombe pilot plant, reactor R-3 (invented)",
    )
    r = _rows(
        ws,
        9,
        "Inputs",
        [
            ("Initial temperature", 25, "degC"),
            ("Initial quality", 0.0005, "-"),
            ("Mass of water", 2, "kg"),
            ("Pressure that lifts the piston", 3, "bar"),
            ("Heat supplied by the jacket", 2500, "kJ"),
            ("Steel vessel mass", 85, "kg"),
        ],
    )
    r = _rows(
        ws,
        r,
        "Calculation",
        [
            ("Initial state", '=JB_STATE("water","T in degC",B10,"x",B11)', "state"),
            (
                "Heat until the piston lifts",
                '=JB_PROCESS(B18,"rigid","P2 in bar",B13,"Q in kJ",B12)',
                "kJ",
            ),
            (
                "Final pressure",
                '=JB_PROCESS(B18,"stops P = 3 bar","Q in kJ",B14,"P2 in bar",B12)',
                "bar",
            ),
            (
                "Final temperature",
                '=JB_PROCESS(B18,"stops P = 3 bar","Q in kJ",B14,"T2 in degC",B12)',
                "degC",
            ),
            ("Final quality", '=JB_PROCESS(B18,"stops P = 3 bar","Q in kJ",B14,"x2",B12)', "-"),
            (
                "Boundary work on the piston",
                '=JB_PROCESS(B18,"stops P = 3 bar","Q in kJ",B14,"W in kJ",B12)',
                "kJ",
            ),
            (
                "Steel heat-up, same temperature rise",
                '=JB_SOLID_HEAT("carbon steel",B15,B10,B21,"degC-kPa-kJ")',
                "kJ",
            ),
            (
                "Check: first law Q = dU + W",
                '=JB_BALANCE_GAP(B14,B23,JB_PROCESS(B18,"stops P = 3 bar","Q in kJ",B14,"dU in kJ",B12))',
                "kJ",
            ),
        ],
    )
    ws.cell(row=r, column=1, value="Path points for a P-V chart (V, P, T, v, s)")
    ref = f"A{r + 1}:E{r + 12}"
    ws[f"A{r + 1}"] = ArrayFormula(
        ref, '=JB_PROCESS_PATH(B18,"stops P = 3 bar","Q in kJ",B14,11,B12)'
    )


def air_cycle(wb) -> None:
    ws = _sheet(
        wb,
        "Cycle",
        "Air-standard closed cycle of a test-bench engine",
        "Brennock engine lab, bench 4 (invented)",
    )
    r = _rows(
        ws,
        9,
        "Inputs",
        [
            ("Air at start of compression, T", 300, "K"),
            ("Air at start of compression, P", 100, "kPa"),
            ("Compression ratio", 9, "-"),
            ("Peak temperature", 1900, "K"),
            ("Model of air", "air (ideal gas)", ""),
        ],
    )
    _rows(
        ws,
        r,
        "Legs (per kg; ideal gas with cp(T))",
        [
            ("State 1", '=JB_STATE(B14,"T in K",B10,"P in kPa",B11)', "state"),
            ("v1", '=JB_PROP(B17,"v")', "m3/kg"),
            (
                "1-2 isentropic compression: W",
                '=JB_PROCESS(B17,"isentropic","v2 in m3/kg",B18/B12,"W")',
                "kJ",
            ),
            ("T2", '=JB_PROCESS(B17,"isentropic","v2 in m3/kg",B18/B12,"T2")', "K"),
            ("State 2", '=JB_STATE(B14,"T in K",B20,"v in m3/kg",B18/B12)', "state"),
            ("2-3 heat at constant volume: Q", '=JB_PROCESS(B21,"rigid","T2 in K",B13,"Q")', "kJ"),
            ("State 3", '=JB_STATE(B14,"T in K",B13,"v in m3/kg",B18/B12)', "state"),
            (
                "3-4 isentropic expansion: W",
                '=JB_PROCESS(B23,"isentropic","v2 in m3/kg",B18,"W")',
                "kJ",
            ),
            ("T4", '=JB_PROCESS(B23,"isentropic","v2 in m3/kg",B18,"T2")', "K"),
            ("State 4", '=JB_STATE(B14,"T in K",B25,"v in m3/kg",B18)', "state"),
            (
                "4-1 heat rejected at constant volume: Q",
                '=JB_PROCESS(B26,"rigid","T2 in K",B10,"Q")',
                "kJ",
            ),
            ("Q per leg (1-2, 2-3, 3-4, 4-1)", 0, "kJ"),
            ("", "=B22", "kJ"),
            ("", 0, "kJ"),
            ("", "=B27", "kJ"),
            ("W per leg (1-2, 2-3, 3-4, 4-1)", "=B19", "kJ"),
            ("", 0, "kJ"),
            ("", "=B24", "kJ"),
            ("", 0, "kJ"),
            ("Net work", "=JB_CYCLE_NET(B32:B35)", "kJ"),
            ("Check: cycle closure Q_net - W_net", "=JB_CYCLE_GAP(B28:B31,B32:B35)", "kJ"),
            ("Thermal efficiency", "=JB_CYCLE_EFFICIENCY(B28:B31,B32:B35)", "-"),
            ("Constant-k comparison, 1 - r^(1-k)", '=1-B12^(1-JB_GAS_K("air",B10))', "-"),
            ("Mean cp over compression", '=JB_GAS_CP_MEAN("air",B10,B20)', "kJ/(kg*K)"),
        ],
    )


def fire_drum(wb) -> None:
    ws = _sheet(
        wb,
        "Fire",
        "Propane storage drum engulfed by a pool fire: time to the relief set pressure",
        "Ashby Moor LPG depot, drum D-3 (invented)",
    )
    r = _rows(
        ws,
        9,
        "Inputs",
        [
            ("Drum diameter", 2.4, "m"),
            ("Drum length between the ends", 8.0, "m"),
            ("Propane held", 12000, "kg"),
            ("Temperature before the fire", 20, "degC"),
            ("Relief valve set pressure (gauge)", 17.2, "barg"),
            ("Environment factor F (bare drum)", 1.0, "-"),
            ("Drainage and fire-fighting", "adequate", ""),
        ],
    )
    _rows(
        ws,
        r,
        "Calculation (rigid drum; the wetted area follows the liquid level)",
        [
            ("Drum volume (flat ends)", "=PI()*B10^2/4*B11", "m3"),
            (
                "Contents before the fire",
                '=JB_STATE("propane","T in degC",B13,"v in m3/kg",B19/B12)',
                "state",
            ),
            ("Pressure before the fire (gauge)", '=JB_PROP(B20,"P in barg")', "barg"),
            ("Vapour mass fraction before the fire", '=JB_PROP(B20,"x")', "-"),
            (
                "Fire heat on the fully wetted drum",
                '=JB_FIRE_HEAT(JB_WETTED_AREA("horizontal",B10,B11,B10),B15,B16)',
                "kW",
            ),
            (
                "Time to reach the set pressure",
                '=JB_TIME_FIRE(B20,"horizontal",B10,B11,"P in barg",B14,B15,B16,"degC-bar-kJ, t=min")',
                "min",
            ),
            (
                "Check: set pressure above the starting pressure?",
                '=IF(B14>B21,"yes","NO - check the inputs")',
                "",
            ),
        ],
    )
    ws["D18"] = "If the drum held commercial LPG (propane 0.7, butane 0.3 by mole):"
    ws["D19"] = "Bubble pressure at the starting temperature (gauge)"
    ws["E19"] = '=JB_PROP_SAT("propane 0.7, butane 0.3","Pbubble in barg","T in degC",B13)'
    ws["D20"] = "Dew pressure at the starting temperature (gauge)"
    ws["E20"] = '=JB_PROP_SAT("propane 0.7, butane 0.3","Pdew in barg","T in degC",B13)'
    ws["A28"] = "The heating, step by step (t, T, P absolute, x, heat taken in)"
    ws["A29"] = ArrayFormula(
        "A29:E35",
        '=JB_TIME_FIRE_TABLE(B20,"horizontal",B10,B11,"P in barg",B14,B15,B16,6,"degC-bar-kJ, t=min")',
    )


def receiver_fire_blowdown(wb) -> None:
    ws = _sheet(
        wb,
        "Receiver",
        "Nitrogen buffer receiver: fire exposure (unwetted shell) and blowdown",
        "Harlow Fen test bay, receiver R-11 (invented)",
    )
    r = _rows(
        ws,
        9,
        "Inputs",
        [
            ("Receiver diameter", 1.2, "m"),
            ("Receiver length between the ends", 4.0, "m"),
            ("Shell thickness", 0.010, "m"),
            ("Nitrogen pressure before the fire (absolute)", 16.0, "bar"),
            ("Nitrogen temperature before the fire", 20.0, "degC"),
            ("Relief valve set pressure (absolute)", 21.0, "bar"),
            ("Fire curve (EN 1991-1-2)", "hydrocarbon", ""),
            ("Shell yield strength (S235)", 235.0, "MPa"),
            ("Blowdown orifice diameter", 0.025, "m"),
            ("Blowdown discharge coefficient", 0.85, "-"),
            ("Blowdown target pressure (absolute)", 2.0, "bar"),
            ("Steel density", 7850.0, "kg/m3"),
            ("Shell-to-gas conductance (about 10 W/m2K over the shell)", 0.2, "kW/K"),
        ],
    )
    _rows(
        ws,
        r,
        "Calculation (rigid receiver; the shell heats with the gas)",
        [
            (
                "Nitrogen before the fire",
                '=JB_STATE("nitrogen","P in bar",B13,"T in degC",B14)',
                "state",
            ),
            ("Receiver volume (flat ends)", "=PI()*B10^2/4*B11", "m3"),
            ("Shell area (flat ends)", "=PI()*B10*B11+PI()*B10^2/2", "m2"),
            ("Shell mass", "=B21*B27*B12", "kg"),
            (
                "Time in the fire to the set pressure",
                '=JB_TIME_FIRE_GAS(B25,B10,B11,B12,B15,B16,,,B17,,"degC-bar-kJ, t=min, E_mod=MPa")',
                "min",
            ),
            (
                "Hoop stress at the set pressure (cold shell)",
                '=JB_WALL_HOOP_STRESS(B15,B10,B12,,B17,"degC-bar-kJ, E_mod=MPa")',
                "MPa",
            ),
            (
                "Blowdown time to the target pressure",
                '=JB_TIME_BLOWDOWN(B25,B26,B18,B20,B19,,,,"degC-bar-kJ, t=min")',
                "min",
            ),
            (
                "Lowest gas temperature, no heat from the shell",
                '=JB_BLOWDOWN_T_MIN(B25,B26,B18,B20,B19,,,,"degC-bar-kJ")',
                "degC",
            ),
            (
                "Lowest gas temperature, warmed by the shell",
                '=JB_BLOWDOWN_T_MIN(B25,B26,B18,B20,B19,,B28,B22,"degC-bar-kJ")',
                "degC",
            ),
            (
                "Check: does the hot shell hold until the relief opens?",
                '=IF(E43>1,"NO - the shell can fail first: see the caution","yes")',
                "",
            ),
        ],
    )
    ws["D36"] = "An unwetted shell heats fast and loses strength above about 400 degC: it can"
    ws["D37"] = (
        "rupture below the set pressure, before the relief valve opens (judge by the codes)."
    )
    ws["A38"] = "The fire, step by step (t, gas T, shell T, P absolute, hoop stress / hot yield)"
    ws["A39"] = ArrayFormula(
        "A39:E43",
        '=JB_TIME_FIRE_GAS_TABLE(B25,B10,B11,B12,B15,B16,,,B17,,4,"degC-bar-kJ, t=min, E_mod=MPa")',
    )
    ws["A45"] = "The blowdown warmed by the shell (t, P absolute, gas T, mass left, shell T)"
    ws["A46"] = ArrayFormula(
        "A46:E50",
        '=JB_TIME_BLOWDOWN_TABLE(B25,B26,B18,B20,B19,,B28,B22,4,"degC-bar-kJ, t=min")',
    )


WORKBOOKS = {
    "blocked_in_line.xlsx": blocked_in_line,
    "wet_steam_vessel.xlsx": wet_steam_vessel,
    "receiver_pneumatic_test.xlsx": receiver_test,
    "compressor_indicator_record.xlsx": indicator_record,
    "piston_on_stops.xlsx": piston_stops,
    "air_standard_cycle.xlsx": air_cycle,
    "fire_exposed_drum.xlsx": fire_drum,
    "receiver_fire_blowdown.xlsx": receiver_fire_blowdown,
}


XLSM = "receiver_pneumatic_test_with_macros.xlsm"


def new_workbook():
    """An empty openpyxl workbook as joulebook makes one: its ``JB_ERRORS`` name declares
    real error values (``#VALUE!``, ``#NUM!``, ``#N/A``), so that a refusal propagates through
    SUM, MAX and every reader in Excel and Calc, the message behind it through ``JB_WHY``
    and the audit."""
    import openpyxl
    from openpyxl.workbook.defined_name import DefinedName

    from joulebook.catalog.cellvalues import ERRORS_NAME, NEW_WORKBOOK_STYLE

    wb = openpyxl.Workbook()
    wb.properties.creator = "joulebook demo"
    wb.defined_names[ERRORS_NAME] = DefinedName(ERRORS_NAME, attr_text=f'"{NEW_WORKBOOK_STYLE}"')
    return wb


def build_xlsm(folder: str | Path) -> Path:
    """The receiver workbook as a macro-enabled .xlsm carrying joulebook's VBA wrappers and
    xlwings' own VBA module, configured (sheet ``xlwings.conf``) to call joulebook.faces.sheet.udfs."""
    from pathlib import Path as _P

    import xlwings

    from joulebook.faces.sheet.vbaproject import to_xlsm, vba_project
    from joulebook.faces.workbook.engine import Engine
    from joulebook.faces.workbook.reader import read_book
    from joulebook.faces.workbook.writer import write_copy
    from joulebook.tools.sheetgen import vba_source

    folder = _P(folder)
    wb = new_workbook()
    receiver_test(wb)
    wb.code_name = "ThisWorkbook"
    wb["Receiver"].sheet_properties.codeName = "Sheet1"
    conf = wb.create_sheet("xlwings.conf")
    conf.sheet_properties.codeName = "Sheet2"
    conf["A1"], conf["B1"] = "UDF Modules", "joulebook.faces.sheet.udfs"
    conf["A2"], conf["B2"] = "Interpreter_Win", ""
    raw = folder / ".xlsm.raw.xlsx"
    wb.save(raw)
    _freeze_times(raw)
    fresh = folder / ".xlsm.fresh.xlsx"
    book = read_book(raw)
    write_copy(book, Engine(book).run(), fresh, force=True)
    raw.unlink()
    xl_bas = (_P(xlwings.__file__).parent / "xlwings.bas").read_text(encoding="cp1252")
    vba = vba_project([("xlwings", xl_bas), ("xlwings_udfs", vba_source())], ["Sheet1", "Sheet2"])
    out = folder / XLSM
    to_xlsm(str(fresh), str(out), vba)
    fresh.unlink()
    return out


def build_workbooks(folder: str | Path, recalculate: bool = True) -> list[Path]:
    """Write every demo workbook into *folder* (with saved values when *recalculate*)."""

    from joulebook.faces.workbook.engine import Engine
    from joulebook.faces.workbook.reader import read_book
    from joulebook.faces.workbook.writer import write_copy

    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    out = []
    for name, build in WORKBOOKS.items():
        wb = new_workbook()
        build(wb)
        path = folder / name
        raw = folder / ("." + name + ".raw.xlsx")
        wb.save(raw)
        _freeze_times(raw)
        if recalculate:
            book = read_book(raw)
            write_copy(book, Engine(book).run(), path, force=True)
            raw.unlink()
        else:
            raw.replace(path)
        out.append(path)
    if recalculate:
        out.append(build_xlsm(folder))
    return out


def _freeze_times(path: Path) -> None:
    """Fixed document dates so that a rebuilt workbook is the same file."""
    import re
    import zipfile

    from joulebook.faces.files import atomic_write

    with zipfile.ZipFile(path) as zin:
        items = [(i, zin.read(i)) for i in zin.infolist()]

    def write(fh):
        with zipfile.ZipFile(fh, "w", zipfile.ZIP_DEFLATED) as zout:
            for info, data in items:
                if info.filename == "docProps/core.xml":
                    data = re.sub(
                        rb"\d{4}-\d\d-\d\dT\d\d:\d\d:\d\dZ", b"2026-12-01T00:00:00Z", data
                    )
                info.date_time = (2026, 12, 1, 0, 0, 0)
                zout.writestr(info, data)

    atomic_write(path, write)


def run_demo(folder: str | Path = "joulebook-demo", echo=print, pdf: bool = True) -> dict:
    """Build, recalculate, check and audit every demo workbook into *folder*: an HTML
    calculation package per workbook, and its PDF (``pdf=True``, when WeasyPrint and its
    Pango library are there; otherwise one line says how to get them)."""
    from joulebook.core.errors import BadInput
    from joulebook.faces.files import atomic_write
    from joulebook.faces.workbook.audit import build_audit
    from joulebook.faces.workbook.check import compare, summary
    from joulebook.faces.workbook.engine import Engine
    from joulebook.faces.workbook.package import build_package, render_package, write_pdf
    from joulebook.faces.workbook.reader import read_book
    from joulebook.faces.workbook.writer import write_copy

    folder = Path(folder)
    books = build_workbooks(folder / "workbooks", recalculate=False)
    results = {}
    for path in books:
        t0 = time.perf_counter()
        book = read_book(path)
        outcomes = Engine(book).run()
        fresh = folder / "recalculated" / path.name
        fresh.parent.mkdir(parents=True, exist_ok=True)
        write_copy(book, outcomes, fresh, force=True)
        checked = read_book(fresh)
        outcomes = Engine(checked).run()
        rows = compare(checked, outcomes)
        s = summary(rows)
        report = folder / "reports" / (path.stem + ".html")
        report.parent.mkdir(parents=True, exist_ok=True)
        audit = build_audit(checked, outcomes=outcomes, copies=False, maps=False)
        text = render_package(build_package(audit))
        html = text.encode("utf-8")
        atomic_write(report, lambda fh, html=html: fh.write(html))
        printed = None
        if pdf:
            try:
                write_pdf(text, report.with_suffix(".pdf"))
                printed = report.with_suffix(".pdf")
            except BadInput as e:
                echo(f"no PDF: {e.message}")
                pdf = False
        flags = len(audit.flags)
        echo(
            f"{path.name:36} {s['cells']:4d} cells, {s.get('pass', 0):4d} hold, "
            f"{len(audit.entries):3d} formulas audited, {flags:2d} flags  -> {report}"
            + (" and .pdf" if printed else "")
            + "  "
            f"({time.perf_counter() - t0:.1f} s)"
        )
        results[path.name] = {
            "summary": s,
            "report": report,
            "flags": flags,
            "entries": len(audit.entries),
            "pdf": printed,
        }
    # revision review: revision B of one demo workbook and its diff report (demodiff.py)
    from .demodiff import REVISED, review

    review(folder / "recalculated" / REVISED, folder / "revisions", WORKBOOKS, new_workbook, echo)
    echo(f"\nOpen the reports in a browser: {folder / 'reports'}")
    return results
