"""Oxygenation: alveolar PO2, A-a gradient, a/A and P/F ratios, respiratory failure type."""

from __future__ import annotations

from types import SimpleNamespace

from ...arrays import NAN, div, each, given, none_if_nan, not_, where
from ...formulas import oxygenation
from .decision import NONE
from .thresholds import HYPERCAPNIA_MMHG, HYPOXAEMIA_MMHG, PCO2_HIGH, PF_IMPAIRED, PF_MODERATE, PF_SEVERE
from .work import _Work


def decide_oxygenation(v: SimpleNamespace) -> None:
    """Oxygenation (arterial PO2 only): alveolar PO2, A-a gradient, P/F, respiratory failure type."""
    arterial, capillary, d, f, fio2_given, has_ra, p, venous, x = (
        v.arterial,
        v.capillary,
        v.d,
        v.f,
        v.fio2_given,
        v.has_ra,
        v.p,
        v.venous,
        v.x,
    )
    po2, fio2 = x.po2, x.fio2
    has_po2 = given(po2)
    d.fio2_given = fio2_given
    d.fio2_source = where(fio2_given, "given", "assumed_air")
    f["venous_po2_not_interpreted"] = has_po2 & venous
    d.alveolar_given = ox = has_po2 & arterial
    d.pio2 = oxygenation._inspired(fio2, x.pb_value)
    d.pao2_alveolar = pao2_a = each(
        oxygenation.alveolar_po2_simple, ox, fio2_fraction=fio2, paco2_mmhg=p, pb_mmhg=x.pb_value, rq=x.rq
    )
    # FiO2 not recorded and a PaO2 above the alveolar PO2 on air: oxygen was probably given, so the
    # oxygenation reading is not interpretable (common practice)
    d.oxygen_probably_given = likely = ox & not_(fio2_given) & (po2 > pao2_a)
    f["oxygen_probably_given"] = likely
    d.oxygenation = readable = ox & not_(likely)
    # the alveolar PO2 is shown unless it is negative (air assumed, no alveolar oxygen left at this PaCO2)
    d.alveolar_given = ox & (pao2_a >= 0.0)
    d.a_a_gradient = aa = pao2_a - po2
    d.a_over_A = where(pao2_a > 0, div(po2, pao2_a), NAN)
    d.pf_ratio = pf = po2 / fio2
    f["po2_above_alveolar"] = readable & (aa < -10.0)
    with_age = given(x.age)
    d.a_a_expected_upper = upper = each(
        oxygenation.aa_gradient_upper_by_age, readable & with_age, age_years=x.age
    )
    adult_low = oxygenation.aa_gradient_upper_by_age(age_years=18.0)
    adult_high = oxygenation.aa_gradient_upper_by_age(age_years=100.0)
    category = where(
        with_age,
        where(aa > upper, "raised", "normal"),
        where(aa <= adult_low, "normal", where(aa > adult_high, "raised", "needs_age")),
    )
    d.a_a_category = where(readable, category, NONE)
    on_oxygen = fio2_given & (fio2 > 0.21)
    f["a_a_on_oxygen"] = readable & fio2_given & (fio2 > 0.3)
    # "above 6.0 kPa" (BTS 2017; 45.004 mmHg), so 6.0 kPa itself is not above
    hyper = p > HYPERCAPNIA_MMHG
    # respiratory failure: type 2 from the PaCO2 whenever a respiratory acidosis is named (with or without a
    # PO2); else type 1 from an arterial PaO2 below 8 kPa, or on oxygen a P/F at or below 300 mmHg, which the
    # oxygen would otherwise hide (ARDS Definition Task Force 2012 for the P/F bands; BTS 2017)
    type_2 = not_(venous) & has_ra & hyper
    low_po2 = readable & (po2 < HYPOXAEMIA_MMHG)
    d.pf_impaired = pf_low = readable & on_oxygen & (pf <= PF_IMPAIRED)
    type_1 = low_po2 | pf_low
    failure = where(type_2, "type_2", where(type_1, "type_1", "none"))
    d.rf_given = rf_given = not_(venous) & (type_2 | not_(likely))
    d.respiratory_failure = where(rf_given, failure, NONE)
    d.pf_band = where(
        pf_low,
        where(pf <= PF_SEVERE, "severe", where(pf <= PF_MODERATE, "moderate", "mild")),
        NONE,
    )
    f["hypoxaemia_masked_by_oxygen"] = pf_low & not_(low_po2)
    f["respiratory_failure_type_1"] = not_(type_2) & type_1
    f["respiratory_failure_type_2"] = type_2
    # the A-a reading of hypercapnia belongs to a respiratory acidosis (not to compensation of an alkalosis)
    f["pure_hypoventilation"] = readable & hyper & has_ra & (category == "normal")
    f["gas_exchange_impaired"] = readable & hyper & has_ra & (category == "raised")
    f["low_inspired_oxygen"] = readable & not_(hyper) & (category == "normal") & low_po2
    f["a_a_needs_age"] = readable & hyper & has_ra & (category == "needs_age")
    f["capillary_po2"] = has_po2 & capillary
    f["air_assumed"] = readable & not_(fio2_given)
    v.hyper = hyper


# -- oxygenation ---------------------------------------------------------------------------------------------


def _oxygenation(w: _Work) -> None:
    s, r, d = w.s, w.r, w.d
    r.put("fio2_source", d.fio2_source)
    if s.site != "venous" and (d.rf_given or s.po2 is not None):
        _respiratory_failure(w)
    if s.po2 is None:
        return
    if w.fires("venous_po2_not_interpreted"):
        r.finding(
            "venous_po2_not_interpreted",
            "notable",
            "A venous PO2 says nothing about arterial oxygenation: no alveolar gas, A-a gradient or "
            "respiratory failure type is computed from it. Use SpO2 or an arterial sample.",
        )
        return
    if w.fires("capillary_po2"):
        r.finding(
            "capillary_po2",
            "notable",
            "An earlobe (capillary) PO2 underestimates the arterial PO2: no A-a gradient, P/F ratio or "
            "type 1 failure is read from it (BTS/ICS 2016). Use SpO2 for oxygenation.",
        )
        return
    fio2_words = f"FiO2 {s.fio2:.2f}" if s.fio2_given else "air (FiO2 0.21 assumed: none was recorded)"
    pb = s.pb_value()
    source = (
        "measured"
        if s.pb is not None
        else ("ISA at the altitude given" if s.altitude is not None else "sea level")
    )
    r.pressure("pb", pb)
    if s.pb is None and s.altitude is not None:
        r.step(
            "Barometric pressure at the altitude given (ICAO standard atmosphere)",
            "PB = 101325 Pa x (1 - 0.0065 h / 288.15)^5.255877",
            pb,
            ("icao7488", "ussa1976"),
            output="pb",
            pressure=True,
        )
    else:
        r.step(
            f"Barometric pressure ({source})",
            "PB as given" if s.pb is not None else "PB = 760 mmHg",
            pb,
            "icao7488",
            output="pb",
            pressure=True,
        )
    if not d.alveolar_given:
        _oxygen_probably_given(w)
        return
    assumed = "" if s.fio2_given else " (air assumed)"
    src_air = () if s.fio2_given else ("fio2_assumed_air",)
    pio2 = d.pio2
    r.computed(
        "pio2",
        pio2,
        f"Inspired PO2{assumed}",
        "PIO2 = FiO2 x (PB - 47)",
        ("alveolar_gas_1946", *src_air),
        pressure=True,
    )
    pao2_a = d.pao2_alveolar
    pao2_full = oxygenation.alveolar_po2_full(fio2_fraction=s.fio2, paco2_mmhg=s.pco2, pb_mmhg=pb, rq=s.rq)
    r.computed(
        "pao2_alveolar",
        pao2_a,
        f"Alveolar PO2 (simplified equation, R {s.rq:g}){assumed}",
        "PAO2 = FiO2 x (PB - 47) - PaCO2 / R",
        ("alveolar_gas_1946", *src_air),
        pressure=True,
    )
    r.computed(
        "pao2_alveolar_full",
        pao2_full,
        f"Alveolar PO2 (full equation){assumed}",
        "PAO2 = PIO2 - PaCO2 x (FiO2 + (1 - FiO2) / R)",
        ("alveolar_gas_1946", *src_air),
        pressure=True,
    )
    if w.fires("oxygen_probably_given"):
        _oxygen_probably_given(w)
        return
    aa = d.a_a_gradient
    r.computed(
        "a_a_gradient",
        aa,
        f"A-a gradient{assumed}",
        "A-a = PAO2 - PaO2",
        ("alveolar_gas_1946", *src_air),
        pressure=True,
    )
    ratio = none_if_nan(d.a_over_A)
    if ratio is not None:
        r.computed(
            "a_over_A", ratio, "a/A ratio", "PaO2 / PAO2 (normal above 0.75)", "gilbert1974", decimals=2
        )
    pf = d.pf_ratio
    r.computed(
        "pf_ratio",
        pf,
        f"P/F ratio{assumed}",
        "PaO2 [mmHg] / FiO2",
        ("berlin2012", *src_air),
        unit="mmHg",
        decimals=0,
    )
    if w.fires("air_assumed"):
        r.finding(
            "air_assumed",
            "info",
            "No FiO2 was recorded: the oxygenation reading assumes the patient was breathing air "
            "(FiO2 0.21). If oxygen was given, enter the FiO2.",
        )
    if w.fires("po2_above_alveolar"):
        r.finding(
            "po2_above_alveolar",
            "notable",
            f"PO2 {w.p(s.po2)} is above the alveolar PO2 computed for FiO2 {s.fio2:.2f} ({w.p(pao2_a)}): "
            "check the FiO2, the barometric pressure and the unit of PO2.",
        )
    # age-expected upper limit and category
    if s.age is not None:
        upper = d.a_a_expected_upper
        r.computed(
            "a_a_expected_upper",
            upper,
            "Upper limit of the A-a gradient for age (breathing air)",
            "age / 4 + 4 mmHg",
            "aa_age_rule",
            pressure=True,
        )
    category = d.a_a_category
    r.put("a_a_category", category)
    if w.fires("a_a_on_oxygen"):
        r.finding(
            "a_a_on_oxygen",
            "info",
            "The age rule for the A-a gradient applies breathing air; on supplemental oxygen the normal "
            "gradient is wider, so a 'raised' reading is less specific.",
        )
    reading = None
    if w.fires("pure_hypoventilation"):
        reading = "pure_hypoventilation"
        r.finding(
            "pure_hypoventilation",
            "notable",
            f"Hypercapnia with a normal A-a gradient ({w.p(aa)}, {fio2_words}): the raised PaCO2 comes from "
            "hypoventilation alone (reduced drive, neuromuscular weakness or a chest-wall problem), not "
            "from lung disease.",
        )
    elif w.fires("gas_exchange_impaired"):
        reading = "lung_disease_and_hypoventilation"
        r.finding(
            "gas_exchange_impaired",
            "notable",
            f"Hypercapnia with a raised A-a gradient ({w.p(aa)}, {fio2_words}): lung disease (V/Q mismatch, "
            "shunt or dead space) as well as hypoventilation.",
        )
    elif w.fires("low_inspired_oxygen"):
        r.finding(
            "low_inspired_oxygen",
            "notable",
            f"Hypoxaemia with a normal A-a gradient and no hypercapnia ({fio2_words}) points to a low "
            "inspired PO2 (altitude, low FiO2).",
        )
    elif w.fires("a_a_needs_age"):
        r.finding(
            "a_a_needs_age",
            "info",
            "Give the age to judge the A-a gradient: it separates pure hypoventilation from lung disease.",
        )
    w.oxygen = {"readable": True, "category": category, "reading": reading, "aa": aa, "pf": pf}


def _oxygen_probably_given(w: _Work) -> None:
    s, d = w.s, w.d
    alveolar = max(d.pao2_alveolar, 0.0)
    w.r.finding(
        "oxygen_probably_given",
        "notable",
        f"No FiO2 was recorded, and PaO2 {w.p(s.po2)} is above the alveolar PO2 breathing air "
        f"({w.p(alveolar)}): the patient was probably on oxygen. The oxygenation is not read (no A-a "
        "gradient, P/F ratio or type 1 failure); enter the FiO2 to read it.",
    )
    w.oxygen = {"readable": False}


def _respiratory_failure(w: _Work) -> None:
    """``respiratory_failure``: type 2 from the PaCO2, type 1 from an arterial PaO2 or, on oxygen, the P/F."""
    s, r, d = w.s, w.r, w.d
    if not d.rf_given:
        return
    failure = d.respiratory_failure
    r.put("respiratory_failure", failure)
    fio2_words = f"FiO2 {s.fio2:.2f}" if s.fio2_given else "air (assumed)"
    if w.fires("respiratory_failure_type_2"):
        po2 = f" PaO2 {w.p(s.po2)} on {fio2_words}." if s.po2 is not None and d.oxygenation else ""
        r.finding(
            "respiratory_failure_type_2",
            "notable",
            f"Type 2 (hypercapnic) respiratory failure: PaCO2 {w.p(s.pco2, PCO2_HIGH)} is above "
            f"{w.p(PCO2_HIGH)} with a respiratory acidosis (named from the PaCO2, with or without "
            "hypoxaemia)." + po2,
        )
    if w.fires("respiratory_failure_type_1"):
        r.finding(
            "respiratory_failure_type_1",
            "notable",
            "Type 1 (hypoxaemic) respiratory failure: "
            + (
                f"PaO2 {w.p(s.po2, HYPOXAEMIA_MMHG)} is below {w.p(HYPOXAEMIA_MMHG)} on {fio2_words}."
                if s.po2 < HYPOXAEMIA_MMHG
                else f"on FiO2 {s.fio2:.2f} the P/F ratio is at or below {w.pf(PF_IMPAIRED)}."
            ),
        )
    if w.fires("hypoxaemia_masked_by_oxygen"):
        limit = {"mild": PF_IMPAIRED, "moderate": PF_MODERATE, "severe": PF_SEVERE}[d.pf_band]
        r.finding(
            "hypoxaemia_masked_by_oxygen",
            "notable",
            f"PaO2 {w.p(s.po2)} looks adequate only because of the oxygen: P/F ratio {w.pf(d.pf_ratio)} on "
            f"FiO2 {s.fio2:.2f} is at or below {w.pf(limit)} (impaired oxygenation"
            + ("" if d.pf_band == "mild" else ", " + d.pf_band)
            + ").",
        )
