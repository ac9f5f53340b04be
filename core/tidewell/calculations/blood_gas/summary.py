"""The report's words: outputs, cautions and the plain-language summary."""

from __future__ import annotations

from ...arrays import given
from ...formulas import acidbase as ab
from .thresholds import HYPERCAPNIA_MMHG, MET_ACID, MET_ALK, NAMES, RESP_ACID, TARGET_BASIS
from .work import _Work

# -- outputs, cautions, summary ------------------------------------------------------------------------------


def _disorder_phrase(w: _Work, d: dict) -> str:
    name = NAMES[d["code"]]
    if d["code"] == MET_ACID and w.acidosis_type and not w.doubtful:
        name = {
            "high_anion_gap": "high anion gap metabolic acidosis",
            "normal_anion_gap": "normal anion gap (hyperchloraemic) metabolic acidosis",
            "high_and_normal_anion_gap": "mixed high and normal anion gap metabolic acidosis",
        }[w.acidosis_type]
    if d["chronicity"] is not None and d["fraction_acute"] is not None:  # judged, not provisional
        name = d["chronicity"].replace("_", "-") + " " + name
    return name


def _reading(w: _Work, *, temperature: bool = True) -> str:
    """The reading in words (without the inconsistency preamble), lower case, no final stop."""
    ds = w.disorders
    if not ds:
        if w.ph_status == "normal":
            text = "no acid-base disorder: pH, PCO2 and HCO3 are within their reference ranges"
        else:
            text = f"{w.ph_status} without a disorder that the rules can name"
    else:
        phrases = [_disorder_phrase(w, d) for d in ds]
        if len(ds) >= 3:
            text = "triple disorder: " + phrases[0] + " with " + " and ".join(phrases[1:])
        elif len(ds) == 2:
            text = phrases[0] + " with a concurrent " + phrases[1]
        else:
            text = phrases[0]
            if ds[0]["code"] in (MET_ACID, MET_ALK) and w.compensation_text:
                text += " with " + w.compensation_text
            elif ds[0]["chronicity"] == "chronic" and ds[0]["fraction_acute"] is not None:
                if w.fires("compensation_incomplete"):
                    text += " with acidaemia: compensation incomplete"
                elif ds[0]["code"] == RESP_ACID or w.ph_status == "normal":
                    text += ", compensated as expected"
    if w.s.site == "venous" and ds:
        text = (
            "venous gas, a screen only: "
            + text
            + " (confirm on an arterial or earlobe gas before judging chronicity or setting a PaCO2 aim)"
        )
    ox = w.oxygen.get("reading")
    if ox == "pure_hypoventilation":
        text += "; normal A-a gradient: pure hypoventilation"
    elif ox == "lung_disease_and_hypoventilation":
        text += "; raised A-a gradient: lung disease as well as hypoventilation"
    if w.temp and temperature:
        text = (
            f"at 37 °C (alpha-stat): {text}; corrected to {w.temp['t']:.1f} °C (pH-stat) the values are "
            + ("near normal" if w.temp["near_normal"] else "outside the reference ranges")
        )
    if w.tentative:
        text += " (tentative: borderline values)"
    return text


def _interpretation(w: _Work) -> str:
    text = _reading(w)
    if w.doubtful:
        text = (
            "The reported pH, PCO2 and HCO3 are internally inconsistent: recheck the sample and its "
            "transcription. Provisional reading from pH and PCO2 only, resting on doubtful data: " + text
        )
    return text[0].upper() + text[1:] + "."


def _outputs(w: _Work) -> None:
    r = w.r
    for d in w.disorders:
        if d["fraction_acute"] is not None:
            from_baseline = w.resp and given(w.d.f_b)
            r.step(
                f"Fraction acute of the {NAMES[d['code']]} used for the chronicity call",
                ">= 0.8 acute, <= 0.2 chronic, between acute-on-chronic"
                + (" (from the known baseline)" if from_baseline else " (HCO3 rules, limited to 0-1)"),
                d["fraction_acute"],
                "fraction_acute_bands",
                output="disorders",
            )
    r.put("disorders", [dict(d) for d in w.disorders])
    w.interpretation = _interpretation(w)
    r.put("interpretation", w.interpretation)


def _cautions(w: _Work) -> None:
    s, r = w.s, w.r
    r.caution(
        "Decision support only: this reading applies published adult rules to the numbers entered. It does "
        "not replace clinical assessment, senior advice or your local protocols; check the inputs against "
        "the original report."
    )
    r.caution(
        "The compensation rules assume a steady state (respiratory compensation takes 12-24 hours, renal "
        "compensation 3-5 days) and are not validated in pregnancy, in children or in neonates."
    )
    if s.age is not None and s.age < 18:
        r.caution("The patient is under 18: these rules and the A-a limits by age were derived in adults.")
    if s.site == "venous":
        r.caution(
            "Venous sample: pH and HCO3 track arterial values closely, but a venous PCO2 only screens for "
            "arterial hypercapnia (a normal value makes it unlikely; a raised one does not measure it), and "
            "a venous PO2 says nothing about oxygenation. Confirm hypercapnia with an arterial or "
            "arterialised capillary sample."
        )
        # above 6.0 kPa, as the SpO2 target reads it (bts2017_o2): one limit for both
        raised = s.pco2 > HYPERCAPNIA_MMHG
        # "above" never shows the value equal to the limit; "not above" may (45 mmHg is not above 45 mmHg)
        value = w.p(s.pco2, HYPERCAPNIA_MMHG) if raised else w.p(s.pco2)
        limit = w.p(HYPERCAPNIA_MMHG)
        r.finding(
            "venous_sample",
            "notable",
            (
                f"Venous PCO2 {value} is above {limit}: arterial hypercapnia is possible (venous PCO2 runs "
                f"about {w.p(4.0)} to {w.p(6.0)} above arterial, with wide limits). Confirm with an arterial "
                "or arterialised earlobe gas before judging chronicity or setting a PaCO2 aim; meanwhile the "
                "88-92 % SpO2 range applies."
                if raised
                else f"Venous PCO2 {value} is not above {limit}: arterial hypercapnia is unlikely (venous "
                f"PCO2 runs about {w.p(4.0)} to {w.p(6.0)} above arterial)."
            ),
        )
    elif s.site == "capillary":
        r.caution(
            "Capillary sample: arterialised capillary pH and PCO2 approximate arterial values when the site "
            "is well perfused; capillary PO2 underestimates arterial PO2."
        )
        r.finding(
            "capillary_sample",
            "info",
            "Arterialised capillary sample: pH and PCO2 approximate arterial values; PO2 underestimates "
            "arterial PO2.",
        )
    if w.pco2_target is not None:
        r.caution(
            "The PaCO2 target is an aim for the treating team, not a ventilator setting: change ventilation "
            "according to local protocols, gradually, and recheck the blood gas after each change."
        )
    if w.niv == "met":
        r.caution(
            "NIV thresholds are one part of a clinical decision made by the treating team with the whole "
            "clinical picture and local protocols."
        )
    r.caution(
        "Use the patient's prescribed SpO2 range where one exists (for example an oxygen alert card) and "
        "follow local oxygen policy."
    )


def _temperature_line(w: _Work) -> str:
    t = w.temp
    return f"Read at 37 °C (alpha-stat); corrected to {t['t']:.1f} °C (pH-stat) the values are " + (
        "near normal." if t["near_normal"] else "outside the reference ranges."
    )


def _summary(w: _Work) -> None:
    """The summary, what changes care first: a provisional mark, the reading, a threshold met, the aims."""
    s, r = w.s, w.r
    said: set[str] = set()
    if w.doubtful:
        r.say(
            "PROVISIONAL: the reported pH, PCO2 and HCO3 do not fit together; recheck the sample and its "
            "transcription before acting on this reading."
        )
    elif s.mix_ups:
        r.say("PROVISIONAL: possible unit mix-up. " + " ".join(s.mix_ups))
    reading = _reading(w, temperature=False)
    r.say(reading[0].upper() + reading[1:] + ".")
    found = {f["code"]: f for f in r.findings}
    extra = {
        "spo2_below_target": " Adjust the oxygen to reach the target range.",
        "pco2_below_baseline": " Do not lower it further; review the ventilation.",
    }
    if bool(w.d.at_risk):
        extra["spo2_above_target"] = (
            " Reduce the oxygen to the target range; recheck the gas in 30-60 minutes."
        )
    if "hypoxaemia_masked_by_oxygen" in found:
        said.add("respiratory_failure_type_1")  # the masked-hypoxaemia sentence says it, with the P/F

    def say(code: str) -> None:
        if code in found and code not in said:
            r.say(found[code]["text"] + extra.get(code, ""))
            said.add(code)

    # a threshold met, then anything else urgent
    for code in (
        "niv_criteria_met",
        "ventilation_failing_to_compensate",
        "niv_criteria_need_arterial_sample",
    ):
        say(code)
    for f in r.findings:
        if f["severity"] == "urgent" and f["code"] != "inconsistent_triple":
            say(f["code"])
    # oxygen that changes care: hypoxaemia, oxygen above or below the target, oxygen not recorded
    for code in ("respiratory_failure_type_1", "hypoxaemia_masked_by_oxygen", "oxygen_probably_given"):
        say(code)
    low, high = w.spo2_target
    if bool(w.d.at_risk):
        say("spo2_above_target")
    say("spo2_below_target")
    # the aims
    if w.pco2_target is not None:
        r.say(f"PaCO2 aim {w.p(w.pco2_target)}: {TARGET_BASIS[w.target_basis]}.")
    say("pco2_below_baseline")
    history = (
        " If the patient has ever needed NIV or invasive ventilation for hypercapnic failure: 88-92 % "
        "(history not given)."
        if w.fires("spo2_target_needs_history")
        else ""
    )
    r.say(f"SpO2 target {low:g}-{high:g} % ({w.basis_text(w.d.spo2_basis)}).{history}")
    if w.temp:
        r.say(_temperature_line(w))
    hco3_note = (
        "reported, consistent"
        if w.consistent
        else "reported, inconsistent with pH and PCO2"
        if w.consistent is False
        else "computed"
    )
    temp = f" at 37 °C, patient {s.temperature:.1f} °C" if w.temp else ""
    r.say(
        f"{s.site.capitalize()} gas{temp}: pH {s.ph:.2f}, PCO2 {w.p(s.pco2)}, HCO3 {w.hco3_out:.1f} "
        f"mmol/L ({hco3_note}), SBE {w.sbe:+.1f} mmol/L."
    )
    if w.resp:
        e = ab.RespiratoryExpectation(w.d.e_acute, w.d.e_chronic)
        d = w.disorders[0]
        line = (
            f"Expected HCO3 for this PCO2: {e.acute.value:.1f} if acute, {e.chronic.value:.1f} if chronic "
            f"(published slopes {e.chronic.low:.1f}-{e.chronic.high:.1f}); "
            f"{'measured' if s.hco3 is not None and not w.doubtful else 'computed'} {w.hco3:.1f}"
        )
        if d["fraction_acute"] is not None:
            line += f"; about {100 * d['fraction_acute']:.0f} % of the change looks acute"
        r.say(line + ".")
    elif w.met_expected is not None:
        e = w.met_expected
        r.say(f"Expected PaCO2 {w.p(e.low)} to {w.p(e.high)}; measured {w.p(s.pco2)}.")
    if w.ag_used is not None:
        r.say(
            f"Anion gap {w.ag_used:.1f} mmol/L"
            + (" (albumin-corrected)" if s.albumin is not None else "")
            + (f", {w.acidosis_type.replace('_', ' ')} acidosis" if w.acidosis_type else "")
            + "."
        )
    failure = w.d.respiratory_failure
    failure_words = {"type_1": "type 1", "type_2": "type 2", "none": "none named", "": ""}
    if w.oxygen.get("readable"):
        o = w.oxygen
        fio2 = f"FiO2 {s.fio2:.2f}" if s.fio2_given else "air (assumed: no FiO2 recorded)"
        category = (
            "below zero: check the FiO2, the barometric pressure and the unit of PO2"
            if w.fires("po2_above_alveolar")
            else o["category"].replace("_", " ")
        )
        r.say(
            f"PaO2 {w.p(s.po2)} on {fio2}: A-a gradient {w.p(o['aa'])} ({category}), P/F {w.pf(o['pf'])}; "
            f"respiratory failure: {failure_words[failure]}."
        )
    elif failure:
        r.say(f"Respiratory failure: {failure_words[failure]} (oxygenation not assessed from this sample).")
