"""One comparison for answers that two implementations compute (numpy arrays vs CPython scalars, Pyodide's
WebAssembly numpy vs the desktop's numpy): numbers to a stated relative tolerance, everything else exactly.

numpy does not promise bit-for-bit agreement with CPython's math library, nor between its own SIMD kernels
on different CPUs (``10**2.5`` is 316.2277660168379 in numpy's AVX-512 power and 316.22776601683796 in
CPython), nor between two numpy versions or builds. A number may therefore differ in its last digits; a word
(a code, a category, a chronicity), a flag, a list's length or a missing key never may.

A sample whose inputs lie within the tolerance of a decision threshold may fairly be read either way. Such
a sample is accepted only when the reference implementation itself gives the other answer for inputs moved
within the tolerance (``alternatives``), and it is counted: each test reports how many it met in the
terminal summary (tests/conftest.py prints ``report_lines()``).
"""

from __future__ import annotations

import math
import os
from collections.abc import Callable, Iterable
from dataclasses import dataclass, field, fields, is_dataclass

# numpy's vectorised kernels vs CPython's math library on one machine: measured one unit in the last place
# (about 2.2e-16 relative) per call; 1e-12 leaves room for a few dozen operations after the first difference.
REL_SAME_ENGINE = 1e-12
# Pyodide's numpy 2.0.2 compiled to WebAssembly (its own libm) vs the desktop's numpy: the same formulas, a
# different math library; Monte-Carlo quantiles and sums over hundreds of draws carry the differences along.
REL_WEBASSEMBLY = 1e-9


def plain(value):
    """numpy scalars, arrays, tuples and dataclasses as plain Python values (floats, lists, dicts)."""
    if is_dataclass(value) and not isinstance(value, type):
        return {f.name: plain(getattr(value, f.name)) for f in fields(value)}
    if hasattr(value, "tolist") and not isinstance(value, (str, bytes)):
        return plain(value.tolist())
    if isinstance(value, dict):
        return {k: plain(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [plain(v) for v in value]
    return value


def _is_number(value) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def differences(got, want, rel: float) -> list[tuple[str, str]]:
    """(path, what) for each place where ``got`` and ``want`` differ: numbers beyond ``rel`` (absolute
    floor ``rel`` too, for values that cancel to about zero), anything else at all. NaN equals NaN."""
    return _differences(plain(got), plain(want), rel, "")


def _differences(got, want, rel: float, path: str) -> list[tuple[str, str]]:
    if _is_number(got) and _is_number(want):
        a, b = float(got), float(want)
        if a == b or (math.isnan(a) and math.isnan(b)):
            return []
        if math.isclose(a, b, rel_tol=rel, abs_tol=rel):
            return []
        return [(path, f"number {got!r} != {want!r} (beyond rel {rel:g})")]
    if isinstance(got, dict) and isinstance(want, dict):
        if set(got) != set(want):
            return [(path, f"keys {sorted(set(got) ^ set(want))} in one answer only")]
        return [d for k in want for d in _differences(got[k], want[k], rel, f"{path}.{k}" if path else k)]
    if isinstance(got, list) and isinstance(want, list):
        if len(got) != len(want):
            return [(path, f"{len(got)} items != {len(want)}")]
        pairs = enumerate(zip(got, want, strict=True))
        return [d for k, (a, b) in pairs for d in _differences(a, b, rel, f"{path}[{k}]")]
    if type(got) is type(want) and got == want:
        return []
    return [(path, f"{got!r} != {want!r}")]


def last_digits_differ(got, want) -> bool:
    """True when ``got`` and ``want`` are not bit for bit equal (NaN equals NaN)."""
    return bool(differences(got, want, 0.0))


@dataclass
class Tally:
    """What one test's comparisons met: samples compared, equal bit for bit, equal within the tolerance
    only, and read differently because they sit on a threshold (both answers accepted)."""

    name: str
    rel: float
    compared: int = 0
    bit_equal: int = 0
    within: int = 0
    on_threshold: list[str] = field(default_factory=list)

    def check(self, got, want, where: str, alternatives: Callable[[], Iterable] | None = None) -> None:
        """Assert that ``got`` is ``want`` (numbers within ``rel``, the rest exactly); or, when the sample
        sits on a threshold, that ``got`` is one of the reference's ``alternatives()`` answers for inputs
        moved within the tolerance."""
        self.compared += 1
        found = differences(got, want, self.rel)
        if not found:
            if last_digits_differ(got, want):
                self.within += 1
            else:
                self.bit_equal += 1
            return
        if alternatives is not None:
            for other in alternatives():
                if not differences(got, other, self.rel):
                    self.on_threshold.append(where)
                    return
        shown = "; ".join(f"{p}: {what}" for p, what in found[:5])
        raise AssertionError(f"{self.name}: {where}: {len(found)} difference(s): {shown}")

    def line(self) -> str:
        listed = f": {', '.join(self.on_threshold[:5])}" if self.on_threshold else ""
        return (
            f"{self.name}: {self.compared} compared at rel {self.rel:g}: {self.bit_equal} bit for bit, "
            f"{self.within} within the tolerance only, {len(self.on_threshold)} on a threshold (both "
            f"readings accepted){listed}"
        )


TALLIES: list[Tally] = []  # every tally of the session, summed by test in the terminal summary
NOTES: list[str] = []  # further lines for the summary (the tallies of a subprocess run)


def tally(rel: float, name: str | None = None) -> Tally:
    """A new tally for the running test (named after it, parameters left out, unless ``name`` is given),
    reported at the end."""
    if name is None:
        name = os.environ.get("PYTEST_CURRENT_TEST", "?").rsplit(" ", 1)[0].split("[", 1)[0]
    TALLIES.append(Tally(name, rel))
    return TALLIES[-1]


def report_lines() -> list[str]:
    """One line per test and tolerance: the tallies of its comparisons summed."""
    summed: dict[tuple[str, float], Tally] = {}
    for t in TALLIES:
        total = summed.setdefault((t.name, t.rel), Tally(t.name, t.rel))
        total.compared += t.compared
        total.bit_equal += t.bit_equal
        total.within += t.within
        total.on_threshold += t.on_threshold
    return [t.line() for t in summed.values()] + NOTES


# inputs are nudged by this share of the tolerance: a reading derived from them through a condition number
# up to about 60 (10**-pH in nmol/L has about 17) then stays within the tolerance of the unnudged one, while
# a value within a few units in the last place of a threshold is still carried across it
NUDGE_SHARE = 1 / 64


def nudged(values: dict, rel: float, keep: Iterable[str] = ()) -> list[dict]:
    """Copies of ``values`` (a flat or nested dict of inputs) with its numbers moved by ``rel`` times
    NUDGE_SHARE: all up, all down, then each one alone up and down. ``keep`` names keys whose numbers are
    counts, seeds or whole years, not measurements with a last digit, and stay as they are."""
    keep = set(keep)
    paths = []

    def find(node, path):
        if isinstance(node, dict):
            for k, v in node.items():
                if k not in keep:
                    find(v, (*path, k))
        elif _is_number(node) and node != 0:
            paths.append(path)

    def moved(chosen, factor):
        def build(node, path):
            if isinstance(node, dict):
                return {k: build(v, (*path, k)) for k, v in node.items()}
            return float(node) * factor if path in chosen else node

        return build(values, ())

    find(values, ())
    out = []
    step = rel * NUDGE_SHARE
    for factor in (1 + step, 1 - step):
        out.append(moved(set(paths), factor))
    for path in paths:
        for factor in (1 + step, 1 - step):
            out.append(moved({path}, factor))
    return out


# -- numpy's SIMD dispatch: which kernels this process uses, and how to narrow it to the baseline --------


def _numpy_cpu():
    import numpy._core._multiarray_umath as umath  # numpy >= 2 (numpy.core before)

    return umath.__cpu_baseline__, umath.__cpu_dispatch__, umath.__cpu_features__


def features_beyond_baseline() -> list[str]:
    """The dispatch targets numpy built for that this CPU has, baseline excluded, as numpy reports them:
    exactly the names NPY_DISABLE_CPU_FEATURES accepts (a name outside the dispatch list is refused with
    an ImportWarning, a baseline one with a RuntimeError)."""
    baseline, dispatch, features = _numpy_cpu()
    return [name for name in dispatch if features.get(name) and name not in baseline]


def numpy_dispatch_line() -> str:
    """numpy's version and the dispatch targets in use; with NPY_DISABLE_CPU_FEATURES, which are off."""
    import numpy

    baseline, dispatch, features = _numpy_cpu()
    on = [name for name in dispatch if features.get(name)]
    asked = os.environ.get("NPY_DISABLE_CPU_FEATURES", "").replace(",", " ").split()
    off = [name for name in asked if not features.get(name)]
    return (
        f"numpy {numpy.__version__} baseline {' '.join(baseline)}; dispatch targets in use: "
        f"{' '.join(on) or 'none'}; NPY_DISABLE_CPU_FEATURES={' '.join(asked) or '(unset)'}; "
        f"disabled and off: {' '.join(off) or 'none'}"
    )


# numbers of a request that are counts or seeds, never nudged
NOT_MEASURED = ("draws", "seed", "cylinders")


def check_against(
    reference: Callable[[dict], dict],
    request: dict,
    got,
    rel: float,
    where: str = "",
    part: Callable = lambda response: response,
) -> None:
    """Assert that ``got``, another implementation's response to ``request`` (or the ``part`` of it that a
    screen shows), is ``part(reference(request))`` to ``rel`` (categories exactly), or, on a threshold,
    that of the request nudged within the tolerance."""

    def alternatives():
        for inputs in nudged(request.get("inputs", {}), rel, keep=NOT_MEASURED):
            other = reference({**request, "inputs": inputs})
            if other.get("ok"):
                yield part(other)

    tally(rel).check(got, part(reference(request)), where or str(request.get("calc")), alternatives)
