"""Oxygenation domain functions against the worked cases and their published sources.

Provenance words beside each check: "published" (a table or worked example in the cited source),
"derived" (hand-computed from the cited equation), "common practice", "from memory".
"""

from __future__ import annotations

import itertools
import json
import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import compare
from casebook import close, load_cases
from conftest import assert_accepted_range
from tidewell.errors import InputError
from tidewell.formulas import oxygenation as ox
from tidewell.formulas.altitude import pressure_at_altitude_isa

CASES = load_cases()


# -- alveolar gas equation (OX-01): alveolar_gas_1946, equation form verified; derived values -------------
def test_ox01_alveolar_gas_equation_simple_and_full():
    i = CASES["OX-01"]["inputs"]
    kw = {"fio2_fraction": i["fio2"], "pb_mmhg": i["pb_mmHg"], "ph2o_mmhg": i["ph2o_mmHg"]}
    close("OX-01", "pio2_mmHg", ox.inspired_po2(**kw))  # derived: 0.21 x 713 = 149.73
    close("OX-01", "pao2_alv_simple_mmHg", ox.alveolar_po2_simple(paco2_mmhg=40.0, rq=0.8, **kw))  # derived
    close("OX-01", "pao2_alv_full_mmHg", ox.alveolar_po2_full(paco2_mmhg=40.0, rq=0.8, **kw))  # derived


def test_full_form_at_fio2_one_is_pio2_minus_paco2():
    # derived (alveolar_gas_1946): at FiO2 1.0 the full form is PIO2 - PaCO2: 713 - 40 = 673; simple 663
    assert ox.alveolar_po2_full(fio2_fraction=1.0, paco2_mmhg=40.0) == pytest.approx(673.0)
    assert ox.alveolar_po2_simple(fio2_fraction=1.0, paco2_mmhg=40.0) == pytest.approx(663.0)


def test_ox02_age_rules_and_a_over_a():
    c = CASES["OX-02"]["inputs"]
    alv = ox.alveolar_po2_simple(fio2_fraction=c["fio2"], paco2_mmhg=c["paco2_mmHg"], pb_mmhg=c["pb_mmHg"])
    close("OX-02", "pao2_alv_mmHg", alv)  # derived from the alveolar gas equation
    close("OX-02", "aa_gradient_mmHg", alv - c["pao2_mmHg"])  # derived
    close("OX-02", "aa_expected_age_mmHg", ox.aa_gradient_upper_by_age(age_years=60))  # common practice
    close("OX-02", "a_A_ratio", ox.a_over_a_ratio(pao2_mmhg=70.0, pao2_alveolar_mmhg=alv))  # derived
    # common practice (100 - age/3) and Sorbini 1968 (from memory) 109 - 0.43 x 60 = 83.2
    close("OX-02", "pao2_expected_100_minus_age_over_3", ox.expected_pao2_by_age(age_years=60))
    close("OX-02", "pao2_expected_sorbini", ox.expected_pao2_sorbini1968(age_years=60))


def test_ox03_berlin_altitude_correction_and_band():
    # berlin2012 (verified): P/F x PB/760 above 1000 m; moderate is 100 < P/F <= 200
    pf = ox.pf_ratio(pao2_mmhg=90.0, fio2_fraction=0.5)
    close("OX-03", "pf_ratio", pf)
    corrected = ox.pf_ratio_altitude_corrected_berlin(pao2_mmhg=90.0, fio2_fraction=0.5, pb_mmhg=630.0)
    close("OX-03", "pf_ratio_altitude_corrected", corrected)
    assert ox.berlin_pf_band(pf_mmhg=corrected) == CASES["OX-03"]["expected"]["berlin_category"]


@pytest.mark.parametrize(
    ("pf", "band"),
    # berlin2012 (verified): severe <= 100 < moderate <= 200 < mild <= 300; an edge is in the worse band
    [
        (50, "severe"),
        (100, "severe"),
        (100.1, "moderate"),
        (200, "moderate"),
        (250, "mild"),
        (300, "mild"),
        (300.1, "above_ards_range"),
    ],
)
def test_berlin_band_edges(pf, band):
    assert ox.berlin_pf_band(pf_mmhg=pf) == band


def test_ox04_sf_ratio_rice_and_oxygenation_index():
    sf = ox.sf_ratio(spo2_percent=92.0, fio2_fraction=0.4)
    close("OX-04", "sf_ratio", sf)  # derived: 92 / 0.4
    close(
        "OX-04", "pf_estimated_rice", ox.pf_from_sf_rice2007(sf=sf)
    )  # rice2007 (verified): S/F = 64 + 0.84 P/F
    oi = ox.oxygenation_index(fio2_fraction=0.6, mean_airway_pressure_cmh2o=20.0, pao2_mmhg=80.0)
    close("OX-04", "oxygenation_index", oi)  # chen2018_oi (verified formula): 0.6 x 20 x 100 / 80


def test_rice_anchor_points():
    # rice2007 (verified): S/F 235 ~ P/F 200 and S/F 315 ~ P/F 300 (rounded in the paper, so within 5 mmHg)
    assert ox.pf_from_sf_rice2007(sf=235.0) == pytest.approx(200.0, abs=5.0)
    assert ox.pf_from_sf_rice2007(sf=315.0) == pytest.approx(300.0, abs=5.0)


def test_ox05_oxygen_content_and_delivery():
    c = CASES["OX-05"]["inputs"]
    kw = {"hb_g_dl": c["hb_g_dL"], "so2_fraction": c["sao2_fraction"], "po2_mmhg": c["pao2_mmHg"]}
    c134 = ox.oxygen_content(**kw)
    c139 = ox.oxygen_content(hufner_ml_per_g=1.39, **kw)
    close("OX-05", "cao2_1p34_mL_dL", c134.total_ml_dl)  # o2_content (common practice) with 1.34
    close("OX-05", "cao2_1p39_mL_dL", c139.total_ml_dl)  # 1.39 theoretical (dijkhuizen1977, verified)
    assert c134.dissolved_ml_dl == pytest.approx(0.31)  # derived: 0.0031 x 100
    close(
        "OX-05", "do2_1p34_mL_min", ox.oxygen_delivery(cao2_ml_dl=c134.total_ml_dl, cardiac_output_l_min=5.0)
    )
    close(
        "OX-05", "do2_1p39_mL_min", ox.oxygen_delivery(cao2_ml_dl=c139.total_ml_dl, cardiac_output_l_min=5.0)
    )


def test_oxygen_content_without_po2_leaves_dissolved_out():
    # derived: 1.34 x 15 x 0.98 = 19.698, dissolved part 0
    r = ox.oxygen_content(hb_g_dl=15.0, so2_fraction=0.98)
    assert r.total_ml_dl == pytest.approx(19.698) and r.dissolved_ml_dl == 0.0


# -- Severinghaus 1979 (OX-06, verified abstract) ---------------------------------------------------------
@pytest.mark.parametrize(("po2", "key"), [(26.8, "s_26p8"), (40.0, "s_40"), (60.0, "s_60"), (100.0, "s_100")])
def test_ox06_severinghaus_eq1(po2, key):
    close("OX-06", key, ox.saturation_severinghaus1979(po2_mmhg=po2))  # derived from eq 1


def test_ox06_inverses_and_p50():
    close("OX-06", "po2_inverse_eq2_mmHg", ox.po2_from_saturation_severinghaus1979(so2_fraction=0.9))  # eq 2
    close("OX-06", "po2_inverse_exact_mmHg", ox.po2_from_saturation_exact(so2_fraction=0.9))  # eq 1 inverted
    close("OX-06", "p50_standard_curve_mmHg", ox.P50_STANDARD_MMHG)  # eq 1 at S = 0.5


@settings(max_examples=300, deadline=None)
@given(st.floats(min_value=0.5, max_value=700.0))
def test_saturation_round_trip_exact(po2):
    # round trip through the exact inverse (derived: the inverse solves eq 1's cubic)
    s = ox.saturation_severinghaus1979(po2_mmhg=po2)
    if 0.0 < s < 1.0:
        back = ox.po2_from_saturation_exact(so2_fraction=s)
        assert back == pytest.approx(po2, rel=1e-6)


@settings(max_examples=300, deadline=None)
@given(st.floats(min_value=1e-6, max_value=0.9999))
def test_inverse_round_trip_from_saturation(s):
    # S 0.9999 is a PO2 of about 400 mmHg (S at 800 mmHg is 0.99995, derived from severinghaus1979 eq 1),
    # so every drawn saturation maps inside the curve's range and the round trip is always checked
    p = ox.po2_from_saturation_exact(so2_fraction=s)
    assert p < 800.0
    assert ox.saturation_severinghaus1979(po2_mmhg=p) == pytest.approx(s, abs=1e-9)


def test_eq2_close_to_exact_inverse_in_its_range():
    # severinghaus1979 (verified abstract): eq 2 is an approximate inverse; the OX-06 case shows ~0.7 mmHg
    # at S 0.90. Over 0.10-0.97 it stays within 1.4 % of the exact inverse (derived here: the largest
    # difference over that range is 1.37 %).
    for i in range(10, 98):
        s = i / 100.0
        exact = ox.po2_from_saturation_exact(so2_fraction=s)
        approx = ox.po2_from_saturation_severinghaus1979(so2_fraction=s)
        assert abs(approx - exact) / exact < 0.014, s


def test_saturation_is_monotonic():
    values = [ox.saturation_severinghaus1979(po2_mmhg=p / 2.0) for p in range(0, 1400)]
    assert all(b > a for a, b in itertools.pairwise(values))
    assert values[0] == 0.0


@pytest.mark.parametrize("bad", [0.0, 1.0, -0.1, 1.2, float("nan"), True, "0.9", None])
def test_impossible_saturations_are_refused(bad):
    for fn in (ox.po2_from_saturation_exact, ox.po2_from_saturation_severinghaus1979):
        with pytest.raises(InputError, match="so2_fraction") as info:
            fn(so2_fraction=bad)
        assert info.value.code in ("out_of_range", "not_a_number")


# -- virtual PO2 (OX-07) and comparison curves (OX-08) ---------------------------------------------------
def test_ox07_virtual_po2_kelman_and_base_excess():
    k = ox.virtual_po2_kelman(po2_mmhg=60.0, temperature_c=37.0, ph=7.20, pco2_mmhg=60.0)
    close("OX-07", "virtual_factor_kelman", k.factor)  # kelman1966 exponent (verified by independent code)
    close("OX-07", "virtual_po2_kelman_mmHg", k.po2_mmhg)
    close("OX-07", "s_sev_kelman", ox.saturation_severinghaus1979(po2_mmhg=k.po2_mmhg))
    b = ox.virtual_po2_base_excess(po2_mmhg=60.0, temperature_c=37.0, ph=7.20, base_excess_mmol_l=-5.0)
    close(
        "OX-07", "virtual_factor_sev_be", b.factor
    )  # severinghaus1966 (from memory; -0.0013 BE in Inaba 1986)
    close("OX-07", "virtual_po2_sev_be_mmHg", b.po2_mmhg)
    close("OX-07", "s_sev_be", ox.saturation_severinghaus1979(po2_mmhg=b.po2_mmhg))


def test_virtual_po2_standard_conditions_is_identity():
    # derived: every exponent term is 0 at 37 degC, pH 7.40, PCO2 40, BE 0
    assert ox.virtual_po2_kelman(po2_mmhg=55.0).factor == 1.0
    assert ox.virtual_po2_base_excess(po2_mmhg=55.0).factor == 1.0


def test_virtual_po2_directions():
    # kelman1966/severinghaus1979: acidaemia, hypercapnia and fever shift the curve right (factor < 1)
    assert ox.virtual_po2_kelman(po2_mmhg=50, ph=7.30).factor < 1.0
    assert ox.virtual_po2_kelman(po2_mmhg=50, pco2_mmhg=60).factor < 1.0
    assert ox.virtual_po2_kelman(po2_mmhg=50, temperature_c=39).factor < 1.0
    assert ox.virtual_po2_kelman(po2_mmhg=50, temperature_c=33).factor > 1.0


def test_ox08_hill_kelman_severinghaus_at_40():
    close(
        "OX-08", "s_hill", ox.saturation_hill(po2_mmhg=40.0, p50_mmhg=26.8, n=2.7)
    )  # hill1910 (from memory)
    close("OX-08", "s_kelman", ox.saturation_kelman1966(po2_mmhg=40.0))  # kelman1966 coefficients
    close("OX-08", "s_severinghaus", ox.saturation_severinghaus1979(po2_mmhg=40.0))  # severinghaus1979 eq 1


def test_three_curves_agree_over_the_clinical_range():
    # severinghaus1979 states +-0.0055 S for eq 1; Kelman was fitted 0-150 mmHg. Derived check: the two
    # standard-curve fits differ by at most about 0.02 S (largest near 18 mmHg) and under 0.01 S from 40 mmHg.
    for p in range(10, 151):
        gap = abs(ox.saturation_kelman1966(po2_mmhg=p) - ox.saturation_severinghaus1979(po2_mmhg=p))
        assert gap < (0.01 if p >= 40 else 0.021), p


# -- water vapour (buck1981 eq 3; docs/methods.md#water-vapour-pressure; coefficients verified) ------------
@pytest.mark.parametrize(("t", "mmhg"), [(32, 35.7), (35, 42.2), (37, 47.1), (39, 52.5), (40, 55.4)])
def test_water_vapour_pressure_buck(t, mmhg):
    assert ox.water_vapour_pressure_buck1981(temperature_c=t) == pytest.approx(mmhg, abs=0.05)


def test_water_vapour_ends_of_range():
    # buck1981 eq 3 (coefficients verified): at 0 degC e = 6.1121 hPa exactly; steam tables (from memory)
    # give 92.5 mmHg at 50 degC
    assert ox.water_vapour_pressure_buck1981(temperature_c=0.0) == pytest.approx(6.1121 / 1.33322387415)
    assert ox.water_vapour_pressure_buck1981(temperature_c=50.0) == pytest.approx(92.5, abs=0.5)
    with pytest.raises(InputError, match="temperature_c"):
        ox.water_vapour_pressure_buck1981(temperature_c=60.0)


# -- monotonicity: higher altitude, lower PIO2 (icao7488 ISA through the altitude module) --------------------
def test_higher_altitude_lowers_pio2():
    pio2 = [
        ox.inspired_po2(fio2_fraction=0.21, pb_mmhg=pressure_at_altitude_isa(altitude_m=h))
        for h in range(0, 8001, 250)
    ]
    assert all(b < a for a, b in itertools.pairwise(pio2))
    # derived: ISA 2438.4 m (8000 ft) PB 564.5 mmHg -> PIO2 0.21 x (564.5 - 47) = 108.7 mmHg
    assert pio2[0] == pytest.approx(149.73, abs=0.01)


@pytest.mark.parametrize("fio2", [0.2, 1.01, 0.0, 21.0])
def test_fio2_outside_range_is_refused(fio2):
    with pytest.raises(InputError, match="fio2_fraction"):
        ox.pf_ratio(pao2_mmhg=80.0, fio2_fraction=fio2)


def test_no_nan_from_curve_edges():
    for p in (0.0, 1e-9, 800.0):
        assert math.isfinite(ox.saturation_severinghaus1979(po2_mmhg=p))
        assert math.isfinite(ox.saturation_kelman1966(po2_mmhg=p))
        assert math.isfinite(ox.saturation_hill(po2_mmhg=p))


# -- one implementation for one value and for arrays (batch, uncertainty) ------------------------------------
# derived: no outside number here; the same equations (alveolar_gas_1946, common-practice A-a limit) must
# give the scalar result on numpy arrays, element by element, to compare.REL_SAME_ENGINE (the batch and
# Monte Carlo use them).


def _grid(n=400, seed=11):
    np = pytest.importorskip("numpy")
    rng = np.random.default_rng(seed)
    return {
        "fio2_fraction": rng.uniform(0.05, 1.0, n),
        "paco2_mmhg": rng.uniform(1.0, 300.0, n),
        "pb_mmhg": rng.uniform(150.0, 1100.0, n),
        "rq": rng.uniform(0.5, 1.5, n),
        "ph2o_mmhg": rng.choice([ox.PH2O_37_MMHG, 35.7, 0.0, 100.0], n),
    }


@pytest.mark.parametrize("func", [ox.alveolar_po2_simple, ox.alveolar_po2_full])
def test_alveolar_gas_on_arrays_is_the_scalar_result(func):
    # numbers to compare.REL_SAME_ENGINE: numpy's kernels may differ from CPython's in the last place
    grid = _grid()
    arrays = func(**grid)
    same = compare.tally(compare.REL_SAME_ENGINE)
    for i in range(len(arrays)):
        one = {k: float(v[i]) for k, v in grid.items()}
        same.check(arrays[i], func(**one), json.dumps(one))
    pio2 = ox.inspired_po2(**{k: grid[k] for k in ("fio2_fraction", "pb_mmhg", "ph2o_mmhg")})
    same.check(
        pio2,
        [
            ox.inspired_po2(fio2_fraction=f, pb_mmhg=p, ph2o_mmhg=w)
            for f, p, w in zip(
                grid["fio2_fraction"].tolist(),
                grid["pb_mmhg"].tolist(),
                grid["ph2o_mmhg"].tolist(),
                strict=True,
            )
        ],
        "inspired_po2 on the grid",
    )


def test_a_a_limit_on_arrays_and_mixed_scalars():
    np = pytest.importorskip("numpy")
    same = compare.tally(compare.REL_SAME_ENGINE)
    ages = np.arange(0.0, 120.5, 0.5)
    same.check(
        ox.aa_gradient_upper_by_age(age_years=ages),
        [ox.aa_gradient_upper_by_age(age_years=a) for a in ages.tolist()],
        "ages 0 to 120",
    )
    # scalars broadcast against arrays, as the batch passes a default R or PB
    many = ox.alveolar_po2_simple(fio2_fraction=np.array([0.21, 0.4]), paco2_mmhg=40.0)
    same.check(many, [ox.alveolar_po2_simple(fio2_fraction=f, paco2_mmhg=40.0) for f in (0.21, 0.4)], "R, PB")


@pytest.mark.parametrize(
    ("field", "bad"),
    [("fio2_fraction", 1.2), ("paco2_mmhg", 0.5), ("rq", 2.0), ("pb_mmhg", math.nan), ("pb_mmhg", math.inf)],
)
def test_arrays_are_refused_with_the_scalar_message(field, bad):
    np = pytest.importorskip("numpy")
    good = {"fio2_fraction": 0.3, "paco2_mmhg": 40.0, "pb_mmhg": 760.0, "rq": 0.8}
    with pytest.raises(InputError) as scalar:
        ox.alveolar_po2_simple(**{**good, field: bad})
    arrays = {k: np.full(5, v) for k, v in good.items()}
    arrays[field][3] = bad
    with pytest.raises(InputError) as array:
        ox.alveolar_po2_simple(**arrays)
    assert str(array.value) == str(scalar.value) and array.value.field == field


def test_each_calls_an_elementwise_function_once_on_the_selected_rows():
    np = pytest.importorskip("numpy")
    from tidewell.arrays import NAN, each, elementwise

    calls = []

    @elementwise
    def limit(*, age_years):
        calls.append(np.shape(age_years))
        return ox.aa_gradient_upper_by_age(age_years=age_years)

    ages = np.array([30.0, NAN, 80.0, 200.0, 44.0])  # NaN and 200 are outside the mask: never checked
    mask = np.array([True, False, True, False, True])
    out = each(limit, mask, age_years=ages)
    assert calls == [(3,)]
    assert out[mask].tolist() == [ox.aa_gradient_upper_by_age(age_years=a) for a in (30.0, 80.0, 44.0)]
    assert np.isnan(out[~mask]).all()
    assert math.isnan(each(limit, False, age_years=30.0)) and each(limit, True, age_years=30.0) == 11.5
    assert np.isnan(each(limit, np.zeros(3, dtype=bool), age_years=np.full(3, NAN))).all()
    assert calls == [(3,), ()]


# -- the Kelman 1966 fit, written here from its published coefficients ------------------------------------


def kelman(x: float) -> float:
    """kelman1966 (coefficients from memory): S = (a1 x + a2 x^2 + a3 x^3 + x^4) / (a4 + a5 x + a6 x^2
    + a7 x^3 + x^4) for a PO2 x of 10 mmHg or more, 0.003683 x + 0.000584 x^2 below."""
    if x < 10.0:
        return 0.003683 * x + 0.000584 * x * x
    a1, a2, a3 = -8.5322289e3, 2.1214010e3, -6.7073989e1
    a4, a5, a6, a7 = 9.3596087e5, -3.1346258e4, 2.3961674e3, -6.7104406e1
    return (a1 * x + a2 * x**2 + a3 * x**3 + x**4) / (a4 + a5 * x + a6 * x**2 + a7 * x**3 + x**4)


@pytest.mark.parametrize("po2", [0.0, 5.0, 9.99, 10.0, 20.0, 26.8, 40.0, 60.0, 100.0, 150.0])
def test_kelman_fit_follows_its_published_coefficients(po2):
    # the fit itself (not its agreement with other curves, checked above to 0.01): to 1e-12 relative, so a
    # change of one coefficient by one unit in its last digits shows
    assert ox.saturation_kelman1966(po2_mmhg=po2) == pytest.approx(kelman(po2), rel=1e-12, abs=1e-15)


# -- the accepted ranges, each end on both sides -------------------------------------------------------------
# The project's plausibility limits of each input (no published source), written here by hand from the
# docstrings (FiO2 0.05-1 or 0.21-1, PB 150-1100 mmHg, PaCO2 1-300 mmHg, R 0.5-1.5, PO2 0-800 mmHg on the
# curves, 15-43 degC, Hb 1-25 g/dL ...): a change of one is then a decision, not an accident.

_CONTENT = {"hb_g_dl": 15.0, "so2_fraction": 0.97, "po2_mmhg": 90.0}


@pytest.mark.parametrize(
    ("func", "field", "low", "high", "base"),
    [
        (ox.inspired_po2, "fio2_fraction", 0.05, 1.0, {}),
        (ox.inspired_po2, "pb_mmhg", 150.0, 1100.0, {"fio2_fraction": 0.21}),
        (ox.inspired_po2, "ph2o_mmhg", 0.0, 100.0, {"fio2_fraction": 0.21}),
        (ox.alveolar_po2_simple, "paco2_mmhg", 1.0, 300.0, {"fio2_fraction": 0.21}),
        (ox.alveolar_po2_simple, "rq", 0.5, 1.5, {"fio2_fraction": 0.21, "paco2_mmhg": 40.0}),
        (ox.alveolar_po2_full, "paco2_mmhg", 1.0, 300.0, {"fio2_fraction": 0.21}),
        (ox.alveolar_po2_full, "rq", 0.5, 1.5, {"fio2_fraction": 0.21, "paco2_mmhg": 40.0}),
        (ox.aa_gradient_upper_by_age, "age_years", 0.0, 120.0, {}),
        (ox.water_vapour_pressure_buck1981, "temperature_c", 0.0, 50.0, {}),
        (ox.a_over_a_ratio, "pao2_mmhg", 1.0, 800.0, {"pao2_alveolar_mmhg": 1100.0}),
        (ox.a_over_a_ratio, "pao2_alveolar_mmhg", 0.1, 1100.0, {"pao2_mmhg": 1.0}),
        (ox.pf_ratio, "pao2_mmhg", 1.0, 800.0, {"fio2_fraction": 0.5}),
        (ox.pf_ratio, "fio2_fraction", 0.21, 1.0, {"pao2_mmhg": 80.0}),
        (
            ox.pf_ratio_altitude_corrected_berlin,
            "pb_mmhg",
            150.0,
            1100.0,
            {"pao2_mmhg": 80.0, "fio2_fraction": 0.5},
        ),
        (ox.berlin_pf_band, "pf_mmhg", 0.0, 5000.0, {}),
        (ox.sf_ratio, "spo2_percent", 1.0, 100.0, {"fio2_fraction": 0.5}),
        (ox.sf_ratio, "fio2_fraction", 0.21, 1.0, {"spo2_percent": 95.0}),
        (ox.pf_from_sf_rice2007, "sf", 64.0, 500.0, {}),
        (
            ox.oxygenation_index,
            "fio2_fraction",
            0.21,
            1.0,
            {"mean_airway_pressure_cmh2o": 15.0, "pao2_mmhg": 80.0},
        ),
        (
            ox.oxygenation_index,
            "mean_airway_pressure_cmh2o",
            1.0,
            60.0,
            {"fio2_fraction": 0.5, "pao2_mmhg": 80.0},
        ),
        (
            ox.oxygenation_index,
            "pao2_mmhg",
            1.0,
            800.0,
            {"fio2_fraction": 0.5, "mean_airway_pressure_cmh2o": 15.0},
        ),
        (ox.expected_pao2_by_age, "age_years", 0.0, 120.0, {}),
        (ox.expected_pao2_sorbini1968, "age_years", 0.0, 120.0, {}),
        (ox.saturation_severinghaus1979, "po2_mmhg", 0.0, 800.0, {}),
        (ox.virtual_po2_kelman, "po2_mmhg", 0.0, 800.0, {}),
        (ox.virtual_po2_kelman, "temperature_c", 15.0, 43.0, {"po2_mmhg": 60.0}),
        (ox.virtual_po2_kelman, "ph", 6.0, 8.6, {"po2_mmhg": 60.0}),
        (ox.virtual_po2_kelman, "pco2_mmhg", 1.0, 400.0, {"po2_mmhg": 60.0}),
        (ox.virtual_po2_base_excess, "po2_mmhg", 0.0, 800.0, {}),
        (ox.virtual_po2_base_excess, "temperature_c", 15.0, 43.0, {"po2_mmhg": 60.0}),
        (ox.virtual_po2_base_excess, "ph", 6.0, 8.6, {"po2_mmhg": 60.0}),
        (ox.virtual_po2_base_excess, "base_excess_mmol_l", -40.0, 40.0, {"po2_mmhg": 60.0}),
        (ox.saturation_hill, "po2_mmhg", 0.0, 800.0, {}),
        (ox.saturation_hill, "p50_mmhg", 5.0, 80.0, {"po2_mmhg": 40.0}),
        (ox.saturation_hill, "n", 1.0, 4.0, {"po2_mmhg": 40.0}),
        (ox.saturation_kelman1966, "po2_mmhg", 0.0, 800.0, {}),
        (ox.oxygen_content, "hb_g_dl", 1.0, 25.0, {"so2_fraction": 0.97}),
        (ox.oxygen_content, "so2_fraction", 0.0, 1.0, {"hb_g_dl": 15.0}),
        (ox.oxygen_content, "hufner_ml_per_g", 1.30, 1.40, _CONTENT),
        (ox.oxygen_content, "dissolved_ml_dl_mmhg", 0.0030, 0.0032, _CONTENT),
        (ox.oxygen_content, "po2_mmhg", 0.0, 800.0, {"hb_g_dl": 15.0, "so2_fraction": 0.97}),
        (ox.oxygen_delivery, "cao2_ml_dl", 0.0, 40.0, {"cardiac_output_l_min": 5.0}),
        (ox.oxygen_delivery, "cardiac_output_l_min", 0.5, 30.0, {"cao2_ml_dl": 20.0}),
    ],
)
def test_each_input_is_accepted_exactly_over_its_range(func, field, low, high, base):
    assert_accepted_range(func, field, low, high, **base)


def test_the_defaults_are_sea_level_and_the_standard_curve():
    # alveolar_gas_1946: PIO2 = FiO2 x (760 - 47) at sea level (PB 760 mmHg, water vapour 47 mmHg at 37 degC)
    assert ox.inspired_po2(fio2_fraction=0.21) == pytest.approx(0.21 * (760.0 - 47.0), abs=0.01)
    # hill1910: S = PO2^n / (PO2^n + P50^n), the standard curve's P50 26.8 mmHg and n 2.7 (common practice)
    assert ox.saturation_hill(po2_mmhg=40.0) == pytest.approx(40.0**2.7 / (40.0**2.7 + 26.8**2.7), rel=1e-12)


@pytest.mark.parametrize("s", [0.01, 0.3, 0.5, 0.75, 0.9, 0.97, 0.99])
def test_severinghaus_eq2_follows_its_published_form(s):
    # severinghaus1979 eq 2: ln PO2 = 0.385 ln(1 / (1/S - 1)) + 3.32 - 1 / (72 S) - 0.17 S^6
    expected = math.exp(0.385 * math.log(1 / (1 / s - 1)) + 3.32 - 1 / (72 * s) - 0.17 * s**6)
    assert ox.po2_from_saturation_severinghaus1979(so2_fraction=s) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize(("t", "ph", "pco2", "be"), [(32.0, 7.30, 50.0, -5.0), (40.0, 7.50, 30.0, 8.0)])
def test_virtual_po2_factors_follow_their_published_form(t, ph, pco2, be):
    # kelman1966 / severinghaus1979 (from memory): the PO2 at standard conditions is PO2 x 10^(0.024 (37 - T)
    # + 0.40 (pH - 7.40) + 0.06 log10(40 / PCO2)); with the base excess 10^(0.024 (37 - T) + 0.48 (pH - 7.40)
    # - 0.0013 BE)
    kelman = 10 ** (0.024 * (37 - t) + 0.40 * (ph - 7.40) + 0.06 * math.log10(40 / pco2))
    by_be = 10 ** (0.024 * (37 - t) + 0.48 * (ph - 7.40) - 0.0013 * be)
    v = ox.virtual_po2_kelman(po2_mmhg=60.0, temperature_c=t, ph=ph, pco2_mmhg=pco2)
    assert v.factor == pytest.approx(kelman, rel=1e-12) and v.po2_mmhg == pytest.approx(
        60.0 * kelman, rel=1e-12
    )
    w = ox.virtual_po2_base_excess(po2_mmhg=60.0, temperature_c=t, ph=ph, base_excess_mmol_l=be)
    assert w.factor == pytest.approx(by_be, rel=1e-12)
