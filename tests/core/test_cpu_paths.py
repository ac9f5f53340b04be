"""The cross-implementation comparisons once more with numpy's SIMD dispatch narrowed to its baseline.

numpy picks a kernel for each ufunc at import from the CPU's features (AVX2, AVX-512 ...); its power, exp
and log kernels differ from one another, and from CPython's libm, in the last place. A machine runs only
one of them, so a comparison that passes here may fail on a machine of another kind. Here the batch-versus-
scalar and uncertainty comparisons run a second time in a subprocess with ``NPY_DISABLE_CPU_FEATURES`` set
to every dispatch target this CPU has beyond numpy's baseline (as numpy itself reports them), so that any
machine exercises a second kernel path; and the uncertainty answers of that subprocess are compared, with
the shared tolerance of tests/compare.py, to the answers of this process.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

import compare
from tidewell.bridge import handle_obj

ROOT = Path(__file__).resolve().parents[2]

# the comparisons of numpy arrays with CPython scalars (batch, decide, Monte-Carlo draws, array formulas)
COMPARISONS = [
    "tests/core/test_batch.py::test_batch_equals_scalar_row_by_row",
    "tests/core/test_batch.py::test_decide_on_arrays_is_decide_on_each_sample",
    "tests/core/test_batch.py::test_consciousness_threshold_never_rises_with_pco2_on_a_dense_grid",
    "tests/core/test_sureness.py::test_every_draw_gets_the_scalar_alveolar_gas_and_a_a_limit",
    "tests/core/test_oxygenation.py::test_alveolar_gas_on_arrays_is_the_scalar_result",
    "tests/core/test_oxygenation.py::test_a_a_limit_on_arrays_and_mixed_scalars",
]
COUNT = 8  # test_batch_equals_scalar_row_by_row and test_alveolar_gas_on_arrays_... have two cases each


def q(value, unit):
    return {"value": value, "unit": unit}


# invented samples: a COPD-like acute-on-chronic retention with oxygenation, and one whose pH and PaCO2 sit
# on the NIV thresholds (pH 7.35, PaCO2 6.5 kPa; bts_ics2016), so that many of its draws fall each side
UNCERTAINTY_REQUESTS = [
    {
        "calc": "uncertainty",
        "inputs": {
            "sample": {
                "ph": 7.26,
                "pco2": q(9.1, "kPa"),
                "hco3": q(30.2, "mmol/L"),
                "po2": q(7.4, "kPa"),
                "fio2": 0.28,
                "age": 68,
                "na": q(138, "mmol/L"),
                "cl": q(96, "mmol/L"),
            },
            "draws": 3000,
            "seed": 4,
        },
    },
    {
        "calc": "uncertainty",
        "inputs": {"sample": {"ph": 7.35, "pco2": q(6.5, "kPa")}, "draws": 3000, "seed": 2},
        "options": {"pressure_unit": "kPa"},
    },
]
NOT_MEASURED = ("draws", "seed", "age")
PYTEST_OPTIONS = ["-q", "-W", "error", "-p", "no:cacheprovider"]


def narrowed_env() -> tuple[list[str], dict]:
    extra = compare.features_beyond_baseline()
    if not extra:
        pytest.skip(
            "numpy reports no dispatch target beyond its baseline on this CPU: the default run already "
            "uses the baseline kernels, so there is no second path to exercise"
        )
    return extra, {**os.environ, "NPY_DISABLE_CPU_FEATURES": " ".join(extra)}


def test_the_disable_list_is_what_numpy_accepts():
    # derived from numpy's own report: dispatch targets present on this CPU, none of them baseline
    import numpy._core._multiarray_umath as umath

    extra = compare.features_beyond_baseline()
    assert set(extra) <= set(umath.__cpu_dispatch__)
    assert not set(extra) & set(umath.__cpu_baseline__)
    assert all(umath.__cpu_features__[name] for name in extra)


def test_comparisons_again_with_numpy_narrowed_to_its_baseline():
    extra, env = narrowed_env()
    done = subprocess.run(
        [
            sys.executable,
            "-W",
            "error",
            "-m",
            "pytest",
            *COMPARISONS,
            "-q",
            "-W",
            "error",
            "-p",
            "no:cacheprovider",
        ],
        cwd=ROOT,
        env=env,
        capture_output=True,
        text=True,
        timeout=900,
    )
    output = done.stdout + done.stderr
    assert done.returncode == 0, output[-4000:]
    assert f"{COUNT} passed" in done.stdout, output[-4000:]
    # the subprocess's numpy really ran with those targets off (its own session summary says so)
    assert f"disabled and off: {' '.join(extra)}" in done.stdout, output[-4000:]
    assert "dispatch targets in use: none" in done.stdout, output[-4000:]
    for line in done.stdout.splitlines():
        if line.startswith("tidewell: tests/") or line.startswith("tidewell: numpy"):
            compare.NOTES.append(f"[NPY_DISABLE_CPU_FEATURES={' '.join(extra)}] {line[len('tidewell: ') :]}")


SCRIPT = """
import json, sys
import compare
from tidewell.bridge import handle_obj
requests = json.loads(sys.stdin.read())
print(json.dumps({"numpy": compare.numpy_dispatch_line(), "responses": [handle_obj(r) for r in requests]}))
"""


def test_uncertainty_with_numpy_narrowed_is_the_uncertainty_here():
    """The Monte-Carlo answer computed on numpy's baseline kernels equals this process's: numbers (intervals,
    probabilities) to compare.REL_SAME_ENGINE, words exactly; a draw on a threshold may fall the other way
    only as it does here for the sample nudged by that tolerance."""
    extra, env = narrowed_env()
    env["PYTHONPATH"] = os.pathsep.join([str(ROOT / "core"), str(ROOT / "tests"), env.get("PYTHONPATH", "")])
    done = subprocess.run(
        [sys.executable, "-W", "error", "-c", SCRIPT],
        input=json.dumps(UNCERTAINTY_REQUESTS),
        env=env,
        capture_output=True,
        text=True,
        timeout=300,
    )
    assert done.returncode == 0, done.stderr[-4000:]
    there = json.loads(done.stdout)
    assert f"disabled and off: {' '.join(extra)}" in there["numpy"], there["numpy"]
    same = compare.tally(compare.REL_SAME_ENGINE)
    for request, got in zip(UNCERTAINTY_REQUESTS, there["responses"], strict=True):
        want = handle_obj(request)
        assert want["ok"] and got["ok"], (want.get("errors"), got.get("errors"))

        def alternatives(request=request):
            for inputs in compare.nudged(request["inputs"], same.rel, keep=NOT_MEASURED):
                yield handle_obj({**request, "inputs": inputs})

        same.check(got, want, json.dumps(request["inputs"]["sample"]), alternatives)
    # the threshold sample really is split: the comparison covers probabilities strictly between 0 and 1
    split = there["responses"][1]["outputs"]["probabilities"]["findings"]["niv_criteria_met"]
    assert 0.1 < split < 0.9, split
