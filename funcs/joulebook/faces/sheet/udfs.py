"""joulebook worksheet functions for Excel (xlwings UDF module).

GENERATED from joulebook's catalog by `joulebook sheet` -- do not edit by hand.
Put `joulebook.faces.sheet.udfs` in xlwings' "UDF Modules" and click "Import Functions".
Each wrapper hands its cells to joulebook.catalog.call, the same path as the Python face;
`caller` (filled in by xlwings, not an Excel argument) is the calling range, whose workbook's
JB_ERRORS name sets the error style.
"""

import xlwings as _xw

from joulebook.faces.sheet.cells import cell as _cell
from joulebook.faces.sheet.cells import why as _why



__all__ = ['JB_STATE', 'JB_PROP', 'JB_PHASE', 'JB_PROP_SAT', 'JB_GAS_CP', 'JB_GAS_CV', 'JB_GAS_K', 'JB_GAS_R', 'JB_GAS_MOLAR_MASS', 'JB_GAS_DELTA_H', 'JB_GAS_DELTA_U', 'JB_GAS_CP_MEAN', 'JB_GAS_DELTA_S', 'JB_SOLID_C', 'JB_SOLID_C_MEAN', 'JB_SOLID_DELTA_U', 'JB_SOLID_HEAT', 'JB_WORK_ISOBARIC', 'JB_WORK_ISOTHERMAL', 'JB_WORK_ISOTHERMAL_MASS', 'JB_WORK_POLYTROPIC', 'JB_WORK_POLYTROPIC_N', 'JB_WORK_LINEAR', 'JB_WORK_PV', 'JB_WORK_PATH', 'JB_WORK_ELECTRIC_IN', 'JB_WORK_SHAFT_IN', 'JB_POLY_EXPONENT', 'JB_POLY_FIT', 'JB_POLY_P2', 'JB_POLY_V2', 'JB_POLY_T2_FROM_V', 'JB_POLY_T2_FROM_P', 'JB_BALANCE_HEAT', 'JB_BALANCE_GAP', 'JB_BALANCE_DELTA_KE', 'JB_BALANCE_DELTA_PE', 'JB_HEAT_ISOBARIC_GAS', 'JB_HEAT_RIGID_GAS', 'JB_PROCESS', 'JB_PROCESS_TABLE', 'JB_PROCESS_PATH', 'JB_CYCLE_NET', 'JB_CYCLE_GAP', 'JB_CYCLE_EFFICIENCY', 'JB_STORED_ISENTROPIC', 'JB_STORED_FLASHING_LIQUID', 'JB_STORED_IDEAL_ISENTROPIC', 'JB_STORED_ISOCHORIC', 'JB_BLOCKED_IN_P2', 'JB_RELIEF_THERMAL_FLOW', 'JB_TIME_HEATING', 'JB_TIME_HEATING_TABLE', 'JB_FIRE_HEAT', 'JB_WETTED_AREA', 'JB_TIME_FIRE', 'JB_TIME_FIRE_TABLE', 'JB_TIME_BATCH', 'JB_BALANCE_RATE', 'JB_BLOCKED_IN_CUSHION_P2', 'JB_TIME_BLOCKED_IN', 'JB_WALL_HOOP_STRESS', 'JB_WALL_AXIAL_STRESS', 'JB_TIME_FIRE_GAS', 'JB_TIME_FIRE_GAS_TABLE', 'JB_TIME_BLOWDOWN', 'JB_BLOWDOWN_T_MIN', 'JB_TIME_BLOWDOWN_TABLE', 'JB_TEST_PNEUMATIC_ENERGY', 'JB_TEST_HYDRO_ENERGY', 'JB_TEST_TNT', 'JB_TEST_DISTANCE', 'JB_ENGINE_VOLUME', 'JB_ENGINE_POWER', 'JB_ENGINE_MEP', 'JB_COMPRESSOR_VOLUMETRIC_EFFICIENCY', 'JB_POLY_FIT_BRANCHES', 'JB_HUMID_AIR', 'JB_HUMID_CONDENSATE', 'JB_CHART_DOME', 'JB_CHART_ISOLINE', 'JB_CONVERT', 'JB_WHY', 'JB_ABOUT']


@_xw.func(category='joulebook · States and real-fluid properties')
@_xw.arg('substance', ndim=2, err_to_str=True, doc='fluid name (water, air, R134a, CO2 …) [text]')
@_xw.arg('spec1', ndim=2, err_to_str=True, doc="first property phrase, e.g. 'T in degC' (T P v rho u h s x) (optional) [text]")
@_xw.arg('value1', ndim=2, err_to_str=True, doc="value of the first property, in the phrase's unit (optional) [number or range]")
@_xw.arg('spec2', ndim=2, err_to_str=True, doc="second property phrase, e.g. 'P in kPa' (optional) [text]")
@_xw.arg('value2', ndim=2, err_to_str=True, doc="value of the second property, in the phrase's unit (optional) [number or range]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_STATE(substance, spec1=None, value1=None, spec2=None, value2=None, units=None, caller=None):
    "State text of a real fluid fixed by two properties, e.g. 'water | T = 25 degC | P = 200 kPa'; validated, and accepted by every property function in place of substance + specs."
    return _cell('JB_STATE', substance, spec1, value1, spec2, value2, units, caller=caller)


@_xw.func(category='joulebook · States and real-fluid properties')
@_xw.arg('substance', ndim=2, err_to_str=True, doc="fluid name (water, air, R134a, CO2 …; 'water (IF97)' for the industrial formulation) or a state text from JB_STATE [text]")
@_xw.arg('want', ndim=2, err_to_str=True, doc="wanted property with unit, e.g. 'h in kJ/kg' (bare symbol: default unit) [text]")
@_xw.arg('spec1', ndim=2, err_to_str=True, doc="first property phrase, e.g. 'T in degC' (T P v rho u h s x) (optional) [text]")
@_xw.arg('value1', ndim=2, err_to_str=True, doc="value of the first property, in the phrase's unit (optional) [number or range]")
@_xw.arg('spec2', ndim=2, err_to_str=True, doc="second property phrase, e.g. 'P in kPa' (optional) [text]")
@_xw.arg('value2', ndim=2, err_to_str=True, doc="value of the second property, in the phrase's unit (optional) [number or range]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_PROP(substance, want, spec1=None, value1=None, spec2=None, value2=None, units=None, caller=None):
    'Property of a fluid (T P v rho u h s cp cv k x Z Tsat Psat beta kappa w mu_JT mu nu lambda Pr sigma) at a state fixed by two properties, each with its unit: JB_PROP("water","h in kJ/kg","T in degC",25,"P in kPa",101.325).'
    return _cell('JB_PROP', substance, want, spec1, value1, spec2, value2, units, caller=caller)


@_xw.func(category='joulebook · States and real-fluid properties')
@_xw.arg('substance', ndim=2, err_to_str=True, doc="fluid name (water, air, R134a, CO2 …; 'water (IF97)' for the industrial formulation) or a state text from JB_STATE [text]")
@_xw.arg('spec1', ndim=2, err_to_str=True, doc="first property phrase, e.g. 'T in degC' (T P v rho u h s x) (optional) [text]")
@_xw.arg('value1', ndim=2, err_to_str=True, doc="value of the first property, in the phrase's unit (optional) [number or range]")
@_xw.arg('spec2', ndim=2, err_to_str=True, doc="second property phrase, e.g. 'P in kPa' (optional) [text]")
@_xw.arg('value2', ndim=2, err_to_str=True, doc="value of the second property, in the phrase's unit (optional) [number or range]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_PHASE(substance, spec1=None, value1=None, spec2=None, value2=None, units=None, caller=None):
    'Phase of a real-fluid state in plain words: compressed liquid, saturated liquid, saturated mixture, saturated vapor, superheated vapor, supercritical fluid …'
    return _cell('JB_PHASE', substance, spec1, value1, spec2, value2, units, caller=caller)


@_xw.func(category='joulebook · States and real-fluid properties')
@_xw.arg('substance', ndim=2, err_to_str=True, doc="fluid name, blend (R410A …) or mixture ('propane 0.7, butane 0.3') [text]")
@_xw.arg('want', ndim=2, err_to_str=True, doc="saturation property with unit, e.g. 'hfg in kJ/kg' or 'Tsat in degC' [text]")
@_xw.arg('given', ndim=2, err_to_str=True, doc="'T in …' or 'P in …' [text]")
@_xw.arg('value', ndim=2, err_to_str=True, doc='the given saturation temperature or pressure [number or range]')
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_PROP_SAT(substance, want, given, value, units=None, caller=None):
    'Saturation property at a given T or P: Tsat, Psat (Tbubble Tdew Pbubble Pdew of a mixture or blend), vf vg vfg, uf ug ufg, hf hg hfg, sf sg sfg (f liquid or bubble, g vapor or dew).'
    return _cell('JB_PROP_SAT', substance, want, given, value, units, caller=caller)


@_xw.func(category='joulebook · Ideal gases')
@_xw.arg('gas', ndim=2, err_to_str=True, doc="gas name (air, nitrogen, CO2 …) or constant-cp model 'air | k = 1.4' [text]")
@_xw.arg('T', ndim=2, err_to_str=True, doc="absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_GAS_CP(gas, T, units=None, caller=None):
    'Ideal-gas specific heat at constant pressure cp(T) of a gas.'
    return _cell('JB_GAS_CP', gas, T, units, caller=caller)


@_xw.func(category='joulebook · Ideal gases')
@_xw.arg('gas', ndim=2, err_to_str=True, doc="gas name (air, nitrogen, CO2 …) or constant-cp model 'air | k = 1.4' [text]")
@_xw.arg('T', ndim=2, err_to_str=True, doc="absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_GAS_CV(gas, T, units=None, caller=None):
    'Ideal-gas specific heat at constant volume cv(T) = cp(T) − R.'
    return _cell('JB_GAS_CV', gas, T, units, caller=caller)


@_xw.func(category='joulebook · Ideal gases')
@_xw.arg('gas', ndim=2, err_to_str=True, doc="gas name (air, nitrogen, CO2 …) or constant-cp model 'air | k = 1.4' [text]")
@_xw.arg('T', ndim=2, err_to_str=True, doc="absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_GAS_K(gas, T, units=None, caller=None):
    'Ideal-gas specific-heat ratio k(T) = cp/cv.'
    return _cell('JB_GAS_K', gas, T, units, caller=caller)


@_xw.func(category='joulebook · Ideal gases')
@_xw.arg('gas', ndim=2, err_to_str=True, doc="gas name (air, nitrogen, CO2 …) or constant-cp model 'air | k = 1.4' [text]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_GAS_R(gas, units=None, caller=None):
    'Specific gas constant R = R_u / M of a gas.'
    return _cell('JB_GAS_R', gas, units, caller=caller)


@_xw.func(category='joulebook · Ideal gases')
@_xw.arg('gas', ndim=2, err_to_str=True, doc="gas name (air, nitrogen, CO2 …) or constant-cp model 'air | k = 1.4' [text]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_GAS_MOLAR_MASS(gas, units=None, caller=None):
    'Molar mass M of a gas (default unit kg/kmol).'
    return _cell('JB_GAS_MOLAR_MASS', gas, units, caller=caller)


@_xw.func(category='joulebook · Ideal gases')
@_xw.arg('gas', ndim=2, err_to_str=True, doc="gas name (air, nitrogen, CO2 …) or constant-cp model 'air | k = 1.4' [text]")
@_xw.arg('T_1', ndim=2, err_to_str=True, doc="initial absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('T_2', ndim=2, err_to_str=True, doc="final absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_GAS_DELTA_H(gas, T_1, T_2, units=None, caller=None):
    'Ideal-gas enthalpy change per unit mass from T1 to T2, integrating cp(T).'
    return _cell('JB_GAS_DELTA_H', gas, T_1, T_2, units, caller=caller)


@_xw.func(category='joulebook · Ideal gases')
@_xw.arg('gas', ndim=2, err_to_str=True, doc="gas name (air, nitrogen, CO2 …) or constant-cp model 'air | k = 1.4' [text]")
@_xw.arg('T_1', ndim=2, err_to_str=True, doc="initial absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('T_2', ndim=2, err_to_str=True, doc="final absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_GAS_DELTA_U(gas, T_1, T_2, units=None, caller=None):
    'Ideal-gas internal-energy change per unit mass from T1 to T2, integrating cv(T).'
    return _cell('JB_GAS_DELTA_U', gas, T_1, T_2, units, caller=caller)


@_xw.func(category='joulebook · Ideal gases')
@_xw.arg('gas', ndim=2, err_to_str=True, doc="gas name (air, nitrogen, CO2 …) or constant-cp model 'air | k = 1.4' [text]")
@_xw.arg('T_1', ndim=2, err_to_str=True, doc="initial absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('T_2', ndim=2, err_to_str=True, doc="final absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_GAS_CP_MEAN(gas, T_1, T_2, units=None, caller=None):
    'Mean ideal-gas cp over T1..T2, so that Δh = cp_mean·(T2 − T1).'
    return _cell('JB_GAS_CP_MEAN', gas, T_1, T_2, units, caller=caller)


@_xw.func(category='joulebook · Ideal gases')
@_xw.arg('gas', ndim=2, err_to_str=True, doc="gas name (air, nitrogen, CO2 …) or constant-cp model 'air | k = 1.4' [text]")
@_xw.arg('T_1', ndim=2, err_to_str=True, doc="initial absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('T_2', ndim=2, err_to_str=True, doc="final absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('P_1', ndim=2, err_to_str=True, doc="initial absolute pressure (optional) (optional) [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('P_2', ndim=2, err_to_str=True, doc="final absolute pressure (optional) (optional) [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_GAS_DELTA_S(gas, T_1, T_2, P_1=None, P_2=None, units=None, caller=None):
    'Ideal-gas entropy change per unit mass from (T1, P1) to (T2, P2); without pressures, the change at equal pressure.'
    return _cell('JB_GAS_DELTA_S', gas, T_1, T_2, P_1, P_2, units, caller=caller)


@_xw.func(category='joulebook · Incompressible solids and liquids')
@_xw.arg('material', ndim=2, err_to_str=True, doc='material name (carbon steel, copper, concrete, water …) [text]')
@_xw.arg('T', ndim=2, err_to_str=True, doc="absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_SOLID_C(material, T, units=None, caller=None):
    'Specific heat c(T) of an incompressible solid or liquid (cp = cv = c).'
    return _cell('JB_SOLID_C', material, T, units, caller=caller)


@_xw.func(category='joulebook · Incompressible solids and liquids')
@_xw.arg('material', ndim=2, err_to_str=True, doc='material name (carbon steel, copper, concrete, water …) [text]')
@_xw.arg('T_1', ndim=2, err_to_str=True, doc="initial absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('T_2', ndim=2, err_to_str=True, doc="final absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_SOLID_C_MEAN(material, T_1, T_2, units=None, caller=None):
    'Mean specific heat of an incompressible solid or liquid over T1..T2.'
    return _cell('JB_SOLID_C_MEAN', material, T_1, T_2, units, caller=caller)


@_xw.func(category='joulebook · Incompressible solids and liquids')
@_xw.arg('material', ndim=2, err_to_str=True, doc='material name (carbon steel, copper, concrete, water …) [text]')
@_xw.arg('T_1', ndim=2, err_to_str=True, doc="initial absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('T_2', ndim=2, err_to_str=True, doc="final absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_SOLID_DELTA_U(material, T_1, T_2, units=None, caller=None):
    'Internal-energy change per unit mass of an incompressible solid or liquid from T1 to T2.'
    return _cell('JB_SOLID_DELTA_U', material, T_1, T_2, units, caller=caller)


@_xw.func(category='joulebook · Incompressible solids and liquids')
@_xw.arg('material', ndim=2, err_to_str=True, doc='material name (carbon steel, copper, concrete, water …) [text]')
@_xw.arg('m', ndim=2, err_to_str=True, doc="mass of the body [number or range; mass in the units argument's unit (kg by default)]")
@_xw.arg('T_1', ndim=2, err_to_str=True, doc="initial absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('T_2', ndim=2, err_to_str=True, doc="final absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_SOLID_HEAT(material, m, T_1, T_2, units=None, caller=None):
    'Sensible heat to take a mass of an incompressible solid or liquid from T1 to T2 (positive when heated).'
    return _cell('JB_SOLID_HEAT', material, m, T_1, T_2, units, caller=caller)


@_xw.func(category='joulebook · Boundary and other work')
@_xw.arg('P', ndim=2, err_to_str=True, doc="absolute pressure of the process [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('V_1', ndim=2, err_to_str=True, doc="initial volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('V_2', ndim=2, err_to_str=True, doc="final volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_WORK_ISOBARIC(P, V_1, V_2, units=None, caller=None):
    'Boundary work at constant pressure, W = P·(V2 − V1); positive when the system expands (work by the system), exactly 0 for a rigid (constant-volume) system.'
    return _cell('JB_WORK_ISOBARIC', P, V_1, V_2, units, caller=caller)


@_xw.func(category='joulebook · Boundary and other work')
@_xw.arg('P_1', ndim=2, err_to_str=True, doc="initial absolute pressure [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('V_1', ndim=2, err_to_str=True, doc="initial volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('V_2', ndim=2, err_to_str=True, doc="final volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_WORK_ISOTHERMAL(P_1, V_1, V_2, units=None, caller=None):
    'Boundary work of an ideal gas at constant temperature, W = P1·V1·ln(V2/V1); positive when the system expands (work by the system).'
    return _cell('JB_WORK_ISOTHERMAL', P_1, V_1, V_2, units, caller=caller)


@_xw.func(category='joulebook · Boundary and other work')
@_xw.arg('gas', ndim=2, err_to_str=True, doc="gas name (air, nitrogen, CO2 …) or constant-cp model 'air | k = 1.4' [text]")
@_xw.arg('m', ndim=2, err_to_str=True, doc="mass of gas [number or range; mass in the units argument's unit (kg by default)]")
@_xw.arg('T', ndim=2, err_to_str=True, doc="absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('V_1', ndim=2, err_to_str=True, doc="initial volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('V_2', ndim=2, err_to_str=True, doc="final volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_WORK_ISOTHERMAL_MASS(gas, m, T, V_1, V_2, units=None, caller=None):
    'Boundary work of a mass of ideal gas at constant temperature, W = m·R·T·ln(V2/V1); positive when the system expands (work by the system).'
    return _cell('JB_WORK_ISOTHERMAL_MASS', gas, m, T, V_1, V_2, units, caller=caller)


@_xw.func(category='joulebook · Boundary and other work')
@_xw.arg('P_1', ndim=2, err_to_str=True, doc="initial absolute pressure [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('V_1', ndim=2, err_to_str=True, doc="initial volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('P_2', ndim=2, err_to_str=True, doc="final absolute pressure [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('V_2', ndim=2, err_to_str=True, doc="final volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_WORK_POLYTROPIC(P_1, V_1, P_2, V_2, units=None, caller=None):
    'Boundary work along P·V^n = C through two states, W = (P2·V2 − P1·V1)/(1 − n), n from the states; continuous at n = 1; positive when the system expands (work by the system).'
    return _cell('JB_WORK_POLYTROPIC', P_1, V_1, P_2, V_2, units, caller=caller)


@_xw.func(category='joulebook · Boundary and other work')
@_xw.arg('P_1', ndim=2, err_to_str=True, doc="initial absolute pressure [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('V_1', ndim=2, err_to_str=True, doc="initial volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('V_2', ndim=2, err_to_str=True, doc="final volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('n', ndim=2, err_to_str=True, doc='polytropic exponent n of P·V^n = C [number or range]')
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_WORK_POLYTROPIC_N(P_1, V_1, V_2, n, units=None, caller=None):
    'Boundary work along P·V^n = C from (P1, V1) to V2 for a given n; equals the isothermal result at n = 1; positive when the system expands (work by the system).'
    return _cell('JB_WORK_POLYTROPIC_N', P_1, V_1, V_2, n, units, caller=caller)


@_xw.func(category='joulebook · Boundary and other work')
@_xw.arg('P_1', ndim=2, err_to_str=True, doc="initial absolute pressure [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('V_1', ndim=2, err_to_str=True, doc="initial volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('P_2', ndim=2, err_to_str=True, doc="final absolute pressure [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('V_2', ndim=2, err_to_str=True, doc="final volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_WORK_LINEAR(P_1, V_1, P_2, V_2, units=None, caller=None):
    'Boundary work when pressure is linear in volume (spring-loaded piston), W = (P1 + P2)/2·(V2 − V1); positive when the system expands (work by the system).'
    return _cell('JB_WORK_LINEAR', P_1, V_1, P_2, V_2, units, caller=caller)


@_xw.func(category='joulebook · Boundary and other work')
@_xw.arg('P_values', ndim=2, err_to_str=True, doc="absolute pressures in path order (blank rows ignored) [range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('V_values', ndim=2, err_to_str=True, doc="volumes in the same order [range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('method', ndim=2, err_to_str=True, doc='trapezoid (default) or polytropic (each segment P·V^n = C) (optional) [text]')
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_WORK_PV(P_values, V_values, method=None, units=None, caller=None):
    'Boundary work from measured pressure–volume points (two ranges, in path order); a closed loop (last point = first) gives the net cycle work; positive = work by the system.'
    return _cell('JB_WORK_PV', P_values, V_values, method, units, caller=caller)


@_xw.func(category='joulebook · Boundary and other work')
@_xw.arg('state1', ndim=2, err_to_str=True, doc="initial state text from JB_STATE (real fluid, or ideal gas such as 'air (ideal gas) | …') [text]")
@_xw.arg('path', ndim=2, err_to_str=True, doc="rigid, isobaric, isothermal, isentropic, 'polytropic n = 1.3', 'linear slope = 500 kPa/m3', 'stops P = 4 bar' or 'stops V = 0.02 m3' [text]")
@_xw.arg('end_spec', ndim=2, err_to_str=True, doc="end condition with unit: V2, v2, P2, T2, x2, Q or W, e.g. 'T2 in degC' [text]")
@_xw.arg('end_value', ndim=2, err_to_str=True, doc='value of the end condition, in its unit [number or range]')
@_xw.arg('mass', ndim=2, err_to_str=True, doc="mass of the system (default 1 of the mass unit) (optional) [number or range; mass in the units argument's unit (kg by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_WORK_PATH(state1, path, end_spec, end_value, mass=None, units=None, caller=None):
    'Boundary work of a mass of real fluid or ideal gas along a path (isothermal, isentropic, polytropic …) on its equation of state, to an end condition; positive = work by the system.'
    return _cell('JB_WORK_PATH', state1, path, end_spec, end_value, mass, units, caller=caller)


@_xw.func(category='joulebook · Boundary and other work')
@_xw.arg('voltage', ndim=2, err_to_str=True, doc="voltage across the element [number or range; voltage in the units argument's unit (V by default)]")
@_xw.arg('current', ndim=2, err_to_str=True, doc="current through it [number or range; current in the units argument's unit (A by default)]")
@_xw.arg('duration', ndim=2, err_to_str=True, doc="time it runs [number or range; time in the units argument's unit (s by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_WORK_ELECTRIC_IN(voltage, current, duration, units=None, caller=None):
    'Electrical energy delivered to the system, V·I·Δt; it is work done ON the system, so enter it in a balance as a negative W_other.'
    return _cell('JB_WORK_ELECTRIC_IN', voltage, current, duration, units, caller=caller)


@_xw.func(category='joulebook · Boundary and other work')
@_xw.arg('torque', ndim=2, err_to_str=True, doc="shaft torque [number or range; torque in the units argument's unit (N*m by default)]")
@_xw.arg('revolutions', ndim=2, err_to_str=True, doc='number of turns [number or range]')
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_WORK_SHAFT_IN(torque, revolutions, units=None, caller=None):
    'Shaft (paddle-wheel, stirrer) work delivered to the system, 2π·N·τ; it is work done ON the system, so enter it in a balance as a negative W_other.'
    return _cell('JB_WORK_SHAFT_IN', torque, revolutions, units, caller=caller)


@_xw.func(category='joulebook · Polytropic analysis')
@_xw.arg('P_1', ndim=2, err_to_str=True, doc="initial absolute pressure [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('V_1', ndim=2, err_to_str=True, doc="initial volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('P_2', ndim=2, err_to_str=True, doc="final absolute pressure [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('V_2', ndim=2, err_to_str=True, doc="final volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_POLY_EXPONENT(P_1, V_1, P_2, V_2, units=None, caller=None):
    'Polytropic exponent n of the path P·V^n = C through two states.'
    return _cell('JB_POLY_EXPONENT', P_1, V_1, P_2, V_2, units, caller=caller)


@_xw.func(category='joulebook · Polytropic analysis')
@_xw.arg('P_values', ndim=2, err_to_str=True, doc="absolute pressures (blank rows ignored) [range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('V_values', ndim=2, err_to_str=True, doc="volumes in the same order [range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('show', ndim=2, err_to_str=True, doc='n (default) or all (optional) [text]')
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_POLY_FIT(P_values, V_values, show=None, units=None, caller=None):
    "Least-squares polytropic fit of measured data in ln P – ln V: n, or with show = all a row (n, C in the sheet's P·V^n units, R²)."
    return _cell('JB_POLY_FIT', P_values, V_values, show, units, caller=caller)


@_xw.func(category='joulebook · Polytropic analysis')
@_xw.arg('P_1', ndim=2, err_to_str=True, doc="initial absolute pressure [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('V_1', ndim=2, err_to_str=True, doc="initial volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('V_2', ndim=2, err_to_str=True, doc="final volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('n', ndim=2, err_to_str=True, doc='polytropic exponent n of P·V^n = C [number or range]')
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_POLY_P2(P_1, V_1, V_2, n, units=None, caller=None):
    'End pressure on P·V^n = C: P2 = P1·(V1/V2)^n.'
    return _cell('JB_POLY_P2', P_1, V_1, V_2, n, units, caller=caller)


@_xw.func(category='joulebook · Polytropic analysis')
@_xw.arg('P_1', ndim=2, err_to_str=True, doc="initial absolute pressure [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('V_1', ndim=2, err_to_str=True, doc="initial volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('P_2', ndim=2, err_to_str=True, doc="final absolute pressure [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('n', ndim=2, err_to_str=True, doc='polytropic exponent n of P·V^n = C [number or range]')
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_POLY_V2(P_1, V_1, P_2, n, units=None, caller=None):
    'End volume on P·V^n = C: V2 = V1·(P1/P2)^(1/n).'
    return _cell('JB_POLY_V2', P_1, V_1, P_2, n, units, caller=caller)


@_xw.func(category='joulebook · Polytropic analysis')
@_xw.arg('T_1', ndim=2, err_to_str=True, doc="initial absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('V_1', ndim=2, err_to_str=True, doc="initial volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('V_2', ndim=2, err_to_str=True, doc="final volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('n', ndim=2, err_to_str=True, doc='polytropic exponent n of P·V^n = C [number or range]')
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_POLY_T2_FROM_V(T_1, V_1, V_2, n, units=None, caller=None):
    'End temperature of an ideal gas on P·V^n = C from the volume ratio: T2 = T1·(V1/V2)^(n − 1).'
    return _cell('JB_POLY_T2_FROM_V', T_1, V_1, V_2, n, units, caller=caller)


@_xw.func(category='joulebook · Polytropic analysis')
@_xw.arg('T_1', ndim=2, err_to_str=True, doc="initial absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('P_1', ndim=2, err_to_str=True, doc="initial absolute pressure [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('P_2', ndim=2, err_to_str=True, doc="final absolute pressure [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('n', ndim=2, err_to_str=True, doc='polytropic exponent n of P·V^n = C [number or range]')
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_POLY_T2_FROM_P(T_1, P_1, P_2, n, units=None, caller=None):
    'End temperature of an ideal gas on P·V^n = C from the pressure ratio: T2 = T1·(P2/P1)^((n − 1)/n).'
    return _cell('JB_POLY_T2_FROM_P', T_1, P_1, P_2, n, units, caller=caller)


@_xw.func(category='joulebook · First law of a closed system')
@_xw.arg('dU', ndim=2, err_to_str=True, doc="internal-energy change ΔU [number or range; energy in the units argument's unit (kJ by default)]")
@_xw.arg('W_b', ndim=2, err_to_str=True, doc="boundary work by the system (+ on expansion) [number or range; energy in the units argument's unit (kJ by default)]")
@_xw.arg('W_other', ndim=2, err_to_str=True, doc="other work BY the system: shaft, electrical (negative when done on it) (optional) [number or range; energy in the units argument's unit (kJ by default)]")
@_xw.arg('dKE', ndim=2, err_to_str=True, doc="kinetic-energy change (optional) (optional) [number or range; energy in the units argument's unit (kJ by default)]")
@_xw.arg('dPE', ndim=2, err_to_str=True, doc="potential-energy change (optional) (optional) [number or range; energy in the units argument's unit (kJ by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_BALANCE_HEAT(dU, W_b, W_other=None, dKE=None, dPE=None, units=None, caller=None):
    'Heat of a closed system from the first law, Q = ΔU + ΔKE + ΔPE + W_b + W_other; heat into the system +, work by the system + (work done on it is negative).'
    return _cell('JB_BALANCE_HEAT', dU, W_b, W_other, dKE, dPE, units, caller=caller)


@_xw.func(category='joulebook · First law of a closed system')
@_xw.arg('Q', ndim=2, err_to_str=True, doc="heat into the system [number or range; energy in the units argument's unit (kJ by default)]")
@_xw.arg('W_b', ndim=2, err_to_str=True, doc="boundary work by the system (+ on expansion) [number or range; energy in the units argument's unit (kJ by default)]")
@_xw.arg('dU', ndim=2, err_to_str=True, doc="internal-energy change ΔU [number or range; energy in the units argument's unit (kJ by default)]")
@_xw.arg('W_other', ndim=2, err_to_str=True, doc="other work BY the system: shaft, electrical (negative when done on it) (optional) [number or range; energy in the units argument's unit (kJ by default)]")
@_xw.arg('dKE', ndim=2, err_to_str=True, doc="kinetic-energy change (optional) (optional) [number or range; energy in the units argument's unit (kJ by default)]")
@_xw.arg('dPE', ndim=2, err_to_str=True, doc="potential-energy change (optional) (optional) [number or range; energy in the units argument's unit (kJ by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_BALANCE_GAP(Q, W_b, dU, W_other=None, dKE=None, dPE=None, units=None, caller=None):
    "Checker's first-law gap Q − W − ΔE for numbers already in a workbook; 0 when they close. Heat into the system +, work by the system +."
    return _cell('JB_BALANCE_GAP', Q, W_b, dU, W_other, dKE, dPE, units, caller=caller)


@_xw.func(category='joulebook · First law of a closed system')
@_xw.arg('m', ndim=2, err_to_str=True, doc="mass of the system [number or range; mass in the units argument's unit (kg by default)]")
@_xw.arg('vel_1', ndim=2, err_to_str=True, doc="initial speed [number or range; speed in the units argument's unit (m/s by default)]")
@_xw.arg('vel_2', ndim=2, err_to_str=True, doc="final speed [number or range; speed in the units argument's unit (m/s by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_BALANCE_DELTA_KE(m, vel_1, vel_2, units=None, caller=None):
    'Kinetic-energy change of a moving closed system, ΔKE = m·(V2² − V1²)/2.'
    return _cell('JB_BALANCE_DELTA_KE', m, vel_1, vel_2, units, caller=caller)


@_xw.func(category='joulebook · First law of a closed system')
@_xw.arg('m', ndim=2, err_to_str=True, doc="mass of the system [number or range; mass in the units argument's unit (kg by default)]")
@_xw.arg('z_1', ndim=2, err_to_str=True, doc="initial elevation [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('z_2', ndim=2, err_to_str=True, doc="final elevation [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('g', ndim=2, err_to_str=True, doc="gravity (default 9.80665 m/s2) (optional) [number or range; acceleration in the units argument's unit (m/s2 by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_BALANCE_DELTA_PE(m, z_1, z_2, g=None, units=None, caller=None):
    'Potential-energy change of a closed system raised or lowered, ΔPE = m·g·(z2 − z1), g = 9.80665 m/s² unless given.'
    return _cell('JB_BALANCE_DELTA_PE', m, z_1, z_2, g, units, caller=caller)


@_xw.func(category='joulebook · First law of a closed system')
@_xw.arg('gas', ndim=2, err_to_str=True, doc="gas name (air, nitrogen, CO2 …) or constant-cp model 'air | k = 1.4' [text]")
@_xw.arg('m', ndim=2, err_to_str=True, doc="mass of gas [number or range; mass in the units argument's unit (kg by default)]")
@_xw.arg('T_1', ndim=2, err_to_str=True, doc="initial absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('T_2', ndim=2, err_to_str=True, doc="final absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('W_other', ndim=2, err_to_str=True, doc="other work BY the system: shaft, electrical (negative when done on it) (optional) [number or range; energy in the units argument's unit (kJ by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_HEAT_ISOBARIC_GAS(gas, m, T_1, T_2, W_other=None, units=None, caller=None):
    'Heat to a mass of ideal gas at constant pressure, Q = m·Δh + W_other (Q − W_other = ΔH); heat into the system +, W_other by the system +.'
    return _cell('JB_HEAT_ISOBARIC_GAS', gas, m, T_1, T_2, W_other, units, caller=caller)


@_xw.func(category='joulebook · First law of a closed system')
@_xw.arg('gas', ndim=2, err_to_str=True, doc="gas name (air, nitrogen, CO2 …) or constant-cp model 'air | k = 1.4' [text]")
@_xw.arg('m', ndim=2, err_to_str=True, doc="mass of gas [number or range; mass in the units argument's unit (kg by default)]")
@_xw.arg('T_1', ndim=2, err_to_str=True, doc="initial absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('T_2', ndim=2, err_to_str=True, doc="final absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('W_other', ndim=2, err_to_str=True, doc="other work BY the system: shaft, electrical (negative when done on it) (optional) [number or range; energy in the units argument's unit (kJ by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_HEAT_RIGID_GAS(gas, m, T_1, T_2, W_other=None, units=None, caller=None):
    'Heat to a mass of ideal gas in a rigid vessel, Q = m·Δu + W_other; heat into the system +, W_other by the system + (a stirrer or heater inside is negative).'
    return _cell('JB_HEAT_RIGID_GAS', gas, m, T_1, T_2, W_other, units, caller=caller)


@_xw.func(category='joulebook · End states of processes', call_in_wizard=False)
@_xw.arg('state1', ndim=2, err_to_str=True, doc="initial state text from JB_STATE (real fluid, or ideal gas such as 'air (ideal gas) | …') [text]")
@_xw.arg('path', ndim=2, err_to_str=True, doc="rigid, isobaric, isothermal, isentropic, 'polytropic n = 1.3', 'linear slope = 500 kPa/m3', 'stops P = 4 bar' or 'stops V = 0.02 m3' [text]")
@_xw.arg('end_spec', ndim=2, err_to_str=True, doc="end condition with unit: V2, v2, P2, T2, x2, Q or W, e.g. 'T2 in degC' [text]")
@_xw.arg('end_value', ndim=2, err_to_str=True, doc='value of the end condition, in its unit [number or range]')
@_xw.arg('want', ndim=2, err_to_str=True, doc="P2 T2 v2 V2 x2 u2 h2 s2 phase2 W Q dU dH (P means P2), with unit, e.g. 'P2 in MPa' [text]")
@_xw.arg('mass', ndim=2, err_to_str=True, doc="mass of the system (default 1 of the mass unit) (optional) [number or range; mass in the units argument's unit (kg by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_PROCESS(state1, path, end_spec, end_value, want, mass=None, units=None, caller=None):
    'End state, work or heat of a fixed mass taken from state1 along a path (rigid, isobaric, isothermal, isentropic, polytropic n=…, linear slope=…, stops P=…/V=…) to an end condition. Q in +, W out +.'
    return _cell('JB_PROCESS', state1, path, end_spec, end_value, want, mass, units, caller=caller)


@_xw.func(category='joulebook · End states of processes', call_in_wizard=False)
@_xw.arg('state1', ndim=2, err_to_str=True, doc="initial state text from JB_STATE (real fluid, or ideal gas such as 'air (ideal gas) | …') [text]")
@_xw.arg('path', ndim=2, err_to_str=True, doc="rigid, isobaric, isothermal, isentropic, 'polytropic n = 1.3', 'linear slope = 500 kPa/m3', 'stops P = 4 bar' or 'stops V = 0.02 m3' [text]")
@_xw.arg('end_spec', ndim=2, err_to_str=True, doc="end condition with unit: V2, v2, P2, T2, x2, Q or W, e.g. 'T2 in degC' [text]")
@_xw.arg('end_value', ndim=2, err_to_str=True, doc='value of the end condition, in its unit [number or range]')
@_xw.arg('mass', ndim=2, err_to_str=True, doc="mass of the system (default 1 of the mass unit) (optional) [number or range; mass in the units argument's unit (kg by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_PROCESS_TABLE(state1, path, end_spec, end_value, mass=None, units=None, caller=None):
    'All end-state and energy results of JB_PROCESS as a spilled table (quantity, value, unit): P2 T2 v2 V2 x2 u2 h2 s2 phase2 W Q dU dH. Q in +, W out +.'
    return _cell('JB_PROCESS_TABLE', state1, path, end_spec, end_value, mass, units, caller=caller)


@_xw.func(category='joulebook · End states of processes', call_in_wizard=False)
@_xw.arg('state1', ndim=2, err_to_str=True, doc="initial state text from JB_STATE (real fluid, or ideal gas such as 'air (ideal gas) | …') [text]")
@_xw.arg('path', ndim=2, err_to_str=True, doc="rigid, isobaric, isothermal, isentropic, 'polytropic n = 1.3', 'linear slope = 500 kPa/m3', 'stops P = 4 bar' or 'stops V = 0.02 m3' [text]")
@_xw.arg('end_spec', ndim=2, err_to_str=True, doc="end condition with unit: V2, v2, P2, T2, x2, Q or W, e.g. 'T2 in degC' [text]")
@_xw.arg('end_value', ndim=2, err_to_str=True, doc='value of the end condition, in its unit [number or range]')
@_xw.arg('points', ndim=2, err_to_str=True, doc='number of points (default 21, 2 to 10000) (optional) [number or range]')
@_xw.arg('mass', ndim=2, err_to_str=True, doc="mass of the system (default 1 of the mass unit) (optional) [number or range; mass in the units argument's unit (kg by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_PROCESS_PATH(state1, path, end_spec, end_value, points=None, mass=None, units=None, caller=None):
    'Points along a JB_PROCESS path as a spilled table with a header row: V, P, T, v, s, for a native P–v or T–s chart of the process.'
    return _cell('JB_PROCESS_PATH', state1, path, end_spec, end_value, points, mass, units, caller=caller)


@_xw.func(category='joulebook · Cycles')
@_xw.arg('values', ndim=2, err_to_str=True, doc="heats or works of the cycle's processes [range; energy in the units argument's unit (kJ by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_CYCLE_NET(values, units=None, caller=None):
    "Net value over a cycle's processes: Σ of a range of heats (Q_net) or works (W_net); blanks ignored."
    return _cell('JB_CYCLE_NET', values, units, caller=caller)


@_xw.func(category='joulebook · Cycles')
@_xw.arg('Q_values', ndim=2, err_to_str=True, doc="heats into the system of each process (+ in) [range; energy in the units argument's unit (kJ by default)]")
@_xw.arg('W_values', ndim=2, err_to_str=True, doc="works by the system of each process (+ out) [range; energy in the units argument's unit (kJ by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_CYCLE_GAP(Q_values, W_values, units=None, caller=None):
    'Closure gap of a cycle, Q_net − W_net; 0 when the process results close (ΔE over a cycle is 0). Heat in +, work by the system +.'
    return _cell('JB_CYCLE_GAP', Q_values, W_values, units, caller=caller)


@_xw.func(category='joulebook · Cycles')
@_xw.arg('Q_values', ndim=2, err_to_str=True, doc="heats into the system of each process (+ in) [range; energy in the units argument's unit (kJ by default)]")
@_xw.arg('W_values', ndim=2, err_to_str=True, doc="works by the system of each process (+ out) [range; energy in the units argument's unit (kJ by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_CYCLE_EFFICIENCY(Q_values, W_values, units=None, caller=None):
    'Thermal efficiency W_net / Q_in of a cycle (Q_in = sum of positive heats); refuses a cycle whose Q_net and W_net differ. Heat in +, work by the system +.'
    return _cell('JB_CYCLE_EFFICIENCY', Q_values, W_values, units, caller=caller)


@_xw.func(category='joulebook · Stored expansion energy', call_in_wizard=False)
@_xw.arg('state', ndim=2, err_to_str=True, doc='state text of the contents from JB_STATE (real fluid or ideal gas) [text]')
@_xw.arg('V', ndim=2, err_to_str=True, doc="gas volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('P_amb', ndim=2, err_to_str=True, doc="absolute ambient pressure (default 101.325 kPa) (optional) [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_STORED_ISENTROPIC(state, V, P_amb=None, units=None, caller=None):
    'Stored expansion energy of a gas volume: isentropic expansion to ambient on the real-fluid equation of state, m·(u1 − u2s); liquid contents: JB_STORED_FLASHING_LIQUID. An estimate: pressure tests are governed by the codes.'
    return _cell('JB_STORED_ISENTROPIC', state, V, P_amb, units, caller=caller)


@_xw.func(category='joulebook · Stored expansion energy', call_in_wizard=False)
@_xw.arg('state', ndim=2, err_to_str=True, doc='state text of the contents from JB_STATE: liquid, or liquid and vapour (x < 1) [text]')
@_xw.arg('V', ndim=2, err_to_str=True, doc="volume the contents fill (the vessel volume) [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('P_amb', ndim=2, err_to_str=True, doc="absolute ambient pressure (default 101.325 kPa) (optional) [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_STORED_FLASHING_LIQUID(state, V, P_amb=None, units=None, caller=None):
    'Expansion energy of a liquid stored above its boiling point (liquefied gas, hot water) that flashes on release: isentropic expansion of liquid and flash vapour to ambient, m·(u1 − u2). An estimate, not the blast.'
    return _cell('JB_STORED_FLASHING_LIQUID', state, V, P_amb, units, caller=caller)


@_xw.func(category='joulebook · Stored expansion energy', call_in_wizard=False)
@_xw.arg('P', ndim=2, err_to_str=True, doc="absolute gas pressure [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('V', ndim=2, err_to_str=True, doc="gas volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('k', ndim=2, err_to_str=True, doc='specific-heat ratio cp/cv of the gas (1 < k ≤ 1.7) [number or range]')
@_xw.arg('P_amb', ndim=2, err_to_str=True, doc="absolute ambient pressure (default 101.325 kPa) (optional) [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_STORED_IDEAL_ISENTROPIC(P, V, k, P_amb=None, units=None, caller=None):
    'Stored expansion energy, ideal gas with constant k: P·V/(k − 1)·[1 − (P_amb/P)^((k−1)/k)]. An estimate: pressure tests are governed by the codes and a competent engineer.'
    return _cell('JB_STORED_IDEAL_ISENTROPIC', P, V, k, P_amb, units, caller=caller)


@_xw.func(category='joulebook · Stored expansion energy', call_in_wizard=False)
@_xw.arg('P', ndim=2, err_to_str=True, doc="absolute gas pressure [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('V', ndim=2, err_to_str=True, doc="gas volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('k', ndim=2, err_to_str=True, doc='specific-heat ratio cp/cv of the gas (1 < k ≤ 1.7) [number or range]')
@_xw.arg('P_amb', ndim=2, err_to_str=True, doc="absolute ambient pressure (default 101.325 kPa) (optional) [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_STORED_ISOCHORIC(P, V, k, P_amb=None, units=None, caller=None):
    'Stored energy as a constant-volume release, (P − P_amb)·V/(k − 1): the largest of the usual estimates. An estimate: pressure tests are governed by the codes and a competent engineer.'
    return _cell('JB_STORED_ISOCHORIC', P, V, k, P_amb, units, caller=caller)


@_xw.func(category='joulebook · Blocked-in liquid and thermal relief')
@_xw.arg('state1', ndim=2, err_to_str=True, doc='liquid state text when blocked in, from JB_STATE [text]')
@_xw.arg('T_2', ndim=2, err_to_str=True, doc="temperature after heating [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('shape', ndim=2, err_to_str=True, doc='rigid (default), cylinder (closed ends) or sphere (optional) [text]')
@_xw.arg('D', ndim=2, err_to_str=True, doc="mean diameter of the wall (optional) [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('wall', ndim=2, err_to_str=True, doc="wall thickness (below D/2) (optional) [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('E_mod', ndim=2, err_to_str=True, doc="Young's modulus of the wall (steel about 200 GPa) (optional) [number or range; modulus in the units argument's unit (GPa by default)]")
@_xw.arg('poisson', ndim=2, err_to_str=True, doc="Poisson's ratio ν of the wall, 0 to 0.5 (steel 0.3) (optional) [number or range]")
@_xw.arg('alpha_wall', ndim=2, err_to_str=True, doc="linear expansion coefficient of the wall (steel 1.2e-5 1/K) (optional) [number or range; expansion coefficient in the units argument's unit (1/K by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_BLOCKED_IN_P2(state1, T_2, shape=None, D=None, wall=None, E_mod=None, poisson=None, alpha_wall=None, units=None, caller=None):
    'Pressure after heating a blocked-in, liquid-full pipe or vessel to T_2: shape rigid (upper bound), cylinder or sphere (thin wall that stretches with P and T), solved on the equation of state. An estimate: relief is governed by the codes.'
    return _cell('JB_BLOCKED_IN_P2', state1, T_2, shape, D, wall, E_mod, poisson, alpha_wall, units, caller=caller)


@_xw.func(category='joulebook · Blocked-in liquid and thermal relief')
@_xw.arg('state', ndim=2, err_to_str=True, doc='liquid state text at the relief set pressure, from JB_STATE [text]')
@_xw.arg('Q_dot', ndim=2, err_to_str=True, doc="heat input to the liquid (sun, tracing, process) [number or range; power in the units argument's unit (kW by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_RELIEF_THERMAL_FLOW(state, Q_dot, units=None, caller=None):
    'Thermal-relief volume flow of a blocked-in liquid under a heat input: q = β·Q_dot/(ρ·cp) at the relief state (API 521 hydraulic expansion). An estimate: relief sizing is governed by the codes.'
    return _cell('JB_RELIEF_THERMAL_FLOW', state, Q_dot, units, caller=caller)


@_xw.func(category='joulebook · Heating with time and fire exposure')
@_xw.arg('state1', ndim=2, err_to_str=True, doc='initial state text of the contents, from JB_STATE [text]')
@_xw.arg('V', ndim=2, err_to_str=True, doc="vessel volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('target', ndim=2, err_to_str=True, doc="target with unit: 'P in bar', 'T in degC' or 'x' [text]")
@_xw.arg('target_value', ndim=2, err_to_str=True, doc='value of the target, in its unit [number or range]')
@_xw.arg('Q_dot', ndim=2, err_to_str=True, doc="constant heat rate into the contents (optional) (optional) [number or range; power in the units argument's unit (kW by default)]")
@_xw.arg('UA', ndim=2, err_to_str=True, doc="conductance to a medium at T_source (optional) (optional) [number or range; heat transfer coefficient in the units argument's unit (kW/K by default)]")
@_xw.arg('T_source', ndim=2, err_to_str=True, doc="temperature of the medium (with UA) (optional) [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_TIME_HEATING(state1, V, target, target_value, Q_dot=None, UA=None, T_source=None, units=None, caller=None):
    'Time for a rigid vessel (state1, volume V) to reach a target T, P or x under a heat rate Q_dot and/or UA·(T_source − T), integrated on the equation of state.'
    return _cell('JB_TIME_HEATING', state1, V, target, target_value, Q_dot, UA, T_source, units, caller=caller)


@_xw.func(category='joulebook · Heating with time and fire exposure')
@_xw.arg('state1', ndim=2, err_to_str=True, doc='initial state text of the contents, from JB_STATE [text]')
@_xw.arg('V', ndim=2, err_to_str=True, doc="vessel volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('target', ndim=2, err_to_str=True, doc="target with unit: 'P in bar', 'T in degC' or 'x' [text]")
@_xw.arg('target_value', ndim=2, err_to_str=True, doc='value of the target, in its unit [number or range]')
@_xw.arg('Q_dot', ndim=2, err_to_str=True, doc="constant heat rate into the contents (optional) (optional) [number or range; power in the units argument's unit (kW by default)]")
@_xw.arg('UA', ndim=2, err_to_str=True, doc="conductance to a medium at T_source (optional) (optional) [number or range; heat transfer coefficient in the units argument's unit (kW/K by default)]")
@_xw.arg('T_source', ndim=2, err_to_str=True, doc="temperature of the medium (with UA) (optional) [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('points', ndim=2, err_to_str=True, doc='number of rows, 2 to 1000 (default 11) (optional) [number or range]')
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_TIME_HEATING_TABLE(state1, V, target, target_value, Q_dot=None, UA=None, T_source=None, points=None, units=None, caller=None):
    'The heating of JB_TIME_HEATING as a spilled table of t, T, P, x, Q at points states from state1 to the target.'
    return _cell('JB_TIME_HEATING_TABLE', state1, V, target, target_value, Q_dot, UA, T_source, points, units, caller=caller)


@_xw.func(category='joulebook · Heating with time and fire exposure')
@_xw.arg('A_wet', ndim=2, err_to_str=True, doc="wetted area (the part the code counts) [number or range; area in the units argument's unit (m2 by default)]")
@_xw.arg('F', ndim=2, err_to_str=True, doc='environment factor, 0 < F ≤ 1 (1 bare vessel) (optional) [number or range]')
@_xw.arg('drainage', ndim=2, err_to_str=True, doc='adequate (default) or inadequate (optional) [text]')
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_FIRE_HEAT(A_wet, F=None, drainage=None, units=None, caller=None):
    'Heat input of a pool fire to a vessel by its wetted area (API 521): Q = C·F·A^0.82, C = 43,200 W/m^1.64 with adequate drainage, 70,900 without. An estimate: fire cases follow the codes.'
    return _cell('JB_FIRE_HEAT', A_wet, F, drainage, units, caller=caller)


@_xw.func(category='joulebook · Heating with time and fire exposure')
@_xw.arg('shape', ndim=2, err_to_str=True, doc='horizontal or vertical [text]')
@_xw.arg('D', ndim=2, err_to_str=True, doc="diameter [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('L', ndim=2, err_to_str=True, doc="length between the ends (height when vertical) [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('level', ndim=2, err_to_str=True, doc="liquid level above the bottom [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_WETTED_AREA(shape, D, L, level, units=None, caller=None):
    'Wetted area of a horizontal or vertical cylindrical vessel (flat ends) up to a liquid level.'
    return _cell('JB_WETTED_AREA', shape, D, L, level, units, caller=caller)


@_xw.func(category='joulebook · Heating with time and fire exposure')
@_xw.arg('state1', ndim=2, err_to_str=True, doc='initial state text of the contents, from JB_STATE [text]')
@_xw.arg('shape', ndim=2, err_to_str=True, doc='horizontal or vertical [text]')
@_xw.arg('D', ndim=2, err_to_str=True, doc="diameter [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('L', ndim=2, err_to_str=True, doc="length between the ends (height when vertical) [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('target', ndim=2, err_to_str=True, doc="target with unit: 'P in bar', 'T in degC' or 'x' [text]")
@_xw.arg('target_value', ndim=2, err_to_str=True, doc='value of the target, in its unit [number or range]')
@_xw.arg('F', ndim=2, err_to_str=True, doc='environment factor, 0 < F ≤ 1 (default 1) (optional) [number or range]')
@_xw.arg('drainage', ndim=2, err_to_str=True, doc='adequate (default) or inadequate (optional) [text]')
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_TIME_FIRE(state1, shape, D, L, target, target_value, F=None, drainage=None, units=None, caller=None):
    'Time for a fire-exposed cylindrical vessel to reach a target (e.g. its set pressure), the wetted area following the liquid level, on the equation of state. An estimate: fire cases follow the codes.'
    return _cell('JB_TIME_FIRE', state1, shape, D, L, target, target_value, F, drainage, units, caller=caller)


@_xw.func(category='joulebook · Heating with time and fire exposure')
@_xw.arg('state1', ndim=2, err_to_str=True, doc='initial state text of the contents, from JB_STATE [text]')
@_xw.arg('shape', ndim=2, err_to_str=True, doc='horizontal or vertical [text]')
@_xw.arg('D', ndim=2, err_to_str=True, doc="diameter [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('L', ndim=2, err_to_str=True, doc="length between the ends (height when vertical) [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('target', ndim=2, err_to_str=True, doc="target with unit: 'P in bar', 'T in degC' or 'x' [text]")
@_xw.arg('target_value', ndim=2, err_to_str=True, doc='value of the target, in its unit [number or range]')
@_xw.arg('F', ndim=2, err_to_str=True, doc='environment factor, 0 < F ≤ 1 (default 1) (optional) [number or range]')
@_xw.arg('drainage', ndim=2, err_to_str=True, doc='adequate (default) or inadequate (optional) [text]')
@_xw.arg('points', ndim=2, err_to_str=True, doc='number of rows, 2 to 1000 (default 11) (optional) [number or range]')
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_TIME_FIRE_TABLE(state1, shape, D, L, target, target_value, F=None, drainage=None, points=None, units=None, caller=None):
    'The fire exposure of JB_TIME_FIRE as a spilled table of t, T, P, x, Q at points states.'
    return _cell('JB_TIME_FIRE_TABLE', state1, shape, D, L, target, target_value, F, drainage, points, units, caller=caller)


@_xw.func(category='joulebook · Heating with time and fire exposure')
@_xw.arg('material', ndim=2, err_to_str=True, doc='material name (carbon steel, copper, concrete, water …) [text]')
@_xw.arg('m', ndim=2, err_to_str=True, doc="mass of the batch [number or range; mass in the units argument's unit (kg by default)]")
@_xw.arg('T_1', ndim=2, err_to_str=True, doc="initial absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('T_2', ndim=2, err_to_str=True, doc="final absolute temperature [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('UA', ndim=2, err_to_str=True, doc="conductance between batch and medium [number or range; heat transfer coefficient in the units argument's unit (kW/K by default)]")
@_xw.arg('T_source', ndim=2, err_to_str=True, doc="temperature of the medium [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_TIME_BATCH(material, m, T_1, T_2, UA, T_source, units=None, caller=None):
    'Time to heat or cool a batch of a solid or liquid (c(T) of JB_SOLID_C) from T_1 to T_2 through UA from a medium at T_source: m·∫c dT/(UA·(T_source − T)).'
    return _cell('JB_TIME_BATCH', material, m, T_1, T_2, UA, T_source, units, caller=caller)


@_xw.func(category='joulebook · First law of a closed system')
@_xw.arg('Q_dot', ndim=2, err_to_str=True, doc="heat rate into the system [number or range; power in the units argument's unit (kW by default)]")
@_xw.arg('W_dot', ndim=2, err_to_str=True, doc="power delivered by the system (optional) (optional) [number or range; power in the units argument's unit (kW by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_BALANCE_RATE(Q_dot, W_dot=None, units=None, caller=None):
    'First law per unit time of a closed system: dE/dt = Q_dot − W_dot (heat in, work out).'
    return _cell('JB_BALANCE_RATE', Q_dot, W_dot, units, caller=caller)


@_xw.func(category='joulebook · Blocked-in liquid and thermal relief')
@_xw.arg('state1', ndim=2, err_to_str=True, doc='liquid state text when blocked in, from JB_STATE [text]')
@_xw.arg('T_2', ndim=2, err_to_str=True, doc="temperature after heating [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('V', ndim=2, err_to_str=True, doc="container volume (liquid + pocket) at state1 [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('V_gas', ndim=2, err_to_str=True, doc="gas pocket volume at state1 (0: liquid-full) [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('gas', ndim=2, err_to_str=True, doc="pocket gas: nitrogen (default), any gas name, or vapour (the liquid's own, x = 0) (optional) [text]")
@_xw.arg('shape', ndim=2, err_to_str=True, doc='rigid (default), cylinder (closed ends) or sphere (optional) [text]')
@_xw.arg('D', ndim=2, err_to_str=True, doc="mean diameter of the wall (optional) [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('wall', ndim=2, err_to_str=True, doc="wall thickness (below D/2) (optional) [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('E_mod', ndim=2, err_to_str=True, doc="Young's modulus of the wall (steel about 200 GPa) (optional) [number or range; modulus in the units argument's unit (GPa by default)]")
@_xw.arg('poisson', ndim=2, err_to_str=True, doc="Poisson's ratio ν of the wall, 0 to 0.5 (steel 0.3) (optional) [number or range]")
@_xw.arg('alpha_wall', ndim=2, err_to_str=True, doc="linear expansion coefficient of the wall (steel 1.2e-5 1/K) (optional) [number or range; expansion coefficient in the units argument's unit (1/K by default)]")
@_xw.arg('kappa', ndim=2, err_to_str=True, doc="compressibility of a glycol or oil fill (incompressible in the data; default 0) (optional) [number or range; compressibility in the units argument's unit (1/kPa by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_BLOCKED_IN_CUSHION_P2(state1, T_2, V, V_gas, gas=None, shape=None, D=None, wall=None, E_mod=None, poisson=None, alpha_wall=None, kappa=None, units=None, caller=None):
    'Pressure after heating a blocked-in liquid with a gas pocket (nitrogen or any gas, or its own vapour) to T_2, the wall rigid or stretching. An estimate: relief is governed by the codes.'
    return _cell('JB_BLOCKED_IN_CUSHION_P2', state1, T_2, V, V_gas, gas, shape, D, wall, E_mod, poisson, alpha_wall, kappa, units, caller=caller)


@_xw.func(category='joulebook · Heating with time and fire exposure')
@_xw.arg('state1', ndim=2, err_to_str=True, doc='liquid state text when blocked in, from JB_STATE [text]')
@_xw.arg('V', ndim=2, err_to_str=True, doc="container volume (liquid + pocket) at state1 [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('V_gas', ndim=2, err_to_str=True, doc="gas pocket volume at state1 (0: liquid-full) [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('P_set', ndim=2, err_to_str=True, doc="set pressure to reach (absolute) [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('Q_dot', ndim=2, err_to_str=True, doc="constant heat rate into the contents (optional) (optional) [number or range; power in the units argument's unit (kW by default)]")
@_xw.arg('UA', ndim=2, err_to_str=True, doc="conductance to a source at T_source (optional) (optional) [number or range; heat transfer coefficient in the units argument's unit (kW/K by default)]")
@_xw.arg('T_source', ndim=2, err_to_str=True, doc="temperature of the source (with UA) (optional) [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('gas', ndim=2, err_to_str=True, doc='pocket gas: nitrogen (default), any gas name, or vapour (optional) [text]')
@_xw.arg('shape', ndim=2, err_to_str=True, doc='rigid (default), cylinder (closed ends) or sphere (optional) [text]')
@_xw.arg('D', ndim=2, err_to_str=True, doc="mean diameter of the wall (optional) [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('wall', ndim=2, err_to_str=True, doc="wall thickness (below D/2) (optional) [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('E_mod', ndim=2, err_to_str=True, doc="Young's modulus of the wall (steel about 200 GPa) (optional) [number or range; modulus in the units argument's unit (GPa by default)]")
@_xw.arg('poisson', ndim=2, err_to_str=True, doc="Poisson's ratio ν of the wall, 0 to 0.5 (steel 0.3) (optional) [number or range]")
@_xw.arg('alpha_wall', ndim=2, err_to_str=True, doc="linear expansion coefficient of the wall (steel 1.2e-5 1/K) (optional) [number or range; expansion coefficient in the units argument's unit (1/K by default)]")
@_xw.arg('kappa', ndim=2, err_to_str=True, doc="compressibility of a glycol or oil fill (incompressible in the data; default 0) (optional) [number or range; compressibility in the units argument's unit (1/kPa by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_TIME_BLOCKED_IN(state1, V, V_gas, P_set, Q_dot=None, UA=None, T_source=None, gas=None, shape=None, D=None, wall=None, E_mod=None, poisson=None, alpha_wall=None, kappa=None, units=None, caller=None):
    'Time for a heated blocked-in liquid (with an optional gas pocket, the wall rigid or stretching) to reach a set pressure, under Q_dot and/or UA·(T_source − T). An estimate: relief is governed by the codes.'
    return _cell('JB_TIME_BLOCKED_IN', state1, V, V_gas, P_set, Q_dot, UA, T_source, gas, shape, D, wall, E_mod, poisson, alpha_wall, kappa, units, caller=caller)


@_xw.func(category='joulebook · Blocked-in liquid and thermal relief')
@_xw.arg('P', ndim=2, err_to_str=True, doc="absolute pressure inside [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('D', ndim=2, err_to_str=True, doc="mean diameter [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('wall', ndim=2, err_to_str=True, doc="wall thickness (at most D/4) [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('P_out', ndim=2, err_to_str=True, doc="absolute pressure outside (default 101.325 kPa) (optional) [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('f_y', ndim=2, err_to_str=True, doc="yield strength of the wall (default 235 MPa, S235 steel) (optional) [number or range; modulus in the units argument's unit (GPa by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_WALL_HOOP_STRESS(P, D, wall, P_out=None, f_y=None, units=None, caller=None):
    'Hoop stress of a thin cylinder wall, (P − P_out)·D/(2·wall), e.g. at the pressure of a blocked-in or heated case; the audit flags it above the yield strength f_y. An estimate: pressure equipment follows the codes.'
    return _cell('JB_WALL_HOOP_STRESS', P, D, wall, P_out, f_y, units, caller=caller)


@_xw.func(category='joulebook · Blocked-in liquid and thermal relief')
@_xw.arg('P', ndim=2, err_to_str=True, doc="absolute pressure inside [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('D', ndim=2, err_to_str=True, doc="mean diameter [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('wall', ndim=2, err_to_str=True, doc="wall thickness (at most D/4) [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('P_out', ndim=2, err_to_str=True, doc="absolute pressure outside (default 101.325 kPa) (optional) [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('f_y', ndim=2, err_to_str=True, doc="yield strength of the wall (default 235 MPa, S235 steel) (optional) [number or range; modulus in the units argument's unit (GPa by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_WALL_AXIAL_STRESS(P, D, wall, P_out=None, f_y=None, units=None, caller=None):
    'Axial stress of a thin closed cylinder wall (the stress of a thin sphere), (P − P_out)·D/(4·wall); the audit flags it above the yield strength f_y. An estimate: pressure equipment follows the codes.'
    return _cell('JB_WALL_AXIAL_STRESS', P, D, wall, P_out, f_y, units, caller=caller)


@_xw.func(category='joulebook · Heating with time and fire exposure')
@_xw.arg('state1', ndim=2, err_to_str=True, doc='gas state text at the start, from JB_STATE [text]')
@_xw.arg('D', ndim=2, err_to_str=True, doc="diameter of the cylinder [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('L', ndim=2, err_to_str=True, doc="length between the flat ends [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('wall', ndim=2, err_to_str=True, doc="steel wall thickness [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('P_set', ndim=2, err_to_str=True, doc="set pressure of the relief device (absolute) [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('fire', ndim=2, err_to_str=True, doc='hydrocarbon (default) or standard fire curve (optional) [text]')
@_xw.arg('q', ndim=2, err_to_str=True, doc="absorbed heat flux instead of a curve (optional) [number or range; heat flux in the units argument's unit (kW/m2 by default)]")
@_xw.arg('UA_in', ndim=2, err_to_str=True, doc="wall-to-gas conductance (default 10 W/(m2·K) over the area) (optional) [number or range; heat transfer coefficient in the units argument's unit (kW/K by default)]")
@_xw.arg('f_y', ndim=2, err_to_str=True, doc="yield strength of the wall (default 235 MPa, S235 steel) (optional) [number or range; modulus in the units argument's unit (GPa by default)]")
@_xw.arg('P_amb', ndim=2, err_to_str=True, doc="absolute pressure outside (default 101.325 kPa) (optional) [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_TIME_FIRE_GAS(state1, D, L, wall, P_set, fire=None, q=None, UA_in=None, f_y=None, P_amb=None, units=None, caller=None):
    'Time for a gas-filled (unwetted) steel cylinder in a fire to reach its set pressure, gas and wall heated with time. Caution: an unwetted wall can fail before the relief device opens; fire cases follow the codes.'
    return _cell('JB_TIME_FIRE_GAS', state1, D, L, wall, P_set, fire, q, UA_in, f_y, P_amb, units, caller=caller)


@_xw.func(category='joulebook · Heating with time and fire exposure')
@_xw.arg('state1', ndim=2, err_to_str=True, doc='gas state text at the start, from JB_STATE [text]')
@_xw.arg('D', ndim=2, err_to_str=True, doc="diameter of the cylinder [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('L', ndim=2, err_to_str=True, doc="length between the flat ends [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('wall', ndim=2, err_to_str=True, doc="steel wall thickness [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('P_set', ndim=2, err_to_str=True, doc="set pressure of the relief device (absolute) [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('fire', ndim=2, err_to_str=True, doc='hydrocarbon (default) or standard fire curve (optional) [text]')
@_xw.arg('q', ndim=2, err_to_str=True, doc="absorbed heat flux instead of a curve (optional) [number or range; heat flux in the units argument's unit (kW/m2 by default)]")
@_xw.arg('UA_in', ndim=2, err_to_str=True, doc="wall-to-gas conductance (default 10 W/(m2·K) over the area) (optional) [number or range; heat transfer coefficient in the units argument's unit (kW/K by default)]")
@_xw.arg('f_y', ndim=2, err_to_str=True, doc="yield strength of the wall (default 235 MPa, S235 steel) (optional) [number or range; modulus in the units argument's unit (GPa by default)]")
@_xw.arg('P_amb', ndim=2, err_to_str=True, doc="absolute pressure outside (default 101.325 kPa) (optional) [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('points', ndim=2, err_to_str=True, doc='number of rows, 2 to 1000 (default 11) (optional) [number or range]')
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_TIME_FIRE_GAS_TABLE(state1, D, L, wall, P_set, fire=None, q=None, UA_in=None, f_y=None, P_amb=None, points=None, units=None, caller=None):
    "The fire case of JB_TIME_FIRE_GAS as a spilled table of t, gas T, wall T, P and the hoop stress over the yield strength at the wall's temperature. An unwetted wall can fail before relief opens."
    return _cell('JB_TIME_FIRE_GAS_TABLE', state1, D, L, wall, P_set, fire, q, UA_in, f_y, P_amb, points, units, caller=caller)


@_xw.func(category='joulebook · Heating with time and fire exposure')
@_xw.arg('state1', ndim=2, err_to_str=True, doc='gas state text at the start, from JB_STATE [text]')
@_xw.arg('V', ndim=2, err_to_str=True, doc="vessel volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('d', ndim=2, err_to_str=True, doc="orifice diameter [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('P_target', ndim=2, err_to_str=True, doc="pressure to reach (absolute), above P_back [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('Cd', ndim=2, err_to_str=True, doc='discharge coefficient, 0 < Cd ≤ 1 (default 1) (optional) [number or range]')
@_xw.arg('P_back', ndim=2, err_to_str=True, doc="absolute back pressure (default 101.325 kPa) (optional) [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('m_wall', ndim=2, err_to_str=True, doc="steel wall mass that warms the gas (optional) (optional) [number or range; mass in the units argument's unit (kg by default)]")
@_xw.arg('UA_wall', ndim=2, err_to_str=True, doc="wall-to-gas conductance (with m_wall) (optional) [number or range; heat transfer coefficient in the units argument's unit (kW/K by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_TIME_BLOWDOWN(state1, V, d, P_target, Cd=None, P_back=None, m_wall=None, UA_wall=None, units=None, caller=None):
    "Time to blow a vessel's gas down through an orifice to P_target, the gas that stays expanding isentropically (or warmed by the wall), choked or not, on the equation of state. An estimate: depressuring follows the codes."
    return _cell('JB_TIME_BLOWDOWN', state1, V, d, P_target, Cd, P_back, m_wall, UA_wall, units, caller=caller)


@_xw.func(category='joulebook · Heating with time and fire exposure')
@_xw.arg('state1', ndim=2, err_to_str=True, doc='gas state text at the start, from JB_STATE [text]')
@_xw.arg('V', ndim=2, err_to_str=True, doc="vessel volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('d', ndim=2, err_to_str=True, doc="orifice diameter [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('P_target', ndim=2, err_to_str=True, doc="pressure to reach (absolute), above P_back [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('Cd', ndim=2, err_to_str=True, doc='discharge coefficient, 0 < Cd ≤ 1 (default 1) (optional) [number or range]')
@_xw.arg('P_back', ndim=2, err_to_str=True, doc="absolute back pressure (default 101.325 kPa) (optional) [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('m_wall', ndim=2, err_to_str=True, doc="steel wall mass that warms the gas (optional) (optional) [number or range; mass in the units argument's unit (kg by default)]")
@_xw.arg('UA_wall', ndim=2, err_to_str=True, doc="wall-to-gas conductance (with m_wall) (optional) [number or range; heat transfer coefficient in the units argument's unit (kW/K by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_BLOWDOWN_T_MIN(state1, V, d, P_target, Cd=None, P_back=None, m_wall=None, UA_wall=None, units=None, caller=None):
    "Lowest temperature of the gas that stays in a vessel blown down to P_target (as JB_TIME_BLOWDOWN): not the wall's or the outlet's temperature. An estimate: minimum design temperatures follow the codes."
    return _cell('JB_BLOWDOWN_T_MIN', state1, V, d, P_target, Cd, P_back, m_wall, UA_wall, units, caller=caller)


@_xw.func(category='joulebook · Heating with time and fire exposure')
@_xw.arg('state1', ndim=2, err_to_str=True, doc='gas state text at the start, from JB_STATE [text]')
@_xw.arg('V', ndim=2, err_to_str=True, doc="vessel volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('d', ndim=2, err_to_str=True, doc="orifice diameter [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('P_target', ndim=2, err_to_str=True, doc="pressure to reach (absolute), above P_back [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('Cd', ndim=2, err_to_str=True, doc='discharge coefficient, 0 < Cd ≤ 1 (default 1) (optional) [number or range]')
@_xw.arg('P_back', ndim=2, err_to_str=True, doc="absolute back pressure (default 101.325 kPa) (optional) [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('m_wall', ndim=2, err_to_str=True, doc="steel wall mass that warms the gas (optional) (optional) [number or range; mass in the units argument's unit (kg by default)]")
@_xw.arg('UA_wall', ndim=2, err_to_str=True, doc="wall-to-gas conductance (with m_wall) (optional) [number or range; heat transfer coefficient in the units argument's unit (kW/K by default)]")
@_xw.arg('points', ndim=2, err_to_str=True, doc='number of rows, 2 to 1000 (default 11) (optional) [number or range]')
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_TIME_BLOWDOWN_TABLE(state1, V, d, P_target, Cd=None, P_back=None, m_wall=None, UA_wall=None, points=None, units=None, caller=None):
    'The blowdown of JB_TIME_BLOWDOWN as a spilled table of t, P, T, the mass left and the wall temperature.'
    return _cell('JB_TIME_BLOWDOWN_TABLE', state1, V, d, P_target, Cd, P_back, m_wall, UA_wall, points, units, caller=caller)


@_xw.func(category='joulebook · Pressure tests')
@_xw.arg('P_test', ndim=2, err_to_str=True, doc="absolute test pressure (write psig/barg for gauge) [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('V', ndim=2, err_to_str=True, doc="volume under test [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('P_amb', ndim=2, err_to_str=True, doc="absolute ambient pressure (default 101.325 kPa) (optional) [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_TEST_PNEUMATIC_ENERGY(P_test, V, P_amb=None, units=None, caller=None):
    'Stored energy of a pneumatic test by the common code formula, E = 2.5·P·V·[1 − (P_amb/P)^0.286] (P absolute). An estimate: pressure tests are governed by the codes.'
    return _cell('JB_TEST_PNEUMATIC_ENERGY', P_test, V, P_amb, units, caller=caller)


@_xw.func(category='joulebook · Pressure tests')
@_xw.arg('state', ndim=2, err_to_str=True, doc='liquid state text at the test pressure, from JB_STATE [text]')
@_xw.arg('V', ndim=2, err_to_str=True, doc="volume under test [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('shape', ndim=2, err_to_str=True, doc='rigid (default, liquid only), cylinder or sphere (optional) [text]')
@_xw.arg('D', ndim=2, err_to_str=True, doc="mean diameter of the wall (optional) [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('wall', ndim=2, err_to_str=True, doc="wall thickness (below D/2) (optional) [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('E_mod', ndim=2, err_to_str=True, doc="Young's modulus of the wall (steel about 200 GPa) (optional) [number or range; modulus in the units argument's unit (GPa by default)]")
@_xw.arg('poisson', ndim=2, err_to_str=True, doc="Poisson's ratio ν of the wall, 0 to 0.5 (steel 0.3) (optional) [number or range]")
@_xw.arg('P_amb', ndim=2, err_to_str=True, doc="absolute ambient pressure (default 101.325 kPa) (optional) [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_TEST_HYDRO_ENERGY(state, V, shape=None, D=None, wall=None, E_mod=None, poisson=None, P_amb=None, units=None, caller=None):
    "Stored energy of a hydrostatic test: the liquid's isentropic expansion on its equation of state plus the stretched wall's elastic energy (cylinder or sphere). An estimate: tests are governed by the codes."
    return _cell('JB_TEST_HYDRO_ENERGY', state, V, shape, D, wall, E_mod, poisson, P_amb, units, caller=caller)


@_xw.func(category='joulebook · Pressure tests')
@_xw.arg('E', ndim=2, err_to_str=True, doc="stored energy [number or range; energy in the units argument's unit (kJ by default)]")
@_xw.arg('basis', ndim=2, err_to_str=True, doc="energy per mass of TNT (default 4.184 MJ/kg) (optional) [number or range; specific energy in the units argument's unit (kJ/kg by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_TEST_TNT(E, basis=None, units=None, caller=None):
    'TNT equivalent of a stored energy, W = E/e_TNT, on the conventional basis e_TNT = 4.184 MJ/kg unless another basis is given.'
    return _cell('JB_TEST_TNT', E, basis, units, caller=caller)


@_xw.func(category='joulebook · Pressure tests')
@_xw.arg('W_TNT', ndim=2, err_to_str=True, doc="TNT-equivalent mass [number or range; mass in the units argument's unit (kg by default)]")
@_xw.arg('Z', ndim=2, err_to_str=True, doc='scaled distance from the applicable code, m/kg^(1/3) [number or range]')
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_TEST_DISTANCE(W_TNT, Z, units=None, caller=None):
    'Distance by cube-root (Hopkinson–Cranz) scaling, R = Z·W^(1/3), with the scaled distance Z your code sets for the overpressure it limits. Exclusion zones follow the codes.'
    return _cell('JB_TEST_DISTANCE', W_TNT, Z, units, caller=caller)


@_xw.func(category='joulebook · Indicator diagrams, engines and compressors')
@_xw.arg('crank_angle', ndim=2, err_to_str=True, doc='crank angle in degrees from top dead centre [number or range]')
@_xw.arg('bore', ndim=2, err_to_str=True, doc="cylinder bore [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('stroke', ndim=2, err_to_str=True, doc="piston stroke [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('rod', ndim=2, err_to_str=True, doc="connecting-rod length (centre to centre) [number or range; length in the units argument's unit (m by default)]")
@_xw.arg('V_c', ndim=2, err_to_str=True, doc="clearance volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_ENGINE_VOLUME(crank_angle, bore, stroke, rod, V_c, units=None, caller=None):
    'Cylinder volume at a crank angle (degrees from top dead centre) of a slider-crank: V = V_c + π·B²/4·(l + a − a·cos θ − √(l² − a²·sin²θ)), a = S/2.'
    return _cell('JB_ENGINE_VOLUME', crank_angle, bore, stroke, rod, V_c, units, caller=caller)


@_xw.func(category='joulebook · Indicator diagrams, engines and compressors')
@_xw.arg('W_cycle', ndim=2, err_to_str=True, doc="net work of one cycle of one cylinder (∮P dV) [number or range; energy in the units argument's unit (kJ by default)]")
@_xw.arg('speed', ndim=2, err_to_str=True, doc='shaft speed in rev/min [number or range]')
@_xw.arg('cylinders', ndim=2, err_to_str=True, doc='number of cylinders [number or range]')
@_xw.arg('revs_per_cycle', ndim=2, err_to_str=True, doc='2 four-stroke, 1 two-stroke or compressor [number or range]')
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_ENGINE_POWER(W_cycle, speed, cylinders, revs_per_cycle, units=None, caller=None):
    'Indicated power from the net work of one cycle of one cylinder: W·N·z/n_R (N in rev/min, n_R = 2 four-stroke, 1 two-stroke or compressor).'
    return _cell('JB_ENGINE_POWER', W_cycle, speed, cylinders, revs_per_cycle, units, caller=caller)


@_xw.func(category='joulebook · Indicator diagrams, engines and compressors')
@_xw.arg('W_cycle', ndim=2, err_to_str=True, doc="net work of one cycle of one cylinder [number or range; energy in the units argument's unit (kJ by default)]")
@_xw.arg('V_d', ndim=2, err_to_str=True, doc="swept volume π·B²/4·S [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_ENGINE_MEP(W_cycle, V_d, units=None, caller=None):
    'Mean effective pressure of a cycle: MEP = W_cycle/V_d (V_d the swept volume).'
    return _cell('JB_ENGINE_MEP', W_cycle, V_d, units, caller=caller)


@_xw.func(category='joulebook · Indicator diagrams, engines and compressors')
@_xw.arg('clearance', ndim=2, err_to_str=True, doc='clearance ratio V_c/V_d, 0 to 1 [number or range]')
@_xw.arg('P_suction', ndim=2, err_to_str=True, doc="absolute suction pressure [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('P_discharge', ndim=2, err_to_str=True, doc="absolute discharge pressure [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('n', ndim=2, err_to_str=True, doc='polytropic exponent of the re-expansion, 1 to 1.7 [number or range]')
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_COMPRESSOR_VOLUMETRIC_EFFICIENCY(clearance, P_suction, P_discharge, n, units=None, caller=None):
    'Clearance volumetric efficiency of a reciprocating compressor: 1 + c − c·(P_d/P_s)^(1/n), c = V_c/V_d.'
    return _cell('JB_COMPRESSOR_VOLUMETRIC_EFFICIENCY', clearance, P_suction, P_discharge, n, units, caller=caller)


@_xw.func(category='joulebook · Indicator diagrams, engines and compressors')
@_xw.arg('P_values', ndim=2, err_to_str=True, doc="absolute pressures around the loop, in order [range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('V_values', ndim=2, err_to_str=True, doc="volumes in the same order [range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_POLY_FIT_BRANCHES(P_values, V_values, units=None, caller=None):
    'Polytropic exponents of the compression and expansion branches of a measured closed loop, fitted apart with valve plateaus (suction, discharge) left out: a row (n compression, n expansion, R² compression, R² expansion).'
    return _cell('JB_POLY_FIT_BRANCHES', P_values, V_values, units, caller=caller)


@_xw.func(category='joulebook · Humid air')
@_xw.arg('want', ndim=2, err_to_str=True, doc="wanted property with unit, e.g. 'HR in kg/kg', 'Tdp in degC', 'RH in %' [text]")
@_xw.arg('P', ndim=2, err_to_str=True, doc="total (absolute) pressure [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('spec1', ndim=2, err_to_str=True, doc="first property phrase, e.g. 'T in degC' [text]")
@_xw.arg('value1', ndim=2, err_to_str=True, doc='value of the first property [number or range]')
@_xw.arg('spec2', ndim=2, err_to_str=True, doc="second property phrase, e.g. 'RH' (0 to 1) or 'RH in %' [text]")
@_xw.arg('value2', ndim=2, err_to_str=True, doc='value of the second property [number or range]')
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_HUMID_AIR(want, P, spec1, value1, spec2, value2, units=None, caller=None):
    'Property of humid air (T RH HR Tdp Twb h v; h and v per kg dry air) at total pressure P fixed by two of T RH HR Tdp Twb h, each with its unit: real humid air, ASHRAE RP-1485.'
    return _cell('JB_HUMID_AIR', want, P, spec1, value1, spec2, value2, units, caller=caller)


@_xw.func(category='joulebook · Humid air')
@_xw.arg('P_1', ndim=2, err_to_str=True, doc="absolute pressure of the intake air [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('T_1', ndim=2, err_to_str=True, doc="temperature of the intake air [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('RH_1', ndim=2, err_to_str=True, doc='relative humidity of the intake air, 0 to 1 [number or range]')
@_xw.arg('P_2', ndim=2, err_to_str=True, doc="absolute pressure in the receiver [number or range; pressure in the units argument's unit (kPa by default)]")
@_xw.arg('T_2', ndim=2, err_to_str=True, doc="temperature in the receiver [number or range; temperature in the units argument's unit (K by default)]")
@_xw.arg('V_2', ndim=2, err_to_str=True, doc="receiver volume [number or range; volume in the units argument's unit (m3 by default)]")
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_HUMID_CONDENSATE(P_1, T_1, RH_1, P_2, T_2, V_2, units=None, caller=None):
    'Water condensed in a compressed-air receiver of volume V_2 at (P_2, T_2) from air taken in at (P_1, T_1, RH_1): m_da·max(0, HR1 − HR_sat2), real humid air (RP-1485).'
    return _cell('JB_HUMID_CONDENSATE', P_1, T_1, RH_1, P_2, T_2, V_2, units, caller=caller)


@_xw.func(category='joulebook · States and real-fluid properties')
@_xw.arg('substance', ndim=2, err_to_str=True, doc="fluid name (water, air, R134a, CO2 …; 'water (IF97)' for the industrial formulation) or a state text from JB_STATE [text]")
@_xw.arg('coordinates', ndim=2, err_to_str=True, doc='T-s, P-v, P-h or h-s (y–x) [text]')
@_xw.arg('points', ndim=2, err_to_str=True, doc='points on each side, 2 to 1000 (default 11) (optional) [number or range]')
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_CHART_DOME(substance, coordinates, points=None, units=None, caller=None):
    'The saturation dome of a real fluid as a spilled two-column table for a native chart: T-s, P-v, P-h or h-s, up the liquid line to the critical point and down the vapour line.'
    return _cell('JB_CHART_DOME', substance, coordinates, points, units, caller=caller)


@_xw.func(category='joulebook · States and real-fluid properties')
@_xw.arg('substance', ndim=2, err_to_str=True, doc="fluid name (water, air, R134a, CO2 …; 'water (IF97)' for the industrial formulation) or a state text from JB_STATE [text]")
@_xw.arg('coordinates', ndim=2, err_to_str=True, doc='T-s, P-v, P-h or h-s (y–x) [text]')
@_xw.arg('fixed', ndim=2, err_to_str=True, doc="the constant property with unit, e.g. 'P in bar' [text]")
@_xw.arg('fixed_value', ndim=2, err_to_str=True, doc='its value [number or range]')
@_xw.arg('x_from', ndim=2, err_to_str=True, doc="first value of the chart's x quantity (unit-system unit) [number or range]")
@_xw.arg('x_to', ndim=2, err_to_str=True, doc="last value of the chart's x quantity [number or range]")
@_xw.arg('points', ndim=2, err_to_str=True, doc='number of points, 2 to 1000 (default 11) (optional) [number or range]')
@_xw.arg('units', ndim=2, err_to_str=True, doc="unit system of numbers without a written unit: K-kPa-kJ (default), K-Pa-J, degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L' (optional) [text]")
def JB_CHART_ISOLINE(substance, coordinates, fixed, fixed_value, x_from, x_to, points=None, units=None, caller=None):
    "A line of constant T, P, v, h or s across a T-s, P-v, P-h or h-s chart as a spilled table, the chart's x quantity running from x_from to x_to."
    return _cell('JB_CHART_ISOLINE', substance, coordinates, fixed, fixed_value, x_from, x_to, points, units, caller=caller)


@_xw.func(category='joulebook · Units and information')
@_xw.arg('value', ndim=2, err_to_str=True, doc='number to convert [number or range]')
@_xw.arg('from_unit', ndim=2, err_to_str=True, doc='unit of value, e.g. psig [text]')
@_xw.arg('to_unit', ndim=2, err_to_str=True, doc='wanted unit, e.g. kPa [text]')
def JB_CONVERT(value, from_unit, to_unit, caller=None):
    "Convert a value between units of the same quantity; temperatures convert as absolute (27 degC → 300.15 K), gauge pressure uses 101.325 kPa unless written 'kPag @ 95 kPa'."
    return _cell('JB_CONVERT', value, from_unit, to_unit, caller=caller)


@_xw.func(category='joulebook · Units and information')
@_xw.arg('cell', 'range', doc='a cell holding a joulebook result, e.g. B7 [text]')
def JB_WHY(cell, caller=None):
    'The joulebook message behind a cell\'s failure (its error value in a workbook whose JB_ERRORS name is "values", or its text); blank when the cell did not fail.'
    return _why('JB_WHY', cell, caller=caller)


@_xw.func(category='joulebook · Units and information')
@_xw.arg('topic', ndim=2, err_to_str=True, doc='version (default), fluids, materials or units (optional) [text]')
def JB_ABOUT(topic=None, caller=None):
    'joulebook and property-library versions; with a topic, a spilled list: fluids, materials, units.'
    return _cell('JB_ABOUT', topic, caller=caller)
