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
``require``         ``errors.require_number`` for a scalar; the same check on every element of an array
``elementwise``     marks a validated function that takes arrays, so ``each`` calls it once
``each``            a validated function where a mask holds, NaN elsewhere (scalars or arrays)
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

from .errors import require_number

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


def elementwise(func):
    """Mark a validated domain function as element-wise: it takes numpy arrays as well as floats.

    Such a function checks its arguments with :func:`require` and computes with operators only, so
    :func:`each` calls it once on all the rows it applies to instead of once per row.
    """
    func.elementwise = True
    return func


def require(field, value, *, low, high, unit="", hint=""):
    """:func:`tidewell.errors.require_number` for a scalar; for an array, the same check of every element.

    An array passes unchanged (as floats) when every element is a finite number in ``[low, high]``; else the
    first element that fails raises the very error the scalar check gives for it.

    >>> require("rq", 0.8, low=0.5, high=1.5)
    0.8
    """
    if not is_array(value):
        return require_number(field, value, low=low, high=high, unit=unit, hint=hint)
    np = _numpy()
    if value.dtype.kind not in "fiu":
        bad = np.ones(value.shape, dtype=bool)
    else:
        value = value.astype(float, copy=False)
        bad = ~((low <= value) & (value <= high))  # NaN and infinities fail too
    if bad.any():
        first = value.reshape(-1)[np.flatnonzero(bad.reshape(-1))[0]]
        require_number(
            field, first.item() if hasattr(first, "item") else first, low=low, high=high, unit=unit, hint=hint
        )
    return value


def each(func, mask, **kwargs):
    """``func(**kwargs)`` where ``mask`` holds and NaN elsewhere.

    For the validated domain functions of other modules (alveolar gas, A-a limit by age), which raise on
    input outside their range, so they must only see the rows ``mask`` selects. With arrays, a function
    marked :func:`elementwise` is called once on the selected elements (its checks and its formula run on
    arrays, with the same float arithmetic as the scalar call); any other function is called with Python
    floats, once per distinct set of arguments, so the batch path runs exactly the scalar code.
    """
    if not is_array(mask, *kwargs.values()):
        return func(**kwargs) if mask else NAN
    np = _numpy()
    shape = np.broadcast_shapes(*(np.shape(v) for v in (mask, *kwargs.values())))
    rows = np.flatnonzero(np.broadcast_to(mask, shape))
    out = np.full(shape, np.nan)
    if not len(rows):
        return out
    if getattr(func, "elementwise", False):
        selected = {
            name: np.broadcast_to(v, shape).reshape(-1)[rows] if isinstance(v, np.ndarray) else v
            for name, v in kwargs.items()
        }
        out.reshape(-1)[rows] = func(**selected)
        return out
    rows = rows.tolist()
    names = list(kwargs)
    columns = [
        np.broadcast_to(v, shape).reshape(-1)[rows].tolist() if isinstance(v, np.ndarray) else [v] * len(rows)
        for v in kwargs.values()
    ]
    results = []
    cache: dict = {}
    for key in zip(*columns, strict=True):
        value = cache.get(key)
        if value is None:
            value = cache[key] = func(**dict(zip(names, key, strict=True)))
        results.append(value)
    out.reshape(-1)[rows] = results
    return out


def none_if_nan(x):
    """A scalar result back in the scalar core's terms: None for NaN, else ``x`` unchanged."""
    return None if x is None or x != x else x
