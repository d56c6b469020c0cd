"""The perfect-gas area-ratio inversion: Mach number (and pressure) from A/A*, compiled.

The one implementation of the inverse of the isentropic area ratio of a calorically
perfect gas (NACA Report 1135, Ames Research Staff, 1953, eq. 80):

    A/A* = (1/M) [(2/(g+1)) (1 + (g-1)/2 M^2)]^((g+1)/(2(g-1)))

:func:`perfchain.nozzle.isentropic.mach_from_area_ratio` and the first exit guess of the
batch solver (:func:`perfect_gas_guess`) both call :func:`mach_at_area_ratio`.
"""

from __future__ import annotations

import math

from perfchain.thermo.jit import jit

__all__ = ["log_area_ratio", "mach_at_area_ratio", "perfect_gas_guess"]


@jit
def log_area_ratio(M, g):
    """ln(A/A*) of a calorically perfect gas at Mach number M (NACA Report 1135, eq. 80).

    Parameters
    ----------
    M : float
        Mach number [-], above 0.
    g : float
        Ratio of specific heats [-], above 1.

    Returns
    -------
    float
        ln(A/A*) [-] (no overflow: +inf only for an infinite M).

    Examples
    --------
    g = 1.4, M = 2: A/A* = (1/2) (1.8/1.2)^3 = 1.6875 (closed form; NACA 1135 table: 1.688)

    >>> import math
    >>> round(math.exp(log_area_ratio(2.0, 1.4)), 12)
    1.6875
    """
    return (g + 1.0) / (2.0 * (g - 1.0)) * math.log((2.0 / (g + 1.0)) * (1.0 + 0.5 * (g - 1.0) * (M * M))) \
        - math.log(M)


@jit
def mach_at_area_ratio(eps, g, supersonic):
    """Mach number at area ratio A/A* = eps, supersonic or subsonic branch.

    Bisection on :func:`log_area_ratio` until the bracket holds two adjacent floats, so
    the area ratio of the result is eps to round-off (the Mach number itself is
    ill-conditioned next to M = 1, where A/A* - 1 ~ (M - 1)^2).

    Parameters
    ----------
    eps : float
        Area ratio A/A* [-]; 1 or less gives the throat, M = 1.
    g : float
        Ratio of specific heats [-], above 1.
    supersonic : bool
        Which of the two solutions.

    Returns
    -------
    float
        Mach number [-].

    Examples
    --------
    NACA Report 1135, g = 1.4 (closed form of eq. 80): A/A* = 1.6875 at M = 2 and
    1.33984375 at M = 0.5

    >>> round(mach_at_area_ratio(1.6875, 1.4, True), 12), round(mach_at_area_ratio(1.33984375, 1.4, False), 12)
    (2.0, 0.5)
    """
    if not eps > 1.0:
        return 1.0
    if not math.isfinite(eps):
        return math.inf if supersonic else 0.0
    target = math.log(eps)
    if log_area_ratio(1.0, g) - target >= 0.0:      # eps = 1 to round-off: the throat
        return 1.0
    if supersonic:
        lo, hi = 1.0, 2.0
        while log_area_ratio(hi, g) - target < 0.0:
            lo = hi
            hi *= 2.0
    else:
        # A/A* ~ (1/M) (2/(g+1))^((g+1)/(2(g-1))) as M -> 0
        lo = 0.5 * math.exp((g + 1.0) / (2.0 * (g - 1.0)) * math.log(2.0 / (g + 1.0))) / eps
        while log_area_ratio(lo, g) - target < 0.0:
            lo *= 0.5
        hi = 1.0
    f_lo = log_area_ratio(lo, g) - target
    for _ in range(2200):
        mid = 0.5 * (lo + hi)
        if not lo < mid < hi:
            break
        f = log_area_ratio(mid, g) - target
        if f == 0.0:
            return mid
        if (f < 0.0) == (f_lo < 0.0):
            lo, f_lo = mid, f
        else:
            hi = mid
    f_hi = log_area_ratio(hi, g) - target
    return lo if abs(f_lo) <= abs(f_hi) else hi


@jit
def perfect_gas_guess(eps, g, out):
    """ln(p/p*) of a calorically perfect gas at supersonic area ratios, per row (p* sonic).

    The batch solver's first guess for an exit: :func:`mach_at_area_ratio`, then
    p/p* = [(g+1)/2 / (1 + (g-1)/2 M^2)]^(g/(g-1)) (NACA Report 1135, eqs. 44-45),
    kept within [-80, 0].

    Parameters
    ----------
    eps : ndarray (n,)
        Area ratios A/A* [-].
    g : ndarray (n,)
        Ratios of specific heats [-].
    out : ndarray (n,)
        Written: ln(p/p*) [-].

    Examples
    --------
    Argon (g = 5/3) at A/A* = 4: M = 3.441, p/p0 = 0.018376 and p*/p0 = (3/4)^(5/2) = 0.48714
    (closed forms of NACA Report 1135), so ln(p/p*) = -3.2775:

    >>> import numpy as np
    >>> out = np.empty(1)
    >>> perfect_gas_guess(np.array([4.0]), np.array([5 / 3]), out)
    >>> round(float(out[0]), 4)
    -3.2775
    """
    for i in range(eps.shape[0]):
        gi = g[i]
        M = mach_at_area_ratio(eps[i], gi, True)
        y = -gi / (gi - 1.0) * (math.log(1.0 + 0.5 * (gi - 1.0) * (M * M)) - math.log(0.5 * (gi + 1.0)))
        out[i] = min(max(y, -80.0), 0.0)
