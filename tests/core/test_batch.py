"""The batch audit (tidewell.frontends.batch): every row equals the scalar bridge, and the CSV edge cases.

The rules themselves are checked against their published sources in test_acidbase.py and test_blood_gas.py;
here the scalar bridge is the reference: one implementation of each rule (blood_gas.decide and the reader's
field table) must give the same answer on arrays as on one sample. Rows are generated with a seeded random
generator over plausible clinical ranges, with the decision thresholds themselves (pH 7.35, PCO2 45 mmHg,
HCO3 22 and 26 mmol/L, PO2 60 mmHg ...) and the reader's limits mixed in, in every accepted unit; some rows
are deliberately bad.
"""

from __future__ import annotations

import csv
import io
import json
import math
import random
from collections import Counter
from pathlib import Path
from types import SimpleNamespace

import numpy as np
import pytest

import compare
from conftest import load_cases
from tidewell import bridge, units
from tidewell.calculations import blood_gas
from tidewell.calculations.blood_gas import reading
from tidewell.errors import InputErrors
from tidewell.fields import Inputs
from tidewell.frontends import batch

KPA = units.convert(1.0, "kPa", "mmHg")


def q(value, unit):
    return {"value": value, "unit": unit}


def _pick(rng, *choices):
    return rng.choice(choices)


def generate_sample(rng: random.Random) -> dict:
    """One blood_gas ``inputs`` object: plausible, with thresholds and limits mixed in (some are bad)."""
    r = rng.random
    ph = _pick(
        rng,
        rng.uniform(6.9, 7.7),
        rng.uniform(7.30, 7.50),
        _pick(rng, 7.35, 7.45, 7.40, 7.20, 7.60, 7.25, 7.349, 7.451, 6.5, 8.0, 6.49),
    )
    pco2 = _pick(
        rng,
        rng.uniform(15, 130),
        rng.uniform(30, 60),
        _pick(rng, 35.0, 45.0, 40.0, 41.0, 39.0, 48.75, 75.0, 90.0, 8.0, 250.0, 7.9, 14.0),
    )
    inputs = {"ph": round(ph, _pick(rng, 2, 3, 6))}
    inputs["pco2"] = (
        q(round(pco2 / KPA, _pick(rng, 1, 2, 6)), "kPa")
        if r() < 0.35
        else q(round(pco2, _pick(rng, 0, 1)), "mmHg")
    )
    implied = 0.0307 * pco2 * 10 ** (ph - 6.1)
    if r() < 0.75:
        kind = r()
        if kind < 0.7:
            hco3 = implied * (1 + rng.gauss(0, 0.02))
        elif kind < 0.85:
            hco3 = rng.uniform(3, 60)
        else:
            hco3 = _pick(rng, 22.0, 26.0, 24.0, 23.5, 21.9, 26.1, 1.0, 70.0)
        inputs["hco3"] = q(round(min(max(hco3, 0.5), 75.0), _pick(rng, 1, 2)), _pick(rng, "mmol/L", "mEq/L"))
    fio2 = 0.21
    if r() < 0.5:
        fio2 = _pick(rng, 0.21, 0.24, 0.28, 0.3, 0.35, 0.4, 0.6, 1.0, round(rng.uniform(0.21, 1.0), 2))
        inputs["fio2"] = fio2 if r() < 0.7 else q(round(fio2 * 100, 1), "%")
    site = _pick(rng, *(["arterial"] * 6), "venous", "capillary")
    if r() < 0.5:
        inputs["sample"] = site
    altitude = 0.0
    if r() < 0.1:
        altitude = round(rng.uniform(0, 4500), 0)
        inputs["altitude"] = q(altitude, "m") if r() < 0.5 else q(round(altitude / 0.3048), "ft")
    if r() < 0.55:
        pio2 = fio2 * (760.0 * math.exp(-altitude / 8400.0) - 47.0)
        room = pio2 - pco2 / 0.8
        po2 = rng.uniform(25, max(30.0, room)) if room > 30 else rng.uniform(20, 30)
        if r() < 0.08:
            po2 = _pick(rng, 60.0, 59.9, 15.0, 24.0, 14.0)
        inputs["po2"] = q(round(po2, 1), "mmHg") if r() < 0.6 else q(round(po2 / KPA, 2), "kPa")
    if r() < 0.45:
        inputs["na"] = q(round(rng.uniform(120, 160)), "mmol/L")
        inputs["cl"] = q(round(rng.uniform(80, 125)), "mmol/L")
        if r() < 0.5:
            inputs["k"] = q(round(rng.uniform(2.5, 7), 1), "mmol/L")
        if r() < 0.5:
            inputs["albumin"] = (
                q(round(rng.uniform(15, 50)), "g/L")
                if r() < 0.5
                else q(round(rng.uniform(1.5, 5), 1), "g/dL")
            )
        if r() < 0.3:
            inputs["lactate"] = q(round(rng.uniform(0.5, 35), 1), _pick(rng, "mmol/L", "mmol/L", "mg/dL"))
        if r() < 0.2:
            inputs["phosphate"] = q(round(rng.uniform(0.5, 3), 2), "mmol/L")
        if r() < 0.15:
            inputs["ca_ionised"] = q(round(rng.uniform(0.8, 1.5), 2), "mmol/L")
        if r() < 0.15:
            inputs["mg"] = q(round(rng.uniform(0.5, 1.5), 2), "mmol/L")
        if r() < 0.3:
            inputs["glucose"] = (
                q(round(rng.uniform(3, 120), 1), "mmol/L")
                if r() < 0.5
                else q(round(rng.uniform(60, 900)), "mg/dL")
            )
            if r() < 0.5:
                inputs["urea"] = q(round(rng.uniform(2, 90), 1), "mmol/L")
            else:
                inputs["bun"] = q(round(rng.uniform(5, 100)), "mg/dL")
            if r() < 0.6:
                inputs["measured_osmolality"] = q(round(rng.uniform(270, 380)), "mOsm/kg")
        if r() < 0.1:
            inputs["normal_albumin"] = q(round(rng.uniform(3.5, 4.6), 1), "g/dL")
    if r() < 0.15:
        inputs["base_excess"] = q(round(rng.uniform(-25, 25), 1), "mmol/L")
    if r() < 0.15:
        inputs["hb"] = (
            q(round(rng.uniform(6, 18), 1), "g/dL") if r() < 0.7 else q(round(rng.uniform(60, 180)), "g/L")
        )
    if r() < 0.25:
        inputs["spo2"] = _pick(rng, round(rng.uniform(70, 100)), 88, 92, 94, 98)
    if r() < 0.45:
        inputs["age"] = round(rng.uniform(16, 95))
    if r() < 0.1:
        inputs["temperature"] = q(round(rng.uniform(30, 41), 1), "degC") if r() < 0.7 else q(96.8, "degF")
    if r() < 0.05:
        inputs["pb"] = q(round(rng.uniform(600, 1050)), _pick(rng, "mmHg", "hPa"))
    if r() < 0.25:
        inputs["baseline_pco2"] = (
            q(round(rng.uniform(35, 80)), "mmHg") if r() < 0.7 else q(round(rng.uniform(4.5, 10), 1), "kPa")
        )
    if r() < 0.3:
        inputs["hypercapnia_risk"] = r() < 0.6
    if r() < 0.05:
        inputs["rq"] = round(rng.uniform(0.7, 1.0), 2)
    return inputs


def _cell(value, column_unit):
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, dict):
        shown = repr(float(value["value"]))
        return shown if value["unit"] == column_unit else f"{shown} {value['unit']}"
    return value if isinstance(value, str) else repr(value)


def to_csv(samples: list[dict], rng: random.Random, *, units_row: bool = False) -> str:
    """Samples as CSV: an id column, units in the header (the commonest unit), other units in the cells."""
    keys = [f.key for f in blood_gas.FIELDS if any(f.key in s for s in samples)]
    column_unit = {}
    for key in keys:
        found = [s[key]["unit"] for s in samples if isinstance(s.get(key), dict)]
        only_quantities = all(isinstance(s[key], dict) for s in samples if key in s)
        column_unit[key] = max(set(found), key=found.count) if found and only_quantities else None
    out = io.StringIO()
    writer = csv.writer(out)
    if units_row:
        writer.writerow(["id", *keys])
        writer.writerow(["", *(column_unit[k] or "" for k in keys)])
    else:
        writer.writerow(["id", *(f"{k}[{column_unit[k]}]" if column_unit[k] else k for k in keys)])
    for n, sample in enumerate(samples):
        writer.writerow(
            [f"S{n:05d}", *(_cell(sample[k], column_unit[k]) if k in sample else "" for k in keys)]
        )
    return out.getvalue()


def expected_row(response: dict, pressure_unit: str = "mmHg") -> dict:
    """The batch output columns as the scalar bridge response gives them (the P/F ratio, which the bridge
    gives in mmHg, in the batch's pressure unit)."""
    o, findings = response["outputs"], response["findings"]
    ds = o["disorders"]
    respiratory = [d for d in ds if d["code"].startswith("respiratory")]

    def value(name):
        return o[name]["value"] if name in o else None

    spo2_codes = {f["code"] for f in findings} & {"spo2_below_target", "spo2_above_target"}
    return {
        "ph_status": o["ph_status"],
        "pco2_status": o["pco2_status"],
        "consistency": o["consistency"],
        "primary_disorder": ds[0]["code"] if ds else None,
        "disorders": " ".join(d["code"] for d in ds),
        "respiratory_chronicity": respiratory[0]["chronicity"] if respiratory else None,
        "fraction_acute": respiratory[0]["fraction_acute"] if respiratory else None,
        "hco3": value("hco3"),
        "hco3_computed": value("hco3_computed"),
        "standard_base_excess": value("standard_base_excess"),
        "expected_pco2_low": o["expected_pco2"]["low"]["value"] if "expected_pco2" in o else None,
        "expected_pco2_high": o["expected_pco2"]["high"]["value"] if "expected_pco2" in o else None,
        "anion_gap": value("anion_gap"),
        "anion_gap_corrected": value("anion_gap_corrected"),
        "delta_ratio": o.get("delta_ratio"),
        "metabolic_acidosis_type": o.get("metabolic_acidosis_type"),
        "osmolar_gap": value("osmolar_gap"),
        "strong_ion_gap": value("strong_ion_gap"),
        "pao2_alveolar": value("pao2_alveolar"),
        "a_a_gradient": value("a_a_gradient"),
        "a_a_category": o.get("a_a_category"),
        "pf_ratio": None
        if "pf_ratio" not in o
        else units.convert(o["pf_ratio"]["value"], o["pf_ratio"]["unit"], pressure_unit),
        "respiratory_failure": o.get("respiratory_failure"),
        "spo2_target": f"{o['spo2_target']['low']}-{o['spo2_target']['high']}",
        "spo2_on_target": None,  # filled below when an SpO2 was given
        "niv_criteria": o["niv_criteria"],
        "pco2_target": value("pco2_target"),
        "pco2_target_basis": o.get("pco2_target_basis"),
        "pco2_consciousness_threshold": value("pco2_consciousness_threshold"),
        "findings": " ".join(f["code"] for f in findings),
        "urgent_findings": " ".join(f["code"] for f in findings if f["severity"] == "urgent"),
        "_spo2": "below" if "spo2_below_target" in spo2_codes else "above" if spo2_codes else "within",
    }


def assert_rows_equal_scalar(
    table: batch.Table, audit: batch.Audit, *, pressure_unit: str = "mmHg", checked: int | None = None
) -> dict:
    """Every row of ``audit`` equals the scalar bridge's answer to that row's inputs; returns counts.

    The first ``checked`` responses (all by default) also go through the session's contract hook
    (tests/conftest.py); the rest skip it, so thousands of rows stay quick (the hook checks the schema,
    which other tests cover; the scalar answer itself is the same either way).
    """
    hooks = list(bridge.RESPONSE_HOOKS)
    try:
        return _rows_equal_scalar(table, audit, pressure_unit, checked)
    finally:
        bridge.RESPONSE_HOOKS[:] = hooks


def _scalar_row(inputs: dict, pressure_unit: str):
    """The batch row the scalar bridge gives for ``inputs`` (None when it refuses them)."""
    request = {"calc": "blood_gas", "inputs": inputs, "options": {"pressure_unit": pressure_unit}}
    response = bridge.handle_obj(request)
    if not response["ok"]:
        return None
    want = expected_row(response, pressure_unit)
    spo2 = want.pop("_spo2")
    if "spo2" in inputs:
        want["spo2_on_target"] = spo2
    row = {name: None if want[name] == "" else want[name] for name in batch.OUTPUT_NAMES}
    row["findings"] = [f["code"] for f in response["findings"]]
    return row


def _rows_equal_scalar(table, audit, pressure_unit, checked) -> dict:
    counts = {"ok": 0, "errors": 0}
    # numbers to REL_SAME_ENGINE (numpy's SIMD kernels vs CPython's libm), words and codes exactly; a row
    # within that tolerance of a threshold may be read as the bridge reads its inputs nudged by it
    same = compare.tally(compare.REL_SAME_ENGINE)
    for i in range(len(table)):
        inputs = batch.row_inputs(table, i)
        if checked is not None and i >= checked:
            bridge.RESPONSE_HOOKS[:] = []
        where = f"row {i} {json.dumps(inputs)}"
        if i in table.shifted:  # cells beyond the header: refused by the batch before any reading
            counts["errors"] += 1
            assert audit.errors[i] and "shifted" in audit.errors[i][0], where
            assert not any(audit.present[name][i] for name in batch.OUTPUT_NAMES), where
            continue
        request = {"calc": "blood_gas", "inputs": inputs, "options": {"pressure_unit": pressure_unit}}
        response = bridge.handle_obj(request)
        if not response["ok"]:
            counts["errors"] += 1
            assert audit.errors[i] == [batch._csv_message(e["message"]) for e in response["errors"]], where
            assert not any(audit.present[name][i] for name in batch.OUTPUT_NAMES), where
            continue
        counts["ok"] += 1
        assert audit.errors[i] == [], where
        got = {name: audit.value(name, i) for name in batch.OUTPUT_NAMES}
        got = {name: None if value == "" else value for name, value in got.items()}
        got["findings"] = audit.findings(i)
        same.check(
            got,
            _scalar_row(inputs, pressure_unit),
            where,
            lambda inputs=inputs: (
                _scalar_row(moved, pressure_unit)
                for moved in compare.nudged(inputs, compare.REL_SAME_ENGINE, keep=NOT_MEASURED)
            ),
        )
    return counts


# counts, flags and ages are not measured with a last-digit error: they are never nudged
NOT_MEASURED = ("age",)


# -- batch equals scalar -------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("seed", "rows", "pressure_unit", "units_row"), [(1, 2500, "mmHg", False), (2, 1500, "kPa", True)]
)
def test_batch_equals_scalar_row_by_row(seed, rows, pressure_unit, units_row):
    rng = random.Random(seed)
    samples = [generate_sample(rng) for _ in range(rows)]
    table = batch.read_table(to_csv(samples, rng, units_row=units_row))
    assert len(table) == rows
    for i in (0, rows // 2, rows - 1):  # the CSV round trip gives back the generated request
        # a row without a site is sent as the batch reads it: as a venous sample (batch.SITE_NOT_GIVEN)
        assert batch.row_inputs(table, i) == {"sample": "venous", **_canonical(samples[i])}
    audit = batch.interpret_table(table, pressure_unit=pressure_unit)
    counts = assert_rows_equal_scalar(table, audit, pressure_unit=pressure_unit, checked=200)
    # the generator exercises both paths: plainly valid rows on arrays and refused rows
    assert counts["ok"] > 0.6 * rows and counts["errors"] > 0.02 * rows, counts
    assert audit.scalar_rows >= counts["errors"]


def _canonical(sample: dict) -> dict:
    out = {}
    for key, value in sample.items():
        if isinstance(value, dict):
            out[key] = {"value": float(value["value"]), "unit": value["unit"]}
        elif isinstance(value, (int, float)) and not isinstance(value, bool):
            out[key] = float(value)
        else:
            out[key] = value
    return out


def test_every_finding_code_is_exercised_by_the_generator():
    """The equality test only means something if the generated rows reach every decision."""
    rng = random.Random(1)
    samples = [generate_sample(rng) for _ in range(2500)]
    audit = batch.interpret_table(batch.read_table(to_csv(samples, rng)))
    seen = set()
    for i in range(audit.n):
        seen.update(audit.findings(i))
    missing = set(blood_gas.FINDING_ORDER) - seen
    assert len(missing) <= 3, f"finding codes the generator never reaches: {sorted(missing)}"
    disorders = {audit.value("disorders", i) for i in range(audit.n) if not audit.errors[i]}
    assert len(disorders) >= 20  # single, double and triple disorders in many orders


def _decided(sample) -> dict:
    """blood_gas.decide for one sample as plain values (dicts, lists, floats, words)."""
    return compare.plain(vars(blood_gas.decide(sample)))


def _sample_row(together, j: int, n: int):
    """Sample ``j`` of the array answer of blood_gas.decide, in the shape of the scalar answer."""

    def pick(value):
        if isinstance(value, dict):
            return {k: pick(v) for k, v in value.items()}
        if isinstance(value, tuple):
            return [pick(v) for v in value]
        return np.broadcast_to(np.asarray(value), (n,))[j].item()

    return {name: pick(value) for name, value in vars(together).items()}


def _nudged_samples(sample, rel: float):
    """The scalar sample with its measured values moved by ``rel`` (all up, all down, each alone)."""
    measured = {k: v for k, v in vars(sample).items() if type(v) is float and math.isfinite(v) and k != "age"}
    for moved in compare.nudged(measured, rel):
        yield SimpleNamespace(**{**vars(sample), **moved})


def test_decide_on_arrays_is_decide_on_each_sample():
    """blood_gas.decide: the array answer is the scalar answer for every sample: numbers to a relative
    1e-12 (numpy's SIMD power and log differ from CPython's libm in the last place on some CPUs), words,
    codes and flags exactly; a sample within that tolerance of a threshold may take the reading the scalar
    path gives for its values nudged by the tolerance, and is counted in the session summary."""
    rng = random.Random(3)
    samples = []
    while len(samples) < 600:
        try:
            samples.append(reading._Sample(Inputs(generate_sample(rng))).values())
        except InputErrors:
            continue
    arrays = type(samples[0])(**{k: np.array([getattr(s, k) for s in samples]) for k in vars(samples[0])})
    with np.errstate(all="ignore"):
        together = blood_gas.decide(arrays)
    same = compare.tally(compare.REL_SAME_ENGINE)
    for j, sample in enumerate(samples):
        same.check(
            _sample_row(together, j, len(samples)),
            _decided(sample),
            f"sample {j}",
            lambda sample=sample: (_decided(s) for s in _nudged_samples(sample, same.rel)),
        )
    assert same.compared == len(samples)


# -- worked cases through the batch --------------------------------------------------------------------------


def test_worked_cases_through_a_csv():
    """Published worked cases (tests/cases/reference_cases.json) read from a CSV give their expected calls."""
    cases = load_cases()
    text = (
        "id,ph,pco2[mmHg],hco3[mmol/L],na[mmol/L],cl[mmol/L],po2[mmHg],fio2,age,sample\n"
        "AB-01,7.28,26,12,140,100,,,,arterial\n"
        "AB-03,7.25,60,26,,,,,,arterial\n"
        "AB-04,7.33,60,31,,,,,,arterial\n"
        "AB-05,7.24,70,29.7,,,,,,arterial\n"
        "AB-06,7.50,47,36,138,90,,,,arterial\n"
        "AB-08,7.30,40,28,,,,,,arterial\n"
        "AB-09,7.16,80,28,,,48,0.21,30,arterial\n"
        "AB-10,7.33,60,31,,,45,0.21,65,arterial\n"
    )
    table = batch.read_table(text)
    audit = batch.interpret_table(table)
    row = {table.rows[i][0]: i for i in range(len(table))}
    # AB-01 (high anion gap metabolic acidosis, appropriate compensation): AG 28.0, SBE -14.74 (source: the
    # case's own, e.g. Winters 1967 and the CLSI SBE form; derived from the cited equations)
    i = row["AB-01"]
    assert audit.value("anion_gap", i) == pytest.approx(cases["AB-01"]["expected"]["ag_mmol_L"], abs=0.05)
    assert audit.value("standard_base_excess", i) == pytest.approx(
        cases["AB-01"]["expected"]["sbe_clsi_mmol_L"], abs=cases["AB-01"]["tolerance"]["sbe_clsi_mmol_L"]
    )
    assert audit.value("disorders", i) == "metabolic_acidosis"
    assert audit.value("metabolic_acidosis_type", i) == "high_anion_gap"
    # AB-03 acute, AB-04 chronic, AB-05 acute-on-chronic respiratory acidosis (Narins & Emmett 1980 slopes)
    assert audit.value("respiratory_chronicity", row["AB-03"]) == "acute"
    assert audit.value("respiratory_chronicity", row["AB-04"]) == "chronic"
    assert audit.value("respiratory_chronicity", row["AB-05"]) == "acute_on_chronic"
    # AB-05 meets the BTS/ICS 2016 NIV thresholds (case AB-05 expected "meets criteria")
    assert cases["AB-05"]["expected"]["niv_bts_ics"] == "meets criteria"
    assert audit.value("niv_criteria", row["AB-05"]) == "met"
    assert audit.value("fraction_acute", row["AB-05"]) == pytest.approx(
        cases["AB-05"]["expected"]["fraction_acute_hco3_rule"], abs=0.01
    )
    # AB-06 metabolic alkalosis with appropriate respiratory compensation (expected PaCO2 43.4 to 53.4)
    i = row["AB-06"]
    assert audit.value("disorders", i) == "metabolic_alkalosis"
    assert audit.value("expected_pco2_low", i) == pytest.approx(
        cases["AB-06"]["expected"]["expected_low_mmHg"], abs=0.1
    )
    assert audit.value("expected_pco2_high", i) == pytest.approx(
        cases["AB-06"]["expected"]["expected_high_mmHg"], abs=0.1
    )
    # AB-08 internally inconsistent report
    assert audit.value("consistency", row["AB-08"]) == "inconsistent"
    assert "inconsistent_triple" in audit.findings(row["AB-08"])
    # AB-09 normal A-a gradient (pure hypoventilation), AB-10 raised; AB-10 SpO2 target 88-92 (BTS 2017)
    assert audit.value("a_a_gradient", row["AB-09"]) == pytest.approx(
        cases["AB-09"]["expected"]["aa_gradient_mmHg"], abs=cases["AB-09"]["tolerance"]["aa_gradient_mmHg"]
    )
    assert audit.value("a_a_category", row["AB-09"]) == cases["AB-09"]["expected"]["aa_category"]
    assert audit.value("a_a_category", row["AB-10"]) == cases["AB-10"]["expected"]["aa_category"]
    assert audit.value("spo2_target", row["AB-10"]) == cases["AB-10"]["expected"]["o2_target_pct"]
    assert_rows_equal_scalar(table, audit)


# -- CSV edge cases ------------------------------------------------------------------------------------------


def _audit(text: str, **kw):
    table = batch.read_table(text)
    return table, batch.interpret_table(table, **kw)


def test_missing_required_column_is_refused_with_a_hint():
    with pytest.raises(batch.TableError, match=r"no 'pco2' column \('pc02\[kPa\]' looks like it"):
        batch.read_table("ph,pc02[kPa]\n7.3,8\n")
    with pytest.raises(batch.TableError, match="no 'ph' column"):
        batch.read_table("pco2[kPa]\n8\n")


def test_missing_optional_columns_and_empty_cells_mean_not_given():
    table, audit = _audit(
        "id,ph,pco2[kPa],hco3[mmol/L],na,cl\n"
        "a,7.24,9.3,29.7,,\n"  # empty cells
        "b,7.24,9.3,NA,n/a,-\n"  # markers of "not given"
        "c,7.24,9.3, ,null,none\n"
    )
    venous = {"sample": "venous"}  # no site given: read as a venous sample would be
    assert batch.row_inputs(table, 0) == {
        "ph": 7.24,
        "pco2": q(9.3, "kPa"),
        "hco3": q(29.7, "mmol/L"),
        **venous,
    }
    assert batch.row_inputs(table, 1) == {"ph": 7.24, "pco2": q(9.3, "kPa"), **venous}
    assert audit.errors == [[], [], []]
    assert audit.value("consistency", 1) == "consistent" and "hco3_calculated" in audit.findings(1)
    assert audit.value("anion_gap", 0) is None
    assert_rows_equal_scalar(table, audit)


def test_mixed_units_header_cell_and_units_row():
    by_header = "ph,pco2[kPa],po2[kPa]\n7.24,9.3,7.1\n"
    by_cell = "ph,pco2,po2\n7.24,69.76 mmHg,7.1kPa\n"
    by_row = "ph,pco2,po2\n,kPa,kpa\n7.24,9.3,7.1\n"
    lower_case = "PH,PCO2[KPA],Po2 [kpa]\n7.24,9.3,7.1\n"
    for text in (by_header, by_cell, by_row, lower_case):
        table, audit = _audit(text)
        assert audit.errors == [[]], text
        assert audit.value("disorders", 0) == "respiratory_acidosis", text
        assert_rows_equal_scalar(table, audit)
    table, _ = _audit(by_row)
    assert table.units_row == ["", "kPa", "kpa"]
    mixed = batch.read_table("ph,pco2[kPa]\n7.24,9.3\n7.24,70 mmHg\n7.24,9.3kPa\n")
    assert [batch.row_inputs(mixed, i)["pco2"] for i in range(3)] == [
        q(9.3, "kPa"),
        q(70.0, "mmHg"),
        q(9.3, "kPa"),
    ]


def test_bad_rows_go_to_the_error_column_and_the_batch_goes_on():
    text = (
        "id,ph,pco2[kPa],hco3,sample,hypercapnia_risk,fio2\n"
        "ok,7.24,9.3,29.7,arterial,yes,0.28\n"
        "typo,7,24,9.3,29.7,arterial,no,0.28\n"  # a decimal comma shifts the cells
        "text,seven,9.3,29.7,arterial,no,0.28\n"
        "unit,7.24,5.3mmHg,29.7,arterial,no,0.28\n"
        "range,7.24,9.3,29.7,arterial,no,28\n"
        "word,7.24,9.3,29.7,arterail,maybe,0.28\n"
        "ok2,7.40,5.3,24,venous,no,\n"
    )
    table, audit = _audit(text)
    assert audit.errors[0] == [] and audit.errors[6] == []
    assert any("must be a number (entered: 'seven')" in m for m in audit.errors[2]), audit.errors[2]
    assert any("PCO2 5.3 mmHg" in m and "Did you mean 5.3 kPa?" in m for m in audit.errors[3]), audit.errors
    assert any("FiO2" in m and "Did you mean 28 %" in m for m in audit.errors[4]), audit.errors[4]
    # optional cells that cannot be read: the row is read without them, and its notes name them
    assert audit.errors[5] == [] and audit.value("ph_status", 5) == "acidaemia"
    assert "sample 'arterail' not read (did you mean 'arterial'?)" in audit.notes[5]
    assert "hypercapnia_risk 'maybe' not read: read without it" in audit.notes[5]
    assert audit.errors[1], "a row whose cells shifted is refused, not silently misread"
    assert "shifted" in audit.errors[1][0] and audit.error_kinds[1] == ["row: cells shifted"]
    assert_rows_equal_scalar(table, audit)
    out = io.StringIO()
    batch.write_csv(table, audit, out)
    written = list(csv.reader(io.StringIO(out.getvalue())))
    assert written[0][: len(table.header)] == table.header and written[0][-2:] == ["error", "notes"]
    assert written[1][-2:] == ["", ""] and "PCO2 5.3 mmHg" in written[4][-2]
    assert "arterail" in written[6][-1]
    assert written[3][0] == "text" and written[3][len(table.header)] == ""  # no outputs on a refused row


def test_other_columns_are_copied_and_near_misses_are_named():
    table = batch.read_table("bed,ward note,ph,pco2[kPa],hc03\n3,stable,7.3,9.3,29\n")
    assert any("'hc03'" in w and "did you mean 'hco3'" in w for w in table.warnings), table.warnings
    assert not any("'ward note'" in w for w in table.warnings)
    audit = batch.interpret_table(table)
    out = io.StringIO()
    batch.write_csv(table, audit, out)
    row = list(csv.reader(io.StringIO(out.getvalue())))[1]
    assert row[:5] == ["3", "stable", "7.3", "9.3", "29"]
    assert (
        "hco3_calculated"
        in row[len(table.header) + [n for n, _, _ in batch.OUTPUT_COLUMNS].index("findings")]
    )


def test_file_level_problems():
    with pytest.raises(batch.TableError, match="empty"):
        batch.read_table("\n\n")
    with pytest.raises(batch.TableError, match="has no unit"):
        batch.read_table("ph,pco2\n7.3,60\n7.4,40\n")
    with pytest.raises(batch.TableError, match="both name the input 'ph'"):
        batch.read_table("ph,pH,pco2[kPa]\n7.3,7.3,8\n")
    table = batch.read_table("ph,pco2[kPa]\n")  # a header alone: nothing to do, not an error
    assert len(batch.interpret_table(table).errors) == 0


def test_semicolons_quotes_short_and_long_rows_and_blank_lines():
    text = 'id;ph;pco2[kPa];hco3[mmol/L]\n"a;1";7.24;9.3;29.7\n\nb;7.24;9.3\nc;7.24;9.3;29.7;extra\n'
    table, audit = _audit(text)
    assert len(table) == 3 and table.rows[0][0] == "a;1"
    assert batch.row_inputs(table, 1) == {"ph": 7.24, "pco2": q(9.3, "kPa"), "sample": "venous"}
    assert any("line 5: 1 cell(s) beyond the last named column" in w for w in table.warnings)
    # a short row is read; a long one has shifted cells (a decimal comma, a delimiter in a cell): refused
    assert audit.errors[:2] == [[], []] and "shifted" in audit.errors[2][0]


def test_age_header_unit_years_is_the_bare_number():
    table, audit = _audit("ph,pco2[kPa],po2[kPa],age[years]\n7.3,8,7,70\n")
    assert batch.row_inputs(table, 0)["age"] == 70.0 and audit.errors == [[]]


def test_written_csv_units_and_rounding(tmp_path: Path):
    text = "id,ph,pco2[kPa],hco3[mmol/L],po2[kPa],fio2,sample\nx,7.24,9.3,29.7,7.1,28%,arterial\n"
    table, audit = _audit(text, pressure_unit="kPa")
    out = io.StringIO()
    batch.write_csv(table, audit, out)
    header, row = list(csv.reader(io.StringIO(out.getvalue())))
    values = dict(zip(header, row, strict=True))
    assert values["a_a_gradient[kPa]"] == f"{audit.value('a_a_gradient', 0):.2f}"
    assert values["hco3[mmol/L]"] == "29.7" and values["respiratory_chronicity"] == "acute_on_chronic"
    full = io.StringIO()
    batch.write_csv(table, audit, full, full_precision=True)
    row = list(csv.reader(io.StringIO(full.getvalue())))[1]
    assert float(dict(zip(header, row, strict=True))["hco3_computed[mmol/L]"]) == audit.value(
        "hco3_computed", 0
    )


def test_summary_counts_match_the_rows():
    rng = random.Random(9)
    samples = [generate_sample(rng) for _ in range(400)]
    _, audit = _audit(to_csv(samples, rng))
    counts = batch.summary(audit)
    ok = [i for i in range(audit.n) if not audit.errors[i]]
    assert counts["rows"] == 400 and counts["interpreted"] == len(ok)
    assert counts["with_errors"] == sum(1 for e in audit.errors if e)
    for code in blood_gas.DISORDER_CODES:
        want = sum(1 for i in ok if code in (audit.value("disorders", i) or "").split())
        assert counts["disorders"].get(code, 0) == want
    want = sum(1 for i in ok if "niv_criteria_met" in audit.findings(i))
    assert counts["findings"].get("niv_criteria_met", 0) == want
    assert counts["niv_criteria"].get("met", 0) == sum(
        1 for i in ok if audit.value("niv_criteria", i) == "met"
    )
    assert sum(counts["chronicity"].values()) == sum(
        1 for i in ok if audit.value("respiratory_chronicity", i)
    )
    text = batch.summary_text(counts)
    assert "Disorders" in text and "Findings (of" in text and "Chronicity" in text


def test_progress_bar_only_on_a_terminal_or_when_asked(tmp_path: Path):
    source = tmp_path / "in.csv"
    source.write_text("ph,pco2[kPa]\n7.24,9.3\n7.40,5.3\n", encoding="utf-8")

    class Stream(io.StringIO):
        def __init__(self, tty):
            super().__init__()
            self.tty = tty

        def isatty(self):
            return self.tty

    for tty, asked, shown in (
        (False, None, False),
        (True, None, True),
        (False, True, True),
        (True, False, False),
    ):
        err, out = Stream(tty), io.StringIO()
        batch.run(str(source), str(tmp_path / "out.csv"), progress=asked, stdout=out, stderr=err)
        assert ("[" in err.getvalue() and "rows/s" in err.getvalue()) is shown, (tty, asked)
        assert "Rows: 2; interpreted: 2" in out.getvalue()
    assert (tmp_path / "out.csv").read_text(encoding="utf-8").count("\n") == 3


def test_progress_moves_per_chunk(monkeypatch):
    monkeypatch.setattr(batch, "CHUNK", 2)
    seen = []
    table = batch.read_table("ph,pco2[kPa]\n" + "7.24,9.3\n" * 5)
    batch.interpret_table(table, progress=lambda done, total: seen.append((done, total)))
    assert seen == [(2, 5), (4, 5), (5, 5)]


def test_consciousness_threshold_never_rises_with_pco2_on_a_dense_grid():
    """At a fixed HCO3 a higher PaCO2 never lowers the alarm: the threshold (75 mmHg, 90 in chronic retention;
    common practice) is non-increasing in PaCO2, whichever disorder is called primary (that call flips at pH
    7.40). A dense grid is cheap on the batch path; every row is also checked against the scalar bridge."""
    rows = ["ph,pco2[mmHg],hco3[mmol/L]"]
    grid = []
    for hco3 in (24.0, 30.0, 38.0, 47.0, 60.0, 69.0):
        for tenths in range(460, 2500, 7):
            pco2 = tenths / 10
            ph = 6.1 + math.log10(hco3 / (0.0307 * pco2))
            if 6.5 <= ph <= 8.0:
                rows.append(f"{ph!r},{pco2!r},{hco3!r}")
                grid.append((hco3, pco2))
    table, audit = _audit("\n".join(rows) + "\n")
    assert not any(audit.errors)
    last: dict = {}
    for i, (hco3, pco2) in enumerate(grid):
        threshold = audit.value("pco2_consciousness_threshold", i)
        flagged = "pco2_above_consciousness_threshold" in audit.findings(i)
        if hco3 in last:
            previous_threshold, previous_flag = last[hco3]
            assert threshold <= previous_threshold, (hco3, pco2)
            assert flagged or not previous_flag, (hco3, pco2)
        last[hco3] = (threshold, flagged)
    assert_rows_equal_scalar(table, audit, checked=50)


def test_written_csv_quotes_like_the_csv_module():
    text = 'id,note,ph,pco2[kPa]\n"a,1","said ""stable""",7.24,9.3\n"b\nc",plain,7.40,5.3mmHg\n'
    table, audit = _audit(text)
    out = io.StringIO()
    batch.write_csv(table, audit, out)
    parsed = list(csv.reader(io.StringIO(out.getvalue())))
    assert parsed[1][:4] == ["a,1", 'said "stable"', "7.24", "9.3"]
    assert parsed[2][0] == "b\nc" and "Did you mean 5.3 kPa?" in parsed[2][-2]
    reference = io.StringIO()
    csv.writer(reference, lineterminator="\n").writerows(parsed)
    assert out.getvalue() == reference.getvalue()


# -- the quick paths of the reader and the writer give what the csv module and the plain loops give ----------


PLAIN_TEXTS = [
    "id,ph,pco2[kPa],hco3[mmol/L]\na,7.24,9.3,29.7\nb,7.40,5.3,24\n",
    "id,ph,pco2[kPa],hco3[mmol/L]\r\na,7.24,9.3,29.7\r\n\r\nb,7.40,5.3,24\r\n",  # CRLF, a blank line
    "id,ph,pco2[kPa],hco3[mmol/L]\n,,,\n  ,  , ,\na,7.24,9.3,29.7\n,7.30,8.0,30\n b ,7.4 , 5.3,24",  # blanks
    "id,ph,pco2,hco3\n,,kPa,mmol/L\na,7.24,9.3,29.7\n",  # a units row
    "id,ph,pco2[kPa]\na,7.24\nb,7.40,5.3,extra\n",  # short and long rows: the csv module's business
    "\n\nid,ph,pco2[kPa]\n\u00a0,7.24,9.3\nc,-nan,9.3\nd,7.3,+inf\ne,NaN,9.3\n",
]


@pytest.mark.parametrize("text", PLAIN_TEXTS)
def test_plain_reader_is_the_csv_module_reader(text, monkeypatch):
    quick = batch.read_table(text)
    quick_out = io.StringIO()
    quick_audit = batch.interpret_table(quick)
    batch.write_csv(quick, quick_audit, quick_out)
    monkeypatch.setattr(batch, "_plain_lines", lambda text, dialect: None)
    slow = batch.read_table(text)
    slow_out = io.StringIO()
    batch.write_csv(slow, batch.interpret_table(slow), slow_out)
    assert quick.rows == slow.rows and quick.line == slow.line and quick.units_row == slow.units_row
    assert quick.warnings == slow.warnings and quick_out.getvalue() == slow_out.getvalue()
    assert_rows_equal_scalar(quick, quick_audit)


def test_a_carriage_return_inside_a_line_is_a_file_problem():
    with pytest.raises(batch.TableError, match="line 2 cannot be read as CSV"):
        batch.read_table("id,ph,pco2[kPa]\na,7.24\rb,7.40,5.3\n")


def test_nan_and_infinite_cells_are_refused_like_the_scalar_bridge():
    # "nan" (any case) means not given; "-nan" and "inf" are not numbers the bridge takes: in an optional
    # column the row is read without them (and its notes say so), in pH or PCO2 the row is refused
    table, audit = _audit(
        "ph,pco2[kPa],hco3[mmol/L]\n7.24,9.3,NaN\n7.24,9.3,-nan\n7.24,9.3,inf\n7.24,9.3,29\n7.24,inf,29\n"
    )
    assert audit.errors[:4] == [[], [], [], []] and audit.errors[4]
    assert audit.notes[0] == audit.notes[3] == [batch.SITE_NOTE]
    assert audit.notes[1][0] == "HCO3 '-nan' not read: read without it"
    assert audit.notes[2][0] == "HCO3 'inf' not read: read without it"
    assert "hco3" not in batch.row_inputs(table, 1)
    assert_rows_equal_scalar(table, audit)


def test_number_cells_are_read_once_per_distinct_text_as_each_cell_alone():
    cells = ["7.24", "", " 7.4 ", "NA", "7,4", "9.3kPa", "9.3 kpa", "1e1", "-0", "7.24", "nan", "x", "1_0"]
    column = batch.Column("pco2", "pco2", "mmHg", cells)
    batch._parse_column(column)
    for i, text in enumerate(cells):
        state, number, unit = batch._read_cell(text)
        assert column.state[i] == state and (column.number[i] == number or math.isnan(number)), text
        assert column.unit_array[i] == (unit or "mmHg") and column.own_units.get(i) == unit, text
    assert column.distinct == list(dict.fromkeys(cells))


def test_number_formatting_is_python_formatting():
    rng = random.Random(3)
    values = [rng.choice([-0.0, 0.0, 0.05, 0.25, 2.5, -1.25, 1e12, math.nan, 7.1]) for _ in range(300)]
    values += [rng.uniform(-50, 50) for _ in range(100)]
    arr = np.array(values, dtype=object)
    present = np.array([rng.random() < 0.9 for _ in values])
    for decimals in (0, 1, 2):
        text = batch._format(arr, present, "1", decimals, "mmHg", False)
        assert text == [f"{v:.{decimals}f}" if p else "" for v, p in zip(values, present, strict=True)]
    full = batch._format(arr, present, "1", 1, "mmHg", True)
    assert full == [repr(v) if p else "" for v, p in zip(values, present, strict=True)]


@pytest.mark.parametrize("width", [3, 16, 17, 70])
def test_finding_lists_are_joined_as_row_by_row(width):
    rng = np.random.default_rng(width)
    names = [f"code_{k}" for k in range(width)]
    matrix = rng.random((500, width)) < rng.uniform(0.02, 0.5, width)
    matrix[:250] = matrix[rng.integers(0, 10, 250)]  # repeated combinations, as findings have
    want = [" ".join(name for name, on in zip(names, row, strict=True) if on) for row in matrix.tolist()]
    assert batch._joined(matrix, names) == want
    assert batch._joined(matrix[:0], names) == []


def test_word_counts_are_counter_of_all_words():
    rng = random.Random(4)
    texts = [" ".join(rng.sample(["a", "b", "c", "d", "e"], rng.randint(0, 3))) for _ in range(300)]
    want = Counter(" ".join(texts).split())
    got = batch._count_words(texts)
    assert list(got.most_common()) == list(want.most_common()) and list(got) == list(want)
