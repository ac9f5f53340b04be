"""The ``blood_gas`` calculation: a whole, sourced interpretation of one blood-gas sample.

==================  =====================================================================================
``blood_gas``       bridge calculation (docs/bridge.md ``blood_gas``): inputs -> outputs, findings, cautions,
                    steps and a plain-language summary
``decide``          every decision of the interpretation (disorders, chronicity, consistency, findings, key
                    numbers) for one sample or for numpy arrays of samples: the one implementation the
                    report, the batch audit and the uncertainty calculation share
``FIELDS``          how each input is read (kind, unit, range, default): the scalar reader and the batch's
                    array reader use this one table
``disorders``       the ``disorders`` output of a scalar Decision
``findings``        the finding codes of a scalar Decision, in the response's order
``primary_process`` the primary-process rule on its own (pH, PCO2, HCO3 -> code, tentative)
==================  =====================================================================================

Structure: one module per clinical step. ``reading`` reads the inputs (``FIELDS`` and the cross-field checks,
written once for floats and arrays; ``_Sample``) and ``thresholds`` holds the codes and thresholds with their
sources. :func:`decide` (below) takes every decision in order, each step in the module of its clinical step:
``decision.decide_inputs``, ``consistency`` (HCO3, consistency, base excess), ``compensation`` (primary
process, expected compensation, chronicity), ``gaps`` (anion gap, delta ratio; the Copenhagen and Stewart
readings), ``targets`` (PaCO2 aim, NIV, SpO2 target, severity) and ``oxygenation``, all with the
array-polymorphic rules of :mod:`formulas.acidbase` and the helpers of :mod:`tidewell.arrays` (no numpy is
imported here; with floats everything runs on ``math``). :func:`blood_gas` (below) then writes the report
from the scalar Decision with the narrative function of each step (``work._Work`` carries the sample, the
report and the Decision through them; ``summary`` writes the outputs, cautions and summary). They decide
nothing that the batch or the uncertainty calculation reports (only wording: for example whether the pH-stat
view reads "near normal").

What it does, in order (docs/clinical-rules.md gives the rules in words):

1. Reads and checks every input (plausibility ranges; a number that fits only in another unit is refused as
   ``implausible`` with the unit probably meant; values that are possible but look like a unit slip are kept
   and named in a ``possible_unit_mix_up`` finding).
2. Henderson-Hasselbalch (pK' 6.1, S 0.0307) consistency of the reported triple, with the Kassirer-Bleich
   [H+]. HCO3 is computed when not given (``consistency`` is then "consistent" by construction). An
   **inconsistent** triple gets an urgent finding and a provisional reading only: the physiological rules are
   applied to the measured pH and PCO2 (an analyser's HCO3 is derived from those two, so they are the pair
   least likely to be mistyped or to come from another sample) and the interpretation says it rests on
   doubtful data; the gap, base-excess and Stewart cross-checks are not used to add disorders on doubtful
   data.
3. Primary process (pH < 7.35 acidaemia, > 7.45 alkalaemia; HCO3 < 22 or > 26; PCO2 > 45 or < 35). When both
   processes point the same way, the larger contribution to [H+] (|log10(PCO2/40)| against |log10(24/HCO3)|)
   is called primary; at a normal pH the side of 7.40 chooses (common practice). With a pH outside normal but
   PCO2 and HCO3 inside their ranges the same contribution rule names a tentative primary (finding
   ``borderline_values``).
4. Compensation (Boston rules: albert1967, narins1980): Winters' formula; metabolic alkalosis 0.7 per
   mmol/L +/- 5; respiratory acidosis 1 (acute) and 3.5 (chronic) per 10 mmHg, alkalosis 2 and 4, with the
   alternative published slopes shown as the band of ``expected_hco3``. A second, metabolic, disorder is named
   only when the measured HCO3 lies beyond the acute-to-chronic range by more than max(2 mmol/L, 0.2 x the
   acute-chronic span) -- the 0.2 is the published fraction-acute band (f > 1.2 / f < -0.2), the 2 mmol/L
   floor keeps analyser scatter from naming a disorder when PaCO2 is only just abnormal (Tidewell convention).
5. Fraction acute by the HCO3 rules (used for the call) and by the pH rules (shown; they drift above a rise of
   about 30 mmHg, berend2014). With ``baseline_pco2`` the chronicity comes from the baseline instead. A
   respiratory disorder always carries a chronicity word (the contract keeps null for metabolic ones); when it
   cannot be judged (PaCO2 within 5 mmHg of 40, or a concurrent metabolic disorder moving the HCO3) the word
   is what the HCO3 rules alone say, ``fraction_acute`` is null and a finding says so; a respiratory disorder
   concurrent to a metabolic primary is "acute" by convention unless a baseline is given.
6. Anion gap (with and without K, albumin-corrected with a settable normal albumin), delta ratio (Brandis
   bands) and delta gap. An albumin-corrected gap of 20 mmol/L or more names a high-anion-gap metabolic
   acidosis whatever the HCO3 (Gabow 1980, from memory); with no other primary it becomes the primary. With a
   respiratory primary the pre-acid HCO3 (HCO3 + (AG - 12)) is compared with the respiratory expectation
   instead of 24, which is how a triple disorder is found; with a metabolic primary the Brandis delta-ratio
   bands are used as published.
7. Copenhagen (SBE, CLSI form) and Stewart (SIDa/SIDe/SIG with Figge terms; Story 2016 partition, 2004 shown)
   side by side: one finding says where the three readings of the metabolic component agree or differ; none is
   declared right. SBE readings use +/- 3 mmol/L; a Stewart effect counts as a process at 5 mEq/L or more.
8. Ventilation safety: ``pco2_target`` (known baseline; else the baseline estimated by inverting the two
   respiratory rules; else the normal upper limit 45 mmHg; in a metabolic acidosis or alkalosis with a
   concurrent respiratory acidosis, the compensating PaCO2 of that disorder), ``pco2_alkalaemia_floor`` (the
   PaCO2 at which a quick fall would bring pH to 7.45 at the present HCO3), NIV thresholds (BTS/ICS 2016) and
   the PaCO2 above which consciousness commonly falls (75 / 90 mmHg; with a known baseline, baseline + 35).
9. Oxygenation when PO2 is given (not for venous samples): alveolar PO2 (simple equation; the full one shown),
   A-a gradient against age/4 + 4, a/A, P/F, respiratory failure type, and the key reading for hypercapnia
   (normal A-a: pure hypoventilation; raised: lung disease as well).
10. Temperature (alpha-stat interprets the 37 degC values; the corrected values are shown as the pH-stat
    view); SpO2 target (BTS 2017: 88-92 % when at risk of hypercapnic failure or hypercapnic on this arterial
    or capillary sample, else 94-98 %).

The P/F ratio (PaO2 / FiO2) and a/A ratio (PaO2 / PAO2, left out when PAO2 is not positive) are computed in
:func:`decide`, so that this module calls only the oxygenation functions that are settled
(``alveolar_po2_simple``, ``alveolar_po2_full``, ``aa_gradient_upper_by_age``). Those are scalar, validated
functions of formulas.oxygenation: on arrays :func:`tidewell.arrays.each` calls them once per distinct set of
arguments.

The consciousness threshold (clinical change with the batch work): without a known baseline, chronic retention
is read from the PaCO2 and HCO3 alone (PaCO2 above 45 mmHg, the HCO3 rules reading chronic or
acute-on-chronic, no metabolic acidosis named), no longer only when respiratory acidosis is the primary call,
which flips at pH 7.40: at a fixed HCO3 the threshold now never rises as the PaCO2 rises.

Optional inputs beyond the contract: ``ca_ionised``, ``mg`` (Stewart), ``normal_albumin`` (g/dL, default 4.0),
``rq`` (default 0.8). Every output name is listed in docs/glossary/acidbase.md.
"""

from __future__ import annotations

from types import SimpleNamespace

from ...fields import Inputs
from ...report import Report
from .compensation import (
    _classify,
    _finish_chronicity,
    decide_chronicity,
    decide_compensation,
    primary_process,
)
from .consistency import _core, _input_findings, decide_consistency
from .decision import DISORDER_CODES, FINDING_ORDER, SEVERITY, Decision, decide_inputs, disorders, findings
from .gaps import (
    _compare,
    _copenhagen,
    _gap_outputs_only,
    _gaps,
    _stewart,
    decide_copenhagen,
    decide_gaps,
    decide_metabolic_readings,
    decide_stewart,
)
from .oxygenation import _oxygenation, decide_oxygenation
from .reading import FIELDS, INPUT_KEYS, NUMERIC_FIELDS, _Sample
from .summary import _cautions, _outputs, _summary
from .targets import _severity, _spo2_target, _ventilation, decide_pco2_aim, decide_spo2_target
from .temperature import _temperature
from .thresholds import (
    HYPERCAPNIA_MMHG,
    HYPOXAEMIA_MMHG,
    MET_ACID,
    MET_ALK,
    NAMES,
    RESP_ACID,
    RESP_ALK,
    SITES,
)
from .work import _Work

__all__ = [
    "DISORDER_CODES",
    "FIELDS",
    "FINDING_ORDER",
    "HYPERCAPNIA_MMHG",
    "HYPOXAEMIA_MMHG",
    "INPUT_KEYS",
    "MET_ACID",
    "MET_ALK",
    "NAMES",
    "NUMERIC_FIELDS",
    "RESP_ACID",
    "RESP_ALK",
    "SEVERITY",
    "SITES",
    "Decision",
    "blood_gas",
    "decide",
    "disorders",
    "findings",
    "primary_process",
]


def decide(x) -> Decision:
    """Every decision of the blood_gas interpretation, for one sample or for arrays of samples.

    ``x`` has the attributes of :data:`NUMERIC_FIELDS` (pressures in mmHg, concentrations in mmol/L, albumin
    and normal albumin in g/dL, temperature in degC; NaN when not given), ``site`` (word),
    ``hypercapnia_risk`` (bool) and the reading flags ``mix_up``, ``unusual`` and ``pb_and_altitude``
    (bool). Floats give a :class:`Decision` of floats, words and bools; numpy arrays (numpy loaded by the
    caller) give arrays.
    :func:`blood_gas` builds its report on the scalar answer; the batch audit and the uncertainty calculation
    use the array answer, so all three apply the same rules by construction.
    """
    v = SimpleNamespace(x=x)
    decide_inputs(v)
    decide_consistency(v)
    decide_compensation(v)
    decide_gaps(v)
    decide_chronicity(v)
    decide_copenhagen(v)
    decide_stewart(v)
    decide_metabolic_readings(v)
    decide_pco2_aim(v)
    decide_oxygenation(v)
    decide_spo2_target(v)
    return v.d


# -- the calculation -----------------------------------------------------------------------------------------


def blood_gas(inputs: Inputs, report: Report) -> None:
    """Interpret one blood-gas sample (docs/bridge.md); see the module docstring for the rules."""
    s = _Sample(inputs, pressure_unit=report.pressure_unit)
    w = _Work(s, report, decide(s.values()))
    _input_findings(w)
    _core(w)
    _classify(w)
    if not w.doubtful:
        _gaps(w)
        _finish_chronicity(w)
        _copenhagen(w)
        _stewart(w)
        _compare(w)
    else:
        _gap_outputs_only(w)
        _finish_chronicity(w)
    _ventilation(w)
    _oxygenation(w)
    _temperature(w)
    _spo2_target(w)
    _severity(w)
    _outputs(w)
    _cautions(w)
    _summary(w)
