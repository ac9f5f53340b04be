"""Temperature correction of blood gases measured at 37 degC to the patient's temperature.

=====================================  ==========================================================
``ph_at_temperature_rosenthal``        pH_T = pH37 + (T - 37) x (-0.0147 + 0.0065 x (7.40 - pH37))
``pco2_at_temperature``                PCO2_T = PCO2_37 x 10 ^ (0.019 x (T - 37))
``po2_at_temperature_severinghaus``    PO2_T = PO2_37 x exp((T - 37) x k(PO2)), Severinghaus 1979 eq 3
=====================================  ==========================================================
"""

from __future__ import annotations

import math

from .errors import require_number

#: log10 change in PCO2 per degC (instrument convention 0.019; Bradley 1956 gives 0.0185)
PCO2_LOG10_PER_DEGC = 0.019
T_LOW_C, T_HIGH_C = 15.0, 43.0


def ph_at_temperature_rosenthal(*, ph: float, temperature_c: float) -> float:
    """pH at the patient's temperature from the 37 degC value (Rosenthal 1948).

    pH_T = pH37 + (T - 37) x [-0.0147 + 0.0065 x (7.40 - pH37)].

    Examples
    --------
    >>> round(ph_at_temperature_rosenthal(ph=7.30, temperature_c=32.0), 4)
    7.3702
    """
    ph37 = require_number("ph", ph, low=6.5, high=8.0)
    t = require_number("temperature_c", temperature_c, low=T_LOW_C, high=T_HIGH_C, unit="degC")
    return ph37 + (t - 37.0) * (-0.0147 + 0.0065 * (7.40 - ph37))


def pco2_at_temperature(
    *, pco2_mmhg: float, temperature_c: float, factor: float = PCO2_LOG10_PER_DEGC
) -> float:
    """PCO2 at the patient's temperature: PCO2_37 x 10^(0.019 x (T - 37)).

    Examples
    --------
    >>> round(pco2_at_temperature(pco2_mmhg=45.0, temperature_c=32.0), 2)
    36.16
    """
    pco2 = require_number("pco2_mmhg", pco2_mmhg, low=1.0, high=300.0, unit="mmHg")
    t = require_number("temperature_c", temperature_c, low=T_LOW_C, high=T_HIGH_C, unit="degC")
    return pco2 * 10.0 ** (factor * (t - 37.0))


def _k_severinghaus(po2_mmhg: float) -> float:
    """Delta ln PO2 per degC (Severinghaus 1979 eq 3, read as 0.243 x (PO2/100)^3.88)."""
    return 0.058 / (0.243 * (po2_mmhg / 100.0) ** 3.88 + 1.0) + 0.013


def po2_at_temperature_severinghaus(
    *, po2_mmhg: float, temperature_c: float, integrate: bool = False, step_c: float = 0.1
) -> float:
    """PO2 at the patient's temperature (Severinghaus 1979 eq 3).

    Single step: PO2_T = PO2_37 x exp((T - 37) x k(PO2_37)); with ``integrate`` the coefficient is
    re-evaluated at the current PO2 in steps of ``step_c`` degC.

    Examples
    --------
    >>> round(po2_at_temperature_severinghaus(po2_mmhg=90.0, temperature_c=32.0), 1)
    65.7
    >>> round(po2_at_temperature_severinghaus(po2_mmhg=90.0, temperature_c=32.0, integrate=True), 1)
    64.6
    """
    po2 = require_number("po2_mmhg", po2_mmhg, low=1.0, high=800.0, unit="mmHg")
    t = require_number("temperature_c", temperature_c, low=T_LOW_C, high=T_HIGH_C, unit="degC")
    if not integrate:
        return po2 * math.exp((t - 37.0) * _k_severinghaus(po2))
    n = max(1, math.ceil(abs(t - 37.0) / step_c))
    dt = (t - 37.0) / n
    value = po2
    for _ in range(n):
        # midpoint rule: coefficient at the half-step PO2
        mid = value * math.exp(0.5 * dt * _k_severinghaus(value))
        value *= math.exp(dt * _k_severinghaus(mid))
    return value
