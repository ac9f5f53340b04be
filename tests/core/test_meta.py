"""Checks of the codebase itself (our version of a lint plugin; the rules are in DEVELOPERS.md).

- every worked case is used by at least one test;
- every bibliography entry has a known check status;
- every domain and calculation module opens its docstring with a table of what it offers;
- every parameter name of a public domain function is in the glossary;
- every output name a calculation returns for a typical request is in the glossary.
"""

from __future__ import annotations

import importlib
import inspect
import re
from pathlib import Path

import pytest

from conftest import load_cases
from tidewell import bridge
from tidewell.references import REFERENCES

ROOT = Path(__file__).resolve().parents[2]
TESTS = Path(__file__).resolve().parent
DOMAIN_MODULES = [
    "units",
    "formulas.acidbase",
    "formulas.oxygenation",
    "formulas.ventilation",
    "formulas.temperature",
    "formulas.altitude",
    "formulas.transport",
]
CALC_MODULES = [
    "calculations.convert",
    "calculations.blood_gas",
    "calculations.alveolar_gas",
    "calculations.oxygen_content",
    "calculations.oxygen_dissociation_curve",
    "calculations.ventilation",
    "calculations.temperature_correction",
    "calculations.altitude",
    "calculations.altitude_profile",
    "calculations.oxygen_supply",
    "calculations.course",
]


def _importable(name: str):
    try:
        return importlib.import_module(f"tidewell.{name}")
    except ModuleNotFoundError:
        return None


def _glossary_names() -> set[str]:
    text = "\n".join(p.read_text(encoding="utf-8") for p in sorted((ROOT / "docs" / "glossary").glob("*.md")))
    return set(re.findall(r"`([A-Za-z_][A-Za-z0-9_]*)`", text))


def test_every_worked_case_is_tested():
    test_text = "\n".join(p.read_text(encoding="utf-8") for p in TESTS.glob("test_*.py"))
    missing = [case_id for case_id in load_cases() if case_id not in test_text]
    assert not missing, f"worked cases no test uses: {missing}"


def test_every_reference_has_a_status_and_text():
    for key, ref in REFERENCES.items():
        assert re.fullmatch(r"[a-z0-9_]+", key), key
        assert ref.status in ("verified", "from memory", "common practice"), key
        assert ref.short and ref.full, key


@pytest.mark.parametrize("name", DOMAIN_MODULES + CALC_MODULES)
def test_module_docstring_opens_with_a_table(name):
    module = _importable(name)
    if module is None:
        pytest.fail(f"tidewell.{name} is missing")
    doc = inspect.getdoc(module) or ""
    assert re.search(r"^=+\s+=+", doc, re.M), f"tidewell.{name}: docstring has no table of its functions"


@pytest.mark.parametrize("name", [m for m in DOMAIN_MODULES if m != "units"])
def test_domain_parameters_are_in_the_glossary(name):
    module = _importable(name)
    if module is None:
        pytest.fail(f"tidewell.{name} is missing")
    glossary = _glossary_names()
    missing = set()
    for fname, func in inspect.getmembers(module, inspect.isfunction):
        if fname.startswith("_") or func.__module__ != module.__name__:
            continue
        for pname, param in inspect.signature(func).parameters.items():
            if param.kind is inspect.Parameter.KEYWORD_ONLY and pname not in glossary:
                missing.add(f"{fname}({pname})")
    assert not missing, f"tidewell.{name}: parameters not in docs/glossary: {sorted(missing)}"


TYPICAL = {
    "alveolar_gas": {
        "fio2": 0.21,
        "pco2": {"value": 60, "unit": "mmHg"},
        "po2": {"value": 55, "unit": "mmHg"},
        "age": 60,
    },
    "oxygen_content": {
        "hb": {"value": 12, "unit": "g/dL"},
        "po2": {"value": 60, "unit": "mmHg"},
        "cardiac_output": {"value": 5, "unit": "L/min"},
    },
    "temperature_correction": {
        "ph": 7.3,
        "pco2": {"value": 45, "unit": "mmHg"},
        "po2": {"value": 90, "unit": "mmHg"},
        "temperature": {"value": 32, "unit": "degC"},
    },
    "altitude": {
        "altitude": {"value": 8000, "unit": "ft"},
        "fio2": 0.21,
        "pco2": {"value": 40, "unit": "mmHg"},
        "po2": {"value": 70, "unit": "mmHg"},
        "target_po2": {"value": 55, "unit": "mmHg"},
        "trapped_gas_volume": {"value": 100, "unit": "mL"},
    },
    "course": {
        "hypercapnia_risk": True,
        "samples": [
            {
                "time": 0,
                "inputs": {"ph": 7.28, "pco2": {"value": 68, "unit": "mmHg"}},
                "events": ["niv_started"],
            },
            {"time": 90, "inputs": {"ph": 7.33, "pco2": {"value": 60, "unit": "mmHg"}}},
        ],
    },
    "oxygen_supply": {
        "cylinder_water_capacity": {"value": 10, "unit": "L"},
        "cylinder_pressure": {"value": 200, "unit": "bar"},
        "flow": {"value": 15, "unit": "L/min"},
        "duration": {"value": 60, "unit": "min"},
    },
}


@pytest.mark.parametrize("calc", sorted(TYPICAL))
def test_output_names_are_in_the_glossary(calc):
    response = bridge.handle_obj({"calc": calc, "inputs": TYPICAL[calc]})
    assert response["ok"], response
    missing = sorted(set(response["outputs"]) - _glossary_names())
    assert not missing, f"{calc}: outputs not in docs/glossary: {missing}"
