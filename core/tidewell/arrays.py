"""Tiny helpers that let one formula serve a Python float and a numpy array alike.

==================  ====================================================================================
``where``           ``a if cond else b`` for scalars; ``numpy.where(cond, a, b)`` for arrays
``minimum``         the smaller of two values, with Python ``min`` semantics (``b if b < a else a``)
``maximum``         the larger of two values, with Python ``max`` semantics (``b if b > a else a``)
``clamp``           ``minimum(maximum(x, low), high)``
``log10``           ``math.log10`` for scalars (NaN for values that are not positive); ``numpy.log10``
``exp``             ``math.exp`` for scalars; ``numpy.exp`` for arrays
``div``             ``a / b``, NaN where ``b`` is 0 (never raises, never infinite)
``given``           True where a value is present (not NaN; ``None`` counts as absent)
``not_``            logical not for a bool or a boolean array
``is_array``        True when any argument is a numpy array
``NAN``             the "not given" marker of the array-polymorphic rules
==================  ====================================================================================

The rules of the core (acid-base formulas, the blood-gas decisions) are written once with operators and
these helpers, so the scalar bridge and the batch and Monte Carlo paths run the very same code. This module
imports no numpy: an argument can only be a numpy array if numpy has already been imported by the caller
(the batch and uncertainty modules), so ``sys.modules`` is asked rather than numpy imported. In the scalar
path every helper uses ``math`` and plain Python, so the browser's first answer never waits for numpy.

Boolean values combine with ``&`` and ``|`` (never ``and``/``or``, which do not work element-wise) and are
negated with :func:`not_` (``~True`` is -2 in Python). "Not given" is NaN in both paths: comparisons with NaN
are False, so a rule on a missing value simply does not fire.

Examples
--------
>>> where(3 > 2, "yes", "no")
'yes'
>>> maximum(-0.0, 0.0), minimum(2.0, 1.0)
(-0.0, 1.0)
>>> div(1.0, 0.0) != div(1.0, 0.0)
True
>>> given(NAN), given(7.4), given(None)
(False, True, False)
"""

from __future__ import annotations

import math
import sys

NAN = math.nan


_ndarray = None  # numpy.ndarray once numpy has been imported by someone


def _numpy():
    """numpy if some caller has imported it, else None (this module never imports it itself)."""
    return sys.modules.get("numpy")


def _array_type():
    global _ndarray
    if _ndarray is None:
        np = _numpy()
        if np is not None:
            _ndarray = np.ndarray
    return _ndarray


def is_array(*values) -> bool:
    """True when any of ``values`` is a numpy array."""
    nd = _ndarray or _array_type()
    if nd is None:
        return False
    for v in values:
        if isinstance(v, nd):
            return True
    return False


def where(cond, a, b):
    """``a`` where ``cond`` holds, else ``b`` (element-wise for arrays)."""
    nd = _ndarray or _array_type()
    if nd is not None and (isinstance(cond, nd) or isinstance(a, nd) or isinstance(b, nd)):
        return _numpy().where(cond, a, b)
    return a if cond else b


def minimum(a, b):
    """The smaller of ``a`` and ``b`` as Python's ``min(a, b)`` picks it (``b`` only when ``b < a``)."""
    return where(b < a, b, a)


def maximum(a, b):
    """The larger of ``a`` and ``b`` as Python's ``max(a, b)`` picks it (``b`` only when ``b > a``)."""
    return where(b > a, b, a)


def clamp(x, low, high):
    """``x`` limited to ``[low, high]``: ``minimum(maximum(x, low), high)``."""
    return minimum(maximum(x, low), high)


def log10(x):
    """Base-10 logarithm; NaN (never an exception) where ``x`` is not positive."""
    if is_array(x):
        np = _numpy()
        with np.errstate(invalid="ignore", divide="ignore"):
            return np.where(x > 0, np.log10(np.where(x > 0, x, 1.0)), np.nan)
    return math.log10(x) if x > 0 else NAN


def exp(x):
    """e to the power ``x``."""
    if is_array(x):
        return _numpy().exp(x)
    return math.exp(x)


def div(a, b):
    """``a / b``; NaN where ``b`` is 0."""
    if is_array(a, b):
        np = _numpy()
        safe = np.where(b != 0, b, 1.0)
        return np.where(b != 0, a / safe, np.nan)
    return a / b if b != 0 else NAN


def given(x):
    """True where ``x`` is present: not NaN and not None."""
    if x is None:
        return False
    return x == x  # NaN is the only value not equal to itself


def not_(x):
    """Logical not of a bool or a boolean array."""
    if is_array(x):
        return _numpy().logical_not(x)
    return not x


def each(func, mask, **kwargs):
    """``func(**kwargs)`` where ``mask`` holds and NaN elsewhere; row by row when anything is an array.

    For the scalar, validated domain functions of other modules (alveolar gas, A-a limit by age): with arrays
    they are called with Python floats, once per distinct set of arguments, so the batch path runs exactly
    the scalar code.
    """
    if not is_array(mask, *kwargs.values()):
        return func(**kwargs) if mask else NAN
    np = _numpy()
    shape = np.broadcast_shapes(*(np.shape(v) for v in (mask, *kwargs.values())))
    rows = np.flatnonzero(np.broadcast_to(mask, shape)).tolist()
    names = list(kwargs)
    columns = [
        np.broadcast_to(v, shape)[rows].tolist() if isinstance(v, np.ndarray) else [v] * len(rows)
        for v in kwargs.values()
    ]
    results = []
    cache: dict = {}
    for key in zip(*columns, strict=True):
        value = cache.get(key)
        if value is None:
            value = cache[key] = func(**dict(zip(names, key, strict=True)))
        results.append(value)
    out = np.full(shape, np.nan)
    out[rows] = results
    return out


def none_if_nan(x):
    """A scalar result back in the scalar core's terms: None for NaN, else ``x`` unchanged."""
    return None if x is None or x != x else x
