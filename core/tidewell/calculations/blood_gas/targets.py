"""Ventilation safety and targets: the PaCO2 aim, NIV criteria, the SpO2 target and severity."""

from __future__ import annotations

from types import SimpleNamespace

from ...arrays import NAN, given, maximum, minimum, not_, where
from ...formulas import acidbase as ab
from ...report import pressure_text
from .decision import NONE
from .thresholds import (
    FLOOR_PH,
    HCO3_HIGH,
    INF,
    MET_ACID,
    NAMES,
    NARCOSIS_CHRONIC_MMHG,
    NARCOSIS_NORMAL_MMHG,
    NARCOSIS_RISE_MMHG,
    NIV_INVASIVE_PH,
    NIV_PCO2_MMHG,
    NIV_PH,
    PCO2_HIGH,
    PH_HIGH,
    PH_LOW,
    RESP_ACID,
    RESP_ALK,
    SEVERE_ACIDAEMIA_PH,
    SEVERE_ALKALAEMIA_PH,
    TARGET_BASIS,
)
from .work import _Work


def decide_pco2_aim(v: SimpleNamespace) -> None:
    """Ventilation safety: the PaCO2 aim, the alkalaemia floor, NIV (bts_ics2016), consciousness
    (co2_narcosis)."""
    (
        alkalosis,
        b,
        before,
        by_gap,
        d,
        f,
        f_before,
        f_h,
        h,
        has_b,
        has_ma,
        has_ra,
        indeterminate,
        p,
        ph,
        primary,
        resp0,
        venous,
        winters,
    ) = (
        v.alkalosis,
        v.b,
        v.before,
        v.by_gap,
        v.d,
        v.f,
        v.f_before,
        v.f_h,
        v.h,
        v.has_b,
        v.has_ma,
        v.has_ra,
        v.indeterminate,
        v.p,
        v.ph,
        v.primary,
        v.resp0,
        v.venous,
        v.winters,
    )
    # P(x) = PaCO2 x 10^(pH - x): the PaCO2 giving pH x at today's buffer state (Henderson-Hasselbalch)
    d.target_given = target = has_ra & not_(venous)
    d.p_at_735 = p735 = p * 10.0 ** (ph - NIV_PH)
    d.floor = floor = p * 10.0 ** (ph - FLOOR_PH)
    d.met_expected = ab.Expected(
        *(where(primary == MET_ACID, a, c_) for a, c_ in zip(winters, alkalosis, strict=True))
    )
    # the usual PaCO2 estimated by inverting chronic 3.5 and acute 1 per 10 mmHg, from the HCO3 before any
    # high anion gap (its range across the published chronic slopes 5 to 3 is shown beside it)
    h_usual = where(by_gap, before, h)
    d.hco3_for_usual = h_usual
    d.baseline_estimated = ab._baseline_pco2(maximum(p, 41.0), h_usual)
    d.baseline_low = ab._baseline_pco2(maximum(p, 41.0), h_usual, 5.0)
    d.baseline_high = ab._baseline_pco2(maximum(p, 41.0), h_usual, 3.0)
    chronic_part = (d.chronicity == "chronic") | (d.chronicity == "acute_on_chronic")
    d.usual_estimated = estimated = not_(has_b) & resp0 & chronic_part & not_(indeterminate)
    # a metabolic process that moves the HCO3 beyond what the gap explains hides any chronic retention: the
    # usual PaCO2 is then unknown, and 45 mmHg would be unsafe, so the aim is P(7.35) (independent review)
    unknown = not_(has_b) & resp0 & indeterminate
    usual = where(
        has_b, b, where(estimated & not_(unknown), d.baseline_estimated, where(unknown, INF, PCO2_HIGH))
    )
    d.usual_pco2 = usual
    acidaemic = ph < PH_LOW
    metabolic_acidosis_primary = primary == MET_ACID
    aim = where(
        metabolic_acidosis_primary,
        winters.value,
        where(acidaemic, minimum(p735, usual), where(has_b, minimum(p, b), p)),
    )
    # beside a concurrent metabolic acidosis the aim is never below Winters' centre: lower would be more
    # ventilation than full compensation of the metabolic part
    winters_bound = has_ma & not_(metabolic_acidosis_primary) & (aim < winters.value)
    aim = where(winters_bound, winters.value, aim)
    basis = where(
        metabolic_acidosis_primary | winters_bound,
        "metabolic_compensation",
        where(
            acidaemic,
            where(
                p735 <= usual,
                "ph_7_35",
                where(
                    has_b, "usual_pco2_given", where(estimated, "usual_pco2_estimated", "normal_upper_limit")
                ),
            ),
            where(has_b & (b < p), "usual_pco2_given", "present_pco2"),
        ),
    )
    # never below the alkalaemia floor P(7.45), never above the present PaCO2
    lifted = aim < floor
    aim = maximum(aim, floor)
    capped = aim > p
    aim = minimum(aim, p)
    basis = where(capped, "present_pco2", where(lifted, "alkalaemia_floor", basis))
    d.pco2_target = where(target, aim, NAN)
    d.pco2_target_basis = where(target, basis, NONE)
    d.baseline_pco2_source = where(
        target, where(has_b, "given", where(estimated & acidaemic, "estimated", "none")), NONE
    )
    d.target_route = d.pco2_target_basis
    f["baseline_estimate_unreliable"] = target & unknown & acidaemic & chronic_part
    f["pco2_target"] = target
    # below the usual PaCO2 only reads as over-correction when the pH is not acidaemic (independent review)
    f["pco2_below_baseline"] = has_b & (p < b - 5.0) & (b > PCO2_HIGH) & (ph >= PH_LOW)
    meets = (ph < NIV_PH) & (p > NIV_PCO2_MMHG)
    d.niv = where(
        meets & venous,
        "not_assessable",
        where(meets & (primary == MET_ACID), "not_applicable", where(meets, "met", "not_met")),
    )
    f["niv_criteria_need_arterial_sample"] = meets & venous
    # the NIV threshold belongs to a primary respiratory acidosis; with a primary metabolic acidosis the same
    # numbers say that ventilation is failing to compensate
    f["niv_criteria_met"] = meets & not_(venous) & not_(metabolic_acidosis_primary)
    f["ventilation_failing_to_compensate"] = meets & not_(venous) & metabolic_acidosis_primary
    # pH < 7.35 with a raised PaCO2 is never "compensated as expected" (BTS/ICS 2016 definition)
    f["compensation_incomplete"] = (
        (primary == RESP_ACID) & acidaemic & (d.chronicity == "chronic") & not_(venous) & not_(has_ma)
    )
    # chronic retention, without a known baseline: the PaCO2 is raised and the HCO3 rules (before any high
    # anion gap) read it chronic or acute-on-chronic, with no other metabolic acidosis named (it would hide
    # retention). Read from the PaCO2 and HCO3 alone, not from which disorder is called primary (that call
    # flips at pH 7.40), so at a fixed HCO3 the threshold never rises as the PaCO2 rises.
    f_chronic = where(by_gap, f_before, f_h)
    d.retainer = where(
        has_b,
        b > PCO2_HIGH,
        (p > PCO2_HIGH) & given(f_chronic) & (f_chronic < ab.ACUTE_AT_LEAST) & (not_(has_ma) | by_gap),
    )
    d.consciousness_threshold = where(
        has_b,
        maximum(NARCOSIS_NORMAL_MMHG, b + NARCOSIS_RISE_MMHG),
        where(d.retainer, NARCOSIS_CHRONIC_MMHG, NARCOSIS_NORMAL_MMHG),
    )
    f["pco2_above_consciousness_threshold"] = p > d.consciousness_threshold


def decide_spo2_target(v: SimpleNamespace) -> None:
    """Temperature, the SpO2 target (bts2017_o2), severity and the sample site."""
    b, capillary, d, f, has_b, hyper, ph, previous, primary, risk, rx_high, rx_low, sev, venous, x = (
        v.b,
        v.capillary,
        v.d,
        v.f,
        v.has_b,
        v.hyper,
        v.ph,
        v.previous,
        v.primary,
        v.risk,
        v.rx_high,
        v.rx_low,
        v.sev,
        v.venous,
        v.x,
    )
    t = x.temperature
    d.temperature_given = given(t) & (abs(t - 37.0) >= 1e-9)
    f["temperature_ph_stat_view"] = d.temperature_given
    hyper_here = not_(venous) & hyper
    d.hyper_here = hyper_here
    risk = risk | (has_b & (b > PCO2_HIGH))  # a known usual PaCO2 above 45 mmHg: a chronic retainer
    prescribed = given(rx_low) & given(rx_high)
    had_failure = previous == 1.0
    history_unknown = not_(given(previous))
    # 88-92 % when the PCO2 is above 6.0 kPa (a venous one as a positive screen, pending an arterial or
    # earlobe gas) or after NIV or invasive ventilation for hypercapnic failure; an at-risk patient with a
    # normal PCO2 moves to 94-98 %; the patient's prescribed range overrides both
    d.at_risk = at_risk = where(prescribed, rx_low < 94.0, hyper | had_failure)
    d.spo2_basis = where(
        prescribed,
        "prescribed",
        where(
            hyper,
            where(venous, "venous_pco2_raised", "hypercapnic"),
            where(had_failure, "previous_hypercapnic_failure", where(risk, "at_risk_pco2_normal", "default")),
        ),
    )
    d.spo2_low = where(prescribed, rx_low, where(hyper | had_failure, 88, 94))
    d.spo2_high = where(prescribed, rx_high, where(hyper | had_failure, 92, 98))
    f["spo2_target"] = where(at_risk, True, True)
    f["hypercapnic_without_risk_flag"] = hyper_here & not_(risk) & not_(had_failure)
    f["spo2_target_needs_history"] = not_(prescribed) & risk & not_(hyper) & history_unknown
    spo2 = x.spo2
    f["spo2_below_target"] = spo2 < d.spo2_low
    f["spo2_above_target"] = spo2 > d.spo2_high
    sev["spo2_above_target"] = where(at_risk, where(hyper_here & (ph < PH_LOW), "urgent", "notable"), "info")
    f["severe_acidaemia"] = ph < SEVERE_ACIDAEMIA_PH
    f["severe_alkalaemia"] = not_(ph < SEVERE_ACIDAEMIA_PH) & (ph > SEVERE_ALKALAEMIA_PH)
    single_chronic_alkalosis = (primary == RESP_ALK) & (d.chronicity == "chronic")
    f["normal_ph_single_disorder"] = (
        (d.ph_status == "normal") & (d.count == 1) & not_(single_chronic_alkalosis)
    )
    f["venous_sample"] = venous
    f["capillary_sample"] = capillary

    d.finding = f
    d.severity = sev


# -- ventilation safety --------------------------------------------------------------------------------------


def _ventilation(w: _Work) -> None:
    s, r, d = w.s, w.r, w.d
    p = s.pco2
    if d.target_given:
        _pco2_target(w)
    else:
        _below_baseline(w)
    # NIV thresholds (BTS/ICS 2016)
    w.niv = d.niv
    in_kpa = w.r.pressure_unit == "kPa"
    kpa = "" if in_kpa else f" ({pressure_text(p, 'kPa')})"
    # the NIV limit is 6.5 kPa: the PaCO2 in kPa is the one compared with it (the user's, or the one beside)
    niv_limit = pressure_text(NIV_PCO2_MMHG, "kPa")
    niv_pco2 = (
        f"{w.p(p, NIV_PCO2_MMHG)} (above {niv_limit})"
        if in_kpa
        else f"{w.p(p)} ({pressure_text(p, 'kPa', against=NIV_PCO2_MMHG)}, above {niv_limit})"
    )
    if w.fires("niv_criteria_need_arterial_sample"):
        r.finding(
            "niv_criteria_need_arterial_sample",
            "notable",
            f"This venous sample shows pH {s.ph:.2f} with PCO2 {w.p(p)}. The BTS/ICS 2016 NIV thresholds "
            f"(pH < 7.35 and PaCO2 > {w.p(NIV_PCO2_MMHG)}) are defined on arterial (or arterialised earlobe) "
            "values: "
            "confirm with one.",
        )
    elif w.fires("niv_criteria_met"):
        invasive = (
            f" pH below {NIV_INVASIVE_PH:.2f}: the guideline calls for a setting with ready access to "
            "invasive ventilation."
            if s.ph < NIV_INVASIVE_PH
            else ""
        )
        r.finding(
            "niv_criteria_met",
            "urgent",
            f"NIV threshold met: pH {w.ph(NIV_PH)} (below {NIV_PH:.2f}) with PaCO2 {niv_pco2}: the acidaemia "
            "marks decompensated hypercapnic respiratory failure, whatever the HCO3. BTS/ICS 2016 recommends "
            "NIV when it persists after optimal medical treatment (in COPD, neuromuscular or chest-wall "
            "disease and obesity hypoventilation)." + invasive,
        )
    elif w.fires("ventilation_failing_to_compensate"):
        r.finding(
            "ventilation_failing_to_compensate",
            "urgent",
            f"Ventilation is failing to compensate: pH {s.ph:.2f} with PaCO2 {w.p(p)}{kpa}, above the "
            f"{w.p(d.winters.high)} that compensation for the metabolic acidosis would give. The acidaemia "
            "is mainly metabolic; a rising PaCO2 here signals tiring respiratory effort.",
        )
    if w.fires("compensation_incomplete"):
        r.finding(
            "compensation_incomplete",
            "notable",
            f"The HCO3 fits chronic retention, but pH {w.ph(PH_LOW)} is below {PH_LOW:.2f}: compensation is "
            "incomplete (an acute component, or failing compensation). It is not read as compensated.",
        )
    r.put("niv_criteria", w.niv)
    # consciousness
    retainer = bool(d.retainer)
    threshold = d.consciousness_threshold
    if s.baseline_pco2 is not None:
        formula = "max(75 mmHg, baseline PaCO2 + 35 mmHg)"
    else:
        # chronic retention is read from the PaCO2 and HCO3 alone (decide: d.retainer)
        formula = (
            "about 90 mmHg in chronic retainers (chronic compensation seen in the HCO3)"
            if retainer
            else "about 75 mmHg in previously normal people (no chronic retention evident)"
        )
    r.computed(
        "pco2_consciousness_threshold",
        threshold,
        "PaCO2 above which consciousness commonly falls",
        formula,
        "co2_narcosis",
        pressure=True,
    )
    if w.fires("pco2_above_consciousness_threshold"):
        who = (
            "for this patient's usual PaCO2"
            if s.baseline_pco2 is not None
            else "in chronic retainers"
            if retainer
            else "in previously normal people"
        )
        shown, level = w.p_and_limit(p, threshold)
        r.finding(
            "pco2_above_consciousness_threshold",
            "urgent",
            f"PaCO2 {shown} is above the level ({level}) at which consciousness commonly falls {who} "
            "(CO2 narcosis; common practice).",
        )


def _pco2_target(w: _Work) -> None:
    s, r, d = w.s, w.r, w.d
    p = s.pco2
    ph_x = "PaCO2 x 10^(pH - {x})"
    r.computed(
        "pco2_alkalaemia_floor",
        d.floor,
        "PaCO2 that would give pH 7.45 with today's HCO3 (the aim never goes below it)",
        ph_x.format(x="7.45"),
        ("henderson1908", "posthypercapnic_alkalosis"),
        pressure=True,
    )
    target, basis, source = d.pco2_target, d.pco2_target_basis, d.baseline_pco2_source
    if s.ph < PH_LOW and basis != "metabolic_compensation":
        r.computed(
            "pco2_for_ph_7_35",
            d.p_at_735,
            "PaCO2 that would give pH 7.35 with today's HCO3",
            ph_x.format(x="7.35"),
            ("henderson1908", "pco2_aim"),
            pressure=True,
        )
    if source == "estimated":
        est, lo, hi = d.baseline_estimated, d.baseline_low, d.baseline_high
        gap = " before the anion gap" if d.before_gap_used else ""
        r.computed(
            "baseline_pco2_estimated",
            est,
            f"Usual (chronic) PaCO2 estimated from the HCO3{gap} (an estimate)",
            "B = 40 + (HCO3 - 24 - (PaCO2 - 40)/10) / 0.25, limited to 40..PaCO2 (chronic 3.5 and acute 1 "
            "per 10 mmHg inverted)",
            ("narins1980", "fraction_acute_bands"),
            pressure=True,
        )
        r.pressure_range("baseline_pco2_range", lo, hi)
        r.step(
            "Estimated usual PaCO2 with the chronic slope 5 (low) to 3 (high) per 10 mmHg",
            "B = 40 + (HCO3 - 24 - (PaCO2 - 40)/10) / ((slope - 1)/10)",
            lo,
            ("narins1980", "martinu2003"),
            output="baseline_pco2_range",
            pressure=True,
        )
    if basis == "metabolic_compensation":
        formula = "aim = 1.5 x HCO3 + 8 (Winters' centre), not below P(7.45)"
        src = ("albert1967", "pco2_aim")
    else:
        formula = (
            "pH < 7.35: aim = min(P(7.35), usual PaCO2); pH >= 7.35: aim = present PaCO2 (or a lower known "
            "usual); never below P(7.45) = " + ph_x.format(x="7.45") + ", never above the present PaCO2"
        )
        src = ("pco2_aim", "henderson1908", "posthypercapnic_alkalosis", "bts_ics2016")
    w.pco2_target, w.target_basis = target, basis
    r.computed("pco2_target", target, "PaCO2 to aim for", formula, src, pressure=True)
    r.put("baseline_pco2_source", source)
    r.put("pco2_target_basis", basis)
    aim_shown = w.p(target)
    if s.ph < PH_LOW:
        present, aim_shown = w.p_and_limit(p, target)
        why = (
            f"below the present {present}: the pH is {w.ph(PH_LOW)}, so ventilation must bring the PaCO2 "
            "down. "
        )
    elif basis == "usual_pco2_given":
        why = (
            f"the patient's known usual PaCO2: the pH is {s.ph:.2f}, not acidaemic, so there is no need to "
            "lower the PaCO2 quickly, and not below the usual level. "
        )
    else:
        why = "the pH is not acidaemic, so the PaCO2 need not be lowered. "
    usual = ""
    if source == "given":
        usual = f"The known usual PaCO2 is {w.p(s.baseline_pco2)}. "
    elif source == "estimated":
        usual = (
            f"The usual PaCO2 estimated from the HCO3 is {w.p(d.baseline_estimated)} ({w.p(d.baseline_low)} "
            f"to {w.p(d.baseline_high)} across the published chronic slopes). "
        )
    chronic_note = (
        "Ventilating a chronic retainer below the usual level leaves the retained HCO3 unopposed "
        "(post-hypercapnic metabolic alkalosis). "
        if bool(d.retainer) and basis != "metabolic_compensation"
        else ""
    )
    r.finding(
        "pco2_target",
        "notable",
        f"PaCO2 aim {aim_shown} ({TARGET_BASIS[basis]}), "
        + why
        + usual
        + chronic_note
        + "Reach it gradually and recheck with a repeat gas.",
    )
    if w.fires("baseline_estimate_unreliable"):
        r.finding(
            "baseline_estimate_unreliable",
            "notable",
            "The usual PaCO2 cannot be estimated from the HCO3 here: a concurrent metabolic disorder moves "
            "the HCO3 by an amount the anion gap does not show, and chronic retention may be hidden. The aim "
            f"is therefore the PaCO2 that would bring the pH to 7.35, not the normal {w.p(PCO2_HIGH)}. Use a "
            "known "
            "usual PaCO2 (an earlier stable gas) where there is one.",
        )
    _below_baseline(w)


def _below_baseline(w: _Work) -> None:
    s, r, h = w.s, w.r, w.hco3
    if w.fires("pco2_below_baseline"):
        r.finding(
            "pco2_below_baseline",
            "notable",
            f"PaCO2 {w.p(s.pco2)} is below the patient's usual {w.p(s.baseline_pco2)}"
            + (
                f" and HCO3 is {h:.1f} mmol/L with pH {s.ph:.2f}: this fits a post-hypercapnic metabolic "
                "alkalosis (over-correction of chronic hypercapnia)."
                if h > HCO3_HIGH and s.ph > PH_HIGH
                else ": over-correction of chronic hypercapnia is possible."
            ),
        )


def _spo2_target(w: _Work) -> None:
    s, r, d = w.s, w.r, w.d
    at_risk = bool(d.at_risk)
    low, high = d.spo2_low, d.spo2_high
    basis = d.spo2_basis
    w.spo2_target = (low, high)
    r.put("spo2_target", {"low": low, "high": high}, decimals=0)
    r.put("spo2_target_basis", basis)
    r.step(
        f"SpO2 target range {low:g}-{high:g} % ({w.basis_text(basis)})",
        "a prescribed range overrides; else 88-92 % when the PCO2 is above 6.0 kPa or after NIV or invasive "
        "ventilation for hypercapnic failure; else 94-98 % (an at-risk patient with a normal PCO2 too)",
        low,
        "bts2017_o2",
        output="spo2_target",
    )
    r.finding(
        "spo2_target",
        "info",
        f"SpO2 target {low:g}-{high:g} % ({w.basis_text(basis)}; BTS 2017). Recheck the gas 30-60 minutes "
        "after a change of oxygen.",
    )
    if w.fires("spo2_target_needs_history"):
        r.finding(
            "spo2_target_needs_history",
            "notable",
            "At risk of hypercapnic failure with a normal PCO2: 94-98 % applies, but 88-92 % applies if the "
            "patient has needed NIV or invasive ventilation for hypercapnic failure before "
            "(previous_hypercapnic_failure was not given).",
        )
    if w.fires("hypercapnic_without_risk_flag"):
        r.finding(
            "hypercapnic_without_risk_flag",
            "notable",
            f"PaCO2 {w.p(s.pco2)} is raised although the patient was not marked at risk of hypercapnic "
            "failure: the 88-92 % range applies.",
        )
    if w.fires("spo2_below_target"):
        r.finding(
            "spo2_below_target", "notable", f"SpO2 {s.spo2:g} % is below the {low:g}-{high:g} % target."
        )
    elif w.fires("spo2_above_target"):
        r.finding(
            "spo2_above_target",
            d.severity["spo2_above_target"],
            f"SpO2 {s.spo2:g} % is above the {low:g}-{high:g} % target"
            + (
                ": in patients at risk of hypercapnic failure excess oxygen can raise the PaCO2."
                if at_risk
                else "."
            ),
        )


def _severity(w: _Work) -> None:
    r = w.r
    if w.fires("severe_acidaemia"):
        r.finding(
            "severe_acidaemia",
            "urgent",
            f"pH {w.ph(SEVERE_ACIDAEMIA_PH)} is below {SEVERE_ACIDAEMIA_PH:.2f}: severe acidaemia.",
        )
    elif w.fires("severe_alkalaemia"):
        r.finding(
            "severe_alkalaemia",
            "urgent",
            f"pH {w.ph(SEVERE_ALKALAEMIA_PH)} is above {SEVERE_ALKALAEMIA_PH:.2f}: severe alkalaemia.",
        )
    if w.fires("normal_ph_single_disorder"):
        d = w.disorders[0]
        r.finding(
            "normal_ph_single_disorder",
            "info",
            f"The pH is normal with a single {NAMES[d['code']]}: compensation rarely returns the pH to "
            "normal, so an opposing second process is possible.",
        )
