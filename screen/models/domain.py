"""Domain checks shared by every model: one place, one message format.

A model refuses out-of-domain input with :class:`screen.errors.ModelDomainError` instead of
returning NaN or a silently wrong number; the engine then reports the key and fails closed.
Scalars take a fast path (no numpy round trip): sweeps and vessel balances call these checks
thousands of times per screening.

Examples
--------
>>> require_positive(2.5, "specific_heat", "J/(kg K)")
2.5
>>> require_positive(0.0, "area", "m^2", allow_zero=True)
0.0
>>> require_positive(-1.0, "mass", "kg")
Traceback (most recent call last):
...
screen.errors.ModelDomainError: mass: mass = -1.0 kg is out of range; accepted: a finite value > 0 kg
"""

from __future__ import annotations

import math

import numpy as np

from screen.errors import ModelDomainError

_SCALARS = (float, int)


def _fail(name: str, shown, unit: str, accepted: str, key: str | None):
    unit_text = f" {unit}" if unit else ""
    raise ModelDomainError(f"{name} = {shown!r}{unit_text} is out of range; accepted: "
                           f"{accepted}{unit_text}", key=key or name)


def _first_bad(array: np.ndarray, bad: np.ndarray) -> float:
    return float(array[bad].flat[0]) if array.ndim else float(array)


def require_finite(value, name: str, unit: str = "", key: str | None = None):
    """``value`` as float (scalar) or float array, after checking it is finite.

    Parameters
    ----------
    value : float or array_like
        The value to check [any unit].
    name : str
        Name shown in the error. [text]
    unit : str
        Unit shown in the error. [text]
    key : str, optional
        Case-file key of the value (defaults to ``name``). [text]

    Returns
    -------
    float or numpy.ndarray
        The value [same unit].
    """
    if isinstance(value, _SCALARS) and not isinstance(value, bool):
        number = float(value)
        if not math.isfinite(number):
            _fail(name, value, unit, "a finite value", key)
        return number
    try:
        array = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        _fail(name, value, unit, "a number", key)
    bad = ~np.isfinite(array)
    if bad.any():
        _fail(name, _first_bad(array, bad), unit, "a finite value", key)
    return float(array) if array.ndim == 0 else array


def require_positive(value, name: str, unit: str = "", key: str | None = None,
                     allow_zero: bool = False):
    """``value`` after checking it is finite and > 0 (or >= 0 with ``allow_zero``).

    Parameters
    ----------
    value : float or array_like
        The value to check [any unit].
    name : str
        Name shown in the error. [text]
    unit : str
        Unit shown in the error. [text]
    key : str, optional
        Case-file key of the value (defaults to ``name``). [text]
    allow_zero : bool
        Accept zero. [bool]

    Returns
    -------
    float or numpy.ndarray
        The value [same unit]: a float for a scalar input, else a float array.
    """
    accepted = "a finite value >= 0" if allow_zero else "a finite value > 0"
    if isinstance(value, _SCALARS) and not isinstance(value, bool):
        number = float(value)
        if not (math.isfinite(number) and (number >= 0.0 if allow_zero else number > 0.0)):
            _fail(name, value, unit, accepted, key)
        return number
    try:
        array = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        _fail(name, value, unit, "a number", key)
    bad = ~np.isfinite(array) | ((array < 0.0) if allow_zero else (array <= 0.0))
    if bad.any():
        _fail(name, _first_bad(array, bad), unit, accepted, key)
    return float(array) if array.ndim == 0 else array


def require_non_negative(value, name: str, unit: str = "", key: str | None = None):
    """``value`` after checking it is finite and >= 0; see :func:`require_positive`.

    Parameters
    ----------
    value : float or array_like
        The value to check [any unit].
    name : str
        Name shown in the error. [text]
    unit : str
        Unit shown in the error. [text]
    key : str, optional
        Case-file key of the value (defaults to ``name``). [text]

    Returns
    -------
    float or numpy.ndarray
        The value [same unit].
    """
    return require_positive(value, name, unit, key, allow_zero=True)


def require_fraction(value, name: str, key: str | None = None):
    """``value`` after checking it lies in [0, 1] (a conversion or a fraction).

    Parameters
    ----------
    value : float or array_like
        The fraction to check [-].
    name : str
        Name shown in the error. [text]
    key : str, optional
        Case-file key of the value (defaults to ``name``). [text]

    Returns
    -------
    float or numpy.ndarray
        The value [-].
    """
    if isinstance(value, _SCALARS) and not isinstance(value, bool):
        number = float(value)
        if not 0.0 <= number <= 1.0:
            _fail(name, value, "", "a value in [0, 1]", key)
        return number
    array = np.asarray(value, dtype=float)
    bad = ~((array >= 0.0) & (array <= 1.0))
    if bad.any():
        _fail(name, _first_bad(array, bad), "", "a value in [0, 1]", key)
    return float(array) if array.ndim == 0 else array


def scalar_or_array(values):
    """A float for a 0-d result, else the array (models accept and return both).

    Parameters
    ----------
    values : array_like
        Result of a vectorised model [any unit].

    Returns
    -------
    float or numpy.ndarray
        The same values [same unit].
    """
    values = np.asarray(values)
    return float(values) if values.ndim == 0 else values
