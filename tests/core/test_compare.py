"""The shared comparison of tests/compare.py: it must pass last-digit differences, fail everything else, and
accept the other reading of a sample only where the reference itself reads it so within the tolerance."""

from __future__ import annotations

import math

import pytest

import compare

REL = compare.REL_SAME_ENGINE


def test_numbers_within_the_tolerance_and_nothing_else():
    # the last-place difference numpy's AVX-512 power shows for 10**2.5 (measured), and a cancelled zero
    assert compare.differences(316.2277660168379, 316.22776601683796, REL) == []
    assert compare.last_digits_differ(316.2277660168379, 316.22776601683796)
    assert compare.differences({"x": [1e-17, math.nan]}, {"x": [0.0, math.nan]}, REL) == []
    assert compare.differences(2, 2.0, REL) == []  # JSON from JavaScript gives integral numbers as int
    for got, want in [
        (316.2277660168379, 316.22776601),  # beyond 1e-12
        ("acute", "chronic"),
        (True, False),
        (True, 1),  # a flag is not a number
        (None, 0.0),
        ([1.0], [1.0, 2.0]),
        ({"a": 1.0}, {"a": 1.0, "b": 2.0}),
        (math.nan, 1.0),
    ]:
        assert compare.differences(got, want, REL), (got, want)


def _reading(ph: float) -> dict:
    # a toy rule with the pH threshold of 7.35 (bts_ics2016): a word and a number derived from the input
    return {"acidaemic": ph < 7.35, "h_nmol_l": 10 ** (9 - ph)}


def test_a_sample_on_a_threshold_is_accepted_and_counted_a_far_one_is_not():
    t = compare.Tally("toy", REL)
    on = 7.35
    other = _reading(on * (1 - 4e-16))  # another implementation, a few units in the last place under it
    assert other["acidaemic"] != _reading(on)["acidaemic"]
    t.check(other, _reading(on), "on", lambda: (_reading(v["ph"]) for v in compare.nudged({"ph": on}, REL)))
    assert t.on_threshold == ["on"] and t.compared == 1
    far = 7.20
    wrong = {**_reading(far), "acidaemic": False}
    with pytest.raises(AssertionError, match="acidaemic"):
        t.check(
            wrong, _reading(far), "far", lambda: (_reading(v["ph"]) for v in compare.nudged({"ph": far}, REL))
        )
    t.check(_reading(7.2000000000000001), _reading(far), "same", None)
    assert (t.compared, t.bit_equal, len(t.on_threshold)) == (3, 1, 1)
    assert "1 on a threshold" in t.line()


def test_nudged_moves_measured_numbers_only():
    up, down = 1 + 1e-3 * compare.NUDGE_SHARE, 1 - 1e-3 * compare.NUDGE_SHARE
    moved = compare.nudged(
        {"sample": {"ph": 7.3, "pco2": {"value": 60, "unit": "mmHg"}}, "seed": 4}, 1e-3, ["seed"]
    )
    assert len(moved) == 2 + 2 * 2
    assert moved[0] == {
        "sample": {"ph": 7.3 * up, "pco2": {"value": 60 * up, "unit": "mmHg"}},
        "seed": 4,
    }
    assert moved[5]["sample"]["ph"] == 7.3 and moved[5]["sample"]["pco2"]["value"] == 60 * down
