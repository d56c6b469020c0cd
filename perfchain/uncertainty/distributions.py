"""Input distributions: normal, uniform and triangular, with their quantile function and moments.

A :class:`Distribution` maps a number u in (0, 1) to a value by its inverse cumulative
distribution (its quantile function), so uniform samples become samples of the input.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from perfchain.errors import InputError

__all__ = ["Distribution", "normal", "uniform", "triangular", "KINDS"]

KINDS = ("normal", "uniform", "triangular")


@dataclass(frozen=True)
class Distribution:
    """One input's distribution, in SI units.

    Attributes
    ----------
    kind : str
        ``"normal"`` (``a`` mean, ``b`` standard deviation), ``"uniform"`` (``a`` low,
        ``b`` high) or ``"triangular"`` (``a`` low, ``c`` mode, ``b`` high).
    a, b, c : float
        The parameters above [unit of the input]; ``c`` only for triangular.
    text : str
        What was typed (for tables and messages).

    Examples
    --------
    Closed forms: a uniform on [0.95, 0.98] has mean 0.965 and standard deviation
    0.03 / sqrt(12) = 0.00866; its quantile at 0.5 is the mean:

    >>> d = uniform(0.95, 0.98)
    >>> round(d.mean, 6), round(d.std, 5), float(d.ppf(0.5))
    (0.965, 0.00866, 0.965)
    """

    kind: str
    a: float
    b: float
    c: float = math.nan
    text: str = ""

    @property
    def mean(self) -> float:
        """Mean [unit of the input]."""
        if self.kind == "normal":
            return self.a
        if self.kind == "uniform":
            return 0.5 * (self.a + self.b)
        return (self.a + self.b + self.c) / 3.0

    @property
    def std(self) -> float:
        """Standard deviation [unit of the input] (closed forms; Johnson, Kotz & Balakrishnan)."""
        if self.kind == "normal":
            return self.b
        if self.kind == "uniform":
            return (self.b - self.a) / math.sqrt(12.0)
        a, b, c = self.a, self.b, self.c
        return math.sqrt((a * a + b * b + c * c - a * b - a * c - b * c) / 18.0)

    def ppf(self, u):
        """Quantile function: the value below which a fraction ``u`` of the samples lie.

        Parameters
        ----------
        u : float or array_like
            Probabilities in (0, 1) [-].

        Returns
        -------
        float or numpy.ndarray
            [unit of the input]

        Examples
        --------
        The standard normal's 97.5 % point is 1.959964 (Abramowitz & Stegun, Table 26.5);
        a triangular (0, 1, 2) has its median at the mode (closed form):

        >>> round(float(normal(0.0, 1.0).ppf(0.975)), 6), float(triangular(0.0, 1.0, 2.0).ppf(0.5))
        (1.959964, 1.0)
        """
        u = np.asarray(u, dtype=float)
        if self.kind == "normal":
            from scipy.special import ndtri

            return self.a + self.b * ndtri(u)
        if self.kind == "uniform":
            return self.a + (self.b - self.a) * u
        a, b, c = self.a, self.b, self.c
        split = (c - a) / (b - a)
        low = a + np.sqrt(np.clip(u, 0.0, 1.0) * (b - a) * (c - a))
        high = b - np.sqrt(np.clip(1.0 - u, 0.0, 1.0) * (b - a) * (b - c))
        return np.where(u < split, low, high)

    def interval(self, probability: float) -> tuple:
        """The central interval holding ``probability`` of the samples, (low, high) [unit].

        >>> normal(0.0, 1.0).interval(0.9)[1] > 1.6448
        True
        """
        q = 0.5 * (1.0 - probability)
        return float(self.ppf(q)), float(self.ppf(1.0 - q))

    def support(self) -> tuple:
        """The values a sample can take, (low, high) [unit]; a normal's reaches +/- infinity.

        >>> uniform(1.0, 2.0).support(), normal(0.0, 1.0).support()
        ((1.0, 2.0), (-inf, inf))
        """
        if self.kind == "normal":
            return -math.inf, math.inf
        return self.a, self.b

    def describe(self) -> str:
        """Plain words and SI numbers, e.g. ``"normal, mean 2.56, std 0.0256"``.

        >>> uniform(0.95, 0.98).describe()
        'uniform from 0.95 to 0.98'
        """
        if self.kind == "normal":
            return f"normal, mean {self.a:.6g}, std {self.b:.6g}"
        if self.kind == "uniform":
            return f"uniform from {self.a:.6g} to {self.b:.6g}"
        return f"triangular from {self.a:.6g} to {self.b:.6g}, mode {self.c:.6g}"


def normal(mean: float, std: float, text: str = "", name: str = "distribution") -> Distribution:
    """A normal distribution; ``std`` must be above 0.

    >>> normal(1.0, -0.1, name="mixture_ratio")
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: mixture_ratio: got -0.1; allowed: a standard deviation above 0
    """
    if not (math.isfinite(mean) and math.isfinite(std)):
        raise InputError(name, text or (mean, std), "finite numbers")
    if not std > 0:
        raise InputError(name, text or std, "a standard deviation above 0")
    return Distribution("normal", float(mean), float(std), text=text)


def uniform(low: float, high: float, text: str = "", name: str = "distribution") -> Distribution:
    """A uniform distribution on [low, high]; ``low`` must lie below ``high``.

    >>> uniform(0.98, 0.95, name="cstar_efficiency")
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: cstar_efficiency: got (0.98, 0.95); allowed: a range whose low end lies below its high end
    """
    if not (math.isfinite(low) and math.isfinite(high)):
        raise InputError(name, text or (low, high), "finite numbers")
    if not low < high:
        raise InputError(name, text or (low, high), "a range whose low end lies below its high end")
    return Distribution("uniform", float(low), float(high), text=text)


def triangular(low: float, mode: float, high: float, text: str = "", name: str = "distribution") -> Distribution:
    """A triangular distribution: low <= mode <= high and low < high.

    >>> round(triangular(0.0, 0.0, 3.0).mean, 12)
    1.0
    """
    if not all(math.isfinite(v) for v in (low, mode, high)):
        raise InputError(name, text or (low, mode, high), "finite numbers")
    if not (low <= mode <= high and low < high):
        raise InputError(name, text or (low, mode, high), "low <= mode <= high, with low below high")
    return Distribution("triangular", float(low), float(high), float(mode), text=text)
