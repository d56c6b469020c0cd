"""Samples: scrambled Sobol points in the unit cube, seeded, and the Saltelli design built from them.

A scrambled Sobol sequence (Owen scrambling, scipy.stats.qmc) fills the unit cube more evenly
than independent random numbers, so means and percentiles converge faster; the seed makes
every run reproducible, bit for bit.
"""

from __future__ import annotations

import warnings

import numpy as np

__all__ = ["unit_samples", "saltelli_design", "to_inputs", "TINY"]

#: samples are kept this far inside (0, 1), so a normal's quantile stays finite
TINY = 2.0 ** -53


def unit_samples(n: int, d: int, seed: int) -> np.ndarray:
    """``n`` scrambled Sobol points in the ``d``-dimensional unit cube, open at both ends.

    Parameters
    ----------
    n : int
        Number of points (a power of 2 keeps the sequence's balance; any n works).
    d : int
        Dimensions.
    seed : int
        Seed of the scrambling; the same seed gives the same points.

    Returns
    -------
    numpy.ndarray
        Shape (n, d), values in (0, 1).

    Examples
    --------
    The mean of the points is 1/2 in every dimension within about 1/n (a property of
    the sequence; Owen 1997, scrambled net variance):

    >>> u = unit_samples(1024, 3, seed=1)
    >>> u.shape, bool(abs(u.mean(0) - 0.5).max() < 0.005)
    ((1024, 3), True)
    >>> bool((unit_samples(8, 2, 7) == unit_samples(8, 2, 7)).all())
    True
    """
    from scipy.stats import qmc

    with warnings.catch_warnings():
        warnings.simplefilter("ignore", UserWarning)   # "balance properties ... power of 2"
        u = qmc.Sobol(d, scramble=True, seed=np.random.default_rng(seed)).random(n)
    return np.clip(u, TINY, 1.0 - TINY)


def saltelli_design(n: int, d: int, seed: int):
    """The matrices A, B and AB_i of the Saltelli (2010) estimators of Sobol indices.

    A and B are two independent ``n`` x ``d`` samples (the first and last ``d``
    columns of one 2d-dimensional Sobol sequence); AB_i is A with column i taken
    from B (Saltelli et al. 2010, Comput. Phys. Commun. 181, 259-270, sec. 3).

    Returns
    -------
    (numpy.ndarray, numpy.ndarray, numpy.ndarray)
        A (n, d), B (n, d), AB (d, n, d) in the unit cube.

    Examples
    --------
    >>> A, B, AB = saltelli_design(16, 2, seed=0)
    >>> bool((AB[0][:, 0] == B[:, 0]).all() and (AB[0][:, 1] == A[:, 1]).all())
    True
    """
    u = unit_samples(n, 2 * d, seed)
    A, B = u[:, :d], u[:, d:]
    AB = np.repeat(A[None, :, :], d, axis=0)
    for i in range(d):
        AB[i, :, i] = B[:, i]
    return A, B, AB


def to_inputs(u: np.ndarray, distributions) -> np.ndarray:
    """Unit-cube points -> input values, column j through ``distributions[j].ppf``.

    Parameters
    ----------
    u : numpy.ndarray
        (..., d) in (0, 1).
    distributions : sequence of Distribution
        One per column.

    Returns
    -------
    numpy.ndarray
        Same shape [units of the inputs].

    Examples
    --------
    >>> from perfchain.uncertainty.distributions import uniform
    >>> to_inputs(np.array([[0.5, 0.25]]), [uniform(0, 2), uniform(10, 14)]).tolist()
    [[1.0, 11.0]]
    """
    out = np.empty_like(u, dtype=float)
    for j, dist in enumerate(distributions):
        out[..., j] = dist.ppf(u[..., j])
    return out
