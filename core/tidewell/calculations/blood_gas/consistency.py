"""HCO3, the consistency of the triple and the base excess (the first step of the reading)."""

from __future__ import annotations

from types import SimpleNamespace

from ...arrays import given, maximum, minimum, not_, where
from ...formulas import acidbase as ab
from .thresholds import PCO2_HIGH, PCO2_LOW, PH_HIGH, PH_LOW
from .work import _Work


def decide_consistency(v: SimpleNamespace) -> None:
    """HCO3 (reported, else computed), the consistency of the triple and the base excess (henderson1908,
    kassirer1965, nccls1994)."""
    d, f, p, ph, x = v.d, v.f, v.p, v.ph, v.x
    hco3_given = given(x.hco3)
    d.hco3_given = hco3_given
    d.hco3_computed = ab._hco3_hh(ph, p)
    d.h_measured = ab._h_from_ph(ph)
    c = ab._consistency(ph, p, x.hco3)
    d.ph_computed, d.ph_difference, d.h_kassirer = c.ph_computed, c.ph_difference, c.h_kassirer_nmol_l
    d.doubtful = doubtful = hco3_given & not_(c.consistent)
    sound = not_(doubtful)
    d.consistency = where(doubtful, "inconsistent", "consistent")
    d.hco3_out = where(hco3_given, x.hco3, d.hco3_computed)
    d.hco3 = h = where(hco3_given & c.consistent, x.hco3, d.hco3_computed)
    f["inconsistent_triple"] = f["provisional_interpretation"] = doubtful
    f["hco3_calculated"] = not_(hco3_given)
    d.sbe = sbe = ab._sbe_clsi(ph, d.hco3_out)
    so2 = where(given(x.spo2), x.spo2 / 100.0, 1.0)
    d.sbe_siggaard = ab._sbe_siggaard(ph, d.hco3_out)
    d.sbe_van_slyke_hb5 = ab._be_van_slyke(ph, d.hco3_out, 5.0)
    d.be_blood = ab._be_van_slyke(ph, d.hco3_out, x.hb)
    d.be_zander = ab._be_zander(ph, p, x.hb, so2)
    low = minimum(minimum(sbe, d.sbe_siggaard), d.sbe_van_slyke_hb5)
    high = maximum(maximum(sbe, d.sbe_siggaard), d.sbe_van_slyke_hb5)
    with_hb = given(x.hb)
    d.be_low = where(with_hb, minimum(minimum(low, d.be_blood), d.be_zander), low)
    d.be_high = where(with_hb, maximum(maximum(high, d.be_blood), d.be_zander), high)
    be = x.base_excess
    d.be_difference = be - sbe
    f["base_excess_differs"] = given(be) & not_((d.be_low - 2.0 <= be) & (be <= d.be_high + 2.0))
    d.ph_status = where(ph < PH_LOW, "acidaemia", where(ph > PH_HIGH, "alkalaemia", "normal"))
    d.pco2_status = where(p > PCO2_HIGH, "hypercapnia", where(p < PCO2_LOW, "hypocapnia", "normal"))
    v.h, v.sbe, v.sound = h, sbe, sound


def _input_findings(w: _Work) -> None:
    s, r = w.s, w.r
    if w.fires("possible_unit_mix_up"):
        text = "Possible unit mix-up: " + " ".join(s.mix_ups)
        r.finding("possible_unit_mix_up", "notable", text, s.mix_up_suggest)
    if w.fires("value_unusual"):
        r.finding("value_unusual", "notable", "Unusual value: " + "; ".join(s.unusual) + ".")
    if w.fires("pb_used_not_altitude"):
        r.finding(
            "pb_used_not_altitude",
            "info",
            "Both barometric pressure and altitude were given: the measured pressure is used, the altitude "
            "is not.",
        )


def _core(w: _Work) -> None:
    s, r, d = w.s, w.r, w.d
    hh = ("henderson1908", "nccls1994")
    hco3_calc = d.hco3_computed
    r.computed(
        "hco3_computed",
        hco3_calc,
        "HCO3 from pH and PCO2 (Henderson-Hasselbalch)",
        "HCO3 = 0.0307 x PCO2 [mmHg] x 10^(pH - 6.1)",
        hh,
        unit="mmol/L",
        decimals=1,
    )
    h_measured = d.h_measured
    r.computed(
        "h_nmol_l_measured",
        h_measured,
        "[H+] from the pH",
        "[H+] = 10^(9 - pH)",
        "kassirer1965",
        unit="nmol/L",
        decimals=1,
    )
    if s.hco3 is not None:
        r.put("consistency", d.consistency)
        r.computed(
            "ph_computed",
            d.ph_computed,
            "pH from the reported PCO2 and HCO3",
            "pH = 6.1 + log10(HCO3 / (0.0307 x PCO2))",
            hh,
            decimals=3,
        )
        r.computed(
            "ph_difference",
            d.ph_difference,
            "Consistency: computed minus reported pH",
            "difference = pH_computed - pH_reported; consistent when |difference| <= 0.03",
            "consistency_band",
            decimals=3,
        )
        r.computed(
            "h_nmol_l_kassirer",
            d.h_kassirer,
            "[H+] by Kassirer-Bleich",
            "[H+] = 24 x PCO2 [mmHg] / HCO3 [mmol/L]",
            "kassirer1965",
            unit="nmol/L",
            decimals=1,
        )
        if w.fires("inconsistent_triple"):
            r.finding(
                "inconsistent_triple",
                "urgent",
                f"The reported values do not fit together: PCO2 {w.p(s.pco2)} with HCO3 {s.hco3:.1f} mmol/L "
                f"gives pH {d.ph_computed:.3f}, not the reported {s.ph:.2f} (difference "
                f"{d.ph_difference:+.3f}; [H+] {d.h_kassirer:.1f} by Kassirer-Bleich against "
                f"{h_measured:.1f} nmol/L measured). Recheck the sample and the transcription (typing slip, "
                "arterial and venous values mixed, or a chemistry-panel total CO2 entered as HCO3). Any "
                "reading below rests on doubtful data.",
            )
            r.finding(
                "provisional_interpretation",
                "notable",
                f"Provisional reading only, from the measured pH and PCO2 (HCO3 {hco3_calc:.1f} mmol/L as "
                "an analyser would derive it); anion-gap, base-excess and Stewart cross-checks are not "
                "used to name disorders on doubtful data.",
            )
        r.step(
            "HCO3 used in the report",
            "the reported HCO3 (checked against pH and PCO2 above)",
            s.hco3,
            "consistency_band",
            output="hco3",
            unit="mmol/L",
        )
    else:
        r.put("consistency", "consistent")
        r.finding(
            "hco3_calculated",
            "info",
            f"HCO3 was not given: {hco3_calc:.1f} mmol/L is computed from pH and PCO2, so the triple cannot "
            "be checked for consistency.",
        )
        r.step(
            "HCO3 used in the report",
            "HCO3 computed from pH and PCO2 (not given)",
            hco3_calc,
            hh,
            output="hco3",
            unit="mmol/L",
        )
    r.quantity("hco3", w.hco3_out, "mmol/L", decimals=1)

    # standard base excess (CLSI form) and the variants
    r.computed(
        "standard_base_excess",
        w.sbe,
        "Standard base excess (CLSI form, the default)",
        "SBE = HCO3 - 24.8 + 16.2 x (pH - 7.40)",
        "nccls1994",
        unit="mmol/L",
        decimals=1,
    )
    variants = {
        "clsi": {"value": d.sbe, "unit": "mmol/L"},
        "siggaard_andersen": {"value": d.sbe_siggaard, "unit": "mmol/L"},
        "van_slyke_hb5": {"value": d.sbe_van_slyke_hb5, "unit": "mmol/L"},
    }
    r.step(
        "SBE, Siggaard-Andersen form",
        "0.9287 x (HCO3 - 24.4 + 14.83 x (pH - 7.40))",
        d.sbe_siggaard,
        "siggaard1971",
        output="sbe_variants",
        unit="mmol/L",
    )
    r.step(
        "SBE, Van Slyke at Hb 5 g/dL",
        "(1 - 0.014 x 5) x [(HCO3 - 24.8) + (1.43 x 5 + 7.7) x (pH - 7.40)]",
        d.sbe_van_slyke_hb5,
        ("siggaard1971", "nccls1994"),
        output="sbe_variants",
        unit="mmol/L",
    )
    if s.hb is not None:
        variants["blood_van_slyke"] = {"value": d.be_blood, "unit": "mmol/L"}
        variants["zander"] = {"value": d.be_zander, "unit": "mmol/L"}
        r.step(
            "Whole-blood BE, Van Slyke at the patient's Hb",
            "(1 - 0.014 x Hb) x [(HCO3 - 24.8) + (1.43 x Hb + 7.7) x (pH - 7.40)]",
            d.be_blood,
            ("siggaard1971", "nccls1994"),
            output="sbe_variants",
            unit="mmol/L",
            inputs={"hb_g_dl": s.hb},
        )
        so2_note = "SpO2" if s.spo2 is not None else "SO2 taken as 1.0 (no SpO2 given)"
        r.step(
            f"BE, Zander form ({so2_note})",
            "(1 - 0.0143 Hb) x [(0.0304 x PCO2 x 10^(pH - 6.1) - 24.26) + (9.5 + 1.63 Hb)(pH - 7.4)] - 0.2 "
            "x Hb x (1 - SO2)",
            d.be_zander,
            "lang2002",
            output="sbe_variants",
            unit="mmol/L",
        )
    r.put("sbe_variants", variants, decimals=1)
    if s.base_excess is not None:
        r.computed(
            "base_excess_difference",
            d.be_difference,
            "Reported base excess minus computed SBE",
            "BE_reported - SBE_CLSI",
            "nccls1994",
            unit="mmol/L",
            decimals=1,
        )
        if w.fires("base_excess_differs"):
            r.finding(
                "base_excess_differs",
                "notable",
                f"The reported base excess ({s.base_excess:+.1f} mmol/L) differs from every published form "
                f"computed from pH and HCO3 ({d.be_low:+.1f} to {d.be_high:+.1f}): check the "
                "transcription or which base excess the analyser reports.",
            )

    # pH and PCO2 status
    w.ph_status = d.ph_status
    r.put("ph_status", w.ph_status)
    w.pco2_status = d.pco2_status
    r.put("pco2_status", w.pco2_status)
