"""Thrust-chamber design: the Python face of ``perfchain chamber``.

Inputs are checked by :func:`perfchain.inputs.chamber_args` exactly as the command line checks
them, so ``chamber(...).to_dict()`` is the JSON object ``perfchain chamber --json`` prints.
Preliminary design estimates: cooling design and hot-fire qualification follow licensed
practice and test.
"""

from __future__ import annotations

__all__ = ["chamber"]


def chamber(oxidizer=None, fuel=None, *, chamber_pressure, contraction_ratio, area_ratio, thrust=None,
            throat_diameter=None, characteristic_length=None, propellant=None, mixture_ratio=None,
            equivalence_ratio=None, fuel_percent=None, ambient_pressure=None, altitude=None, flow="shifting",
            thrust_at="vacuum", cstar_efficiency=None, cf_efficiency=None, losses=None, contour="bell",
            nozzle_half_angle=None, bell_length_fraction=None, wall_temperature="800 K", points=60,
            separation=None):
    """Design a thrust chamber and estimate its wall heat flux along the contour.

    Parameters
    ----------
    oxidizer, fuel, propellant, mixture_ratio, equivalence_ratio, fuel_percent
        The propellant, as in :func:`perfchain.point`.
    chamber_pressure : str, Quantity or float
        Injector-face pressure [Pa].
    contraction_ratio : float or str
        Chamber / throat area [-], above 1.
    area_ratio : float or str
        Exit / throat area [-], above 1.
    thrust, throat_diameter : str, Quantity or float
        Exactly one: thrust [N] at ``thrust_at`` (sized with the delivered Isp) or the throat [m].
    characteristic_length : str, Quantity or float, optional
        L* [m]; default the middle of the pair's typical range (common practice).
    ambient_pressure, altitude, flow, thrust_at, cstar_efficiency, cf_efficiency, losses
        As in :func:`perfchain.point` (no divergence input: the contour sets it).
    contour : str
        ``"bell"`` (default) or ``"conical"``.
    nozzle_half_angle : str, Quantity or float, optional
        Cone half-angle [rad] (conical; default 15 deg), 5 to 40 deg.
    bell_length_fraction : float, optional
        Bell length / 15 deg cone length [-] (bell; default 0.8), 0.6 to 0.9.
    wall_temperature : str, Quantity, float or sequence of (x, T)
        Hot-gas-side wall temperature [K] (default 800 K), or (x [m], T [K]) pairs.
    points : int
        About how many contour stations (at least 20).
    separation : str, optional
        Separation criterion, as in ``perfchain point``.

    Returns
    -------
    perfchain.performance.chamber_design.ChamberDesign
        ``.to_dict()`` is what ``perfchain chamber --json`` prints; ``.table()`` the contour.

    Examples
    --------
    Closed forms of the geometry: V_c = L* A_t, D_c = D_t sqrt(CR):

    >>> import perfchain as pc
    >>> d = pc.chamber("LOX", "RP-1", mixture_ratio=2.6, chamber_pressure="50 bar", area_ratio=8,
    ...                contraction_ratio=4, thrust="10 kN", characteristic_length="1.1 m", points=20)
    >>> g = d.geometry
    >>> round(g.chamber_volume / (1.1 * g.throat_area), 9), round(g.chamber_diameter / g.throat_diameter, 9)
    (1.0, 2.0)
    """
    from perfchain.inputs import chamber_args
    from perfchain.performance.chamber_design import design_from_args

    args = chamber_args(oxidizer, fuel, chamber_pressure=chamber_pressure, contraction_ratio=contraction_ratio,
                        characteristic_length=characteristic_length, thrust=thrust,
                        throat_diameter=throat_diameter, thrust_at=thrust_at, area_ratio=area_ratio,
                        propellant=propellant, mixture_ratio=mixture_ratio, equivalence_ratio=equivalence_ratio,
                        fuel_percent=fuel_percent, ambient_pressure=ambient_pressure, altitude=altitude, flow=flow,
                        cstar_efficiency=cstar_efficiency, cf_efficiency=cf_efficiency, losses=losses,
                        contour=contour, nozzle_half_angle=nozzle_half_angle,
                        bell_length_fraction=bell_length_fraction, wall_temperature=wall_temperature,
                        points=points, separation=separation)
    return design_from_args(args)
