"""The wall contour of a thrust chamber, injector face to nozzle exit: a table of (x, r).

Chamber and convergent come from :mod:`perfchain.nozzle.geometry`. The divergent section
starts with the throat's downstream arc (radius R_d) and is either

``conical``
    the arc up to the cone half-angle alpha, then a straight cone to the exit radius;
``bell``
    the thrust-optimised parabola approximation of a Rao contour: the arc up to the initial
    wall angle theta_n, then a parabola (a quadratic Bezier curve) tangent to theta_n there
    and to the exit angle theta_e at the exit. Its length is a fraction (60-90 %) of the
    length of a 15 deg cone of the same area ratio (with the same throat arc).

The wall angles theta_n and theta_e come from :data:`BELL_ANGLES`: values read from Rao's
charts as reproduced in Huzel & Huang, Modern Engineering for Design of Liquid-Propellant
Rocket Engines (1992), fig. 4-16 -- from memory, about +/- 2 deg; interpolated linearly in
the length fraction and in ln(area ratio), and taken at the table's end outside area ratios
4-100 (the contour then says so in its notes).

The bell's divergence factor (1 + cos theta_e) / 2 (the exit-lip approximation of
:func:`perfchain.performance.loss_model.bell_divergence_factor`) is what the delivered
chain uses for it.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from perfchain.errors import InputError
from perfchain.nozzle.geometry import ChamberGeometry

__all__ = ["BELL_ANGLES", "BELL_LENGTH_FRACTIONS", "CONTOUR_KINDS", "bell_angles", "Contour", "wall_contour",
           "conical_length"]

CONTOUR_KINDS = ("bell", "conical")
#: length fractions of the angle table [-] (of a 15 deg cone)
BELL_LENGTH_FRACTIONS = (0.6, 0.7, 0.8, 0.9)
_BELL_AREA_RATIOS = (4.0, 10.0, 25.0, 50.0, 100.0)
#: length fraction -> ((theta_n [deg] at area ratios 4, 10, 25, 50, 100), (theta_e [deg] ...)).
#: Rao's charts as reproduced in Huzel & Huang (1992) fig. 4-16, from memory (+/- 2 deg).
BELL_ANGLES = {
    0.6: ((26.0, 30.0, 33.0, 35.0, 36.5), (20.5, 17.0, 15.0, 14.0, 13.0)),
    0.7: ((23.5, 27.0, 30.5, 32.5, 34.0), (17.0, 13.5, 11.5, 10.5, 9.5)),
    0.8: ((21.5, 25.0, 28.5, 30.5, 32.0), (14.0, 11.0, 9.0, 8.0, 7.0)),
    0.9: ((20.0, 23.0, 26.5, 28.5, 30.0), (11.5, 8.5, 7.0, 6.0, 5.0)),
}


def _check_fraction(fraction) -> float:
    lo, hi = BELL_LENGTH_FRACTIONS[0], BELL_LENGTH_FRACTIONS[-1]
    if isinstance(fraction, bool) or not isinstance(fraction, (int, float)) or not lo <= fraction <= hi:
        raise InputError("bell_length_fraction", fraction,
                         f"a fraction of the 15 deg cone's length from {lo:g} to {hi:g} (the range of the "
                         "published wall-angle charts)")
    return float(fraction)


def bell_angles(area_ratio: float, length_fraction: float = 0.8) -> tuple[float, float]:
    """Initial and exit wall angles of a thrust-optimised bell [rad].

    Parameters
    ----------
    area_ratio : float
        Exit / throat area [-], above 1 (table range 4-100; ends held outside it).
    length_fraction : float
        Bell length / length of a 15 deg cone [-], 0.6 to 0.9.

    Returns
    -------
    (float, float)
        theta_n, theta_e [rad].

    Examples
    --------
    An 80 % bell of area ratio 25: about 28.5 deg and 9 deg (Rao's charts in Huzel & Huang,
    fig. 4-16; from memory, +/- 2 deg):

    >>> tn, te = bell_angles(25.0, 0.8)
    >>> round(math.degrees(tn), 1), round(math.degrees(te), 1)
    (28.5, 9.0)
    """
    f = _check_fraction(length_fraction)
    if isinstance(area_ratio, bool) or not isinstance(area_ratio, (int, float)) or not area_ratio > 1.0:
        raise InputError("area_ratio", area_ratio, "an exit/throat area ratio above 1")
    x = math.log(min(max(area_ratio, _BELL_AREA_RATIOS[0]), _BELL_AREA_RATIOS[-1]))
    xs = np.log(_BELL_AREA_RATIOS)
    fr = np.array(BELL_LENGTH_FRACTIONS)
    tn = np.array([np.interp(x, xs, BELL_ANGLES[k][0]) for k in BELL_LENGTH_FRACTIONS])
    te = np.array([np.interp(x, xs, BELL_ANGLES[k][1]) for k in BELL_LENGTH_FRACTIONS])
    return math.radians(float(np.interp(f, fr, tn))), math.radians(float(np.interp(f, fr, te)))


def conical_length(throat_radius: float, area_ratio: float, half_angle: float,
                   downstream_radius: float) -> float:
    """Axial length throat -> exit of a conical divergent with a throat arc [m].

    L = (R_t (sqrt(eps) - 1) + R_d (sec alpha - 1)) / tan alpha (geometry of an arc of radius
    R_d tangent to the cone; Huzel & Huang ch. 4).

    Parameters
    ----------
    throat_radius : float
        [m]
    area_ratio : float
        [-]
    half_angle : float
        [rad]
    downstream_radius : float
        [m]

    Returns
    -------
    float
        [m]

    Examples
    --------
    Closed form without a throat arc: R_t = 1, eps = 4, alpha = 45 deg gives L = 1 m

    >>> round(conical_length(1.0, 4.0, math.pi / 4, 0.0), 12)
    1.0
    """
    a = half_angle
    return (throat_radius * (math.sqrt(area_ratio) - 1.0)
            + downstream_radius * (1.0 / math.cos(a) - 1.0)) / math.tan(a)


@dataclass(frozen=True)
class Contour:
    """A wall contour: x [m, from the injector face], r [m], A/A_t [-], and its description.

    Fields: kind (``"conical"`` or ``"bell"``), x, radius, area_ratio (numpy arrays, x
    increasing), subsonic (bool array: upstream of the throat), throat_index, exit_area_ratio,
    nozzle_length [m, throat to exit], initial_angle and exit_angle [rad] (the cone half-angle
    twice for a cone), length_fraction [-] (None for a cone), notes.
    """

    kind: str
    x: np.ndarray
    radius: np.ndarray
    area_ratio: np.ndarray
    subsonic: np.ndarray
    throat_index: int
    exit_area_ratio: float
    nozzle_length: float
    initial_angle: float
    exit_angle: float
    length_fraction: float | None
    notes: tuple = field(default_factory=tuple)

    @property
    def divergence_factor(self) -> float:
        """(1 + cos theta_e) / 2 [-]: exact for a cone (Malina 1940), the exit-lip approximation for a bell."""
        return 0.5 * (1.0 + math.cos(self.exit_angle))


def _arc(xc, rc, radius, a0, a1, n, sign):
    p = np.linspace(a0, a1, n)
    return xc + radius * np.sin(p), rc + sign * radius * np.cos(p)


def wall_contour(geometry: ChamberGeometry, area_ratio: float, kind: str = "bell", *,
                 half_angle: float = math.radians(15.0), length_fraction: float = 0.8,
                 points: int = 60) -> Contour:
    """The wall contour from the injector face to the exit.

    Parameters
    ----------
    geometry : ChamberGeometry
        Chamber, convergent and throat radii.
    area_ratio : float
        Exit / throat area [-], above 1.
    kind : str
        ``"bell"`` (default) or ``"conical"``.
    half_angle : float
        Cone half-angle [rad] (conical only), 5 to 40 deg.
    length_fraction : float
        Bell length / 15 deg cone length [-] (bell only), 0.6 to 0.9.
    points : int
        About how many stations in all (at least 20).

    Returns
    -------
    Contour

    Examples
    --------
    Closed forms: the exit radius is R_t sqrt(eps), and a 15 deg cone of area ratio 25 with the
    throat arc is (R_t (5 - 1) + R_d (sec 15 deg - 1)) / tan 15 deg long:

    >>> from perfchain.nozzle.geometry import chamber_geometry
    >>> g = chamber_geometry(math.pi * 0.1 ** 2, 4.0, 1.0)
    >>> c = wall_contour(g, 25.0, "conical")
    >>> round(float(c.radius[-1]), 12), round(c.nozzle_length, 6), float(c.area_ratio[c.throat_index])
    (0.5, 1.497849, 1.0)
    >>> wall_contour(g, 25.0, "bell", length_fraction=0.5)
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: bell_length_fraction: got 0.5; allowed: a fraction of the 15 deg cone's length from 0.6 to 0.9 (the range of the published wall-angle charts)
    """
    if kind not in CONTOUR_KINDS:
        raise InputError("contour", kind, "one of " + ", ".join(CONTOUR_KINDS))
    if isinstance(area_ratio, bool) or not isinstance(area_ratio, (int, float)) or not area_ratio > 1.0:
        raise InputError("area_ratio", area_ratio, "an exit/throat area ratio above 1")
    if isinstance(points, bool) or not isinstance(points, int) or points < 20:
        raise InputError("points", points, "a whole number of stations, at least 20")
    g = geometry
    rt, rd, b = g.throat_radius, g.throat_downstream_radius, g.convergent_half_angle
    re = rt * math.sqrt(area_ratio)
    notes = []
    if kind == "conical":
        if isinstance(half_angle, bool) or not isinstance(half_angle, (int, float)) \
                or not math.radians(5.0) <= half_angle <= math.radians(40.0):
            raise InputError("nozzle_half_angle", half_angle, "a cone half-angle from 5 to 40 deg")
        theta_n = theta_e = float(half_angle)
        fraction = None
        length = conical_length(rt, area_ratio, theta_n, rd)
    else:
        fraction = _check_fraction(length_fraction)
        theta_n, theta_e = bell_angles(area_ratio, fraction)
        if not _BELL_AREA_RATIOS[0] <= area_ratio <= _BELL_AREA_RATIOS[-1]:
            notes.append(f"bell wall angles taken at the chart's end (area ratios "
                         f"{_BELL_AREA_RATIOS[0]:g}-{_BELL_AREA_RATIOS[-1]:g}) for area ratio {area_ratio:g}")
        length = fraction * conical_length(rt, area_ratio, math.radians(15.0), rd)
    k = max(points // 9, 2) + 1           # points of each convergent piece (its first is the last one's end)
    n_div = points - 1 - 3 * (k - 1)      # new points after the throat
    p = g.convergent_points()
    x_t = g.chamber_length
    # cylinder (two stations) and convergent: blend arc, cone, throat arc
    xs = [np.array([0.0, g.cylinder_length])]
    rs = [np.array([g.chamber_radius, g.chamber_radius])]
    x, r = _arc(p["cylinder_end"][0], g.chamber_radius - g.chamber_blend_radius, g.chamber_blend_radius,
                0.0, b, k, 1.0)
    xs.append(x[1:]), rs.append(r[1:])
    x = np.linspace(p["cone_start"][0], p["cone_end"][0], k)
    xs.append(x[1:]), rs.append(np.interp(x, [p["cone_start"][0], p["cone_end"][0]],
                                          [p["cone_start"][1], p["cone_end"][1]])[1:])
    x, r = _arc(x_t, rt + g.throat_upstream_radius, g.throat_upstream_radius, -b, 0.0, k, -1.0)
    xs.append(x[1:]), rs.append(r[1:])
    # divergent: throat arc to theta_n, then the cone or the parabola
    m = max(n_div // 5, 2) + 1
    x, r = _arc(x_t, rt + rd, rd, 0.0, theta_n, m, -1.0)
    xs.append(x[1:]), rs.append(r[1:])
    xn, rn = x[-1], r[-1]
    xe = x_t + length
    t = np.linspace(0.0, 1.0, n_div - m + 1)[1:]
    if kind == "conical":
        x = xn + t * (xe - xn)
        r = rn + (x - xn) * math.tan(theta_n)
    else:
        # control point Q: intersection of the tangents at N (theta_n) and E (theta_e)
        tn, te = math.tan(theta_n), math.tan(theta_e)
        xq = (re - rn + tn * xn - te * xe) / (tn - te)
        rq = rn + tn * (xq - xn)
        if not (xn < xq < xe):
            raise InputError("bell_length_fraction", length_fraction,
                             "a bell whose wall angles fit its length (no parabola joins them here)")
        x = (1 - t) ** 2 * xn + 2 * t * (1 - t) * xq + t ** 2 * xe
        r = (1 - t) ** 2 * rn + 2 * t * (1 - t) * rq + t ** 2 * re
    xs.append(x), rs.append(r)
    x_all, r_all = np.concatenate(xs), np.concatenate(rs)
    r_all[-1] = re
    i_t = int(np.argmin(np.abs(x_all - x_t)))
    r_all[i_t] = rt
    subsonic = np.arange(len(x_all)) < i_t
    return Contour(kind=kind, x=x_all, radius=r_all, area_ratio=(r_all / rt) ** 2, subsonic=subsonic,
                   throat_index=i_t, exit_area_ratio=float(area_ratio), nozzle_length=length,
                   initial_angle=theta_n, exit_angle=theta_e, length_fraction=fraction, notes=tuple(notes))
