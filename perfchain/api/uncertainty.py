"""Uncertainty and sensitivity: the Python face of ``perfchain point --vary`` and ``perfchain deltav --vary``.

:func:`point_uncertainty` takes every keyword of :func:`perfchain.point` plus ``vary``;
:func:`delta_v_uncertainty` those of :func:`perfchain.delta_v`. Both return an
:class:`Uncertain`: the nominal result, the ``uncertainty`` block (mean, std, 5/50/95th
percentiles of each output, named by its JSON key), the ``sensitivity`` block (each input's
share of each output's variance) and the samples themselves.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["Uncertain", "point_uncertainty", "delta_v_uncertainty", "format_uncertainty"]


@dataclass
class Uncertain:
    """A nominal result and the statistics of its sampled inputs (SI units).

    Attributes
    ----------
    nominal : object
        The result at the nominal inputs (a :class:`~perfchain.api.point.PointResult` or a
        :class:`~perfchain.api.vehicle.DeltaV`).
    propagation : perfchain.uncertainty.propagation.Propagation
        Samples, statistics, Sobol indices or local shares, failures.
    """

    nominal: object
    propagation: object

    @property
    def uncertainty(self) -> dict:
        """output -> {mean, std, p5, p50, p95} [SI]."""
        return self.propagation.uncertainty_block()

    @property
    def sensitivity(self) -> dict:
        """output -> input -> share of the output's variance [-]."""
        return self.propagation.sensitivity_block()

    def samples(self):
        """The samples as a pandas DataFrame (inputs, outputs, ``failure``)."""
        return self.propagation.frame()

    def to_parquet(self, path) -> None:
        """Write :meth:`samples` to a Parquet file."""
        self.samples().to_parquet(path, index=False)

    def to_dict(self) -> dict:
        """The nominal result's JSON object with the ``uncertainty``, ``sensitivity`` and
        ``uncertainty_run`` blocks added: what ``--vary ... --json`` prints."""
        return {**self.nominal.to_dict(), **self.propagation.to_dict()}

    def __repr__(self) -> str:
        return format_uncertainty(self.to_dict())


def point_uncertainty(oxidizer=None, fuel=None, *, vary, samples=None, seed=None, sensitivity="local",
                      workers=1, separation=None, **point) -> Uncertain:
    """An operating point with uncertain inputs: the spread of its results and what drives it.

    Parameters
    ----------
    oxidizer, fuel, **point
        Every keyword of :func:`perfchain.point` (the nominal point).
    vary : mapping or list of str
        Input -> distribution: ``{"mixture_ratio": "+/-2%", "cstar_efficiency": "0.95..0.98"}``
        (see :mod:`perfchain.inputs.uncertainty` for the forms: tolerances, ranges,
        ``normal(mean, std)``, ``uniform(low, high)``, ``triangular(low, mode, high)``).
        Inputs: the point's scalar keywords (``mixture_ratio``, ``chamber_pressure``,
        ``area_ratio``, ``cstar_efficiency``, ``thrust``...; see
        :data:`perfchain.study.uncertainty.POINT_INPUTS`) and ``oxidizer.enthalpy`` /
        ``fuel.enthalpy`` per mole of the ingredient's formula unit (``"+/-2 kJ/mol"``).
    samples : int, optional
        Samples behind the statistics (default 4000, percentiles of Isp to about 0.1 s).
    seed : int, optional
        Seed of the scrambled Sobol sequence (default 0); the same seed gives the same numbers.
    sensitivity : str
        ``"local"`` (default: one-at-a-time slopes over each input's 5-95 % interval, linear
        variance shares) or ``"sobol"`` (first-order and total Sobol indices; samples x (d + 2)
        solves, fewer where samples share a chamber).
    workers : int
        Worker processes for the solves (same numbers for any count).
    separation : str, optional
        As in :func:`perfchain.point`.

    Returns
    -------
    Uncertain

    Examples
    --------
    A c* efficiency known only to 0.95-0.98 (uniform) scales delivered Isp in proportion, so the
    delivered vacuum Isp's relative spread is that of the efficiency, 0.03/sqrt(12)/0.965 = 0.90 %
    (closed form), and the efficiency holds all of its variance:

    >>> import perfchain as pc
    >>> u = pc.point_uncertainty("LOX", "RP-1", mixture_ratio=2.56, chamber_pressure="70 bar",
    ...                          area_ratio=40, vary={"cstar_efficiency": "0.95..0.98"}, samples=256)
    >>> s = u.uncertainty["delivered.isp_vacuum"]
    >>> round(s["std"] / s["mean"] * 100, 2), round(u.sensitivity["delivered.isp_vacuum"]["cstar_efficiency"], 3)
    (0.9, 1.0)
    """
    from perfchain.api.point import PointResult
    from perfchain.inputs import point_args
    from perfchain.study.uncertainty import point_uncertainty as run

    args = point_args(oxidizer, fuel, **point)
    nominal, prop = run(args, vary, samples=samples, seed=seed, sensitivity=sensitivity, separation=separation,
                        workers=workers)
    return Uncertain(PointResult.of(nominal), prop)


def delta_v_uncertainty(stages, payload, *, vary, samples=None, seed=None, sensitivity="sobol",
                        names=None) -> Uncertain:
    """A vehicle with uncertain stage inputs: the spread of its delta-v and payload fraction.

    Parameters
    ----------
    stages, payload, names
        As in :func:`perfchain.delta_v`.
    vary : mapping or list of str
        ``{"stage1.isp": "+/-1%", "stage2.structural_ratio": "0.08..0.1", "payload": "+/-5%"}``.
    samples, seed : int, optional
        As in :func:`point_uncertainty`.
    sensitivity : str
        ``"sobol"`` (default; samples are cheap here) or ``"local"``.

    Returns
    -------
    Uncertain

    Examples
    --------
    The rocket equation is linear in the exhaust velocity: Isp 350 s with sigma 1.75 s on a
    stage of mass ratio 200/38.5 gives a delta-v std of g0 1.75 ln(200/38.5) = 28.29 m/s
    (closed form), here within 1 % (the sampling error of a std from 1024 samples is 2.2 %):

    >>> import perfchain as pc
    >>> u = pc.delta_v_uncertainty(["isp=350 s, dry=28.5 t, propellant=161.5 t"], "10 t",
    ...                            vary={"stage1.isp": "+/-1%"}, samples=1024)
    >>> abs(u.uncertainty["total_delta_v"]["std"] / 28.29 - 1) < 0.01
    True
    """
    from perfchain.api.vehicle import delta_v, stack_keywords
    from perfchain.study.uncertainty_vehicle import vehicle_uncertainty

    nominal = delta_v(stages, payload, names=names)
    args = stack_keywords(stages, (names or {}).get("stage", "stages[{i}]"))
    prop = vehicle_uncertainty(args, nominal.payload_mass, vary, samples=samples, seed=seed,
                               sensitivity=sensitivity)
    return Uncertain(nominal, prop)


def format_uncertainty(data: dict) -> str:
    """The ``uncertainty`` and ``sensitivity`` blocks of a result as a plain-text table (SI units).

    Parameters
    ----------
    data : dict
        A dict with ``uncertainty``, ``sensitivity`` and ``uncertainty_run`` blocks
        (:meth:`Uncertain.to_dict`).

    Returns
    -------
    str

    Examples
    --------
    >>> print(format_uncertainty({"uncertainty": {"isp_vacuum": {"mean": 350.0, "std": 1.0, "p5": 348.4,
    ...     "p50": 350.0, "p95": 351.6}}, "sensitivity": {"isp_vacuum": {"mixture_ratio": 1.0}},
    ...     "uncertainty_run": {"samples": 100, "failed": 0, "seed": 0, "failure_reasons": {}}}))
    ... # doctest: +NORMALIZE_WHITESPACE
    output (SI)             mean        std         p5        p50        p95  largest share
    isp_vacuum               350          1      348.4        350      351.6  mixture_ratio 1.00
    100 samples (seed 0), 0 failed
    """
    run = data.get("uncertainty_run", {})
    lines = [f"{'output (SI)':20s} {'mean':>10s} {'std':>10s} {'p5':>10s} {'p50':>10s} {'p95':>10s}  largest share"]
    for key, s in data["uncertainty"].items():
        shares = {k: v for k, v in data["sensitivity"].get(key, {}).items() if v == v}
        top = max(shares, key=shares.get) if shares else None
        cells = " ".join(f"{s[k]:10.6g}" if s[k] is not None else f"{'-':>10s}"
                         for k in ("mean", "std", "p5", "p50", "p95"))
        lines.append(f"{key:20s} {cells}  " + (f"{top} {shares[top]:.2f}" if top else "-"))
    lines.append(f"{run.get('samples')} samples (seed {run.get('seed')}), {run.get('failed')} failed")
    for reason, n in (run.get("failure_reasons") or {}).items():
        lines.append(f"  {n} failed: {reason}")
    return "\n".join(lines)
