"""The metabolic component: anion gap, delta ratio, delta gap, osmolar gap, Copenhagen and Stewart."""

from __future__ import annotations

from types import SimpleNamespace

from ...arrays import given, maximum, minimum, not_, where
from ...formulas import acidbase as ab
from .compensation import _metabolic_expected
from .decision import NONE
from .thresholds import (
    AG_ALWAYS_ACIDOSIS,
    AG_BESIDE_HYPERCAPNIA,
    LACTATE_ACIDOSIS,
    LACTATE_RAISED,
    MET_ACID,
    MET_ALK,
    NAMES,
    PH_LOW,
    RESP_ACID,
    RESP_ALK,
    SBE_TOLERANCE,
    STEWART_EFFECT,
    TYPICAL_CA_IONISED,
    TYPICAL_MG,
    TYPICAL_PHOSPHATE,
)
from .work import _Work


def decide_gaps(v: SimpleNamespace) -> None:
    """Anion gap, delta ratio and delta gap (kraut2007, brandis, gabow1980); named disorders only on
    consistent data."""
    alk_limit, d, f, h, has_ma, has_mk, low_ref, margin, met_acid, ph, primary0, resp0, sound, x = (
        v.alk_limit,
        v.d,
        v.f,
        v.h,
        v.has_ma,
        v.has_mk,
        v.low_ref,
        v.margin,
        v.met_acid,
        v.ph,
        v.primary0,
        v.resp0,
        v.sound,
        v.x,
    )
    na, cl = x.na, x.cl
    d.has_gap = has_gap = given(na) & given(cl)
    d.anion_gap = ag = ab._anion_gap(na, cl, d.hco3_out)
    d.anion_gap_with_k = ag + x.k
    with_albumin = given(x.albumin)
    d.anion_gap_corrected = ab._anion_gap_corrected(ag, x.albumin, x.normal_albumin)
    d.ag_used = used = where(with_albumin, d.anion_gap_corrected, ag)
    d.dr_given = has_gap & (d.hco3_out < 23.5)
    d.delta_ratio = ab._delta_ratio(used, d.hco3_out)
    d.delta_ratio_band = band = ab._delta_ratio_band(d.delta_ratio)
    d.delta_gap = dg = ab._delta_gap(used, d.hco3_out)
    d.delta_gap_reading = ab._delta_gap_reading(dg)
    f["anion_gap_low"] = has_gap & (used < 3.0)
    d.osm_calc_given = given(na) & given(x.glucose) & given(x.urea)
    d.osmolality_calculated = ab._osmolality_calculated(na, x.glucose, x.urea)
    d.osm_gap_given = d.osm_calc_given & given(x.osm)
    d.osmolar_gap = ab._osmolar_gap(x.osm, d.osmolality_calculated)
    f["osmolar_gap_raised"] = d.osm_gap_given & (d.osmolar_gap >= 10.0)
    f["lactate_raised"] = sound & (x.lactate > LACTATE_RAISED)
    # beside an acidaemic primary respiratory acidosis, a lactate of 4 or more or an anion gap above 16
    # names a concurrent metabolic acidosis, whatever the HCO3 (lactic acidosis: Cohen & Woods 1976, from
    # memory; thresholds common practice)
    d.ma_from_lactate_or_gap = beside = (
        sound
        & (primary0 == RESP_ACID)
        & (ph < PH_LOW)
        & not_(met_acid)
        & ((x.lactate >= LACTATE_ACIDOSIS) | (has_gap & (used > AG_BESIDE_HYPERCAPNIA)))
    )
    met_acid = met_acid | beside
    has_ma = has_ma | beside
    f["concurrent_metabolic_acidosis"] = met_acid
    f["anion_gap_needs_electrolytes"] = sound & not_(has_gap) & has_ma
    gap = sound & has_gap
    found = gap & not_(has_ma) & (used >= AG_ALWAYS_ACIDOSIS)
    f["high_anion_gap_acidosis_found"] = found
    d.gap_primary = found & (primary0 == NONE)
    d.primary = primary = where(d.gap_primary, MET_ACID, primary0)
    has_ma = has_ma | found
    f["anion_gap_raised"] = gap & not_(has_ma) & (used > ab.NORMAL_ANION_GAP_MMOL_L + 4.0)
    acidosis = gap & has_ma
    d.winters_concurrent = acidosis & (primary != MET_ACID)
    d.hco3_before_gap = before = h + (used - ab.NORMAL_ANION_GAP_MMOL_L)
    normal_ag = used <= ab.NORMAL_ANION_GAP_MMOL_L
    d.before_shown = acidosis & not_(normal_ag) & resp0
    type_resp = where(before < low_ref - margin, "high_and_normal_anion_gap", "high_anion_gap")
    type_band = where(
        d.dr_given & (band == "normal_anion_gap_acidosis"),
        "normal_anion_gap",
        where(
            d.dr_given & (band == "high_and_normal_anion_gap_acidosis"),
            "high_and_normal_anion_gap",
            "high_anion_gap",
        ),
    )
    d.acidosis_type = where(
        acidosis, where(normal_ag, "normal_anion_gap", where(resp0, type_resp, type_band)), NONE
    )
    raised = acidosis & not_(normal_ag) & not_(has_mk)
    # with a respiratory primary the HCO3 before the gap is compared with the respiratory expectation (for a
    # respiratory acidosis: beyond the steepest chronic band); beside a respiratory alkalosis the delta ratio,
    # where it can be computed, must agree (above 2), so the reading never contradicts its own delta reading
    alk_after_gap = (
        raised
        & resp0
        & (before > alk_limit)
        & where((primary0 == RESP_ALK) & d.dr_given, band == "high_anion_gap_acidosis_with_raised_hco3", True)
    )
    alk_delta_gap = raised & not_(resp0) & not_(d.dr_given) & (dg > 6.0)
    alk_delta_ratio = raised & not_(resp0) & d.dr_given & (band == "high_anion_gap_acidosis_with_raised_hco3")
    d.alkalosis_from_gap = where(
        alk_after_gap,
        "hco3_before_gap",
        where(alk_delta_gap, "delta_gap", where(alk_delta_ratio, "delta_ratio", NONE)),
    )
    from_gap = alk_after_gap | alk_delta_gap | alk_delta_ratio
    f["metabolic_alkalosis_from_gap"] = from_gap
    f["anion_gap_reading"] = acidosis
    d.has_mk_before_gap = has_mk
    has_mk = has_mk | from_gap
    (
        v.before,
        v.cl,
        v.gap,
        v.has_gap,
        v.has_ma,
        v.has_mk,
        v.met_acid,
        v.na,
        v.primary,
        v.used,
        v.with_albumin,
    ) = before, cl, gap, has_gap, has_ma, has_mk, met_acid, na, primary, used, with_albumin


def decide_copenhagen(v: SimpleNamespace) -> None:
    """The Copenhagen reading of the metabolic component (SBE; schlichtig1998)."""
    d, judge, p, primary, resp0, sbe, sound = v.d, v.judge, v.p, v.primary, v.resp0, v.sbe, v.sound
    sbe_ok = (-40.0 <= sbe) & (sbe <= 40.0)
    cph = sound & sbe_ok
    d.copenhagen = cph
    d.cph_pco2_given = cph & ((primary == MET_ACID) | (primary == MET_ALK))
    x_acid, x_alk = ab._pco2_sbe_acidosis(sbe), ab._pco2_sbe_alkalosis(sbe)
    d.cph_pco2 = where(primary == MET_ACID, x_acid, x_alk)
    d.cph_fits = where(primary == MET_ACID, abs(p - x_acid) <= 2.0, abs(p - x_alk) <= 5.0)
    sbe_acute, sbe_chronic = ab._sbe_respiratory(p)
    d.sbe_acute, d.sbe_chronic = sbe_acute, sbe_chronic
    lo = where(resp0, minimum(sbe_acute, sbe_chronic), 0.0)
    hi = where(resp0, maximum(sbe_acute, sbe_chronic), 0.0)
    near_a = abs(sbe - sbe_acute) <= SBE_TOLERANCE
    near_c = abs(sbe - sbe_chronic) <= SBE_TOLERANCE
    d.cph_chronicity_given = cph & resp0 & (lo - SBE_TOLERANCE <= sbe) & (sbe <= hi + SBE_TOLERANCE) & judge
    d.cph_chronicity = where(
        near_a & near_c, NONE, where(near_a, "acute", where(near_c, "chronic", "acute_on_chronic"))
    )
    d.cph_acid = sbe < lo - SBE_TOLERANCE
    d.cph_alk = sbe > hi + SBE_TOLERANCE
    v.cph, v.sbe_ok = cph, sbe_ok


def decide_stewart(v: SimpleNamespace) -> None:
    """The Stewart reading of the metabolic component (figge1992, story2016)."""
    cl, d, f, has_gap, na, ph, sbe, sbe_ok, sound, with_albumin, x = (
        v.cl,
        v.d,
        v.f,
        v.has_gap,
        v.na,
        v.ph,
        v.sbe,
        v.sbe_ok,
        v.sound,
        v.with_albumin,
        v.x,
    )
    d.stewart_full = full = with_albumin & sbe_ok
    lactate_given = given(x.lactate)
    alb_g_l = x.albumin * 10.0
    d.story2016 = ab._story2016(sbe, na, cl, alb_g_l, where(lactate_given, x.lactate, 0.0))
    d.story2004 = ab._story2004(sbe, na, cl, alb_g_l)
    d.na_cl_effect = na - cl - 35.0
    effects = {
        "na_cl": (has_gap, d.na_cl_effect),
        "albumin": (has_gap & full, d.story2016.albumin),
        "unmeasured": (has_gap & full, d.story2016.unmeasured),
        "lactate": (has_gap & lactate_given, -x.lactate),
    }
    d.effect_acidifying = {k: ok & (v <= -STEWART_EFFECT) for k, (ok, v) in effects.items()}
    d.effect_alkalinising = {k: ok & (v >= STEWART_EFFECT) for k, (ok, v) in effects.items()}
    st_acid = st_alk = False
    for k in effects:
        st_acid = st_acid | d.effect_acidifying[k]
        st_alk = st_alk | d.effect_alkalinising[k]
    d.sig_given = sig_ok = has_gap & given(x.k) & with_albumin
    d.assumed = {
        "ca": not_(given(x.ca_ionised)),
        "mg": not_(given(x.mg)),
        "phosphate": not_(given(x.phosphate)),
        "lactate": not_(lactate_given),
    }
    ca = where(given(x.ca_ionised), x.ca_ionised, TYPICAL_CA_IONISED)
    mg = where(given(x.mg), x.mg, TYPICAL_MG)
    phos = where(given(x.phosphate), x.phosphate, TYPICAL_PHOSPHATE)
    d.stewart_terms = (ca, mg, phos)
    d.sid_apparent = ab._sid_apparent(na, x.k, ca, mg, cl, where(lactate_given, x.lactate, 0.0))
    d.albumin_charge = ab._albumin_charge(alb_g_l, ph)
    d.phosphate_charge = ab._phosphate_charge(phos, ph)
    d.sid_effective = ab._sid_effective(d.hco3_out, alb_g_l, phos, ph)
    d.strong_ion_gap = ab._strong_ion_gap(d.sid_apparent, d.sid_effective)
    any_assumed = d.assumed["ca"] | d.assumed["mg"] | d.assumed["phosphate"] | d.assumed["lactate"]
    f["stewart_assumed_values"] = sound & sig_ok & any_assumed
    f["strong_ion_gap_raised"] = sound & sig_ok & (d.strong_ion_gap > 4.0)
    v.full, v.st_acid, v.st_alk = full, st_acid, st_alk


def decide_metabolic_readings(v: SimpleNamespace) -> None:
    """The three readings of the metabolic component side by side: where they agree or differ."""
    cph, d, f, full, has_gap, has_ma, has_mk, has_ra, has_rk, resp_chronicity, sev, st_acid, st_alk = (
        v.cph,
        v.d,
        v.f,
        v.full,
        v.has_gap,
        v.has_ma,
        v.has_mk,
        v.has_ra,
        v.has_rk,
        v.resp_chronicity,
        v.sev,
        v.st_acid,
        v.st_alk,
    )
    agree_bc = (has_ma == d.cph_acid) & (has_mk == d.cph_alk)
    d.resp_differs = d.cph_pco2_given & ((has_ra | has_rk) == d.cph_fits)
    d.stewart_pair_given = has_gap & full
    stewart_agrees = (st_acid == has_ma) & (st_alk == has_mk)
    agree_all = agree_bc & not_(d.resp_differs) & (not_(d.stewart_pair_given) | stewart_agrees)
    d.agree_bc, d.stewart_acid, d.stewart_alk = agree_bc, st_acid, st_alk
    f["approaches_agree"] = cph & agree_all
    f["approaches_disagree"] = cph & not_(agree_all)
    sev["approaches_disagree"] = where(agree_bc, "info", "notable")
    f["boston_copenhagen_chronicity"] = (
        cph & d.cph_chronicity_given & (d.cph_chronicity != NONE) & (resp_chronicity != d.cph_chronicity)
    )


# -- gaps ---------------------------------------------------------------------------------------------------


def _gap_values(w: _Work) -> dict | None:
    s, r, d = w.s, w.r, w.d
    if not d.has_gap:
        return None
    out = {}
    ag = d.anion_gap
    r.computed(
        "anion_gap",
        ag,
        "Anion gap",
        "AG = Na - (Cl + HCO3); normal about 12",
        ("oh1977", "kraut2007"),
        unit="mmol/L",
        decimals=1,
    )
    out["ag"] = ag
    if s.k is not None:
        agk = d.anion_gap_with_k
        r.computed(
            "anion_gap_with_k",
            agk,
            "Anion gap with potassium",
            "AG_K = Na + K - (Cl + HCO3); normal about 16",
            ("oh1977", "kraut2007"),
            unit="mmol/L",
            decimals=1,
        )
    if s.albumin is not None:
        agc = d.anion_gap_corrected
        r.computed(
            "anion_gap_corrected",
            agc,
            f"Anion gap corrected for albumin (normal albumin {s.normal_albumin:.1f} g/dL)",
            "AG_corr = AG + 2.5 x (normal albumin - albumin) [g/dL]",
            ("figge1998", "kraut2007"),
            unit="mmol/L",
            decimals=1,
        )
    used = d.ag_used
    out["used"] = used
    which = "albumin-corrected AG" if s.albumin is not None else "AG"
    if d.dr_given:
        dr = d.delta_ratio
        r.computed(
            "delta_ratio",
            dr,
            f"Delta ratio (from the {which})",
            "delta ratio = (AG - 12) / (24 - HCO3)",
            "brandis",
            decimals=2,
        )
        r.put("delta_ratio_band", d.delta_ratio_band)
        out["dr"], out["band"] = dr, d.delta_ratio_band
    dg = d.delta_gap
    r.computed(
        "delta_gap",
        dg,
        f"Delta gap (from the {which})",
        "delta gap = (AG - 12) - (24 - HCO3)",
        "brandis",
        unit="mmol/L",
        decimals=1,
    )
    r.put("delta_gap_reading", d.delta_gap_reading)
    out["dg"] = dg
    if w.fires("anion_gap_low"):
        r.finding(
            "anion_gap_low",
            "notable",
            f"The {which} is {used:.1f} mmol/L, unusually low: check the Na, Cl and HCO3 entered (a "
            "laboratory or transcription error is the usual cause); low albumin, lithium, bromide and IgG "
            "paraproteins also lower it.",
        )
    return out


def _osmolality(w: _Work) -> None:
    s, r, d = w.s, w.r, w.d
    if not d.osm_calc_given:
        return
    calc = d.osmolality_calculated
    r.computed(
        "osmolality_calculated",
        calc,
        "Calculated osmolality (SI)",
        "2 x Na + glucose + urea (mmol/L)" + (" (urea from BUN)" if s.urea_from == "bun" else ""),
        "ccjm_osmol",
        unit="mOsm/kg",
        decimals=0,
    )
    if not d.osm_gap_given:
        return
    gap = d.osmolar_gap
    r.computed(
        "osmolar_gap",
        gap,
        "Osmolar gap",
        "measured - calculated osmolality; normal below 10",
        "ccjm_osmol",
        unit="mOsm/kg",
        decimals=0,
    )
    if w.fires("osmolar_gap_raised"):
        r.finding(
            "osmolar_gap_raised",
            "notable",
            f"Osmolar gap {gap:.0f} mOsm/kg (normal below 10): unmeasured osmoles such as a toxic alcohol "
            "are possible; the gap needs osmolality measured by freezing-point depression.",
        )


def _gap_outputs_only(w: _Work) -> None:
    """Inconsistent triple: the gaps are shown with the reported HCO3 but name no disorder."""
    _gap_values(w)
    _osmolality(w)


def _gaps(w: _Work) -> None:
    s, r, d = w.s, w.r, w.d
    g = _gap_values(w)
    _osmolality(w)
    if w.fires("lactate_raised"):
        r.finding(
            "lactate_raised",
            "notable",
            f"Lactate {s.lactate:.1f} mmol/L is raised (above 2 mmol/L) and adds to the anion gap.",
        )
    if g is None:
        if w.fires("anion_gap_needs_electrolytes"):
            r.finding(
                "anion_gap_needs_electrolytes",
                "info",
                "Add Na and Cl (and albumin) to tell a high from a normal anion gap acidosis.",
            )
        return
    used = g["used"]
    w.ag_used = used
    if w.fires("high_anion_gap_acidosis_found"):
        if d.gap_primary:  # the gap alone reveals it: it is the primary disorder
            _metabolic_expected(w, acidosis=True)
        r.finding(
            "high_anion_gap_acidosis_found",
            "notable",
            f"An anion gap of {used:.0f} mmol/L points to a high anion gap metabolic acidosis although the "
            f"HCO3 ({w.hco3:.1f} mmol/L) does not show it on its own (opposing processes).",
        )
    if not w.has(MET_ACID):
        if w.fires("anion_gap_raised"):
            r.finding(
                "anion_gap_raised",
                "info",
                f"The anion gap ({used:.1f} mmol/L) is above the usual 12 without a metabolic acidosis "
                "being evident.",
            )
        return
    if d.winters_concurrent:
        e = d.winters
        r.computed(
            "expected_pco2_winters",
            e.value,
            f"Winters' formula for the concurrent metabolic acidosis (band {w.p(e.low)} to {w.p(e.high)})",
            "1.5 x HCO3 + 8 +/- 2",
            "albert1967",
            pressure=True,
        )
    before = d.hco3_before_gap
    if d.before_shown:
        r.computed(
            "hco3_before_anion_gap",
            before,
            "HCO3 before the unmeasured acid",
            "HCO3 + (AG - 12)",
            "brandis",
            unit="mmol/L",
            decimals=1,
        )
    kind = d.alkalosis_from_gap
    if kind == "hco3_before_gap":
        r.finding(
            "metabolic_alkalosis_from_gap",
            "notable",
            f"Adding back the anion-gap acid gives an HCO3 of {before:.1f} mmol/L, above the "
            f"{d.high_ref:.1f} the {NAMES[w.primary]} explains: a concurrent metabolic "
            "alkalosis (triple disorder).",
        )
    elif kind == "delta_gap":
        r.finding(
            "metabolic_alkalosis_from_gap",
            "notable",
            f"The delta gap is {g['dg']:+.1f} mmol/L (above +6): a concurrent metabolic alkalosis.",
        )
    elif kind == "delta_ratio":
        r.finding(
            "metabolic_alkalosis_from_gap",
            "notable",
            f"Delta ratio {g['dr']:.2f} (above 2): the HCO3 has fallen far less than the anion gap "
            "rose, so a raised HCO3 was there before: a concurrent metabolic alkalosis (or "
            "compensation of a chronic respiratory acidosis).",
        )
    r.put("metabolic_acidosis_type", w.acidosis_type)
    words = {
        "normal_anion_gap": "a normal anion gap (hyperchloraemic) metabolic acidosis",
        "high_anion_gap": "a high anion gap metabolic acidosis",
        "high_and_normal_anion_gap": "a high anion gap and a normal anion gap metabolic acidosis together",
    }
    dr_text = f", delta ratio {g['dr']:.2f}" if "dr" in g else ""
    if w.resp and g.get("dr", 0.0) > 2.0 and not w.has(MET_ALK):
        dr_text += (
            f" (above 2, but the HCO3 before the anion-gap acid, {before:.1f} mmol/L, is within what the "
            f"{NAMES[w.primary]} explains)"
        )
    r.finding("anion_gap_reading", "info", f"Anion gap {used:.1f} mmol/L{dr_text}: {words[w.acidosis_type]}.")


# -- Copenhagen and Stewart ----------------------------------------------------------------------------------


def _copenhagen(w: _Work) -> None:
    r, d = w.r, w.d
    if not d.copenhagen:
        return
    if w.primary == MET_ACID:
        r.computed(
            "expected_pco2_copenhagen",
            d.cph_pco2,
            "Expected PaCO2 by the SBE rule (metabolic acidosis)",
            "PaCO2 = 40 + SBE",
            ("schlichtig1998", "berend2018"),
            pressure=True,
        )
    elif w.primary == MET_ALK:
        r.computed(
            "expected_pco2_copenhagen",
            d.cph_pco2,
            "Expected PaCO2 by the SBE rule (metabolic alkalosis)",
            "PaCO2 = 40 + 0.6 x SBE",
            ("schlichtig1998", "berend2018"),
            pressure=True,
        )
    if w.resp:
        acute, chronic = d.sbe_acute, d.sbe_chronic
        r.put(
            "expected_sbe",
            {"acute": {"value": acute, "unit": "mmol/L"}, "chronic": {"value": chronic, "unit": "mmol/L"}},
            decimals=1,
        )
        r.step(
            "Expected SBE if acute (respiratory)",
            "SBE = 0 (+/- 3)",
            acute,
            ("schlichtig1998", "berend2018"),
            output="expected_sbe",
            unit="mmol/L",
        )
        r.step(
            "Expected SBE if chronic (respiratory)",
            "SBE = 0.4 x (PaCO2 - 40)",
            chronic,
            ("schlichtig1998", "berend2018"),
            output="expected_sbe",
            unit="mmol/L",
        )


def _stewart(w: _Work) -> None:
    s, r, d = w.s, w.r, w.d
    if not d.has_gap:
        return
    mq = "mEq/L"
    if d.stewart_full:
        p16, p04 = d.story2016, d.story2004
        r.put(
            "base_excess_partition",
            {k: {"value": v, "unit": mq} for k, v in p16._asdict().items()},
            decimals=1,
        )
        r.put(
            "base_excess_partition_2004",
            {k: {"value": v, "unit": mq} for k, v in p04._asdict().items()},
            decimals=1,
        )
        for label, formula, value in (
            ("Na-Cl effect (Story 2016)", "Na - Cl - 35", p16.na_cl),
            ("Albumin effect", "0.25 x (42 - albumin g/L)", p16.albumin),
            (
                "Lactate effect" + ("" if s.lactate is not None else " (lactate not given: counted as 0)"),
                "- lactate",
                p16.lactate,
            ),
            ("Unmeasured ions (Story 2016)", "SBE - (Na-Cl + albumin + lactate effects)", p16.unmeasured),
        ):
            r.step(label, formula, value, "story2016", output="base_excess_partition", unit=mq)
        r.step(
            "Na-Cl effect (Story 2004)",
            "Na - Cl - 38",
            p04.na_cl,
            "story2004",
            output="base_excess_partition_2004",
            unit=mq,
        )
        r.step(
            "Albumin effect (Story 2004)",
            "0.25 x (42 - albumin g/L)",
            p04.albumin,
            "story2004",
            output="base_excess_partition_2004",
            unit=mq,
        )
        r.step(
            "Unmeasured ions including lactate (Story 2004)",
            "SBE - (Na-Cl + albumin effects)",
            p04.unmeasured_including_lactate,
            "story2004",
            output="base_excess_partition_2004",
            unit=mq,
        )
    else:
        na_cl = d.na_cl_effect
        r.computed(
            "na_cl_effect",
            na_cl,
            "Na-Cl effect (Story 2016; albumin not given, so no full partition)",
            "Na - Cl - 35",
            "story2016",
            unit=mq,
            decimals=1,
        )
        if s.lactate is not None:
            r.computed(
                "lactate_effect",
                -s.lactate,
                "Lactate effect (Story 2016)",
                "- lactate",
                "story2016",
                unit=mq,
                decimals=1,
            )
    if d.sig_given:
        assumed = []
        ca, mg, phos = d.stewart_terms
        for name, key, value in (
            ("ionised calcium", "ca", ca),
            ("magnesium", "mg", mg),
            ("phosphate", "phosphate", phos),
        ):
            if d.assumed[key]:
                assumed.append(f"{name} {value:g} mmol/L")
        sig = d.strong_ion_gap
        sources = ("stewart1983", "figge1992", "kellum1995")
        for name, value, formula, src in (
            ("sid_apparent", d.sid_apparent, "Na + K + 2 x Ca(ionised) + 2 x Mg - Cl - lactate", sources),
            ("albumin_charge", d.albumin_charge, "albumin g/L x (0.123 x pH - 0.631)", "figge1992"),
            ("phosphate_charge", d.phosphate_charge, "phosphate mmol/L x (0.309 x pH - 0.469)", "figge1992"),
            ("sid_effective", d.sid_effective, "HCO3 + albumin charge + phosphate charge", sources),
            ("strong_ion_gap", sig, "SIG = SIDa - SIDe", ("kellum1995", "figge1992")),
        ):
            r.quantity(name, value, mq, decimals=1)
            r.step(name.replace("_", " ").replace("sid", "SID"), formula, value, src, output=name, unit=mq)
        if d.assumed["lactate"]:
            assumed.append("lactate not given (any lactate is counted in the SIG)")
        if w.fires("stewart_assumed_values"):
            r.finding(
                "stewart_assumed_values",
                "info",
                "Strong ion gap computed with typical values for what was not measured: "
                + "; ".join(assumed)
                + ". Measure them for a firmer SIG.",
            )
            r.step(
                "Typical values assumed for the Stewart terms",
                "; ".join(assumed),
                sig,
                "stewart_typical_values",
                output="strong_ion_gap",
                unit=mq,
            )
        if w.fires("strong_ion_gap_raised"):
            r.finding(
                "strong_ion_gap_raised",
                "info",
                f"Strong ion gap {sig:.1f} mEq/L is above the 2-4 mEq/L above which unmeasured anions are "
                "usually suspected; its normal value depends on the laboratory and on the terms included"
                + (" (typical values were assumed for some terms)." if assumed else "."),
            )


_EFFECT_WORDS = {
    "na_cl": ("a hyperchloraemic (Na-Cl) acidifying effect", "a hypochloraemic (Na-Cl) alkalinising effect"),
    "albumin": ("a high-albumin acidifying effect", "a hypoalbuminaemic alkalinising effect"),
    "lactate": ("lactate", "lactate"),
    "unmeasured": ("unmeasured anions", "an unmeasured-cation (alkalinising) residual"),
}


def _compare(w: _Work) -> None:
    """Physiological, base-excess and physicochemical readings of the metabolic component, side by side."""
    s, r, d = w.s, w.r, w.d
    if not d.copenhagen:
        return
    boston = (w.has(MET_ACID), w.has(MET_ALK))

    def words(acid: bool, alk: bool) -> str:
        if acid and alk:
            return "a metabolic acidosis and a metabolic alkalosis"
        return "a metabolic acidosis" if acid else "a metabolic alkalosis" if alk else "no metabolic disorder"

    parts = [f"Physiological (HCO3) reading: {words(*boston)}."]
    cph_pair = (bool(d.cph_acid), bool(d.cph_alk))
    beyond = " beyond what the respiratory disorder explains" if w.resp and any(cph_pair) else ""
    resp_note = ""
    if d.cph_pco2_given:
        rule = "SBE" if w.primary == MET_ACID else "0.6 x SBE"
        resp_note = f"; PaCO2 {'fits' if d.cph_fits else 'does not fit'} 40 + {rule} = {w.p(d.cph_pco2)}"
    parts.append(
        f"Base-excess (Copenhagen) reading: SBE {d.sbe:+.1f} mmol/L, {words(*cph_pair)}{beyond}{resp_note}."
    )
    if d.resp_differs:
        parts.append(
            "The two readings differ on the respiratory response: "
            + (
                "Winters' formula finds it appropriate while the SBE rule does not."
                if not d.cph_fits
                else "the SBE rule finds it appropriate while the HCO3 rule does not."
            )
        )
    if d.has_gap:
        shown_keys = ["na_cl"] + (["albumin", "unmeasured"] if d.stewart_full else [])
        if s.lactate is not None:
            shown_keys.append("lactate")
        values = {
            "na_cl": d.na_cl_effect,
            "albumin": d.story2016.albumin,
            "unmeasured": d.story2016.unmeasured,
            "lactate": -s.lactate if s.lactate is not None else None,
        }
        acidifying = [k for k in shown_keys if d.effect_acidifying[k]]
        alkalinising = [k for k in shown_keys if d.effect_alkalinising[k]]
        shown = ", ".join(f"{k.replace('_', '-')} {values[k]:+.1f}" for k in shown_keys)
        named = [_EFFECT_WORDS[k][0] for k in acidifying] + [_EFFECT_WORDS[k][1] for k in alkalinising]
        text = f"Physicochemical (Stewart) reading: effects {shown} mEq/L" + (
            f", showing {', '.join(named)}" if named else ", none of them large"
        )
        if d.stewart_full:
            text += "."
        else:
            text += (
                " (albumin not given, so the unmeasured-ion effect is unknown and this reading is partial)."
            )
        parts.append(text)
        if w.has(RESP_ACID) and d.effect_alkalinising["na_cl"]:
            parts.append(
                "With a respiratory acidosis, a low chloride (a raised Na-Cl effect) is also how renal "
                "compensation appears in Stewart terms."
            )
    if w.fires("approaches_agree"):
        parts.append("The readings agree.")
        r.finding("approaches_agree", "info", " ".join(parts))
    else:
        if boston[0] and boston[1] and not any(cph_pair):
            parts.append(
                "Opposing metabolic processes cancel in the SBE, which measures only their net effect."
            )
        # only where Stewart names an effect: with none named its reading has already said so
        named_by_stewart = d.stewart_acid or d.stewart_alk
        if (
            d.stewart_pair_given
            and named_by_stewart
            and (bool(d.stewart_acid), bool(d.stewart_alk)) != boston
        ):
            parts.append(
                "Stewart splits the net change into separate effects, some of which offset each other."
            )
        parts.append(
            "Each approach measures the metabolic component its own way; none is taken as the reference here."
        )
        r.finding("approaches_disagree", d.severity["approaches_disagree"], " ".join(parts))
    # the chronic respiratory rules (Boston 3.5 per 10 against Copenhagen 0.4 x dPaCO2)
    if w.fires("boston_copenhagen_chronicity"):
        boston_ch = w.disorders[0]["chronicity"]
        r.finding(
            "boston_copenhagen_chronicity",
            "info",
            f"The HCO3 rules read {boston_ch.replace('_', '-')}, the SBE rules "
            f"{d.cph_chronicity.replace('_', '-')} (SBE {d.sbe:+.1f}; acute 0, chronic "
            f"{d.sbe_chronic:+.1f} +/- 3 mmol/L). The chronic SBE rule corresponds to a steeper HCO3 "
            "rise than 3.5 per 10 mmHg, so the two rules differ most for chronic hypercapnia.",
        )
