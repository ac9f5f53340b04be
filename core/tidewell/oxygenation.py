"""Oxygenation: inspired and alveolar PO2, A-a gradient and its age-expected limit.

=================================  ==========================================================
``inspired_po2``                   PIO2 = FiO2 x (PB - PH2O) [mmHg]
``alveolar_po2_simple``            PAO2 = PIO2 - PaCO2 / R [mmHg]
``alveolar_po2_full``              PAO2 = PIO2 - PaCO2 x (FiO2 + (1 - FiO2) / R) [mmHg]
``aa_gradient_upper_by_age``       age/4 + 4 [mmHg], breathing air
=================================  ==========================================================
"""

from __future__ import annotations

from .errors import require_number

#: water vapour pressure at 37 degC used by convention [mmHg]
PH2O_37_MMHG = 47.0


def inspired_po2(*, fio2_fraction: float, pb_mmhg: float = 760.0, ph2o_mmhg: float = PH2O_37_MMHG) -> float:
    """Inspired PO2 of humidified gas at body temperature.

    PIO2 = FiO2 x (PB - PH2O).

    Parameters
    ----------
    fio2_fraction : float
        Inspired oxygen fraction. [1] Accepted 0.05-1.0.
    pb_mmhg : float
        Barometric pressure. [mmHg] Accepted 150-1100.
    ph2o_mmhg : float
        Water vapour pressure. [mmHg] 47 at 37 degC.

    References
    ----------
    alveolar_gas_1946.

    Examples
    --------
    >>> round(inspired_po2(fio2_fraction=0.21), 2)
    149.73
    """
    fio2 = require_number("fio2_fraction", fio2_fraction, low=0.05, high=1.0)
    pb = require_number("pb_mmhg", pb_mmhg, low=150.0, high=1100.0, unit="mmHg")
    ph2o = require_number("ph2o_mmhg", ph2o_mmhg, low=0.0, high=100.0, unit="mmHg")
    return fio2 * (pb - ph2o)


def alveolar_po2_simple(
    *,
    fio2_fraction: float,
    paco2_mmhg: float,
    pb_mmhg: float = 760.0,
    rq: float = 0.8,
    ph2o_mmhg: float = PH2O_37_MMHG,
) -> float:
    """Alveolar PO2, simplified alveolar gas equation: PAO2 = FiO2 (PB - PH2O) - PaCO2 / R.

    Examples
    --------
    >>> round(alveolar_po2_simple(fio2_fraction=0.21, paco2_mmhg=40.0), 2)
    99.73
    """
    paco2 = require_number("paco2_mmhg", paco2_mmhg, low=1.0, high=300.0, unit="mmHg")
    r = require_number("rq", rq, low=0.5, high=1.5)
    return inspired_po2(fio2_fraction=fio2_fraction, pb_mmhg=pb_mmhg, ph2o_mmhg=ph2o_mmhg) - paco2 / r


def alveolar_po2_full(
    *,
    fio2_fraction: float,
    paco2_mmhg: float,
    pb_mmhg: float = 760.0,
    rq: float = 0.8,
    ph2o_mmhg: float = PH2O_37_MMHG,
) -> float:
    """Alveolar PO2, full alveolar gas equation: PAO2 = PIO2 - PaCO2 x (FiO2 + (1 - FiO2) / R).

    Examples
    --------
    >>> round(alveolar_po2_full(fio2_fraction=0.21, paco2_mmhg=40.0), 2)
    101.83
    """
    paco2 = require_number("paco2_mmhg", paco2_mmhg, low=1.0, high=300.0, unit="mmHg")
    r = require_number("rq", rq, low=0.5, high=1.5)
    pio2 = inspired_po2(fio2_fraction=fio2_fraction, pb_mmhg=pb_mmhg, ph2o_mmhg=ph2o_mmhg)
    return pio2 - paco2 * (fio2_fraction + (1.0 - fio2_fraction) / r)


def aa_gradient_upper_by_age(*, age_years: float) -> float:
    """Upper limit of the A-a gradient breathing air at sea level: age / 4 + 4 [mmHg].

    Common practice (also quoted as (age + 10) / 4).

    Examples
    --------
    >>> aa_gradient_upper_by_age(age_years=60)
    19.0
    """
    age = require_number("age_years", age_years, low=0.0, high=120.0, unit="years")
    return age / 4.0 + 4.0
