"""Shared test helpers: the worked cases and a bridge caller that checks the response shape."""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest

CASES_PATH = Path(__file__).parent / "cases" / "reference_cases.json"


def load_cases() -> dict[str, dict]:
    """The worked cases (a copy of the shared reference cases), by id."""
    return {case["id"]: case for case in json.loads(CASES_PATH.read_text(encoding="utf-8"))}


@pytest.fixture(scope="session")
def cases() -> dict[str, dict]:
    return load_cases()


def assert_finite_everywhere(value, path="response"):
    """No NaN or infinity anywhere in a response."""
    if isinstance(value, float):
        assert math.isfinite(value), f"{path} is not finite"
    elif isinstance(value, dict):
        for key, item in value.items():
            assert_finite_everywhere(item, f"{path}.{key}")
    elif isinstance(value, list):
        for i, item in enumerate(value):
            assert_finite_everywhere(item, f"{path}[{i}]")
