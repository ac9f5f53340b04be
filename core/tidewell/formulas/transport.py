"""Oxygen for transport: cylinder contents, the oxygen a journey needs, and whether it is enough.

===============================  ================================================================
``free_gas_litres``              free gas of one cylinder above a residual pressure (ideal gas) [L]
``usable_litres``                free gas less a reserve fraction of the contents [L]
``required_litres``              flow x duration x safety factor [L]
``minutes_available``            usable litres / flow [min]
``cylinders_needed``             whole cylinders of one kind to cover a requirement
``ventilator_oxygen_flow``       O2 drawn by a ventilator from VE, FiO2 and a device allowance [L/min]
``oxygen_supply_plan``           all of the above for one set of cylinders (a NamedTuple)
===============================  ================================================================

Decisions (cylinder_ideal_gas, transport_reserve; none has a single authoritative source: common practice):

- **Ideal gas.** Free gas at about 1 atm = water capacity x gauge pressure / 1.01325 bar. Oxygen is not
  ideal: at 15 degC its compressibility factor Z is about 0.93 at 137-200 bar (0.94 at 230 bar), so a
  cylinder really holds about 6-7 % *more* than this estimate. The ideal figure is therefore
  conservative for oxygen (it would be optimistic for air).
- **Gauge pressure** is used as read; a gauge reads about 1.1 bar lower per degC colder with the same
  contents, so read it at the temperature of use.
- **Margin.** The need is flow x planned duration x ``safety_factor`` (default **1.5**: "carry 1.5-2
  times the oxygen calculated for the trip"). Two further margins are available and off by default:
  ``reserve_fraction`` (default **0**; e.g. 0.25 keeps a quarter of the contents untouched) and a
  ``residual_pressure`` below which a cylinder is treated as empty (default **0**; e.g. 14 bar /
  200 psi). Turning all three on stacks them (1.5 x and a quarter held back is a 2 x margin).
- **Ventilated patients.** O2 drawn = VE x (FiO2 - 0.2095) / (1 - 0.2095) + device allowance: the
  mixing balance of pure O2 with air (exact for a blender or turbine ventilator that entrains air),
  plus an allowance (default **2 L/min**) for bias/trigger flow and leaks. Gas-driven (pneumatic)
  ventilators also consume driving gas, which can be as much again as VE: set the allowance from the
  device manual.
"""

from __future__ import annotations

import math
from typing import NamedTuple

from ..errors import InputError, require_number

#: 1 standard atmosphere in bar (exact)
ATM_BAR = 1.01325
#: O2 fraction of dry air (US Standard Atmosphere 1976, from memory)
AIR_O2_FRACTION = 0.2095
#: default multiplier on the planned oxygen (common practice: 1.5-2 x)
DEFAULT_SAFETY_FACTOR = 1.5
#: default fraction of the contents held back (off: the safety factor is the default margin)
DEFAULT_RESERVE_FRACTION = 0.0
#: default device allowance for a ventilated patient [L/min] (bias flow, leaks; common practice)
DEFAULT_DEVICE_ALLOWANCE_L_MIN = 2.0
#: accepted cylinder gauge pressures [bar]
PRESSURE_LOW_BAR, PRESSURE_HIGH_BAR = 1.0, 350.0


def free_gas_litres(*, water_capacity_l: float, pressure_bar: float, residual_bar: float = 0.0) -> float:
    """Free gas (litres at about 1 atm) in one cylinder above a residual pressure, ideal-gas estimate.

    V_free = water capacity x (P_gauge - P_residual) / 1.01325.

    Parameters
    ----------
    water_capacity_l : float
        Internal (water) volume of the cylinder. [L] Accepted 0.1-100.
    pressure_bar : float
        Gauge pressure. [bar] Accepted 1-350.
    residual_bar : float
        Gauge pressure at which the cylinder counts as empty. [bar] Accepted 0 to below
        ``pressure_bar``.

    Returns
    -------
    float
        Free gas. [L] Conservative for oxygen (real O2 holds about 6-7 % more at 137-230 bar).

    Raises
    ------
    InputError
        ``inconsistent`` when the residual pressure is not below the gauge pressure.

    References
    ----------
    cylinder_ideal_gas, coolprop2014 (compressibility of O2).

    Examples
    --------
    >>> round(free_gas_litres(water_capacity_l=10.0, pressure_bar=200.0), 1)
    1973.8
    """
    wc = require_number("water_capacity_l", water_capacity_l, low=0.1, high=100.0, unit="L")
    p = require_number("pressure_bar", pressure_bar, low=PRESSURE_LOW_BAR, high=PRESSURE_HIGH_BAR, unit="bar")
    residual = require_number("residual_bar", residual_bar, low=0.0, high=PRESSURE_HIGH_BAR, unit="bar")
    if residual >= p:
        raise InputError(
            "residual_bar",
            residual,
            f"must be below the cylinder pressure ({p:g} bar): there is no usable gas",
            code="inconsistent",
        )
    return wc * (p - residual) / ATM_BAR


def usable_litres(*, free_gas_l: float, reserve_fraction: float = DEFAULT_RESERVE_FRACTION) -> float:
    """Free gas less a reserve held back: V_usable = V_free x (1 - reserve fraction).

    Parameters
    ----------
    free_gas_l : float
        Free gas. [L] Accepted 0-1e7.
    reserve_fraction : float
        Share of the contents not planned for use. [1] Accepted 0-0.9. Default 0.

    Returns
    -------
    float
        Usable gas. [L]

    References
    ----------
    transport_reserve.

    Examples
    --------
    >>> round(usable_litres(free_gas_l=1973.85, reserve_fraction=0.25), 1)
    1480.4
    """
    v = require_number("free_gas_l", free_gas_l, low=0.0, high=1e7, unit="L")
    r = require_number("reserve_fraction", reserve_fraction, low=0.0, high=0.9)
    return v * (1.0 - r)


def required_litres(
    *, flow_l_min: float, duration_min: float, safety_factor: float = DEFAULT_SAFETY_FACTOR
) -> float:
    """Oxygen a journey needs: flow x duration x safety factor.

    Parameters
    ----------
    flow_l_min : float
        Oxygen flow. [L/min] Accepted 0.1-200.
    duration_min : float
        Planned duration, door to door. [min] Accepted 1-4320 (72 h).
    safety_factor : float
        Multiplier for delays. [1] Accepted 1-3. Default 1.5.

    Returns
    -------
    float
        Oxygen needed. [L]

    References
    ----------
    transport_reserve.

    Examples
    --------
    >>> required_litres(flow_l_min=4.0, duration_min=60.0)
    360.0
    """
    flow = require_number("flow_l_min", flow_l_min, low=0.1, high=200.0, unit="L/min")
    minutes = require_number("duration_min", duration_min, low=1.0, high=4320.0, unit="min")
    factor = require_number("safety_factor", safety_factor, low=1.0, high=3.0)
    return flow * minutes * factor


def minutes_available(*, litres: float, flow_l_min: float) -> float:
    """How long a volume of oxygen lasts at a flow: minutes = litres / flow.

    Parameters
    ----------
    litres : float
        Usable oxygen. [L] Accepted 0-1e7.
    flow_l_min : float
        Flow. [L/min] Accepted 0.1-200.

    Returns
    -------
    float
        Minutes. [min]

    References
    ----------
    cylinder_ideal_gas.

    Examples
    --------
    >>> round(minutes_available(litres=1973.85, flow_l_min=15.0), 2)
    131.59
    """
    v = require_number("litres", litres, low=0.0, high=1e7, unit="L")
    flow = require_number("flow_l_min", flow_l_min, low=0.1, high=200.0, unit="L/min")
    return v / flow


def cylinders_needed(*, required_l: float, usable_per_cylinder_l: float) -> int:
    """Whole cylinders of one kind (same size and pressure) that cover a requirement: ceil(need / each).

    Parameters
    ----------
    required_l : float
        Oxygen needed. [L] Accepted 0-1e7.
    usable_per_cylinder_l : float
        Usable oxygen in one cylinder. [L] Must be above 0.

    Returns
    -------
    int
        Number of cylinders (at least 1).

    References
    ----------
    transport_reserve.

    Examples
    --------
    >>> cylinders_needed(required_l=900.0, usable_per_cylinder_l=454.0)
    2
    """
    need = require_number("required_l", required_l, low=0.0, high=1e7, unit="L")
    each = require_number("usable_per_cylinder_l", usable_per_cylinder_l, low=1e-9, high=1e6, unit="L")
    return max(1, math.ceil(need / each))


def ventilator_oxygen_flow(
    *,
    minute_ventilation_l_min: float,
    fio2_fraction: float,
    device_allowance_l_min: float = DEFAULT_DEVICE_ALLOWANCE_L_MIN,
) -> float:
    """Oxygen drawn from the cylinder by a ventilated patient, estimated.

    O2 flow = VE x (FiO2 - 0.2095) / (1 - 0.2095) + device allowance. The first term is the O2 that
    a mix of pure oxygen and air must contain to reach FiO2 (the mixing balance); the allowance covers
    bias/trigger flow and leaks (default 2 L/min) and, for gas-driven ventilators, must include the
    driving gas (device manual). An FiO2 at or below air gives the allowance alone.

    Parameters
    ----------
    minute_ventilation_l_min : float
        Expired minute ventilation. [L/min] Accepted 0.5-60.
    fio2_fraction : float
        Set FiO2. [1] Accepted 0.21-1.0.
    device_allowance_l_min : float
        Added device consumption. [L/min] Accepted 0-60. Default 2.

    Returns
    -------
    float
        Estimated oxygen flow. [L/min]

    References
    ----------
    ventilator_o2_estimate.

    Examples
    --------
    >>> round(ventilator_oxygen_flow(minute_ventilation_l_min=8.0, fio2_fraction=0.5), 2)
    4.94
    >>> ventilator_oxygen_flow(minute_ventilation_l_min=8.0, fio2_fraction=1.0)
    10.0
    """
    ve = require_number(
        "minute_ventilation_l_min", minute_ventilation_l_min, low=0.5, high=60.0, unit="L/min"
    )
    fio2 = require_number("fio2_fraction", fio2_fraction, low=0.21, high=1.0)
    allowance = require_number(
        "device_allowance_l_min", device_allowance_l_min, low=0.0, high=60.0, unit="L/min"
    )
    oxygen_share = max(fio2 - AIR_O2_FRACTION, 0.0) / (1.0 - AIR_O2_FRACTION)
    return ve * oxygen_share + allowance


class SupplyPlan(NamedTuple):
    """Result of :func:`oxygen_supply_plan` (litres at about 1 atm, minutes)."""

    litres_per_cylinder: float  #: free gas of one cylinder above the residual pressure [L]
    available_litres: float  #: all cylinders [L]
    usable_litres: float  #: available less the reserve fraction [L]
    planned_litres: float  #: flow x duration [L]
    required_litres: float  #: planned x safety factor [L]
    minutes_available: float  #: usable / flow [min]
    sufficient: bool  #: usable >= required
    cylinders_needed: int  #: cylinders of this kind that cover the requirement


def oxygen_supply_plan(
    *,
    water_capacity_l: float,
    pressure_bar: float,
    flow_l_min: float,
    duration_min: float,
    cylinders: int = 1,
    safety_factor: float = DEFAULT_SAFETY_FACTOR,
    reserve_fraction: float = DEFAULT_RESERVE_FRACTION,
    residual_bar: float = 0.0,
) -> SupplyPlan:
    """Whether ``cylinders`` identical cylinders cover a journey, and how many would.

    available = n x WC x (P - P_residual) / 1.01325; usable = available x (1 - reserve);
    required = flow x duration x safety factor; sufficient when usable >= required;
    cylinders needed = ceil(required / usable per cylinder).

    Parameters
    ----------
    water_capacity_l : float
        Water capacity of each cylinder. [L] Accepted 0.1-100.
    pressure_bar : float
        Gauge pressure of each cylinder. [bar] Accepted 1-350.
    flow_l_min : float
        Oxygen flow. [L/min] Accepted 0.1-200.
    duration_min : float
        Planned duration. [min] Accepted 1-4320.
    cylinders : int
        Number of cylinders. [1] Accepted 1-100.
    safety_factor : float
        [1] Accepted 1-3. Default 1.5.
    reserve_fraction : float
        [1] Accepted 0-0.9. Default 0.
    residual_bar : float
        [bar] Default 0.

    Returns
    -------
    SupplyPlan

    References
    ----------
    cylinder_ideal_gas, transport_reserve.

    Examples
    --------
    >>> plan = oxygen_supply_plan(water_capacity_l=2.0, pressure_bar=230.0, flow_l_min=4.0, duration_min=60.0)
    >>> round(plan.available_litres, 1), plan.required_litres, plan.sufficient, plan.cylinders_needed
    (454.0, 360.0, True, 1)
    """
    if isinstance(cylinders, bool) or not isinstance(cylinders, int):
        raise InputError("cylinders", cylinders, "must be a whole number", code="not_a_number")
    n = int(require_number("cylinders", cylinders, low=1, high=100))
    each = free_gas_litres(
        water_capacity_l=water_capacity_l, pressure_bar=pressure_bar, residual_bar=residual_bar
    )
    available = n * each
    usable = usable_litres(free_gas_l=available, reserve_fraction=reserve_fraction)
    usable_each = usable_litres(free_gas_l=each, reserve_fraction=reserve_fraction)
    planned = required_litres(flow_l_min=flow_l_min, duration_min=duration_min, safety_factor=1.0)
    required = required_litres(flow_l_min=flow_l_min, duration_min=duration_min, safety_factor=safety_factor)
    minutes = minutes_available(litres=usable, flow_l_min=flow_l_min)
    return SupplyPlan(
        litres_per_cylinder=each,
        available_litres=available,
        usable_litres=usable,
        planned_litres=planned,
        required_litres=required,
        minutes_available=minutes,
        sufficient=usable >= required,
        cylinders_needed=cylinders_needed(required_l=required, usable_per_cylinder_l=usable_each),
    )
