"""Input checks and scalar-or-array results shared by the calorically-perfect closed forms.

Used by :mod:`perfchain.nozzle.isentropic` and :mod:`perfchain.nozzle.rayleigh`: every
argument may be a float or an array; a bad element raises a one-line
:class:`~perfchain.errors.InputError` naming the field, the first bad value and what is allowed.
"""

from __future__ import annotations

import numpy as np

from perfchain.errors import InputError

__all__ = ["check_array", "check_gamma", "check_mach", "float_if_scalar"]


def check_array(name, value, low, allowed, *, inclusive=False, high=None):
    """``value`` as a float array, every element finite and above ``low`` (and at most ``high``).

    Parameters
    ----------
    name : str
        Field name for the error message.
    value : float or array_like
        The input, in the unit of ``low`` and ``high``.
    low : float
        Lower bound, exclusive (inclusive with ``inclusive=True``).
    allowed : str
        What is allowed, for the error message.
    inclusive : bool
        Accept ``low`` itself.
    high : float, optional
        Upper bound, inclusive.

    Returns
    -------
    ndarray
        ``numpy.asarray(value, dtype=float)``.

    Examples
    --------
    A pressure ratio lies in (0, 1] (closed form p/p0 = (T/T0)^(g/(g-1)) with 0 < T/T0 <= 1):

    >>> check_array("pressure_ratio", [0.5, 1.0], 0.0, "a ratio in (0, 1]", high=1.0)
    array([0.5, 1. ])
    >>> check_array("pressure_ratio", 1.5, 0.0, "a ratio in (0, 1]", high=1.0)
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: pressure_ratio: got 1.5; allowed: a ratio in (0, 1]
    """
    arr = np.asarray(value, dtype=float)
    bad = ~np.isfinite(arr) | ((arr < low) if inclusive else (arr <= low))
    if high is not None:
        bad |= arr > high
    if np.any(bad):
        raise InputError(name, float(arr[bad].flat[0]) if arr.ndim else float(arr), allowed)
    return arr


def check_gamma(g):
    """Ratio of specific heats [-] as a float array, every element above 1.

    Parameters
    ----------
    g : float or array_like
        Ratio of specific heats [-].

    Returns
    -------
    ndarray

    Examples
    --------
    Closed form: a gas has cp > cv (cp - cv = R), so g = cp/cv > 1; 5/3 for a monatomic gas:

    >>> float(check_gamma(5 / 3)) > 1
    True
    >>> check_gamma(1.0)
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: gamma: got 1.0; allowed: a ratio of specific heats above 1
    """
    return check_array("gamma", g, 1.0, "a ratio of specific heats above 1")


def check_mach(M):
    """Mach number [-] as a float array, every element 0 or more.

    Parameters
    ----------
    M : float or array_like
        Mach number [-].

    Returns
    -------
    ndarray

    Examples
    --------
    Closed form: M = u / a with a speed u >= 0 and a sound speed a > 0, so M >= 0:

    >>> check_mach([0.0, 2.0])
    array([0., 2.])
    >>> check_mach(-1.0)
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: mach: got -1.0; allowed: a Mach number of 0 or more
    """
    return check_array("mach", M, 0.0, "a Mach number of 0 or more", inclusive=True)


def float_if_scalar(arr, *inputs):
    """A plain float when every input was a scalar, else the array itself.

    Parameters
    ----------
    arr : ndarray
        The result [any unit].
    *inputs
        The arguments the result was computed from.

    Returns
    -------
    float or ndarray

    Examples
    --------
    Closed form T/T0 = 1 / (1 + (g-1)/2 M^2): g = 1.4 at M = 0 and M = 1 gives 1 and 5/6:

    >>> M = np.array([0.0, 1.0])
    >>> float_if_scalar(1 / (1 + 0.2 * M * M), M, 1.4)
    array([1.        , 0.83333333])
    >>> float_if_scalar(np.asarray(1 / 1.2), 1.0, 1.4) == 5 / 6
    True
    """
    return float(arr) if all(np.ndim(x) == 0 for x in inputs) else arr
