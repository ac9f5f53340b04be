"""The acid-base map: the compensation bands of the published rules drawn across the whole range, for the
blood gas picture (PCO2 across, HCO3 up).

========================  ==================================================================================
``compensation_map``      every band as a closed outline of (PCO2, HCO3) points, and the normal region
``PCO2_AXIS_MMHG``        the fixed range of the picture's PCO2 axis [mmHg]
``HCO3_AXIS``             the fixed range of its HCO3 axis [mmol/L]
========================  ==================================================================================

Each band is computed point by point by the same functions the reading uses (acidbase), so the picture and
the report never disagree: respiratory acidosis and alkalosis, acute and chronic, as HCO3 bands over PCO2
(the band of published slopes); metabolic acidosis (Winters) and metabolic alkalosis (slope 0.7, +/- 5 mmHg)
as PCO2 bands over HCO3. The normal region is PCO2 35-45 mmHg and HCO3 22-26 mmol/L (common practice).
Pressures are returned in the unit asked for. Standard library only: no numpy.
"""

from __future__ import annotations

from .. import units
from ..formulas import acidbase

#: the fixed axes of the picture, so that every sample is seen on the same familiar plane
PCO2_AXIS_MMHG = (10.0, 110.0)
HCO3_AXIS = (0.0, 50.0)
#: the normal region (common practice reference ranges)
NORMAL_PCO2_MMHG = (35.0, 45.0)
NORMAL_HCO3 = (22.0, 26.0)

_STEPS = 24


def _span(low: float, high: float) -> list[float]:
    return [low + (high - low) * i / _STEPS for i in range(_STEPS + 1)]


def _outline(xs: list[float], lows: list[float], highs: list[float]) -> tuple[list[float], list[float]]:
    """A closed outline: along the low edge, back along the high edge."""
    return xs + xs[::-1], lows + highs[::-1]


def compensation_map(*, pressure_unit: str = "mmHg") -> dict:
    """The bands and the normal region of the acid-base picture, PCO2 in ``pressure_unit``.

    Returns ``{"axes": {"pco2": {"low", "high"}, "hco3": {...}}`` (quantities), ``"normal"`` and ``"bands":
    {name: outline}``; an outline is a polygon ``{"pco2": {"value": [...], "unit"}, "hco3": {...}}``.

    References: narins1980, berend2014 (respiratory bands; acidbase.expected_hco3_respiratory_*),
    albert1967 (Winters), berend2014 (metabolic alkalosis).

    >>> m = compensation_map(pressure_unit="mmHg")
    >>> len(m["bands"]), sorted(m["bands"])[:2]
    (6, ['metabolic_acidosis', 'metabolic_alkalosis'])
    >>> b = m["bands"]["respiratory_acidosis_chronic"]
    >>> b["pco2"]["value"][-1], b["hco3"]["value"][_STEPS]  # at 80 mmHg: 24 + 3 x 4 = 36 (low edge, slope 3)
    (40.0, 36.0)
    """
    p = lambda mmhg: units.convert(mmhg, "mmHg", pressure_unit)  # noqa: E731

    def outline(pco2_mmhg: list[float], hco3: list[float]) -> dict:
        return {
            "pco2": {"value": [p(v) for v in pco2_mmhg], "unit": pressure_unit},
            "hco3": {"value": hco3, "unit": "mmol/L"},
        }

    bands: dict = {}
    up = _span(40.0, 80.0)
    down = _span(20.0, 40.0)
    for name, xs, rule in (
        ("respiratory_acidosis", up, acidbase.expected_hco3_respiratory_acidosis),
        ("respiratory_alkalosis", down, acidbase.expected_hco3_respiratory_alkalosis),
    ):
        for kind in ("acute", "chronic"):
            expected = [getattr(rule(paco2_mmhg=x), kind) for x in xs]
            lows = [min(e.low, e.high) for e in expected]
            highs = [max(e.low, e.high) for e in expected]
            pco2, hco3 = _outline(xs, lows, highs)
            bands[f"{name}_{kind}"] = outline(pco2, hco3)
    acid = _span(6.0, 24.0)
    winters = [acidbase.expected_pco2_winters(hco3_mmol_l=h) for h in acid]
    hco3, pco2 = _outline(acid, [e.low for e in winters], [e.high for e in winters])
    bands["metabolic_acidosis"] = outline(pco2, hco3)
    alk = _span(24.0, 45.0)
    rule = [acidbase.expected_pco2_metabolic_alkalosis(hco3_mmol_l=h) for h in alk]
    hco3, pco2 = _outline(alk, [e.low for e in rule], [e.high for e in rule])
    bands["metabolic_alkalosis"] = outline(pco2, hco3)
    lo, hi = NORMAL_PCO2_MMHG
    return {
        "axes": {
            "pco2": {
                "low": {"value": p(PCO2_AXIS_MMHG[0]), "unit": pressure_unit},
                "high": {"value": p(PCO2_AXIS_MMHG[1]), "unit": pressure_unit},
            },
            "hco3": {
                "low": {"value": HCO3_AXIS[0], "unit": "mmol/L"},
                "high": {"value": HCO3_AXIS[1], "unit": "mmol/L"},
            },
        },
        "normal": outline([lo, hi, hi, lo], [NORMAL_HCO3[0]] * 2 + [NORMAL_HCO3[1]] * 2),
        "bands": bands,
    }


def acid_base_map(inputs, report) -> None:
    """The ``acid_base_map`` calculation: the bands of :func:`compensation_map` in the request's unit.

    No inputs. Outputs ``axes``, ``normal`` and ``bands`` (each band a closed outline of PCO2 and HCO3
    lists); one step per rule family names its source.
    """
    inputs.finish()
    m = compensation_map(pressure_unit=report.pressure_unit)
    report.put("axes", m["axes"])
    report.put("normal", m["normal"])
    report.put("bands", m["bands"])
    for label, formula, keys in (
        (
            "Respiratory acidosis bands",
            "HCO3 = 24 + slope x (PaCO2 - 40)/10; acute slopes 1-2, chronic 3-5",
            ("narins1980", "berend2014"),
        ),
        (
            "Respiratory alkalosis bands",
            "HCO3 = 24 - slope x (40 - PaCO2)/10; acute slopes 2-2.5, chronic 4-5",
            ("narins1980", "berend2014"),
        ),
        ("Metabolic acidosis band (Winters)", "PaCO2 = 1.5 x HCO3 + 8 +/- 2", ("albert1967",)),
        ("Metabolic alkalosis band", "PaCO2 = 40 + 0.7 x (HCO3 - 24) +/- 5", ("berend2014",)),
    ):
        report.step(label, formula, "drawn across the range", keys, output="bands")
    report.say("The compensation bands of the published rules, for the acid-base picture.")
