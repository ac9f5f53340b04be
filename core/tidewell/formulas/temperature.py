"""Temperature correction of blood gases between 37 degC (the analyser) and the patient's temperature.

==========================================  =====================================================
``ph_at_temperature_rosenthal``             pH_T = pH37 + (T - 37) x (-0.0147 + 0.0065 x (7.40 - pH37))
``pco2_at_temperature``                     PCO2_T = PCO2_37 x 10 ^ (0.019 x (T - 37))
``po2_at_temperature_severinghaus``         PO2_T = PO2_37 x exp((T - 37) x k(PO2)), Severinghaus eq 3
``ph_at_37_rosenthal``                      the exact inverse of the Rosenthal correction
``pco2_at_37``                              PCO2_37 = PCO2_T x 10 ^ (-0.019 x (T - 37))
``po2_at_37_severinghaus``                  PO2 at 37 degC from the value at T (both PO2 forms)
``severinghaus_po2_coefficient``            k(PO2) = d ln PO2 / dT [1/degC] of eq 3
==========================================  =====================================================

Direction: the ``*_at_temperature`` functions take analyser values (37 degC) to the patient's
temperature T; the ``*_at_37`` functions take values at T back to 37 degC. Each reverse function is
the exact inverse of its forward function (round trips are exact to rounding): Rosenthal and the
PCO2 factor are inverted algebraically; the single-step PO2 form is inverted numerically
(bisection on a strictly increasing map); the integrated PO2 form is the same differential equation
integrated from T back to 37 degC.

Eq 3 is read as k = 0.058 / (0.243 x (PO2/100)^3.88 + 1) + 0.013 (severinghaus1966).
"""

from __future__ import annotations

import math

from ..errors import require_number

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


def severinghaus_po2_coefficient(*, po2_mmhg: float) -> float:
    """d ln PO2 / dT of Severinghaus 1979 eq 3 [1/degC].

    k = 0.058 / (0.243 x (PO2/100)^3.88 + 1) + 0.013.

    Examples
    --------
    >>> round(severinghaus_po2_coefficient(po2_mmhg=100.0), 4)
    0.0597
    """
    po2 = require_number("po2_mmhg", po2_mmhg, low=1.0, high=800.0, unit="mmHg")
    return _k_severinghaus(po2)


def ph_at_37_rosenthal(*, ph: float, temperature_c: float) -> float:
    """pH at 37 degC from the pH at the patient's temperature: the exact inverse of Rosenthal.

    pH_T = pH37 (1 - 0.0065 d) + d (0.0065 x 7.40 - 0.0147), d = T - 37, so
    pH37 = (pH_T - d (0.0481 - 0.0147)) / (1 - 0.0065 d).

    Parameters
    ----------
    ph : float
        pH at the patient's temperature. 6.5-8.0.
    temperature_c : float
        Patient's temperature. [degC] 15-43.

    References
    ----------
    rosenthal1948.

    Examples
    --------
    >>> round(ph_at_37_rosenthal(ph=7.3702, temperature_c=32.0), 3)
    7.3
    """
    ph_t = require_number("ph", ph, low=6.5, high=8.0)
    t = require_number("temperature_c", temperature_c, low=T_LOW_C, high=T_HIGH_C, unit="degC")
    d = t - 37.0
    return (ph_t - d * (0.0065 * 7.40 - 0.0147)) / (1.0 - 0.0065 * d)


def pco2_at_37(*, pco2_mmhg: float, temperature_c: float, factor: float = PCO2_LOG10_PER_DEGC) -> float:
    """PCO2 at 37 degC from the value at the patient's temperature: PCO2_T x 10^(-0.019 x (T - 37)).

    References
    ----------
    bradley1956 (0.0185 theoretical; 0.019 instrument convention, the default).

    Examples
    --------
    >>> round(pco2_at_37(pco2_mmhg=36.16, temperature_c=32.0), 1)
    45.0
    """
    pco2 = require_number("pco2_mmhg", pco2_mmhg, low=1.0, high=300.0, unit="mmHg")
    t = require_number("temperature_c", temperature_c, low=T_LOW_C, high=T_HIGH_C, unit="degC")
    return pco2 * 10.0 ** (-factor * (t - 37.0))


def _integrate(po2: float, t_from: float, t_to: float, step_c: float) -> float:
    # same midpoint scheme as po2_at_temperature_severinghaus(integrate=True), between any two temperatures
    n = max(1, math.ceil(abs(t_to - t_from) / step_c))
    dt = (t_to - t_from) / n
    value = po2
    for _ in range(n):
        mid = value * math.exp(0.5 * dt * _k_severinghaus(value))
        value *= math.exp(dt * _k_severinghaus(mid))
    return value


def po2_at_37_severinghaus(
    *, po2_mmhg: float, temperature_c: float, integrate: bool = False, step_c: float = 0.1
) -> float:
    """PO2 at 37 degC from the PO2 at the patient's temperature (inverse of Severinghaus eq 3).

    Single step (``integrate=False``): solves PO2_T = PO2_37 x exp((T - 37) k(PO2_37)) for PO2_37 by
    bisection (the map is strictly increasing in PO2_37 for 15-43 degC: its log-derivative
    1 + (T - 37) PO2 k'(PO2) stays above 0.6 because |PO2 k'(PO2)| <= 0.058 x 3.88 / 4), so it
    undoes :func:`po2_at_temperature_severinghaus` exactly. Integrated: eq 3 integrated from T to 37
    degC in steps of ``step_c``.

    Parameters
    ----------
    po2_mmhg : float
        PO2 at the patient's temperature. [mmHg] 1-800.
    temperature_c : float
        Patient's temperature. [degC] 15-43.

    References
    ----------
    severinghaus1979 (eq 3).

    Examples
    --------
    >>> round(po2_at_37_severinghaus(po2_mmhg=65.7, temperature_c=32.0), 0)
    90.0
    >>> round(po2_at_37_severinghaus(po2_mmhg=64.65, temperature_c=32.0, integrate=True), 0)
    90.0
    """
    po2_t = require_number("po2_mmhg", po2_mmhg, low=1.0, high=800.0, unit="mmHg")
    t = require_number("temperature_c", temperature_c, low=T_LOW_C, high=T_HIGH_C, unit="degC")
    if integrate:
        return _integrate(po2_t, t, 37.0, step_c)
    d = t - 37.0

    def forward(p37: float) -> float:
        return p37 * math.exp(d * _k_severinghaus(p37))

    # bracket: the factor exp(d k) lies between exp(d 0.013) and exp(d 0.071)
    lo, hi = (
        po2_t * 0.5 * min(math.exp(-d * 0.013), math.exp(-d * 0.071)),
        po2_t * 2.0 * max(math.exp(-d * 0.013), math.exp(-d * 0.071)),
    )
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        if forward(mid) < po2_t:
            lo = mid
        else:
            hi = mid
        if hi - lo <= 1e-12 * hi:
            break
    return 0.5 * (lo + hi)
