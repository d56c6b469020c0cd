"""Thrust-chamber geometry: chamber volume from L*, cylinder, convergent section, throat radii.

The combustion chamber is sized by its characteristic length L* = V_c / A_t, the chamber
volume (injector face to throat, convergent section included) per throat area (Sutton &
Biblarz, Rocket Propulsion Elements, ch. 8; Huzel & Huang, Modern Engineering for Design of
Liquid-Propellant Rocket Engines, ch. 4). With the contraction ratio CR = A_c / A_t it fixes

    D_c = D_t sqrt(CR),     V_c = L* A_t,     L_cyl = (V_c - V_conv) / A_c

where V_conv is the volume of the convergent section. The convergent section, upstream
(injector) to downstream (throat), is: an arc of radius R_1 turning the cylinder wall to the
convergent half-angle beta, a straight cone at beta, and the throat's upstream arc of radius
R_u tangent to the throat. The divergent section starts with the throat's downstream arc R_d
(see :mod:`perfchain.nozzle.contour`).

Common practice (Huzel & Huang ch. 4, from memory): beta = 20-45 deg (30 deg here),
R_u = 1.5 R_t, R_d = 0.382 R_t, R_1 about 1.0-1.5 R_t (1.5 R_t here).

Preliminary design estimates only: cooling design and hot-fire qualification follow licensed
practice and test.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from perfchain.errors import InputError

__all__ = ["CHARACTERISTIC_LENGTHS", "typical_characteristic_length", "ChamberGeometry",
           "chamber_geometry", "convergent_volume"]

#: (oxidizer, fuel) -> (low, high) typical L* [m]; common practice. Sutton & Biblarz,
#: Rocket Propulsion Elements, table of chamber characteristic lengths, and Huzel & Huang,
#: table 4-1 (both from memory; ranges rounded). LOX/LCH4 and N2O pairs: common practice.
CHARACTERISTIC_LENGTHS: dict[tuple[str, str], tuple[float, float]] = {
    ("LOX", "LH2"): (0.76, 1.02),
    ("LOX", "RP-1"): (1.02, 1.27),
    ("LOX", "LCH4"): (0.90, 1.30),
    ("LOX", "ethanol"): (1.00, 1.50),
    ("N2O4", "MMH"): (0.76, 0.89),
    ("N2O4", "UDMH"): (0.76, 0.89),
    ("N2O4", "N2H4"): (0.60, 0.89),
    ("N2O4", "A-50"): (0.76, 0.89),
    ("H2O2-98", "RP-1"): (1.52, 1.78),
    ("N2O", "ethanol"): (1.00, 1.50),
}


def typical_characteristic_length(oxidizer: str, fuel: str) -> float:
    """The middle of the typical L* range of a propellant pair [m] (common practice).

    Parameters
    ----------
    oxidizer, fuel : str
        Names as in :data:`CHARACTERISTIC_LENGTHS` (case-insensitive).

    Returns
    -------
    float
        L* [m].

    Raises
    ------
    perfchain.errors.InputError
        A pair not in the table (give the L* yourself).

    Examples
    --------
    LOX/RP-1: 1.02-1.27 m (Sutton & Biblarz, Rocket Propulsion Elements; from memory)

    >>> round(typical_characteristic_length("LOX", "RP-1"), 3)
    1.145
    """
    key = {(o.lower(), f.lower()): v for (o, f), v in CHARACTERISTIC_LENGTHS.items()}
    rng = key.get((str(oxidizer).lower(), str(fuel).lower()))
    if rng is None:
        pairs = ", ".join(f"{o}/{f}" for o, f in CHARACTERISTIC_LENGTHS)
        raise InputError("characteristic_length", f"{oxidizer}/{fuel}",
                         f"a length given for this pair (typical values are tabulated for {pairs})")
    return 0.5 * (rng[0] + rng[1])


@dataclass(frozen=True)
class ChamberGeometry:
    """Combustion chamber and convergent section of a thrust chamber (SI: m, m^2, m^3, rad).

    Fields: throat_radius, throat_area, contraction_ratio [-], characteristic_length,
    chamber_radius, chamber_volume (injector face to throat), convergent_volume,
    cylinder_length, convergent_length, chamber_length (injector face to throat),
    convergent_half_angle [rad], chamber_blend_radius (R_1), throat_upstream_radius (R_u),
    throat_downstream_radius (R_d). The injector face is x = 0; the throat is at
    x = chamber_length.
    """

    throat_radius: float
    throat_area: float
    contraction_ratio: float
    characteristic_length: float
    chamber_radius: float
    chamber_volume: float
    convergent_volume: float
    cylinder_length: float
    convergent_length: float
    chamber_length: float
    convergent_half_angle: float
    chamber_blend_radius: float
    throat_upstream_radius: float
    throat_downstream_radius: float

    @property
    def throat_diameter(self) -> float:
        """Throat diameter [m]."""
        return 2.0 * self.throat_radius

    @property
    def chamber_diameter(self) -> float:
        """Chamber (cylinder) diameter [m]."""
        return 2.0 * self.chamber_radius

    def convergent_points(self) -> dict[str, tuple[float, float]]:
        """(x, r) [m] of the convergent's joints: cylinder end, cone start and end, throat."""
        b, rt = self.convergent_half_angle, self.throat_radius
        x_t = self.chamber_length
        x2 = x_t - self.throat_upstream_radius * math.sin(b)
        r2 = rt + self.throat_upstream_radius * (1.0 - math.cos(b))
        x0 = self.cylinder_length
        x1 = x0 + self.chamber_blend_radius * math.sin(b)
        r1 = self.chamber_radius - self.chamber_blend_radius * (1.0 - math.cos(b))
        return {"cylinder_end": (x0, self.chamber_radius), "cone_start": (x1, r1),
                "cone_end": (x2, r2), "throat": (x_t, rt)}

    def to_dict(self) -> dict:
        """The fields (and both diameters) as a plain dict (SI)."""
        out = {k: getattr(self, k) for k in self.__dataclass_fields__}
        out.update(throat_diameter=self.throat_diameter, chamber_diameter=self.chamber_diameter)
        return out


def _positive(name, x, allowed):
    if isinstance(x, bool) or not isinstance(x, (int, float)) or not math.isfinite(x) or not x > 0:
        raise InputError(name, x, allowed)
    return float(x)


def _arc_volume(rc_center: float, radius: float, a0: float, a1: float, sign: float) -> float:
    """Volume of revolution under an arc r(phi) = rc + sign R cos(phi), x = R sin(phi), phi in [a0, a1].

    Closed form of pi int r^2 dx with dx = R cos(phi) dphi.
    """
    def prim(p):
        c, s = math.cos(p), math.sin(p)
        # int (rc + sign R c)^2 R c dp = R [rc^2 s + 2 sign rc R (p/2 + s c/2) + R^2 (s - s^3/3)]
        return radius * (rc_center ** 2 * s + sign * rc_center * radius * (p + s * c)
                         + radius ** 2 * (s - s ** 3 / 3.0))
    return math.pi * (prim(a1) - prim(a0))


def convergent_volume(chamber_radius: float, throat_radius: float, half_angle: float,
                      blend_radius: float, upstream_radius: float) -> tuple[float, float]:
    """Volume and axial length of the convergent section (blend arc, cone, throat arc).

    Parameters
    ----------
    chamber_radius, throat_radius : float
        [m]
    half_angle : float
        Convergent half-angle [rad], 0 to 90 deg exclusive.
    blend_radius, upstream_radius : float
        Radii of the cylinder-to-cone arc and of the throat's upstream arc [m].

    Returns
    -------
    (float, float)
        Volume [m^3] and length [m].

    Examples
    --------
    Closed form: with both radii tending to zero the section is a cone frustum,
    V = pi L (R1^2 + R1 R2 + R2^2) / 3; a 45 deg cone from R 2 m to 1 m is 1 m long and
    holds 7 pi / 3 = 7.3304 m^3:

    >>> v, length = convergent_volume(2.0, 1.0, math.pi / 4, 1e-12, 1e-12)
    >>> round(v, 4), round(length, 9)
    (7.3304, 1.0)
    """
    b = half_angle
    r1 = chamber_radius - blend_radius * (1.0 - math.cos(b))
    r2 = throat_radius + upstream_radius * (1.0 - math.cos(b))
    if r1 < r2:
        raise InputError("contraction_ratio", (chamber_radius / throat_radius) ** 2,
                         f"a contraction ratio large enough for the convergent's radii at "
                         f"{math.degrees(b):.4g} deg (at least {((r2 + blend_radius * (1 - math.cos(b))) / throat_radius) ** 2:.4g})")
    cone_length = (r1 - r2) / math.tan(b)
    v_cone = math.pi * cone_length * (r1 * r1 + r1 * r2 + r2 * r2) / 3.0
    # blend arc: centre (x0, Rc - R1), r = (Rc - R1) + R1 cos(phi), phi from 0 to b
    v_blend = _arc_volume(chamber_radius - blend_radius, blend_radius, 0.0, b, 1.0)
    # throat arc: centre (x_t, Rt + Ru), r = (Rt + Ru) - Ru cos(phi), phi from -b to 0
    v_throat = _arc_volume(throat_radius + upstream_radius, upstream_radius, -b, 0.0, -1.0)
    length = blend_radius * math.sin(b) + cone_length + upstream_radius * math.sin(b)
    return v_cone + v_blend + v_throat, length


def chamber_geometry(throat_area: float, contraction_ratio: float, characteristic_length: float, *,
                     convergent_half_angle: float = math.radians(30.0), blend_radius_ratio: float = 1.5,
                     upstream_radius_ratio: float = 1.5,
                     downstream_radius_ratio: float = 0.382) -> ChamberGeometry:
    """Chamber diameter, volume and lengths from the throat area, CR and L*.

    Parameters
    ----------
    throat_area : float
        [m^2], above 0.
    contraction_ratio : float
        A_c / A_t [-], above 1.
    characteristic_length : float
        L* = V_c / A_t [m], above 0.
    convergent_half_angle : float
        [rad], 10 to 60 deg (30 deg common practice).
    blend_radius_ratio, upstream_radius_ratio, downstream_radius_ratio : float
        R_1 / R_t, R_u / R_t, R_d / R_t [-] (1.5, 1.5, 0.382 common practice).

    Returns
    -------
    ChamberGeometry

    Raises
    ------
    perfchain.errors.InputError
        A non-positive L* or CR at most 1; an L* too short to hold the convergent section.

    Examples
    --------
    Closed forms: V_c = L* A_t and D_c = D_t sqrt(CR). A throat of 0.01 m^2, CR 4, L* 1 m:
    V_c = 0.01 m^3, D_c = 2 D_t:

    >>> g = chamber_geometry(0.01, 4.0, 1.0)
    >>> round(g.chamber_volume, 12), round(g.chamber_diameter / g.throat_diameter, 12)
    (0.01, 2.0)
    >>> chamber_geometry(0.01, 4.0, -1.0)
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: characteristic_length: got -1.0; allowed: a length above 0 m
    """
    at = _positive("throat_area", throat_area, "an area above 0 m**2")
    cr = _positive("contraction_ratio", contraction_ratio, "a chamber/throat area ratio above 1")
    if not cr > 1.0:
        raise InputError("contraction_ratio", contraction_ratio, "a chamber/throat area ratio above 1")
    lstar = _positive("characteristic_length", characteristic_length, "a length above 0 m")
    b = _positive("convergent_half_angle", convergent_half_angle, "an angle from 10 to 60 deg")
    if not math.radians(10.0) <= b <= math.radians(60.0):
        raise InputError("convergent_half_angle", convergent_half_angle, "an angle from 10 to 60 deg")
    ratios = {}
    for name, x in (("blend_radius_ratio", blend_radius_ratio), ("upstream_radius_ratio", upstream_radius_ratio),
                    ("downstream_radius_ratio", downstream_radius_ratio)):
        ratios[name] = _positive(name, x, "a radius / throat radius above 0")
    rt = math.sqrt(at / math.pi)
    rc = rt * math.sqrt(cr)
    r1, ru, rd = (ratios[k] * rt for k in ("blend_radius_ratio", "upstream_radius_ratio",
                                             "downstream_radius_ratio"))
    v_conv, l_conv = convergent_volume(rc, rt, b, r1, ru)
    vc = lstar * at
    if vc < v_conv:
        raise InputError("characteristic_length", characteristic_length,
                         f"a length of at least {v_conv / at:.4g} m: the convergent section alone "
                         f"holds {v_conv:.4g} m**3 at this contraction ratio and half-angle")
    l_cyl = (vc - v_conv) / (math.pi * rc * rc)
    return ChamberGeometry(throat_radius=rt, throat_area=at, contraction_ratio=cr, characteristic_length=lstar,
                           chamber_radius=rc, chamber_volume=vc, convergent_volume=v_conv,
                           cylinder_length=l_cyl, convergent_length=l_conv, chamber_length=l_cyl + l_conv,
                           convergent_half_angle=b, chamber_blend_radius=r1, throat_upstream_radius=ru,
                           throat_downstream_radius=rd)
