"""One operating point and its best mixture ratio: the Python face of ``perfchain point``.

Inputs are checked by :mod:`perfchain.inputs` exactly as the command line checks them, so
``point(...).to_dict()`` is the JSON object ``perfchain point --json`` prints for the
same inputs.
"""

from __future__ import annotations

from dataclasses import fields, replace

from perfchain.performance.chain import Performance

__all__ = ["PointResult", "point", "optimum"]


class PointResult(Performance):
    """A :class:`~perfchain.performance.chain.Performance` that reads well on screen.

    ``repr`` gives the ``perfchain point`` table; in a notebook the same summary
    shows as HTML. Every attribute and :meth:`to_dict` are those of
    Performance (SI units).
    """

    @classmethod
    def of(cls, perf: Performance) -> "PointResult":
        """The same record as a PointResult."""
        return cls(**{f.name: getattr(perf, f.name) for f in fields(perf)})

    def __repr__(self) -> str:
        from perfchain.api.display import format_point

        return format_point(self)

    def _repr_html_(self) -> str:
        from perfchain.api.display import html_point

        return html_point(self)


def point(oxidizer=None, fuel=None, *, chamber_pressure, propellant=None, mixture_ratio=None,
          equivalence_ratio=None, fuel_percent=None, area_ratio=None, exit_pressure=None, ambient_pressure=None,
          altitude=None, flow="shifting", contraction_ratio=None, cstar_efficiency=None, nozzle_half_angle=None,
          divergence_factor=None, cf_efficiency=None, losses=None, thrust=None, thrust_at="vacuum",
          ammonia_dissociation=None, throat_diameter=None, particle_size=None) -> PointResult:
    """Performance of one operating point: chamber, throat, exit, c*, Cf, Isp.

    The inputs of ``perfchain point``. Every quantity is text with a unit
    (``"70 bar"``), a pint Quantity, or a plain number in SI units (int, float
    or numpy scalar).

    Parameters
    ----------
    oxidizer, fuel : str or Ingredient
        Names or aliases (``"LOX"``, ``"RP-1"``, ``"LOX @ 80 K"``; see :func:`ingredients`)
        or records from :func:`custom_ingredient` / :func:`blend`.
    chamber_pressure : str, Quantity or float
        Chamber pressure [Pa] (the injector-face pressure with ``contraction_ratio``).
    propellant : str, Mapping or Ingredient, optional
        Instead of oxidizer, fuel and mixture: a formulation by mass fraction
        (``"AP=0.68, Al=0.18, HTPB=0.14"`` or ``{"AP": 0.68, "Al": 0.18, "HTPB": 0.14}``,
        keys may be Ingredient records) or one monopropellant (``"H2O2-98"``).
    mixture_ratio, equivalence_ratio, fuel_percent : float or str
        Exactly one, with oxidizer and fuel: O/F by mass [-], equivalence ratio phi [-]
        (> 1 fuel-rich), or fuel mass per cent [%].
    area_ratio : float or str, optional
        Exit/throat area ratio [-], > 1.
    exit_pressure : str, Quantity or float, optional
        Exit pressure [Pa]; exactly one of ``area_ratio``, ``exit_pressure``.
    ambient_pressure : str, Quantity or float, optional
        Ambient pressure for the ambient Isp [Pa]; 0 is vacuum; default 1 atm.
    altitude : str, Quantity or float, optional
        Instead of ``ambient_pressure``: geometric altitude [m], 0-86 km, U.S.
        Standard Atmosphere 1976.
    flow : str
        ``"shifting"`` (default), ``"frozen"`` or ``"frozen-throat"``.
    contraction_ratio : float or str, optional
        Chamber/throat area ratio [-] (> 1); default an infinite-area chamber.
    cstar_efficiency, divergence_factor, cf_efficiency : float or str, optional
        Efficiency factors in (0, 1] [-]; any of them adds the delivered blocks.
    nozzle_half_angle : str, Quantity or float, optional
        Conical nozzle half-angle [rad] (``"15 deg"``), instead of ``divergence_factor``.
    losses : LossModel or dict, optional
        Any factors of :class:`perfchain.performance.losses.LossModel`.
    thrust : str, Quantity or float, optional
        Thrust to size the chamber for [N], at ``thrust_at`` (``"vacuum"`` or ``"ambient"``).
    throat_diameter, particle_size : str, Quantity or float, optional
        Throat diameter and mean particle diameter [m] of the default two-phase flow loss of
        condensed products (the throat instead of one sized from ``thrust``; particles
        instead of Hermsen's correlation).
    ammonia_dissociation : float or str, optional
        For hydrazine alone (``propellant="N2H4"``): the ammonia dissociation X of a catalytic
        bed, 0 to 1 [-]. The chamber composition is then fixed, its temperature follows from the
        energy balance, and the nozzle is frozen. Without it hydrazine is in equilibrium.

    Returns
    -------
    PointResult
        The :class:`~perfchain.performance.chain.Performance` record (SI units), with the gas
        transport properties at each station (:mod:`perfchain.performance.transport`);
        ``.to_dict()`` is what ``perfchain point --json`` prints.

    Raises
    ------
    perfchain.errors.InputError
        One line naming the field, the value as typed and what is allowed.

    Examples
    --------
    LOX/RP-1 at O/F 2.56, 1000 psia, expanded to 1 atm, shifting: Tc 3676 K, c* 1799 m/s,
    sea-level Isp 300 s (Sutton & Biblarz, Rocket Propulsion Elements, Table 5-5; from
    memory, so +/- 1 %):

    >>> import perfchain as pc
    >>> r = pc.point(oxidizer="LOX", fuel="RP-1", mixture_ratio=2.56, chamber_pressure="1000 psi",
    ...              exit_pressure="1 atm")
    >>> abs(r.chamber.temperature / 3676 - 1) < 0.01, abs(r.cstar / 1799 - 1) < 0.01
    (True, True)
    >>> abs(r.isp_ambient / 300 - 1) < 0.01
    True

    A formulation has no O/F: 90 % hydrogen peroxide decomposes at about 1020 K
    (Sutton & Biblarz, Rocket Propulsion Elements, monopropellant table; from memory, +/- 30 K):

    >>> r = pc.point(propellant="H2O2-90", chamber_pressure="10 bar", area_ratio=10)
    >>> r.propellant, r.mixture_ratio, abs(r.chamber.temperature - 1020) < 30
    ('H2O2-90', None, True)
    >>> pc.point(oxidizer="LOX", fuel="RP-1", mixture_ratio=2.56, chamber_pressure="1000",
    ...          area_ratio=40)
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: chamber_pressure: got '1000'; allowed: a pressure with a unit, e.g. '20 bar', '300 psi', '2.1 MPa'
    """
    from perfchain.inputs import point_args
    from perfchain.performance.chain import performance

    args = point_args(oxidizer, fuel, chamber_pressure=chamber_pressure, propellant=propellant,
                      ammonia_dissociation=ammonia_dissociation, mixture_ratio=mixture_ratio,
                      equivalence_ratio=equivalence_ratio, fuel_percent=fuel_percent, area_ratio=area_ratio,
                      exit_pressure=exit_pressure, ambient_pressure=ambient_pressure, altitude=altitude,
                      flow=flow, contraction_ratio=contraction_ratio, cstar_efficiency=cstar_efficiency,
                      nozzle_half_angle=nozzle_half_angle, divergence_factor=divergence_factor,
                      cf_efficiency=cf_efficiency, losses=losses, thrust=thrust, thrust_at=thrust_at,
                      throat_diameter=throat_diameter, particle_size=particle_size)
    return PointResult.of(performance(**args, transport=True))


def optimum(oxidizer, fuel, *, chamber_pressure, area_ratio=None, exit_pressure=None, ambient_pressure=None,
            altitude=None, flow="shifting", objective="isp_vacuum", bounds=None, xtol=1e-4):
    """The mixture ratio that maximizes an objective at one chamber pressure and nozzle.

    A bounded scalar search (not a grid scan); see :mod:`perfchain.study.optimum`.

    Parameters
    ----------
    oxidizer, fuel : str or Ingredient
    chamber_pressure, area_ratio, exit_pressure, ambient_pressure, altitude, flow
        As in :func:`point`.
    objective : str
        ``"isp_vacuum"``, ``"isp_ambient"`` [s], ``"density_isp"`` or
        ``"density_isp_ambient"`` [kg s/m^3] (bulk density x Isp).
    bounds : (float, float), optional
        O/F bracket [-]; default 0.3 to 3 times stoichiometric.
    xtol : float
        Relative O/F tolerance [-].

    Returns
    -------
    perfchain.study.optimum.Optimum
        ``mixture_ratio`` [-], ``value`` (the objective), ``performance`` (a
        :class:`PointResult`), ``evaluations``, ``at_bound``.

    Examples
    --------
    LOX/RP-1 at 1000 psia expanded to 1 atm: the sea-level Isp peaks near O/F 2.3-2.6,
    at about 300 s (Sutton & Biblarz, Rocket Propulsion Elements, Table 5-5; from memory):

    >>> import perfchain as pc
    >>> o = pc.optimum("LOX", "RP-1", chamber_pressure="1000 psi", exit_pressure="1 atm",
    ...                objective="isp_ambient")
    >>> bool(2.2 < o.mixture_ratio < 2.7), bool(295 < o.value < 305)
    (True, True)
    """
    from perfchain.inputs import ingredient as check_ingredient, nozzle_args, value
    from perfchain.study.optimum import optimum_mixture_ratio

    ox, fu = check_ingredient(oxidizer, "oxidizer"), check_ingredient(fuel, "fuel")
    nz = nozzle_args(chamber_pressure=chamber_pressure, area_ratio=area_ratio, exit_pressure=exit_pressure,
                     ambient_pressure=ambient_pressure, altitude=altitude, flow=flow)
    if "altitude" in nz:
        from perfchain.atmosphere import pressure

        nz["ambient_pressure"] = float(pressure(nz.pop("altitude")))
    if bounds is not None:
        bounds = tuple(value("mixture_ratio", b, name="bounds") for b in bounds)
    o = optimum_mixture_ratio(ox, fu, nz.pop("chamber_pressure"), objective=objective, bounds=bounds,
                              xtol=_tolerance(xtol), **nz)
    return replace(o, performance=PointResult.of(o.performance))


def _tolerance(xtol) -> float:
    from perfchain.errors import InputError
    from perfchain.inputs import number

    x = number(xtol, "xtol", "a relative tolerance in (0, 0.1)")
    if not 0.0 < x < 0.1:
        raise InputError("xtol", xtol, "a relative tolerance in (0, 0.1)")
    return x
