"""Pushing samples through a model: statistics of every output, variance shares, failures counted.

A model is any function ``model(X) -> (outputs, reasons)``: ``X`` holds one row of input
values per sample (SI), ``outputs`` maps each output key to an array with one value per row,
and ``reasons`` gives per row None (solved) or the one line that says why the row failed
(its outputs are then NaN). All rows come in one call, so the model may batch, group and
share work; rows never affect each other. Failed samples are counted and their reasons
kept: they are left out of the statistics, never silently.
"""

from __future__ import annotations

from collections import Counter
from dataclasses import dataclass, field

import numpy as np

from perfchain.errors import InputError
from perfchain.uncertainty.sampling import saltelli_design, to_inputs, unit_samples
from perfchain.uncertainty.statistics import linear_shares, sobol_indices, summary

__all__ = ["Propagation", "propagate", "METHODS", "TORNADO_PROBABILITY"]

METHODS = ("sobol", "local")
#: the tornado and the local slopes move one input at a time to the ends of this central interval
TORNADO_PROBABILITY = 0.9


@dataclass
class Propagation:
    """The samples of one propagation and what they show.

    Attributes
    ----------
    names : tuple of str
        The varied inputs, in order.
    distributions : tuple of Distribution
    nominal : numpy.ndarray
        The nominal input values [SI], shape (d,).
    method : str
        ``"sobol"`` (first-order and total indices) or ``"local"`` (variance shares of the
        one-at-a-time slopes).
    seed : int
    inputs : numpy.ndarray
        The samples the statistics come from [SI], shape (n, d).
    values : dict
        output key -> samples [SI], shape (n,); NaN for a failed sample.
    reasons : list
        Per sample None, or why it failed.
    evaluations : int
        Model rows evaluated in all (samples, Saltelli matrices, one-at-a-time rows).
    failed_evaluations : Counter
        reason -> number of failed rows among all evaluations.
    first, total : dict
        output -> input -> Sobol index [-] (``total`` None for the local method, whose
        ``first`` holds the linear variance shares).
    nominal_values : dict
        output -> value at the nominal inputs.
    tornado : dict
        output -> input -> (value with the input at its 5th, at its 95th percentile), the
        others nominal.
    elasticity : dict
        output -> input -> d ln(output) / d ln(input) [-] at the nominal point (secant over
        the 5-95 % interval).
    """

    names: tuple
    distributions: tuple
    nominal: np.ndarray
    method: str
    seed: int
    inputs: np.ndarray
    values: dict
    reasons: list
    evaluations: int
    failed_evaluations: Counter = field(default_factory=Counter)
    first: dict = field(default_factory=dict)
    total: dict | None = None
    nominal_values: dict = field(default_factory=dict)
    tornado: dict = field(default_factory=dict)
    elasticity: dict = field(default_factory=dict)

    @property
    def samples(self) -> int:
        """Number of samples behind the statistics."""
        return len(self.reasons)

    @property
    def failed(self) -> int:
        """Samples (of :attr:`samples`) that failed to solve."""
        return sum(r is not None for r in self.reasons)

    def uncertainty_block(self) -> dict:
        """output -> {mean, std, p5, p50, p95} [SI] over the samples that solved."""
        return {k: summary(v) for k, v in self.values.items()}

    def sensitivity_block(self) -> dict:
        """output -> input -> share of the output's variance [-] (first-order)."""
        return self.first

    def run_block(self) -> dict:
        """How the numbers were made: inputs, samples, seed, method, failures and their reasons."""
        failures = Counter(r for r in self.reasons if r is not None)
        return {
            "inputs": {n: {"distribution": d.describe(), "as_typed": d.text, "nominal": float(x)}
                       for n, d, x in zip(self.names, self.distributions, self.nominal)},
            "samples": self.samples, "seed": self.seed, "sampling": "scrambled Sobol (scipy.stats.qmc)",
            "sensitivity_method": ("first-order and total Sobol indices (Saltelli 2010, Jansen)"
                                   if self.method == "sobol" else
                                   "first-order propagation of one-at-a-time slopes over the 5-95 % interval"),
            "evaluations": self.evaluations, "failed": self.failed,
            "failure_reasons": dict(failures.most_common()),
            "failed_evaluations": sum(self.failed_evaluations.values()),
            "sensitivity_total": self.total, "elasticity": self.elasticity,
            "tornado": {o: {i: list(v) for i, v in t.items()} for o, t in self.tornado.items()},
            "nominal_values": self.nominal_values,
        }

    def to_dict(self) -> dict:
        """The three JSON blocks: ``uncertainty``, ``sensitivity`` and ``uncertainty_run``."""
        return {"uncertainty": self.uncertainty_block(), "sensitivity": self.sensitivity_block(),
                "uncertainty_run": self.run_block()}

    def frame(self):
        """The samples as a pandas DataFrame: one column per input and output, ``failure`` text."""
        import pandas as pd

        cols = {n: self.inputs[:, j] for j, n in enumerate(self.names)}
        cols.update({k: v for k, v in self.values.items()})
        cols["failure"] = pd.array(self.reasons, dtype="string")
        return pd.DataFrame(cols)


def propagate(model, names, distributions, nominal, *, samples: int, seed: int = 0,
              method: str = "sobol") -> Propagation:
    """Sample the inputs, run the model once over every row, and summarise.

    Parameters
    ----------
    model : callable
        ``model(X) -> (outputs, reasons)``, see the module docstring.
    names : sequence of str
        The input names (columns of X).
    distributions : sequence of Distribution
        One per input.
    nominal : sequence of float
        The nominal value of each input [SI]; the one-at-a-time rows move one input
        from here to its 5th and 95th percentiles.
    samples : int
        n: samples behind the statistics, at least 8. With ``method="sobol"`` the model
        also runs n rows of B and n rows of each AB_i: n (d + 2) rows in all.
    seed : int
        Seed of the scrambled Sobol sequence.
    method : str
        ``"sobol"`` or ``"local"``.

    Returns
    -------
    Propagation

    Examples
    --------
    Closed form: y = 3 x with x normal (mean 1, std 0.1) has mean 3 and std 0.3; the only
    input holds the whole variance:

    >>> from perfchain.uncertainty.distributions import normal
    >>> def model(X):
    ...     return {"y": 3.0 * X[:, 0]}, [None] * len(X)
    >>> p = propagate(model, ["x"], [normal(1.0, 0.1)], [1.0], samples=4096, seed=1)
    >>> s = p.uncertainty_block()["y"]
    >>> round(s["mean"], 3), round(s["std"], 3), round(p.first["y"]["x"], 2)
    (3.0, 0.3, 1.0)
    """
    if method not in METHODS:
        raise InputError("sensitivity", method, "one of " + ", ".join(METHODS))
    names, dists = tuple(names), tuple(distributions)
    d = len(names)
    nominal = np.asarray(nominal, dtype=float)
    if method == "sobol":
        A, B, AB = saltelli_design(samples, d, seed)
        U = np.concatenate([A, B, AB.reshape(-1, d)])
    else:
        U = unit_samples(samples, d, seed)
    X = to_inputs(U, dists)
    oat = np.repeat(nominal[None, :], 2 * d + 1, axis=0)
    ends = np.array([dist.interval(TORNADO_PROBABILITY) for dist in dists]).reshape(d, 2)
    for i in range(d):
        oat[1 + 2 * i, i], oat[2 + 2 * i, i] = ends[i]
    outputs, reasons = model(np.concatenate([X, oat]))
    outputs = {k: np.asarray(v, dtype=float) for k, v in outputs.items()}
    n = samples
    result = Propagation(names, dists, nominal, method, seed, X[:n], {k: v[:n] for k, v in outputs.items()},
                         list(reasons[:n]), len(reasons),
                         Counter(r for r in reasons if r is not None))
    stds = np.array([dist.std for dist in dists])
    for k, v in outputs.items():
        f_oat = v[len(X):]
        f0 = f_oat[0]
        lo, hi = f_oat[1::2], f_oat[2::2]
        slopes = (hi - lo) / (ends[:, 1] - ends[:, 0])
        result.nominal_values[k] = float(f0)
        result.tornado[k] = {nm: (float(lo[i]), float(hi[i])) for i, nm in enumerate(names)}
        with np.errstate(all="ignore"):
            el = slopes * nominal / f0
        result.elasticity[k] = {nm: float(el[i]) for i, nm in enumerate(names)}
        if method == "sobol":
            S, ST = sobol_indices(v[:n], v[n:2 * n], v[2 * n:len(X)].reshape(d, n))
            result.first[k] = {nm: float(S[i]) for i, nm in enumerate(names)}
            result.total = result.total or {}
            result.total[k] = {nm: float(ST[i]) for i, nm in enumerate(names)}
        else:
            shares = linear_shares(slopes, stds)
            result.first[k] = {nm: float(shares[i]) for i, nm in enumerate(names)}
    return result
