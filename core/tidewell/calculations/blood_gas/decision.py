"""The Decision a blood-gas reading rests on, its finding codes and severities, and its scalar views."""

from __future__ import annotations

from types import SimpleNamespace

from ...arrays import NAN, none_if_nan, not_, where
from .thresholds import MET_ACID, MET_ALK, RESP_ACID, RESP_ALK

#: every finding code of the blood_gas report, in the order the report emits them (the response then sorts
#: them by severity, keeping this order within a severity)
FINDING_ORDER = (
    "possible_unit_mix_up",
    "value_unusual",
    "pb_used_not_altitude",
    "inconsistent_triple",
    "provisional_interpretation",
    "hco3_calculated",
    "base_excess_differs",
    "borderline_values",
    "concurrent_respiratory_acidosis",
    "concurrent_respiratory_alkalosis",
    "compensation_as_expected",
    "ph_rule_drift",
    "chronicity_not_judged",
    "concurrent_metabolic_acidosis",
    "concurrent_metabolic_alkalosis",
    "chronicity_rules_disagree",
    "baseline_and_hco3_disagree",
    "anion_gap_low",
    "osmolar_gap_raised",
    "lactate_raised",
    "anion_gap_needs_electrolytes",
    "high_anion_gap_acidosis_found",
    "anion_gap_raised",
    "metabolic_alkalosis_from_gap",
    "anion_gap_reading",
    "chronicity_indeterminate",
    "respiratory_chronicity_assumed",
    "stewart_assumed_values",
    "strong_ion_gap_raised",
    "approaches_agree",
    "approaches_disagree",
    "boston_copenhagen_chronicity",
    "pco2_target",
    "baseline_estimate_unreliable",
    "pco2_below_baseline",
    "niv_criteria_need_arterial_sample",
    "niv_criteria_met",
    "ventilation_failing_to_compensate",
    "compensation_incomplete",
    "pco2_above_consciousness_threshold",
    "respiratory_failure_type_2",
    "respiratory_failure_type_1",
    "hypoxaemia_masked_by_oxygen",
    "venous_po2_not_interpreted",
    "capillary_po2",
    "oxygen_probably_given",
    "air_assumed",
    "po2_above_alveolar",
    "a_a_on_oxygen",
    "pure_hypoventilation",
    "gas_exchange_impaired",
    "low_inspired_oxygen",
    "a_a_needs_age",
    "temperature_ph_stat_view",
    "spo2_target",
    "spo2_target_needs_history",
    "hypercapnic_without_risk_flag",
    "spo2_below_target",
    "spo2_above_target",
    "severe_acidaemia",
    "severe_alkalaemia",
    "normal_ph_single_disorder",
    "venous_sample",
    "capillary_sample",
)

#: severities of the findings whose severity never changes (the others are in ``Decision.severity``)
SEVERITY = {
    "possible_unit_mix_up": "notable",
    "value_unusual": "notable",
    "pb_used_not_altitude": "info",
    "inconsistent_triple": "urgent",
    "provisional_interpretation": "notable",
    "hco3_calculated": "info",
    "base_excess_differs": "notable",
    "borderline_values": "info",
    "concurrent_respiratory_acidosis": "notable",
    "concurrent_respiratory_alkalosis": "notable",
    "compensation_as_expected": "info",
    "ph_rule_drift": "info",
    "chronicity_not_judged": "info",
    "concurrent_metabolic_acidosis": "notable",
    "concurrent_metabolic_alkalosis": "notable",
    "chronicity_rules_disagree": "info",
    "baseline_and_hco3_disagree": "info",
    "anion_gap_low": "notable",
    "osmolar_gap_raised": "notable",
    "lactate_raised": "notable",
    "anion_gap_needs_electrolytes": "info",
    "high_anion_gap_acidosis_found": "notable",
    "anion_gap_raised": "info",
    "metabolic_alkalosis_from_gap": "notable",
    "anion_gap_reading": "info",
    "chronicity_indeterminate": "info",
    "respiratory_chronicity_assumed": "info",
    "stewart_assumed_values": "info",
    "strong_ion_gap_raised": "info",
    "approaches_agree": "info",
    "boston_copenhagen_chronicity": "info",
    "baseline_estimate_unreliable": "notable",
    "pco2_target": "notable",
    "pco2_below_baseline": "notable",
    "niv_criteria_need_arterial_sample": "notable",
    "niv_criteria_met": "urgent",
    "ventilation_failing_to_compensate": "urgent",
    "compensation_incomplete": "notable",
    "pco2_above_consciousness_threshold": "urgent",
    "venous_po2_not_interpreted": "notable",
    "oxygen_probably_given": "notable",
    "air_assumed": "info",
    "po2_above_alveolar": "notable",
    "a_a_on_oxygen": "info",
    "hypoxaemia_masked_by_oxygen": "notable",
    "respiratory_failure_type_1": "notable",
    "respiratory_failure_type_2": "notable",
    "pure_hypoventilation": "notable",
    "gas_exchange_impaired": "notable",
    "low_inspired_oxygen": "notable",
    "a_a_needs_age": "info",
    "capillary_po2": "notable",
    "temperature_ph_stat_view": "info",
    "spo2_target": "info",
    "hypercapnic_without_risk_flag": "notable",
    "spo2_target_needs_history": "notable",
    "spo2_below_target": "notable",
    "severe_acidaemia": "urgent",
    "severe_alkalaemia": "urgent",
    "normal_ph_single_disorder": "info",
    "venous_sample": "notable",
    "capillary_sample": "info",
}

#: the four disorder codes, in the contract's order
DISORDER_CODES = (MET_ACID, MET_ALK, RESP_ACID, RESP_ALK)
#: "no code" in the array-polymorphic decisions (None in the report)
NONE = ""


class Decision(SimpleNamespace):
    """Everything :func:`decide` works out about one sample (scalars) or many (arrays of the same length).

    Numbers that do not apply are NaN; words that do not apply are ``""``. The main attributes:

    - ``primary`` (final primary disorder code, or ``""``), ``has`` (code -> bool), ``stage`` (code -> the
      step that named it: 0 primary, 1 compensation rules, 2 anion gap, 3 gap-based alkalosis; the order of
      the ``disorders`` list), ``chronicity`` and ``fraction_acute`` of the respiratory disorder;
    - ``consistency``, ``doubtful``, the numbers every rule used (``hco3``, ``sbe``, gaps, oxygenation ...);
    - ``finding`` (code -> bool, every code of :data:`FINDING_ORDER`) and ``severity`` (code -> severity, for
      the codes whose severity depends on the sample);
    - ``niv``, ``respiratory_failure``, ``a_a_category``, ``spo2_low``/``spo2_high``, ``pco2_target``,
      ``consciousness_threshold`` and the other key outputs.
    """


def _ones(flag):
    """1 where ``flag`` holds, else 0 (so flags can be counted: numpy adds boolean arrays as a logical or)."""
    return where(flag, 1, 0)


def decide_inputs(v: SimpleNamespace) -> None:
    """Where the sample was taken, the CO2-retainer inputs and the reading flags (the first findings)."""
    x = v.x
    d = Decision()
    ph, p, site, risk = x.ph, x.pco2, x.site, x.hypercapnia_risk
    venous, capillary = site == "venous", site == "capillary"
    arterial = not_(venous | capillary)
    # inputs of the CO2-retainer rules (absent on callers that predate them: FiO2 given, history unknown)
    fio2_given = getattr(x, "fio2_given", True)
    previous = getattr(x, "previous_failure", NAN)
    rx_low, rx_high = getattr(x, "spo2_rx_low", NAN), getattr(x, "spo2_rx_high", NAN)
    d.venous = venous
    f = {}
    sev = {}
    f["possible_unit_mix_up"] = x.mix_up
    f["value_unusual"] = x.unusual
    f["pb_used_not_altitude"] = x.pb_and_altitude
    (
        v.arterial,
        v.capillary,
        v.d,
        v.f,
        v.fio2_given,
        v.p,
        v.ph,
        v.previous,
        v.risk,
        v.rx_high,
        v.rx_low,
        v.sev,
        v.venous,
    ) = arterial, capillary, d, f, fio2_given, p, ph, previous, risk, rx_high, rx_low, sev, venous


def _code(word: str) -> str | None:
    return word if word else None


def disorders(d: Decision) -> list[dict]:
    """The ``disorders`` output of a scalar :class:`Decision`: primary first, then in the order named."""
    present = sorted((d.stage[code], code) for code in DISORDER_CODES if d.has[code])
    out = []
    for i, (_, code) in enumerate(present):
        respiratory = code in (RESP_ACID, RESP_ALK)
        out.append(
            {
                "code": code,
                "role": "primary" if i == 0 else "concurrent",
                "chronicity": _code(d.chronicity) if respiratory else None,
                "fraction_acute": none_if_nan(d.fraction_acute) if respiratory else None,
            }
        )
    return out


def findings(d: Decision) -> list[str]:
    """The finding codes of a scalar :class:`Decision`, in the response's order (urgent, notable, info)."""
    order = {"urgent": 0, "notable": 1, "info": 2}
    codes = [code for code in FINDING_ORDER if d.finding[code]]
    return sorted(codes, key=lambda code: order[d.severity.get(code, SEVERITY.get(code))])
