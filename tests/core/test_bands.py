"""The acid-base map (the ``acid_base_map`` calculation): each band at a point checked
against the published rule it draws, in both pressure units."""

from __future__ import annotations

import pytest

from tidewell.bridge import handle_obj

MMHG_PER_KPA = 7.50062  # units: defined conversion


def band_at(outline: dict, axis: str, x: float) -> tuple[float, float]:
    """The two edges of a closed outline at ``x`` along ``axis`` ('pco2' or 'hco3')."""
    other = "hco3" if axis == "pco2" else "pco2"
    xs, ys = outline[axis]["value"], outline[other]["value"]
    hits = sorted(y for xv, y in zip(xs, ys, strict=True) if abs(xv - x) < 1e-9)
    return hits[0], hits[-1]


def the_map(unit: str = "mmHg") -> dict:
    response = handle_obj({"calc": "acid_base_map", "options": {"pressure_unit": unit}})
    assert response["ok"], response
    return response["outputs"]


def test_respiratory_bands_follow_the_published_slopes():
    b = the_map()["bands"]
    # narins1980 / martinu2003 (published slopes): at PaCO2 60, chronic 24 + 3..5 x 2 = 30..34 mmol/L
    assert band_at(b["respiratory_acidosis_chronic"], "pco2", 60.0) == pytest.approx((30.0, 34.0))
    # acute 24 + 1..2 x 2 = 26..28 mmol/L
    assert band_at(b["respiratory_acidosis_acute"], "pco2", 60.0) == pytest.approx((26.0, 28.0))
    # alkalosis at 30: acute 24 - 2..2.5 = 21.5..22, chronic 24 - 4..5 = 19..20 (berend2014; narins1980)
    assert band_at(b["respiratory_alkalosis_acute"], "pco2", 30.0) == pytest.approx((21.5, 22.0))
    assert band_at(b["respiratory_alkalosis_chronic"], "pco2", 30.0) == pytest.approx((19.0, 20.0))


def test_metabolic_bands_follow_winters_and_the_alkalosis_rule():
    b = the_map()["bands"]
    # albert1967 (Winters, published worked example): HCO3 12 -> PaCO2 26 +/- 2
    assert band_at(b["metabolic_acidosis"], "hco3", 12.0) == pytest.approx((24.0, 28.0))
    # berend2014: PaCO2 = 40 + 0.7 x (HCO3 - 24) +/- 5: HCO3 31 -> 44.9 +/- 5 (derived)
    assert band_at(b["metabolic_alkalosis"], "hco3", 31.0) == pytest.approx((39.9, 49.9))


def test_the_map_is_the_same_in_kpa():
    mmhg, kpa = the_map("mmHg"), the_map("kPa")
    assert kpa["axes"]["pco2"]["low"]["unit"] == "kPa"
    assert kpa["axes"]["pco2"]["low"]["value"] == pytest.approx(10 / MMHG_PER_KPA, rel=1e-6)
    for name, outline in mmhg["bands"].items():
        other = kpa["bands"][name]
        assert other["hco3"] == outline["hco3"]
        assert [v * MMHG_PER_KPA for v in other["pco2"]["value"]] == pytest.approx(outline["pco2"]["value"])
    # the normal region: PCO2 35-45 mmHg, HCO3 22-26 mmol/L (common practice)
    assert sorted(set(mmhg["normal"]["pco2"]["value"])) == [35.0, 45.0]
    assert sorted(set(mmhg["normal"]["hco3"]["value"])) == [22.0, 26.0]


def test_it_takes_no_inputs():
    response = handle_obj({"calc": "acid_base_map", "inputs": {"ph": 7.4}})
    assert [(e["code"], e["field"]) for e in response["errors"]] == [("unknown_input", "inputs.ph")]
