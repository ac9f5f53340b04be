"""Every finding code the core can emit is provoked by a test, and shown absent by another.

The table (finding_requests.json beside this file) maps each code to a request that must emit it and a
request (the nearest one found, of the same calculation where the calculation can go without it) that
must not. Each runs through ``tidewell.bridge.handle_obj``. The meta-test lists every code the core can
emit, from ``blood_gas.FINDING_ORDER`` and from the core's ``.finding(...)`` calls (f-string codes
expanded), and fails when a code has no row: a new code needs its provoking request here.

Two codes are emitted by every answer of their calculation (``spo2_target`` in ``blood_gas``,
``alpha_stat_ph_stat`` in ``temperature_correction``); their absent request is one of another
calculation, and ``test_always_emitted`` checks that they are indeed always there.
"""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest

from tidewell.bridge import handle_obj
from tidewell.calculations import blood_gas

HERE = Path(__file__).resolve().parent
CORE = HERE.parents[1] / "core" / "tidewell"
TABLE: dict[str, dict] = json.loads((HERE / "finding_requests.json").read_text(encoding="utf-8"))

#: f-string codes and what their placeholder takes: the Berlin bands a finding names (berlin2012; the band
#: above the ARDS range has no finding, calculations/alveolar_gas.py)
EXPANSIONS = {"pf_band_{band}": ("mild", "moderate", "severe")}
#: codes every answer of a calculation carries
ALWAYS = {"spo2_target": "blood_gas", "alpha_stat_ph_stat": "temperature_correction"}

_CALL = re.compile(r"\.finding\(\s*")
_LITERAL = re.compile(r'\.finding\(\s*(f?)"([^"]+)"')


def emitted_codes() -> set[str]:
    """Every code the core can emit: FINDING_ORDER plus the codes of every ``.finding(`` call."""
    codes = set(blood_gas.FINDING_ORDER)
    for path in sorted(CORE.rglob("*.py")):
        text = path.read_text(encoding="utf-8")
        calls = len(_CALL.findall(text))
        literal = _LITERAL.findall(text)
        # a code held in a variable could hide from this list: every call names its code in the call
        assert len(literal) == calls, f"{path.name}: a .finding( call whose code is not a string literal"
        for is_f, code in literal:
            if is_f and "{" in code:
                assert code in EXPANSIONS, f"{path.name}: f-string code {code!r} has no expansion here"
                codes |= {
                    code.replace(code[code.index("{") : code.index("}") + 1], v) for v in EXPANSIONS[code]
                }
            else:
                codes.add(code)
    return codes


def codes_of(request: dict) -> set[str]:
    response = handle_obj(request)
    assert response["ok"], response.get("errors")
    return {f["code"] for f in response["findings"]}


def test_every_code_has_a_provoking_and_an_absent_request():
    codes = emitted_codes()
    assert len(codes) >= 130, len(codes)  # sanity: the scan found the codes (138 when written)
    missing = sorted(codes - set(TABLE))
    assert not missing, f"finding codes without a provoking request in finding_requests.json: {missing}"
    stale = sorted(set(TABLE) - codes)
    assert not stale, f"rows for codes the core no longer emits: {stale}"


@pytest.mark.parametrize("code", sorted(TABLE))
def test_provoked(code):
    assert code in codes_of(TABLE[code]["provoke"])


@pytest.mark.parametrize("code", sorted(TABLE))
def test_absent(code):
    absent = TABLE[code]["absent"]
    assert code not in codes_of(absent)
    provoke = TABLE[code]["provoke"]
    if code not in ALWAYS:
        assert absent["calc"] == provoke["calc"], "the absence is shown on the same calculation"


@pytest.mark.parametrize(("code", "calc"), sorted(ALWAYS.items()))
def test_always_emitted(code, calc):
    requests = [row["provoke"] for row in TABLE.values() if row["provoke"]["calc"] == calc]
    requests += [row["absent"] for row in TABLE.values() if row["absent"]["calc"] == calc]
    assert len(requests) >= 2
    for request in requests:
        assert code in codes_of(request)
