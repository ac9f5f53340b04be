"""blood_gas: the thresholds, accepted ranges, display decimals and wording the other tests left unpinned.

Written for the survivors of a full mutation run over the blood_gas package (docs/testing.md). Each expected
value comes from outside the package: the published rule or formula written here with its ``references.py``
key, marked *common practice* where that is what it is, or the contract's documented behaviour
(docs/bridge.md). The accepted ranges are the project's own plausibility limits, copied by hand from the
field table's documentation (docs/glossary/acidbase.md), not published values: a change of a limit must then
be a decision, not an accident.

Some rules are checked on both paths of :func:`blood_gas.decide`: the scalar one behind the report and the
array one behind the batch audit and the uncertainty calculation (numpy arrays of one sample).
"""

from __future__ import annotations

import math
from types import SimpleNamespace

import numpy as np
import pytest

from casebook import q
from tidewell.bridge import handle_obj
from tidewell.calculations import blood_gas
from tidewell.calculations.blood_gas import reading
from tidewell.fields import Inputs

KPA = 1000.0 / 133.322387415  # mmHg per kPa (references.py bipm2019)


def bg(inputs: dict, unit: str = "mmHg") -> dict:
    response = handle_obj({"calc": "blood_gas", "inputs": inputs, "options": {"pressure_unit": unit}})
    assert response["ok"], response.get("errors")
    return response


def refused(inputs: dict) -> list[tuple[str, str]]:
    response = handle_obj({"calc": "blood_gas", "inputs": inputs})
    assert not response["ok"]
    return [(e["field"], e["code"]) for e in response["errors"]]


def codes(response: dict) -> set[str]:
    return {f["code"] for f in response["findings"]}


def finding_text(response: dict, code: str) -> str:
    return next(f["text"] for f in response["findings"] if f["code"] == code)


def ph_of(hco3: float, pco2: float) -> float:
    """Henderson-Hasselbalch, pK' 6.1, S 0.0307 (references.py henderson1908, nccls1994)."""
    return 6.1 + math.log10(hco3 / (0.0307 * pco2))


def hco3_of(ph: float, pco2: float) -> float:
    """Henderson-Hasselbalch solved for HCO3 (references.py henderson1908, nccls1994)."""
    return 0.0307 * pco2 * 10 ** (ph - 6.1)


def both_paths(inputs: dict):
    """blood_gas.decide for one request's sample: (the scalar Decision, the Decision of numpy arrays of one
    sample, element 0 of each array)."""
    values = reading._Sample(Inputs(inputs)).values()
    scalar = blood_gas.decide(values)
    arrays = SimpleNamespace(**{k: np.array([v]) for k, v in vars(values).items()})
    with np.errstate(all="ignore"):
        together = blood_gas.decide(arrays)
    return scalar, together


def fires_on_both_paths(inputs: dict, code: str) -> tuple[bool, bool]:
    scalar, together = both_paths(inputs)
    return bool(scalar.finding[code]), bool(np.asarray(together.finding[code]).reshape(-1)[0])


# -- display decimals (docs/bridge.md, display: a clinical choice made in the core) ----------------------------
#
# common practice: a pH and a fraction (fraction acute, delta ratio) to 2 decimals, a concentration in mmol/L or
# mEq/L to 1, the P/F ratio in mmHg whole (docs/cli.md: "no decimals in mmHg").


def test_display_decimals_of_a_respiratory_acidosis_with_a_known_baseline():
    r = bg({"ph": 7.30, "pco2": q(65, "mmHg"), "hco3": q(31, "mmol/L"), "baseline_pco2": q(50, "mmHg")})
    display = r["display"]
    assert display["expected_ph"] == 2
    assert display["fraction_acute_baseline"] == 2


def test_display_decimals_of_a_concurrent_respiratory_acidosis_with_a_known_baseline():
    # metabolic acidosis, HCO3 12: Winters 1.5 x 12 + 8 = 26 +/- 2 (albert1967); PaCO2 50 is above it
    r = bg({"ph": ph_of(12, 50), "pco2": q(50, "mmHg"), "hco3": q(12, "mmol/L"), "baseline_pco2": q(45, "mmHg")})
    assert r["outputs"]["disorders"][1]["code"] == "respiratory_acidosis"
    assert r["display"]["fraction_acute_baseline"] == 2


def test_display_decimals_of_the_gaps_and_the_oxygenation():
    r = bg(
        {
            "ph": 7.25,
            "pco2": q(30, "mmHg"),
            "hco3": q(hco3_of(7.25, 30), "mmol/L"),
            "na": q(140, "mmol/L"),
            "cl": q(100, "mmol/L"),
            "lactate": q(5, "mmol/L"),
            "po2": q(70, "mmHg"),
            "fio2": 0.4,
        }
    )
    display = r["display"]
    assert display["anion_gap"] == 1
    assert display["delta_ratio"] == 2
    assert display["delta_gap"] == 1
    assert display["lactate_effect"] == 1
    assert display["pf_ratio"] == 0


def test_display_decimals_of_the_stewart_partition_and_the_temperature_view():
    r = bg(
        {
            "ph": 7.25,
            "pco2": q(30, "mmHg"),
            "hco3": q(hco3_of(7.25, 30), "mmol/L"),
            "na": q(140, "mmol/L"),
            "cl": q(100, "mmol/L"),
            "albumin": q(3.0, "g/dL"),
            "lactate": q(5, "mmol/L"),
            "temperature": q(33, "degC"),
        }
    )
    display = r["display"]
    assert display["base_excess_partition"] == 1
    assert display["base_excess_partition_2004"] == 1
    assert display["ph_at_temperature"] == 2


# -- accepted ranges (the project's plausibility limits, docs/glossary/acidbase.md; not published values) -------

BASE = {"ph": 7.40, "pco2": q(40, "mmHg"), "hco3": q(24, "mmol/L")}


def reader(unit: str | None = None, **base):
    """A reader of one blood_gas sample for ``assert_accepted_range``: the value is sent bare, or as a
    quantity in ``unit``; a refusal of the value (``out_of_range``, or ``implausible`` when another unit would
    fit: both refuse it, docs/glossary/acidbase.md) comes back as an ``InputError`` ``out_of_range`` naming
    the input key. Any other error is raised as it is."""
    from tidewell.errors import InputError, InputErrors

    def read(**values):
        inputs = {k: v for k, v in {**BASE, **base}.items() if v is not None}  # None: left out
        for key, value in values.items():
            inputs[key] = value if unit is None else q(value, unit)
        try:
            reading._Sample(Inputs(inputs))
        except InputErrors as errors:
            first = errors.errors[0]
            if first.code in ("out_of_range", "implausible") and first.field.startswith("inputs."):
                key = first.field.removeprefix("inputs.")
                raise InputError(key, first.value, str(first), code="out_of_range") from None
            raise

    return read


@pytest.mark.parametrize(
    ("field", "unit", "low", "high", "base"),
    [
        ("ph", None, 6.5, 8.0, {"pco2": q(20, "mmHg"), "hco3": None}),
        ("pco2", "mmHg", 8.0, 250.0, {"ph": 6.9, "hco3": None}),
        ("hco3", "mmol/L", 1.0, 70.0, {}),
        ("po2", "mmHg", 15.0, 800.0, {}),
        ("fio2", None, 0.21, 1.0, {}),
        ("base_excess", "mmol/L", -40.0, 40.0, {}),
        ("na", "mmol/L", 100.0, 190.0, {}),
        ("k", "mmol/L", 1.0, 10.0, {}),
        ("cl", "mmol/L", 60.0, 150.0, {}),
        ("albumin", "g/dL", 0.5, 6.0, {}),
        ("lactate", "mmol/L", 0.0, 50.0, {}),
        ("glucose", "mmol/L", 0.0, 150.0, {}),
        ("urea", "mmol/L", 0.0, 100.0, {}),
        ("bun", "mmol/L", 0.0, 100.0, {}),
        ("phosphate", "mmol/L", 0.1, 5.0, {}),
        ("measured_osmolality", "mOsm/kg", 200.0, 450.0, {}),
        ("hb", "g/dL", 3.0, 25.0, {}),
        ("spo2", None, 30.0, 100.0, {}),
        ("age", None, 0.0, 120.0, {}),
        ("temperature", "degC", 15.0, 43.0, {}),
        ("altitude", "m", -500.0, 9000.0, {}),
        ("pb", "mmHg", 150.0, 1100.0, {}),
        ("baseline_pco2", "mmHg", 20.0, 150.0, {}),
        # the optional Stewart and alveolar-gas inputs (docs/glossary/acidbase.md, optional inputs)
        ("ca_ionised", "mmol/L", 0.3, 3.0, {}),
        ("mg", "mmol/L", 0.1, 5.0, {}),
        ("normal_albumin", "g/dL", 3.0, 5.5, {}),
        ("rq", None, 0.6, 1.2, {}),
    ],
)
def test_accepted_range_of_each_blood_gas_input(field, unit, low, high, base):
    from conftest import assert_accepted_range

    assert_accepted_range(reader(unit, **base), field, low, high)
