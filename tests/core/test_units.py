"""units.py against the exact unit definitions and the worked conversion cases."""

from __future__ import annotations

import pytest
from hypothesis import given
from hypothesis import strategies as st

from tidewell import units
from tidewell.errors import InputError


def test_defined_factors_are_exact():
    # Published: conventional mmHg = 13.5951 g/cm3 x 9.80665 m/s2 x 1 mm (SI Brochure / NIST SP 811).
    assert units.MMHG_PA == pytest.approx(13595.1 * 9.80665 * 0.001, rel=0, abs=1e-9)
    assert units.MMHG_PA == 133.322387415
    # Published: international foot 0.3048 m and pound 0.45359237 kg (NIST SP 811).
    assert units.FT_M == 0.3048
    assert units.LB_KG == 0.45359237
    # Derived from the exact pound, inch and standard gravity: 1 psi = 6894.757293168 Pa
    # (NIST SP 811 lists 6.894757 kPa).
    assert units.PSI_PA == pytest.approx(6894.757293168, abs=1e-6)


def test_uc01_pressure_temperature_length(cases):
    case = cases["UC-01"]
    inp, exp, tol = case["inputs"], case["expected"], case["tolerance"]
    # Worked example UC-01 (bipm2019, nist811), provenance: verified unit definitions.
    assert units.convert(inp["p1_kPa"], "kPa", "mmHg") == pytest.approx(exp["p1_mmHg"], abs=tol["p1_mmHg"])
    assert units.convert(inp["p2_mmHg"], "mmHg", "kPa") == pytest.approx(exp["p2_kPa"], abs=tol["p2_kPa"])
    assert units.convert(inp["temp_C"], "degC", "degF") == pytest.approx(exp["temp_F_from_C"], abs=1e-9)
    assert units.convert(inp["temp_F"], "degF", "degC") == pytest.approx(exp["temp_C_from_F"], abs=1e-9)
    assert units.convert(inp["altitude_ft"], "ft", "m") == pytest.approx(exp["altitude_m_from_ft"], abs=1e-9)
    assert units.convert(inp["altitude_m"], "m", "ft") == pytest.approx(
        exp["altitude_ft_from_m"], abs=tol["altitude_ft_from_m"]
    )


def test_more_pressure_examples():
    # Worked examples (bipm2019; derived from the exact mmHg): 6.0 kPa = 45.0037 mmHg,
    # 8.0 kPa = 60.0049 mmHg.
    assert units.convert(6.0, "kPa", "mmHg") == pytest.approx(45.0037, abs=1e-4)
    assert units.convert(8.0, "kPa", "mmHg") == pytest.approx(60.0049, abs=1e-4)
    # Published: standard atmosphere 101.325 kPa = 760 mmHg exactly by the torr definition; the conventional
    # mmHg differs from the torr by 1.4e-7 (bipm2019).
    assert units.convert(101.325, "kPa", "mmHg") == pytest.approx(760.0, rel=2e-7)
    # Published: 1 bar = 100 kPa; 1 hPa = 0.1 kPa (SI Brochure).
    assert units.convert(1, "bar", "kPa") == pytest.approx(100.0)
    assert units.convert(1013.25, "hPa", "kPa") == pytest.approx(101.325)


def test_uc02_chemistry(cases):
    case = cases["UC-02"]
    inp, exp, tol = case["inputs"], case["expected"], case["tolerance"]
    # Worked example UC-02, provenance: common practice (IUPAC molar masses: glucose 180.156, urea 60.056,
    # urea nitrogen 28.0134, lactic acid 90.08, haem monomer 16114.5 g/mol).
    conv = units.convert
    assert conv(inp["glucose_mg_dL"], "mg/dL", "mmol/L", substance="glucose") == pytest.approx(
        exp["glucose_mmol_L"], abs=tol["glucose_mmol_L"]
    )
    assert conv(inp["bun_mg_dL"], "mg/dL", "mmol/L", substance="bun") == pytest.approx(
        exp["urea_from_bun_mmol_L"], abs=tol["urea_from_bun_mmol_L"]
    )
    assert conv(inp["urea_mg_dL"], "mg/dL", "mmol/L", substance="urea") == pytest.approx(
        exp["urea_mmol_L"], abs=tol["urea_mmol_L"]
    )
    assert conv(inp["lactate_mg_dL"], "mg/dL", "mmol/L", substance="lactate") == pytest.approx(
        exp["lactate_mmol_L"], abs=tol["lactate_mmol_L"]
    )
    assert conv(inp["hb_g_dL"], "g/dL", "g/L") == pytest.approx(exp["hb_g_L"], abs=tol["hb_g_L"])
    assert conv(inp["hb_g_dL"], "g/dL", "mmol/L", substance="hb") == pytest.approx(
        exp["hb_mmol_L_monomer"], abs=tol["hb_mmol_L_monomer"]
    )
    assert conv(inp["albumin_g_dL"], "g/dL", "g/L") == pytest.approx(
        exp["albumin_g_L"], abs=tol["albumin_g_L"]
    )


def test_bedside_factors_agree_with_molar_masses():
    # Common practice bedside factors (iupac_masses): glucose /18, BUN x 0.357, phosphate x 0.3229.
    assert units.convert(18.0, "mg/dL", "mmol/L", substance="glucose") == pytest.approx(1.0, rel=1e-3)
    assert units.convert(1.0, "mg/dL", "mmol/L", substance="bun") == pytest.approx(0.357, rel=1e-3)
    assert units.convert(1.0, "mg/dL", "mmol/L", substance="phosphate") == pytest.approx(0.3229, rel=1e-3)


def test_meq_is_mmol_for_monovalent_and_double_for_divalent():
    # Definition of the equivalent: mEq = mmol x |charge| (common practice).
    assert units.convert(140, "mEq/L", "mmol/L") == 140
    assert units.convert(140, "mEq/L", "mmol/L", substance="sodium") == 140
    assert units.convert(2.4, "mEq/L", "mmol/L", substance="calcium") == pytest.approx(1.2)


@pytest.mark.parametrize(
    ("from_unit", "to_unit"),
    [("kPa", "degC"), ("mmHg", "m"), ("L", "L/min"), ("degC", "kPa"), ("g/dL", "kg")],
)
def test_mismatched_units_are_refused(from_unit, to_unit):
    with pytest.raises(InputError, match="cannot be converted") as info:
        units.convert(1.0, from_unit, to_unit)
    assert info.value.code == "bad_unit"


def test_unknown_unit_gets_a_hint():
    with pytest.raises(InputError) as info:
        units.convert(1.0, "mmhg", "kPa")
    assert info.value.code == "bad_unit"
    assert "mmHg" in info.value.hint


def test_mass_to_molar_needs_a_substance():
    with pytest.raises(InputError) as info:
        units.convert(100, "mg/dL", "mmol/L")
    assert info.value.code == "missing"


@given(
    st.floats(min_value=-1e6, max_value=1e6, allow_nan=False),
    st.sampled_from(["mmHg", "kPa", "hPa", "bar", "psi", "cmH2O", "Pa"]),
    st.sampled_from(["mmHg", "kPa", "hPa", "bar", "psi", "cmH2O", "Pa"]),
)
def test_pressure_round_trip(value, a, b):
    there = units.convert(value, a, b)
    assert units.convert(there, b, a) == pytest.approx(value, rel=1e-12, abs=1e-9)


@given(st.floats(min_value=-300, max_value=300, allow_nan=False), st.sampled_from(["degC", "degF", "K"]))
def test_temperature_round_trip(value, unit):
    assert units.convert(units.convert(value, unit, "degC"), "degC", unit) == pytest.approx(value, abs=1e-9)
