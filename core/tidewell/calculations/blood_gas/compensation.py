"""The primary process, the expected compensation and the chronicity of a respiratory disorder."""

from __future__ import annotations

from types import SimpleNamespace

from ...arrays import NAN, clamp, div, given, log10, maximum, none_if_nan, not_, where
from ...formulas import acidbase as ab
from .decision import NONE, _code, _ones
from .thresholds import (
    AG_BESIDE_HYPERCAPNIA,
    HCO3_HIGH,
    HCO3_LOW,
    HCO3_MARGIN_MIN,
    LACTATE_ACIDOSIS,
    MET_ACID,
    MET_ALK,
    NAMES,
    PCO2_HIGH,
    PCO2_LOW,
    PH_HIGH,
    PH_LOW,
    RESP_ACID,
    RESP_ALK,
    SBE_TOLERANCE,
)
from .work import _Work


def _primary_process(ph, pco2, hco3):
    """(primary code or ``""``, tentative) for the pH, PCO2 and HCO3 the rules use (see primary_process)."""
    resp_w = abs(log10(pco2 / ab.NORMAL_PCO2_MMHG))
    met_w = abs(log10(ab.NORMAL_HCO3_MMOL_L / hco3))
    resp_larger = resp_w >= met_w  # a tie names the respiratory process

    def side(resp_ok, met_ok, resp_code, met_code, resp_lean, met_lean):
        larger = where(resp_larger, resp_code, met_code)
        one = where(resp_ok, resp_code, met_code)
        nothing = not_(resp_ok | met_ok)
        # no value outside its range: the larger contribution among those on this side of 40 / 24 (tentative)
        lean = where(
            resp_lean & met_lean, larger, where(resp_lean, resp_code, where(met_lean, met_code, NONE))
        )
        return where(resp_ok & met_ok, larger, where(nothing, lean, one)), nothing

    ma, ra = hco3 < HCO3_LOW, pco2 > PCO2_HIGH
    mk, rk = hco3 > HCO3_HIGH, pco2 < PCO2_LOW
    acid_code, acid_tentative = side(
        ra, ma, RESP_ACID, MET_ACID, pco2 > ab.NORMAL_PCO2_MMHG, hco3 < ab.NORMAL_HCO3_MMOL_L
    )
    alk_code, alk_tentative = side(
        rk, mk, RESP_ALK, MET_ALK, pco2 < ab.NORMAL_PCO2_MMHG, hco3 > ab.NORMAL_HCO3_MMOL_L
    )
    any_acid, any_alk = ra | ma, rk | mk
    acid_side = where(
        ph < PH_LOW, True, where(ph > PH_HIGH, False, where(ph < ab.NORMAL_PH, any_acid, not_(any_alk)))
    )
    quiet = (ph >= PH_LOW) & (ph <= PH_HIGH) & not_(any_acid | any_alk)
    code = where(quiet, NONE, where(acid_side, acid_code, alk_code))
    tentative = where(quiet, False, where(acid_side, acid_tentative, alk_tentative))
    return code, tentative


def decide_compensation(v: SimpleNamespace) -> None:
    """The primary process and the expected compensation (Boston rules: albert1967, narins1980;
    fraction_acute_bands)."""
    d, f, h, p, ph, sbe, x = v.d, v.f, v.h, v.p, v.ph, v.sbe, v.x
    primary0, tentative = _primary_process(ph, p, h)
    d.primary_classified, d.tentative = primary0, tentative
    f["borderline_values"] = tentative & (primary0 != NONE)
    met0 = (primary0 == MET_ACID) | (primary0 == MET_ALK)
    resp0 = (primary0 == RESP_ACID) | (primary0 == RESP_ALK)
    d.respiratory_primary = resp0
    winters, alkalosis = ab._winters(h), ab._metabolic_alkalosis_pco2(h)
    d.winters = winters
    # a metabolic primary: is the PaCO2 inside the band compensation explains?
    e_high = where(primary0 == MET_ACID, winters.high, alkalosis.high)
    e_low = where(primary0 == MET_ACID, winters.low, alkalosis.low)
    above, below = met0 & (p > e_high), met0 & (p < e_low)
    d.response = where(above, RESP_ACID, where(below, RESP_ALK, NONE))
    f["concurrent_respiratory_acidosis"] = above
    f["concurrent_respiratory_alkalosis"] = met0 & not_(above) & below
    f["compensation_as_expected"] = met0 & not_(above | below)
    below = f["concurrent_respiratory_alkalosis"]

    # a respiratory primary: acute and chronic expectations, fraction acute, a concurrent metabolic process
    acid = primary0 == RESP_ACID
    d.acid = acid
    e_acid, e_alk = ab._respiratory_acidosis_hco3(p), ab._respiratory_alkalosis_hco3(p)
    d.e_acid = e_acid
    d.e_acute = ab.Expected(*(where(acid, a, b) for a, b in zip(e_acid.acute, e_alk.acute, strict=True)))
    d.e_chronic = ab.Expected(
        *(where(acid, a, b) for a, b in zip(e_acid.chronic, e_alk.chronic, strict=True))
    )
    ea, ec = d.e_acute.value, d.e_chronic.value
    delta = p - ab.NORMAL_PCO2_MMHG
    d.margin = margin = maximum(HCO3_MARGIN_MIN, 0.2 * abs(ec - ea))
    d.judge = judge = abs(delta) >= 5.0
    d.f_h = f_h = where(abs(delta) >= 1.0, ab._fraction_acute_hco3(p, h), NAN)
    d.ph_rules = ab._respiratory_acidosis_ph(p)
    d.ph_hh_acute = ab._ph_hh(e_acid.acute.value, p)
    d.ph_hh_chronic = ab._ph_hh(e_acid.chronic.value, p)
    d.f_ph = f_ph = where(acid & (p >= 41.0), ab._fraction_acute_ph(ph, p), NAN)
    f["ph_rule_drift"] = acid & (delta > 30.0)
    b = x.baseline_pco2
    has_b = given(b)
    on_baseline = acid & has_b
    d.hco3_on_baseline = ab._hco3_on_baseline(p, b)
    base = maximum(b, ab.NORMAL_PCO2_MMHG)
    d.f_b = f_b = where(
        on_baseline, where((p > base) & (delta > 0), clamp(div(p - base, delta), 0.0, 1.0), 0.0), NAN
    )
    d.low_ref = low_ref = where(on_baseline, d.hco3_on_baseline, where(acid, ea, ec))
    d.high_ref = high_ref = where(on_baseline, d.hco3_on_baseline, where(acid, ec, ea))
    met_acid = resp0 & (h < low_ref - margin)
    # beside a respiratory acidosis a metabolic alkalosis is named only above the steepest published chronic
    # band (5 per 10 mmHg, Martinu 2003) with an SBE above the Copenhagen chronic expectation + 3 (Schlichtig
    # 1998): a HCO3 inside the band the report prints as expected never names one
    d.sbe_chronic_limit = 0.4 * delta + SBE_TOLERANCE
    alk_limit = where(acid, maximum(high_ref + margin, e_acid.chronic.high), high_ref + margin)
    d.alk_limit = alk_limit
    met_alk = resp0 & (h > alk_limit) & where(acid, sbe > d.sbe_chronic_limit, True)
    by_h = where(given(f_h), ab._chronicity(f_h), "acute")
    by_b = ab._chronicity(f_b)
    judged_b = judge & given(f_b)
    judged_h = judge & not_(met_acid | met_alk) & given(f_h)
    resp_chronicity = where(judged_b, by_b, where(judged_h, by_h, where(given(f_b), by_b, by_h)))
    resp_fraction = where(judged_b, f_b, where(judged_h, clamp(f_h, 0.0, 1.0), NAN))
    f["chronicity_not_judged"] = resp0 & not_(judge)
    f["concurrent_metabolic_alkalosis"] = met_alk
    d.by_ph = by_ph = ab._chronicity(f_ph)
    f["chronicity_rules_disagree"] = (
        resp0 & acid & not_(given(f_b)) & given(f_ph) & (by_ph != resp_chronicity)
    )
    f["baseline_and_hco3_disagree"] = (
        resp0
        & given(f_b)
        & given(f_h)
        & judge
        & not_(met_acid | met_alk)
        & (ab._chronicity(f_h) != resp_chronicity)
    )
    has_ma = (primary0 == MET_ACID) | met_acid
    has_mk = (primary0 == MET_ALK) | met_alk
    has_ra = (primary0 == RESP_ACID) | above
    has_rk = (primary0 == RESP_ALK) | below
    (
        v.above,
        v.acid,
        v.alk_limit,
        v.alkalosis,
        v.b,
        v.base,
        v.below,
        v.f_b,
        v.f_h,
        v.has_b,
        v.has_ma,
        v.has_mk,
        v.has_ra,
        v.has_rk,
        v.judge,
        v.low_ref,
        v.margin,
        v.met0,
        v.met_acid,
        v.met_alk,
        v.primary0,
        v.resp0,
        v.resp_chronicity,
        v.resp_fraction,
        v.winters,
    ) = (
        above,
        acid,
        alk_limit,
        alkalosis,
        b,
        base,
        below,
        f_b,
        f_h,
        has_b,
        has_ma,
        has_mk,
        has_ra,
        has_rk,
        judge,
        low_ref,
        margin,
        met0,
        met_acid,
        met_alk,
        primary0,
        resp0,
        resp_chronicity,
        resp_fraction,
        winters,
    )


def decide_chronicity(v: SimpleNamespace) -> None:
    """The respiratory chronicity when a metabolic disorder also moves the HCO3."""
    (
        above,
        acid,
        base,
        before,
        below,
        d,
        f,
        f_b,
        gap,
        has_b,
        has_ma,
        has_mk,
        has_ra,
        has_rk,
        judge,
        met0,
        met_acid,
        met_alk,
        p,
        primary,
        resp0,
        resp_chronicity,
        resp_fraction,
        used,
        venous,
    ) = (
        v.above,
        v.acid,
        v.base,
        v.before,
        v.below,
        v.d,
        v.f,
        v.f_b,
        v.gap,
        v.has_b,
        v.has_ma,
        v.has_mk,
        v.has_ra,
        v.has_rk,
        v.judge,
        v.met0,
        v.met_acid,
        v.met_alk,
        v.p,
        v.primary,
        v.resp0,
        v.resp_chronicity,
        v.resp_fraction,
        v.used,
        v.venous,
    )
    metabolic = has_ma | has_mk
    # a high anion gap acidosis alone beside a respiratory acidosis: the HCO3 before the gap,
    # HCO3 + (AG - 12), is what the chronicity reading uses (delta gap method; Wrenn 1990, Rastegar 2007)
    d.before_gap_used = by_gap = (
        resp0 & acid & has_ma & not_(has_mk) & gap & (used > ab.NORMAL_ANION_GAP_MMOL_L) & judge
    )
    d.f_before = f_before = where(by_gap, ab._fraction_acute_hco3(p, before), NAN)
    judged_gap = by_gap & not_(given(f_b))
    resp_chronicity = where(judged_gap, ab._chronicity(f_before), resp_chronicity)
    resp_fraction = where(judged_gap, clamp(f_before, 0.0, 1.0), resp_fraction)
    indeterminate = resp0 & not_(given(f_b)) & metabolic & not_(by_gap)
    f["chronicity_indeterminate"] = indeterminate
    resp_fraction = where(indeterminate, NAN, resp_fraction)
    # a venous sample screens: its respiratory chronicity is not judged (the word is what the HCO3 rules
    # alone say, with no fraction), and it gets no PaCO2 target
    resp_fraction = where(venous, NAN, resp_fraction)
    concurrent = met0 & (above | below)
    conc_b = concurrent & has_b & above & (p > ab.NORMAL_PCO2_MMHG + 1.0)
    d.concurrent_from_baseline = conc_b
    conc_f = where(conc_b, clamp(div(p - base, p - ab.NORMAL_PCO2_MMHG), 0.0, 1.0), NAN)
    f["respiratory_chronicity_assumed"] = concurrent & not_(conc_b)
    d.chronicity = where(
        resp0, resp_chronicity, where(conc_b, ab._chronicity(conc_f), where(concurrent, "acute", NONE))
    )
    d.fraction_acute = where(resp0, resp_fraction, where(venous, NAN, conc_f))
    d.fraction_acute_baseline = where(resp0, f_b, conc_f)
    d.has = {MET_ACID: has_ma, MET_ALK: has_mk, RESP_ACID: has_ra, RESP_ALK: has_rk}
    d.stage = {
        MET_ACID: where(primary == MET_ACID, 0, where(met_acid, 1, 2)),
        MET_ALK: where(primary == MET_ALK, 0, where(met_alk, 1, 3)),
        RESP_ACID: where(primary == RESP_ACID, 0, 1),
        RESP_ALK: where(primary == RESP_ALK, 0, 1),
    }
    d.count = _ones(has_ma) + _ones(has_mk) + _ones(has_ra) + _ones(has_rk)
    v.by_gap, v.f_before, v.indeterminate, v.resp_chronicity = (
        by_gap,
        f_before,
        indeterminate,
        resp_chronicity,
    )


# -- classification ------------------------------------------------------------------------------------------


def primary_process(ph: float, pco2: float, hco3: float) -> tuple[str | None, bool]:
    """(primary disorder code or None, tentative) for a consistent pH/PCO2/HCO3.

    pH < 7.35 acidaemia, > 7.45 alkalaemia; HCO3 < 22 or > 26; PCO2 > 45 or < 35. When both processes point
    the same way, the larger contribution to [H+] (|log10(PCO2/40)| against |log10(24/HCO3)|) is primary; at
    a normal pH the side of 7.40 chooses; with only the pH outside its range the primary is tentative.

    >>> primary_process(7.28, 26.0, 12.0)
    ('metabolic_acidosis', False)
    >>> primary_process(7.53, 24.0, 20.0)
    ('respiratory_alkalosis', False)
    """
    code, tentative = _primary_process(ph, pco2, hco3)
    return _code(code), bool(tentative)


def _classify(w: _Work) -> None:
    r = w.r
    primary = _code(w.d.primary_classified)
    if w.fires("borderline_values"):
        r.finding(
            "borderline_values",
            "info",
            "The pH is outside its reference range while PCO2 and HCO3 are inside theirs; "
            f"{NAMES[primary]} is named from the larger contribution to [H+] and is tentative.",
        )
    if primary is None:
        return
    if primary == MET_ACID:
        _metabolic_primary(w, acidosis=True)
    elif primary == MET_ALK:
        _metabolic_primary(w, acidosis=False)
    else:
        _respiratory_primary(w, primary)


def _metabolic_primary(w: _Work, *, acidosis: bool) -> None:
    e = _metabolic_expected(w, acidosis=acidosis)
    _respiratory_response(w, e)


def _metabolic_expected(w: _Work, *, acidosis: bool):
    """Expected PaCO2 of a metabolic primary (outputs and steps); returns the Expected band."""
    r, d = w.r, w.d
    e = d.met_expected
    if acidosis:
        formula = "expected PaCO2 = 1.5 x HCO3 + 8, band +/- 2 mmHg (Winters)"
        sources = ("albert1967",)
        alt = f"alternatives: 1.54 x HCO3 + 8.36 +/- 2.2 gives {w.p(1.54 * w.hco3 + 8.36)} (Kidney360 2022)"
    else:
        a06 = ab.expected_pco2_metabolic_alkalosis(hco3_mmol_l=w.hco3, slope=0.6).value
        a075 = ab.expected_pco2_metabolic_alkalosis(hco3_mmol_l=w.hco3, slope=0.75).value
        formula = "expected PaCO2 = 40 + 0.7 x (HCO3 - 24), band +/- 5 mmHg"
        sources = ("berend2014", "kidney360_2022")
        alt = f"alternatives: slope 0.6 gives {w.p(a06)} (Narins & Emmett 1980), 0.75 gives {w.p(a075)}"
    r.pressure_range("expected_pco2", e.low, e.high)
    r.step(
        f"Expected PaCO2 ({formula}; {alt})", formula, e.value, sources, output="expected_pco2", pressure=True
    )
    r.computed(
        "expected_pco2_centre", e.value, "Expected PaCO2, centre of the band", formula, sources, pressure=True
    )
    if acidosis:
        r.computed(
            "expected_pco2_winters",
            e.value,
            "Winters' formula",
            "1.5 x HCO3 + 8",
            "albert1967",
            pressure=True,
        )
    return e


def _respiratory_response(w: _Work, e) -> None:
    """Compare the measured PaCO2 with the expected band of a metabolic primary."""
    s, r = w.s, w.r
    band = f"{w.p(e.low)} to {w.p(e.high)}"
    if w.fires("concurrent_respiratory_acidosis"):
        text = (
            f"PaCO2 {w.p(s.pco2)} is above the {band} expected from compensation: the respiratory response "
            "is inadequate (concurrent respiratory acidosis)."
        )
        r.finding("concurrent_respiratory_acidosis", "notable", text)
        w.compensation_text = "inadequate respiratory compensation (concurrent respiratory acidosis)"
    elif w.fires("concurrent_respiratory_alkalosis"):
        text = (
            f"PaCO2 {w.p(s.pco2)} is below the {band} expected from compensation: the patient is "
            "ventilating more than compensation explains (concurrent respiratory alkalosis)."
        )
        r.finding("concurrent_respiratory_alkalosis", "notable", text)
        w.compensation_text = "PaCO2 lower than compensation explains (concurrent respiratory alkalosis)"
    else:
        r.finding(
            "compensation_as_expected",
            "info",
            f"PaCO2 {w.p(s.pco2)} lies within the {band} expected from respiratory compensation.",
        )
        w.compensation_text = "appropriate respiratory compensation"


def _respiratory_primary(w: _Work, code: str) -> None:
    s, r, d = w.s, w.r, w.d
    acid = code == RESP_ACID
    p, h = s.pco2, w.hco3
    delta = p - ab.NORMAL_PCO2_MMHG
    e = ab.RespiratoryExpectation(d.e_acute, d.e_chronic)
    if acid:
        acute_f = "HCO3 = 24 + 1 x (PaCO2 - 40)/10 (band: 1-2 per 10 mmHg)"
        chronic_f = "HCO3 = 24 + 3.5 x (PaCO2 - 40)/10 (band: 3 [some texts], 4 [Brandis], 5 [Martinu 2003])"
    else:
        acute_f = "HCO3 = 24 - 2 x (40 - PaCO2)/10 (band: 2-2.5 per 10 mmHg)"
        chronic_f = "HCO3 = 24 - 4 x (40 - PaCO2)/10 (band: 4-5 per 10 mmHg, Narins & Emmett; Brandis)"
    rules = ("narins1980", "berend2014", "kidney360_2022", "brandis") + (("martinu2003",) if acid else ())

    def q(x):
        return {"value": x, "unit": "mmol/L"}

    r.put(
        "expected_hco3",
        {
            "acute": {"low": q(e.acute.low), "high": q(e.acute.high)},
            "chronic": {"low": q(e.chronic.low), "high": q(e.chronic.high)},
        },
        decimals=1,
    )
    r.put("expected_hco3_centre", {"acute": q(e.acute.value), "chronic": q(e.chronic.value)}, decimals=1)
    for label, f, x in (("acute", acute_f, e.acute), ("chronic", chronic_f, e.chronic)):
        r.step(
            f"Expected HCO3 if {label} (band {x.low:.1f}-{x.high:.1f} mmol/L)",
            f,
            x.value,
            rules,
            output="expected_hco3",
            unit="mmol/L",
        )
        r.step(
            f"Expected HCO3 if {label}, default slope",
            f,
            x.value,
            rules,
            output="expected_hco3_centre",
            unit="mmol/L",
        )
    margin = d.margin
    f_h, f_ph, f_b = none_if_nan(d.f_h), none_if_nan(d.f_ph), none_if_nan(d.f_b)
    if f_h is not None:
        r.computed(
            "fraction_acute_hco3",
            f_h,
            "Fraction acute by the HCO3 rules",
            "f = (HCO3_chronic - HCO3) / (HCO3_chronic - HCO3_acute), default slopes",
            ("fraction_acute_bands", "narins1980"),
            decimals=2,
        )
    if acid:
        pr = d.ph_rules
        r.put("expected_ph", {"acute": pr.acute, "chronic": pr.chronic}, decimals=2)
        r.step(
            "Expected pH if acute",
            "pH = 7.40 - 0.008 x (PaCO2 - 40)",
            pr.acute,
            "berend2014",
            output="expected_ph",
        )
        r.step(
            "Expected pH if chronic",
            "pH = 7.40 - 0.003 x (PaCO2 - 40)",
            pr.chronic,
            "berend2014",
            output="expected_ph",
        )
        ph_hh = {"acute": d.ph_hh_acute, "chronic": d.ph_hh_chronic}
        r.put("expected_ph_hh", ph_hh, decimals=3)
        for label in ("acute", "chronic"):
            r.step(
                f"pH from the expected {label} HCO3 (Henderson-Hasselbalch)",
                "pH = 6.1 + log10(HCO3_expected / (0.0307 x PaCO2))",
                ph_hh[label],
                "henderson1908",
                output="expected_ph_hh",
            )
        if f_ph is not None:
            r.computed(
                "fraction_acute_ph",
                f_ph,
                "Fraction acute by the pH rules",
                "f = [(7.40 - pH) - 0.003 x dPaCO2] / [(0.008 - 0.003) x dPaCO2]",
                ("fraction_acute_bands", "berend2014"),
                decimals=2,
            )
        if w.fires("ph_rule_drift"):
            r.finding(
                "ph_rule_drift",
                "info",
                f"With PaCO2 {w.p(delta)} above {w.p(40.0)} the linear pH rules drift: the acute rule "
                "predicts "
                f"pH {pr.acute:.2f}, while Henderson-Hasselbalch with the acute HCO3 gives "
                f"{ph_hh['acute']:.3f}. The chronicity call uses the HCO3 rules.",
            )
    if f_b is not None:
        exp_b = d.hco3_on_baseline
        r.computed(
            "expected_hco3_on_baseline",
            exp_b,
            "HCO3 expected on the known baseline",
            "24 + 3.5 x (baseline - 40)/10 + 1 x (PaCO2 - baseline)/10 (or - 2 x (baseline - PaCO2)/10 "
            "below it)",
            ("narins1980", "berend2014"),
            unit="mmol/L",
            decimals=1,
        )
        r.computed(
            "fraction_acute_baseline",
            f_b,
            "Fraction acute from the known baseline",
            "f = (PaCO2 - baseline) / (PaCO2 - 40), limited to 0-1",
            "fraction_acute_bands",
            decimals=2,
        )
    low_ref, high_ref = d.low_ref, d.high_ref
    chronicity = _code(d.chronicity)
    if d.before_gap_used and given(d.f_before):
        r.computed(
            "fraction_acute_before_gap",
            d.f_before,
            f"Fraction acute by the HCO3 rules, from the HCO3 before the anion gap ({d.hco3_before_gap:.1f})",
            "f = (HCO3_chronic - (HCO3 + AG - 12)) / (HCO3_chronic - HCO3_acute)",
            ("fraction_acute_bands", "wrenn1990"),
            decimals=2,
        )
    if w.fires("chronicity_not_judged"):
        r.finding(
            "chronicity_not_judged",
            "info",
            f"PaCO2 {w.p(p)} is too close to normal for the acute and chronic rules to be told apart; the "
            "chronicity shown is provisional.",
        )
    if w.fires("concurrent_metabolic_acidosis"):
        if d.ma_from_lactate_or_gap:
            why = []
            if s.lactate is not None and s.lactate >= LACTATE_ACIDOSIS:
                why.append(f"lactate {s.lactate:.1f} mmol/L (4 or more)")
            if d.has_gap and d.ag_used > AG_BESIDE_HYPERCAPNIA:
                corrected = " albumin-corrected" if s.albumin is not None else ""
                why.append(f"{corrected} anion gap {d.ag_used:.1f} mmol/L (above 16)".strip())
            text = (
                f"With pH {w.ph(PH_LOW)} below {PH_LOW:.2f}, {' and '.join(why)}: a concurrent metabolic "
                "acidosis beside the respiratory acidosis. Its acid consumes HCO3, so a HCO3 that looks "
                "acute can hide chronic retention."
            )
        else:
            text = (
                f"HCO3 {h:.1f} mmol/L is more than {margin:.1f} below the {low_ref:.1f} expected "
                f"{'even for an acute change' if not f_b and acid else 'for this PaCO2'}: a concurrent "
                "metabolic acidosis."
            )
        r.finding("concurrent_metabolic_acidosis", "notable", text)
    if w.fires("concurrent_metabolic_alkalosis"):
        if acid:
            text = (
                f"HCO3 {h:.1f} mmol/L is above {d.alk_limit:.1f}, beyond the steepest published chronic "
                f"band (5 per 10 mmHg), and SBE {w.sbe:+.1f} is above {d.sbe_chronic_limit:+.1f} "
                "(Copenhagen chronic expectation + 3): a concurrent metabolic alkalosis."
            )
        else:
            text = (
                f"HCO3 {h:.1f} mmol/L is more than {margin:.1f} above the {high_ref:.1f} expected for this "
                "PaCO2: a concurrent metabolic alkalosis."
            )
        r.finding("concurrent_metabolic_alkalosis", "notable", text)
    if w.fires("chronicity_rules_disagree"):
        by_ph = d.by_ph
        r.finding(
            "chronicity_rules_disagree",
            "info",
            f"The HCO3 rules read {chronicity.replace('_', '-')} (f {f_h:.2f}), the pH rules "
            f"{by_ph.replace('_', '-')} (f {f_ph:.2f})"
            + (
                "; at this rise the pH rules drift, so the HCO3 reading is used."
                if delta > 30
                else "; the HCO3 reading is used."
            ),
        )
    if w.fires("baseline_and_hco3_disagree"):
        by_h = ab.chronicity_from_fraction(fraction_acute=f_h)
        r.finding(
            "baseline_and_hco3_disagree",
            "info",
            f"The known baseline reads {chronicity.replace('_', '-')}, the HCO3 alone "
            f"{by_h.replace('_', '-')}: the baseline may be out of date, or a metabolic process moves "
            "the HCO3.",
        )


def _finish_chronicity(w: _Work) -> None:
    """Respiratory chronicity when a metabolic disorder also moves the HCO3 (always a word, never null)."""
    r = w.r
    if w.fires("chronicity_indeterminate"):
        primary = w.disorders[0]
        r.finding(
            "chronicity_indeterminate",
            "info",
            f"A concurrent metabolic disorder also moves the HCO3, so whether the {NAMES[primary['code']]} "
            f"is acute or chronic cannot be read from it: the '{primary['chronicity'].replace('_', '-')}' "
            "shown is what the HCO3 rules alone would say, and the fraction acute is left out. A known "
            "usual PaCO2 (baseline_pco2) would settle it.",
        )
    if w.primary in (MET_ACID, MET_ALK):
        for d in w.disorders[1:]:
            if d["code"] in (RESP_ACID, RESP_ALK):
                _concurrent_respiratory_chronicity(w, d)


def _concurrent_respiratory_chronicity(w: _Work, d: dict) -> None:
    r = w.r
    if w.d.concurrent_from_baseline:
        f = d["fraction_acute"]
        if f is None:  # a venous sample: not judged
            return
        r.computed(
            "fraction_acute_baseline",
            f,
            "Fraction acute of the concurrent respiratory acidosis, from the known baseline",
            "f = (PaCO2 - baseline) / (PaCO2 - 40), limited to 0-1",
            "fraction_acute_bands",
            decimals=2,
        )
        return
    r.finding(
        "respiratory_chronicity_assumed",
        "info",
        f"The {NAMES[d['code']]} is judged against the compensation the {NAMES[w.primary]} calls for, so "
        "its chronicity cannot be read from the HCO3; it is shown as acute by convention (a respiratory "
        "response that fails or overshoots is usually a current event). A known usual PaCO2 would settle "
        "it.",
    )
