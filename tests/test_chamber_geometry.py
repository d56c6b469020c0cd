"""Thrust-chamber geometry and wall contour (perfchain.nozzle.geometry, perfchain.nozzle.contour).

Checks against closed forms of plane geometry (volumes of revolution, cone lengths) and the
definitions of L* and contraction ratio (Sutton & Biblarz, Rocket Propulsion Elements, ch. 8;
Huzel & Huang, Modern Engineering for Design of Liquid-Propellant Rocket Engines, ch. 4).
"""

import math

import numpy as np
import pytest

from perfchain.errors import InputError
from perfchain.nozzle.contour import BELL_ANGLES, bell_angles, conical_length, wall_contour
from perfchain.nozzle.geometry import CHARACTERISTIC_LENGTHS, chamber_geometry, convergent_volume


def _volume_to_throat(contour, n=20001):
    """pi int r^2 dx from the injector face to the throat, on a fine resampling of the contour."""
    s = slice(0, contour.throat_index + 1)
    x = np.linspace(contour.x[0], contour.x[contour.throat_index], n)
    r = np.interp(x, contour.x[s], contour.radius[s])
    return np.trapezoid(np.pi * r * r, x)


@pytest.mark.parametrize("cr, lstar", [(2.5, 0.8), (4.0, 1.1), (8.0, 1.5)])
def test_chamber_volume_is_lstar_times_throat_area(cr, lstar):
    # definition of L* = Vc / At (Sutton & Biblarz ch. 8); Dc = Dt sqrt(CR) (definition of CR)
    at = 0.02
    g = chamber_geometry(at, cr, lstar)
    assert g.chamber_volume == pytest.approx(lstar * at, rel=1e-12)
    assert g.chamber_diameter == pytest.approx(g.throat_diameter * math.sqrt(cr), rel=1e-12)
    # the cylinder plus the convergent hold exactly that volume
    cyl = math.pi * g.chamber_radius ** 2 * g.cylinder_length
    assert cyl + g.convergent_volume == pytest.approx(lstar * at, rel=1e-12)
    # and an independent numerical integration of the wall contour agrees (a fine polyline of
    # the arcs and cone; 0.2 % covers the chords between stations)
    c = wall_contour(g, 20.0, "conical", points=400)
    assert _volume_to_throat(c) == pytest.approx(lstar * at, rel=2e-3)


def test_convergent_without_radii_is_a_cone_frustum():
    # closed form of a frustum, V = pi L (R1^2 + R1 R2 + R2^2) / 3, L = (R1 - R2) / tan(beta)
    rc, rt, b = 0.15, 0.05, math.radians(30.0)
    v, length = convergent_volume(rc, rt, b, 1e-12, 1e-12)
    ell = (rc - rt) / math.tan(b)
    assert length == pytest.approx(ell, rel=1e-9)
    assert v == pytest.approx(math.pi * ell * (rc * rc + rc * rt + rt * rt) / 3.0, rel=1e-9)


def test_convergent_arcs_against_numerical_integration():
    # the closed-form arc volumes against a direct quadrature of pi r(x)^2 over the same arcs
    rc, rt, b, r1, ru = 0.12, 0.05, math.radians(35.0), 0.06, 0.075
    v, length = convergent_volume(rc, rt, b, r1, ru)
    phi = np.linspace(0.0, b, 20001)      # blend arc, centre (0, rc - r1)
    x1, y1 = r1 * np.sin(phi), rc - r1 + r1 * np.cos(phi)
    phi = np.linspace(-b, 0.0, 20001)     # throat arc, centre (0, rt + ru)
    x3, y3 = ru * np.sin(phi), rt + ru - ru * np.cos(phi)
    cone_len = length - r1 * math.sin(b) - ru * math.sin(b)
    cone = math.pi * cone_len * (y1[-1] ** 2 + y1[-1] * y3[0] + y3[0] ** 2) / 3.0
    v_num = np.trapezoid(np.pi * y1 ** 2, x1) + cone + np.trapezoid(np.pi * y3 ** 2, x3)
    assert v == pytest.approx(v_num, rel=1e-7)


def test_throat_radii_common_practice():
    # upstream 1.5 Rt, downstream 0.382 Rt (Huzel & Huang ch. 4, from memory; common practice)
    g = chamber_geometry(0.01, 4.0, 1.0)
    assert g.throat_upstream_radius == pytest.approx(1.5 * g.throat_radius)
    assert g.throat_downstream_radius == pytest.approx(0.382 * g.throat_radius)


def test_conical_contour_closed_forms():
    g = chamber_geometry(math.pi * 0.04 ** 2, 3.0, 1.0)
    a = math.radians(15.0)
    c = wall_contour(g, 16.0, "conical", half_angle=a)
    assert c.radius[-1] == pytest.approx(0.04 * 4.0, rel=1e-12)             # Re = Rt sqrt(eps)
    assert c.x[-1] - g.chamber_length == pytest.approx(conical_length(0.04, 16.0, a, g.throat_downstream_radius))
    # straight part: slope tan(alpha) everywhere after the throat arc
    tail = slice(-5, None)
    assert np.allclose(np.diff(c.radius[tail]) / np.diff(c.x[tail]), math.tan(a), rtol=1e-9)
    # conical divergence factor (1 + cos a)/2 = 0.9830 at 15 deg (Malina 1940; Sutton & Biblarz, from memory)
    assert c.divergence_factor == pytest.approx(0.9830, abs=5e-5)
    assert np.all(np.diff(c.x) > 0) and c.area_ratio[c.throat_index] == 1.0
    assert c.area_ratio.min() == pytest.approx(1.0)


@pytest.mark.parametrize("fraction", [0.6, 0.7, 0.8, 0.9])
def test_bell_parabola_meets_its_angles_and_length(fraction):
    g = chamber_geometry(math.pi * 0.05 ** 2, 3.0, 1.0)
    c = wall_contour(g, 40.0, "bell", length_fraction=fraction, points=200)
    cone15 = conical_length(0.05, 40.0, math.radians(15.0), g.throat_downstream_radius)
    assert c.x[-1] - g.chamber_length == pytest.approx(fraction * cone15, rel=1e-12)
    # wall slope at the exit = tan(theta_e) (the parabola's end tangent), at its start tan(theta_n)
    assert (c.radius[-1] - c.radius[-2]) / (c.x[-1] - c.x[-2]) == pytest.approx(math.tan(c.exit_angle), rel=0.02)
    assert np.all(np.diff(c.radius[c.throat_index:]) > 0)      # the bell only opens
    # the bell turns its flow back towards the axis, ending below its initial angle and below 15 deg,
    # so its exit-lip divergence factor beats the 15 deg cone's 0.9830
    assert c.exit_angle < c.initial_angle and c.exit_angle < math.radians(15.0)
    assert 0.983 < c.divergence_factor < 1.0


def test_bell_angle_table_trends():
    # Rao's charts (Huzel & Huang fig. 4-16, from memory): longer bells start and end shallower;
    # larger area ratios start steeper and end shallower
    for k in BELL_ANGLES:
        tn, te = BELL_ANGLES[k]
        assert list(tn) == sorted(tn) and list(te) == sorted(te, reverse=True)
    assert bell_angles(25.0, 0.6)[0] > bell_angles(25.0, 0.9)[0]


@pytest.mark.parametrize("call, field", [
    (lambda: chamber_geometry(0.01, 4.0, 0.0), "characteristic_length"),
    (lambda: chamber_geometry(0.01, -2.0, 1.0), "contraction_ratio"),
    (lambda: chamber_geometry(0.01, 1.0, 1.0), "contraction_ratio"),
    (lambda: chamber_geometry(0.01, 4.0, 0.05), "characteristic_length"),   # too short for the convergent
    (lambda: wall_contour(chamber_geometry(0.01, 4.0, 1.0), 10.0, "bell", length_fraction=0.95),
     "bell_length_fraction"),
    (lambda: wall_contour(chamber_geometry(0.01, 4.0, 1.0), 10.0, "spike"), "contour"),
])
def test_bad_geometry_inputs_name_the_field(call, field):
    with pytest.raises(InputError) as err:
        call()
    assert str(err.value).startswith(field + ":") and "\n" not in str(err.value)


def test_typical_characteristic_lengths_are_plausible():
    # common practice: 0.5 to 2 m for every tabulated pair (Sutton & Biblarz; from memory)
    for lo, hi in CHARACTERISTIC_LENGTHS.values():
        assert 0.5 <= lo < hi <= 2.0
