"""Units and exact conversions.

==========================  ===============================================================
``convert``                 convert a number between two units (``substance`` for mass/molar)
``unit_family``             the family of a unit ("pressure", "length", ...)
``units_for``               the units that can be converted to a given unit
``MMHG_PA``, ``FT_M``, ...  the defined factors
``SUBSTANCES``              molar masses and valences for mass <-> molar conversions
==========================  ===============================================================

Only defined factors are used (1 mmHg = 133.322387415 Pa; 1 ft = 0.3048 m; 1 lb = 0.45359237 kg);
nothing is rounded before it is used. Families:

- ``pressure``: mmHg, kPa, hPa, Pa, bar, psi, cmH2O
- ``amount_concentration``: mmol/L, mEq/L (mEq = mmol x |valence|; a synonym for monovalent ions)
- ``mass_concentration``: g/L, g/dL, mg/dL, mg/L
- ``osmolality``: mOsm/kg
- ``temperature``: degC, degF, K
- ``length``: m, km, ft, cm, in
- ``mass``: kg, g, lb
- ``volume``: mL, L
- ``flow``: L/min, mL/min
- ``time``: s, min, h
- ``fraction``: "1" (a bare fraction), "%"

Mass and molar concentrations convert into each other only for a named ``substance``.

References
----------
bipm2019 : the SI Brochure, 9th ed. (2019): defined units; 1 mmHg = 13.5951 g/cm3 x 9.80665 m/s2 x 1 mm
    = 133.322387415 Pa (conventional definition).
nist811 : NIST Special Publication 811 (2008), Guide for the Use of the SI: 1 ft = 0.3048 m,
    1 lb = 0.45359237 kg, 1 psi = 6894.757 Pa, 1 cmH2O (conventional) = 98.0665 Pa.
"""

from __future__ import annotations

import functools
import math

from .errors import NOTHING, InputError

#: 1 mmHg in pascals (conventional millimetre of mercury, exact by definition).
MMHG_PA = 133.322387415
#: 1 international foot in metres (exact, 1959 agreement).
FT_M = 0.3048
#: 1 avoirdupois pound in kilograms (exact).
LB_KG = 0.45359237
#: 1 international inch in metres (exact).
IN_M = 0.0254
#: standard gravity, m/s2 (exact).
G0 = 9.80665
#: 1 psi (pound-force per square inch) in pascals, from the exact pound and inch.
PSI_PA = LB_KG * G0 / IN_M**2
#: 1 conventional centimetre of water in pascals (1000 kg/m3 x g0 x 1 cm).
CMH2O_PA = 98.0665
#: 0 degC in kelvin (exact).
ZERO_C_K = 273.15

# unit -> (family, factor to the family's base unit). Temperature is handled separately.
_LINEAR: dict[str, tuple[str, float]] = {
    # pressure, base Pa
    "mmHg": ("pressure", MMHG_PA),
    "kPa": ("pressure", 1000.0),
    "hPa": ("pressure", 100.0),
    "Pa": ("pressure", 1.0),
    "bar": ("pressure", 1.0e5),
    "psi": ("pressure", PSI_PA),
    "cmH2O": ("pressure", CMH2O_PA),
    # amount concentration, base mmol/L (mEq/L handled by valence)
    "mmol/L": ("amount_concentration", 1.0),
    "umol/L": ("amount_concentration", 1.0e-3),
    "mEq/L": ("amount_concentration", 1.0),
    # mass concentration, base g/L
    "g/L": ("mass_concentration", 1.0),
    "g/dL": ("mass_concentration", 10.0),
    "mg/dL": ("mass_concentration", 0.01),
    "mg/L": ("mass_concentration", 0.001),
    # osmolality
    "mOsm/kg": ("osmolality", 1.0),
    # length, base m
    "m": ("length", 1.0),
    "km": ("length", 1000.0),
    "ft": ("length", FT_M),
    "cm": ("length", 0.01),
    "in": ("length", IN_M),
    # mass, base kg
    "kg": ("mass", 1.0),
    "g": ("mass", 0.001),
    "lb": ("mass", LB_KG),
    # volume, base L
    "L": ("volume", 1.0),
    "mL": ("volume", 0.001),
    # flow, base L/min
    "L/min": ("flow", 1.0),
    "mL/min": ("flow", 0.001),
    # time, base min
    "min": ("time", 1.0),
    "s": ("time", 1.0 / 60.0),
    "h": ("time", 60.0),
    # fraction, base 1
    "1": ("fraction", 1.0),
    "%": ("fraction", 0.01),
}
_TEMPERATURE = ("degC", "degF", "K")

#: substance -> (molar mass g/mol, valence, note). Mass <-> molar conversions need one of these.
SUBSTANCES: dict[str, tuple[float, int, str]] = {
    "glucose": (180.156, 0, "C6H12O6"),
    "urea": (60.056, 0, "CH4N2O"),
    # blood urea nitrogen: mass of the two N atoms of urea; converts to mmol/L of urea
    "bun": (28.0134, 0, "urea nitrogen (2 N per urea)"),
    "lactate": (90.08, -1, "lactic acid"),
    "phosphate": (30.973762, 0, "as elemental P"),
    "hb": (16114.5, 0, "haemoglobin per haem (monomer convention)"),
    "sodium": (22.98977, 1, "Na+"),
    "potassium": (39.0983, 1, "K+"),
    "chloride": (35.453, -1, "Cl-"),
    "bicarbonate": (61.0168, -1, "HCO3-"),
    "calcium": (40.078, 2, "Ca2+"),
    "magnesium": (24.305, 2, "Mg2+"),
    "creatinine": (113.12, 0, "C4H7N3O"),
}

ALL_UNITS: tuple[str, ...] = (*_LINEAR, *_TEMPERATURE)


def unit_family(unit: str) -> str:
    """The family of ``unit``; raises ``InputError`` (``bad_unit``) for an unknown unit.

    >>> unit_family("kPa")
    'pressure'
    """
    if unit in _TEMPERATURE:
        return "temperature"
    if isinstance(unit, str) and unit in _LINEAR:
        return _LINEAR[unit][0]
    raise InputError("unit", unit, "is not a unit Tidewell knows", _unit_hint(unit), code="bad_unit")


def _unit_hint(unit: object) -> str:
    if not isinstance(unit, str):
        return "A unit is a short text such as 'mmHg' or 'kPa'."
    import difflib

    close = difflib.get_close_matches(unit, ALL_UNITS, n=1, cutoff=0.5)
    folded = {u.lower(): u for u in ALL_UNITS}
    aliases = {
        "torr": "mmHg",
        "mm hg": "mmHg",
        "c": "degC",
        "°c": "degC",
        "f": "degF",
        "°f": "degF",
        "meq/l": "mEq/L",
        "mmol/l": "mmol/L",
        "ml": "mL",
        "l": "L",
        "lpm": "L/min",
        "l/min": "L/min",
    }
    guess = (
        aliases.get(unit.strip().lower()) or folded.get(unit.strip().lower()) or (close[0] if close else "")
    )
    return f"Did you mean '{guess}'?" if guess else "Known units: " + ", ".join(ALL_UNITS)


def _valence_factor(unit: str, substance: str | None) -> float:
    """mmol/L per unit of amount concentration (mEq/L divides by |valence|)."""
    if unit != "mEq/L" or substance is None:
        return _LINEAR[unit][1]
    valence = abs(SUBSTANCES[substance][1]) or 1
    return 1.0 / valence


def convert(value: float, from_unit: str, to_unit: str, *, substance: str | None = None) -> float:
    """Convert ``value`` from ``from_unit`` to ``to_unit``.

    Mass and molar concentrations convert into each other only when ``substance`` names an
    entry of :data:`SUBSTANCES`; ``mEq/L`` uses the substance's valence (a synonym of mmol/L for
    monovalent ions and when no substance is named).

    Raises
    ------
    InputError
        ``bad_unit`` for unknown units or units of different families; ``missing`` when a
        substance is needed and not given.

    Examples
    --------
    >>> round(convert(6.5, "kPa", "mmHg"), 4)
    48.754
    >>> convert(8000, "ft", "m")
    2438.4
    >>> round(convert(180, "mg/dL", "mmol/L", substance="glucose"), 4)
    9.9913
    """
    fam_from, fam_to = unit_family(from_unit), unit_family(to_unit)
    if substance is not None and substance not in SUBSTANCES:
        raise InputError(
            "substance",
            substance,
            "is not a substance Tidewell can convert",
            "Known: " + ", ".join(SUBSTANCES),
            code="bad_unit",
        )
    if fam_from == "temperature" or fam_to == "temperature":
        if fam_from != fam_to:
            raise _mismatch(from_unit, to_unit)
        return _from_celsius(_to_celsius(value, from_unit), to_unit)
    if fam_from == fam_to:
        if fam_from == "amount_concentration":
            return value * _valence_factor(from_unit, substance) / _valence_factor(to_unit, substance)
        return value * _LINEAR[from_unit][1] / _LINEAR[to_unit][1]
    pair = {fam_from, fam_to}
    if pair == {"amount_concentration", "mass_concentration"}:
        if substance is None:
            raise InputError(
                "substance",
                NOTHING,
                f"is needed to convert {from_unit} to {to_unit}",
                "Name the substance, e.g. 'glucose'.",
                code="missing",
            )
        molar_mass = SUBSTANCES[substance][0]
        if fam_from == "mass_concentration":
            g_per_l = value * _LINEAR[from_unit][1]
            mmol_per_l = g_per_l / molar_mass * 1000.0
            return mmol_per_l / _valence_factor(to_unit, substance)
        mmol_per_l = value * _valence_factor(from_unit, substance)
        g_per_l = mmol_per_l * molar_mass / 1000.0
        return g_per_l / _LINEAR[to_unit][1]
    raise _mismatch(from_unit, to_unit)


def _mismatch(from_unit: str, to_unit: str) -> InputError:
    return InputError(
        "unit", from_unit, f"cannot be converted to {to_unit} (different kinds of quantity)", code="bad_unit"
    )


def _to_celsius(value: float, unit: str) -> float:
    if unit == "degC":
        return value
    if unit == "degF":
        return (value - 32.0) * 5.0 / 9.0
    return value - ZERO_C_K


def _from_celsius(value: float, unit: str) -> float:
    if unit == "degC":
        return value
    if unit == "degF":
        return value * 9.0 / 5.0 + 32.0
    return value + ZERO_C_K


@functools.lru_cache(maxsize=256)
def units_for(target_unit: str, *, substance: str | None = None) -> tuple[str, ...]:
    """Units that :func:`convert` can turn into ``target_unit`` (for this ``substance``).

    >>> units_for("mmHg")
    ('mmHg', 'kPa', 'hPa', 'Pa', 'bar', 'psi', 'cmH2O')
    """
    family = unit_family(target_unit)
    if family == "temperature":
        return _TEMPERATURE
    families = {family}
    if substance is not None and family in ("amount_concentration", "mass_concentration"):
        families = {"amount_concentration", "mass_concentration"}
    out = [u for u, (fam, _) in _LINEAR.items() if fam in families]
    if substance is None or abs(SUBSTANCES.get(substance, (0, 0, ""))[1]) == 0:
        # mEq/L is only meaningful for ions; keep it as the contract's synonym for monovalent ions
        if family == "amount_concentration" and substance is not None:
            out = [u for u in out if u != "mEq/L"]
    return tuple(out)


def is_finite(value: float) -> bool:
    return math.isfinite(value)
