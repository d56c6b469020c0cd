"""Statistics of sampled outputs: mean, spread, percentiles, and each input's share of the variance.

Sobol indices by the estimators recommended by Saltelli et al. (2010): the first-order index
S_i = mean(f_B (f_ABi - f_A)) / V and the total index (Jansen 1999)
S_Ti = mean((f_A - f_ABi)^2) / (2 V), with V the variance of f over A and B together; f is
centred on its sample mean first (the expectations are unchanged, since E[f_ABi - f_A] = 0,
and the first-order estimate no longer carries the mean squared as noise).
Local shares come from one slope per input: (slope_i sigma_i)^2 over their sum, the
first-order (linear) propagation of variance.
"""

from __future__ import annotations

import numpy as np

__all__ = ["summary", "sobol_indices", "linear_shares", "PERCENTILES"]

PERCENTILES = (5.0, 50.0, 95.0)


def summary(values) -> dict:
    """Mean, standard deviation (n - 1) and 5/50/95th percentiles of the finite values.

    Parameters
    ----------
    values : array_like
        Samples of one output; NaN marks a failed sample and is left out (count them
        yourself: :class:`perfchain.uncertainty.propagation.Propagation` does).

    Returns
    -------
    dict
        ``mean``, ``std``, ``p5``, ``p50``, ``p95`` [unit of the output]; None each when
        fewer than two samples are finite.

    Examples
    --------
    Closed form: 1..101 has mean 51, median 51, 5th percentile 6 (linear interpolation):

    >>> s = summary(np.arange(1.0, 102.0))
    >>> s["mean"], s["p5"], s["p50"], s["p95"]
    (51.0, 6.0, 51.0, 96.0)
    """
    v = np.asarray(values, dtype=float)
    v = v[np.isfinite(v)]
    if v.size < 2:
        return dict.fromkeys(("mean", "std", "p5", "p50", "p95"))
    p5, p50, p95 = np.percentile(v, PERCENTILES)
    return {"mean": float(v.mean()), "std": float(v.std(ddof=1)), "p5": float(p5), "p50": float(p50),
            "p95": float(p95)}


def sobol_indices(fA, fB, fAB) -> tuple:
    """First-order and total Sobol indices of each input (Saltelli 2010; Jansen 1999).

    Parameters
    ----------
    fA, fB : array_like
        The output at the rows of A and of B, shape (n,); NaN marks a failed sample.
    fAB : array_like
        The output at the rows of each AB_i, shape (d, n).

    Returns
    -------
    (numpy.ndarray, numpy.ndarray)
        First-order S_i and total S_Ti [-], shape (d,); NaN where the output does not vary.
        A row with any failed sample among A, B, AB_i is left out of index i.

    Examples
    --------
    f = x1 + 2 x2 with independent uniforms on (0, 1): S_1 = 1/5, S_2 = 4/5 (the squared
    coefficients, Saltelli et al. 2008, Global Sensitivity Analysis: The Primer, ch. 1):

    >>> from perfchain.uncertainty.sampling import saltelli_design
    >>> A, B, AB = saltelli_design(4096, 2, seed=3)
    >>> f = lambda x: x[..., 0] + 2 * x[..., 1]
    >>> S, ST = sobol_indices(f(A), f(B), f(AB))
    >>> np.round(S, 2).tolist(), np.round(ST, 2).tolist()
    ([0.2, 0.8], [0.2, 0.8])
    """
    fA, fB, fAB = (np.asarray(x, dtype=float) for x in (fA, fB, fAB))
    both = np.concatenate([fA, fB])
    finite = both[np.isfinite(both)]
    V = np.var(finite, ddof=0) if finite.size > 1 else np.nan
    if finite.size:   # centred: the same expectations, far less noise when the mean dwarfs the spread
        fA, fB, fAB = fA - finite.mean(), fB - finite.mean(), fAB - finite.mean()
    d = fAB.shape[0]
    first, total = np.full(d, np.nan), np.full(d, np.nan)
    if not V > 0:
        return first, total
    for i in range(d):
        ok = np.isfinite(fA) & np.isfinite(fB) & np.isfinite(fAB[i])
        if ok.sum() < 2:
            continue
        a, b, ab = fA[ok], fB[ok], fAB[i][ok]
        first[i] = np.mean(b * (ab - a)) / V
        total[i] = 0.5 * np.mean((a - ab) ** 2) / V
    return first, total


def linear_shares(slopes, stds) -> np.ndarray:
    """Each input's share of the output variance by first-order propagation.

    Parameters
    ----------
    slopes : array_like
        d output / d input_i [output unit / input unit], shape (d,).
    stds : array_like
        Standard deviation of each input [input unit], shape (d,).

    Returns
    -------
    numpy.ndarray
        (slope_i sigma_i)^2 / sum_j (slope_j sigma_j)^2 [-]; NaN when the sum is 0.

    Examples
    --------
    Closed form: slopes 1 and 2, equal spreads -> 1/5 and 4/5:

    >>> linear_shares([1.0, 2.0], [0.5, 0.5]).tolist()
    [0.2, 0.8]
    """
    terms = (np.asarray(slopes, float) * np.asarray(stds, float)) ** 2
    total = terms.sum()
    return terms / total if total > 0 else np.full(terms.shape, np.nan)
