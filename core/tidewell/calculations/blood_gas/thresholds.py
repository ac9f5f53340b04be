"""The blood_gas calculation's codes and thresholds, each with its source."""

from __future__ import annotations

import math

from ... import units
from ...formulas import acidbase as ab

MET_ACID = "metabolic_acidosis"
MET_ALK = "metabolic_alkalosis"
RESP_ACID = "respiratory_acidosis"
RESP_ALK = "respiratory_alkalosis"
NAMES = {
    MET_ACID: "metabolic acidosis",
    MET_ALK: "metabolic alkalosis",
    RESP_ACID: "respiratory acidosis",
    RESP_ALK: "respiratory alkalosis",
}
SITES = ("arterial", "venous", "capillary")

# reference values (acid_base_normal_ranges, ph_severity; common practice)
PH_LOW, PH_HIGH = 7.35, 7.45
PCO2_LOW, PCO2_HIGH = 35.0, 45.0
HCO3_LOW, HCO3_HIGH = 22.0, 26.0
SEVERE_ACIDAEMIA_PH, SEVERE_ALKALAEMIA_PH = 7.20, 7.60
#: BTS/ICS 2016 NIV thresholds
NIV_PH = 7.35
NIV_PCO2_MMHG = round(units.convert(6.5, "kPa", "mmHg"), 9)  # rounded as inputs are (see _r9)
NIV_INVASIVE_PH = 7.25
#: consciousness thresholds [mmHg] (common practice)
NARCOSIS_NORMAL_MMHG, NARCOSIS_CHRONIC_MMHG = 75.0, 90.0
NARCOSIS_RISE_MMHG = NARCOSIS_NORMAL_MMHG - ab.NORMAL_PCO2_MMHG
#: PCO2 above which the SpO2 target and type 2 failure read hypercapnia: 6.0 kPa [mmHg] (BTS 2017)
HYPERCAPNIA_MMHG = round(units.convert(6.0, "kPa", "mmHg"), 9)
#: hypoxaemia threshold for respiratory failure [mmHg] (8 kPa)
HYPOXAEMIA_MMHG = 60.0
#: P/F ratio bands [mmHg]: impaired oxygenation at or below 300, more severe at or below 200 and 100 (ARDS
#: Definition Task Force 2012; named by the P/F only, as their ARDS label needs PEEP and imaging)
PF_IMPAIRED, PF_MODERATE, PF_SEVERE = 300.0, 200.0, 100.0
#: anion gap at or above which a high-AG acidosis is named whatever the HCO3 (Gabow 1980, from memory)
AG_ALWAYS_ACIDOSIS = 20.0
#: beside an acidaemic respiratory acidosis: the lactate [mmol/L] and the (albumin-corrected) anion gap
#: [mmol/L] above which a concurrent metabolic acidosis is named (common practice; Cohen & Woods 1976)
LACTATE_ACIDOSIS, AG_BESIDE_HYPERCAPNIA = 4.0, 16.0
#: lactate above the upper reference limit [mmol/L] (common practice)
LACTATE_RAISED = 2.0
#: minimum margin beyond a compensation band before a second disorder is named [mmol/L]
HCO3_MARGIN_MIN = 2.0
#: SBE tolerance for the Copenhagen reading [mmol/L]
SBE_TOLERANCE = 3.0
#: size at which a Stewart effect counts as a process [mEq/L]
STEWART_EFFECT = 5.0
#: typical values assumed when a Stewart term is missing (named in the report)
TYPICAL_CA_IONISED, TYPICAL_MG, TYPICAL_PHOSPHATE = 1.2, 0.9, 1.0
#: the alkalaemia floor: PaCO2 at which pH would reach this after a quick fall
FLOOR_PH = 7.45

_CONVENTION = "tidewell_acid_base_conventions"
INF = math.inf


#: the words of ``pco2_target_basis`` and what each says
TARGET_BASIS = {
    "ph_7_35": "the PaCO2 that would bring the pH to 7.35 with today's HCO3",
    "usual_pco2_given": "the patient's known usual PaCO2",
    "usual_pco2_estimated": "the usual PaCO2 estimated from the HCO3",
    "normal_upper_limit": "the upper limit of normal (no chronic retention shows)",
    "present_pco2": "the present PaCO2 (hold it; do not lower it)",
    "metabolic_compensation": "the centre of Winters' compensation for the metabolic acidosis",
    "alkalaemia_floor": "the PaCO2 below which the pH would pass 7.45 with today's HCO3",
}


# -- oxygen target, severity ---------------------------------------------------------------------------------


#: why the SpO2 target is what it is (``spo2_target_basis``)
SPO2_BASIS = {
    "prescribed": "the patient's prescribed range",
    "hypercapnic": "PCO2 above {limit} on this sample",
    "venous_pco2_raised": "venous PCO2 above {limit}: a positive screen until an arterial or earlobe gas",
    "previous_hypercapnic_failure": "NIV or invasive ventilation for hypercapnic failure before",
    "at_risk_pco2_normal": "at risk of hypercapnic failure, but the PCO2 is normal",
    "default": "not hypercapnic",
}
