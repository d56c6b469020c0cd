"""Checks of perfchain.vehicle.ascent against the rocket equation and closed forms."""

import math

import pytest

from perfchain.constants import G0
from perfchain.vehicle.ascent import EARTH_MU, EARTH_RADIUS, simulate_ascent
from perfchain.errors import InputError


@pytest.mark.parametrize("pitch", [
    {},  # vertical burn
    dict(pitch_over_time=5.0, pitch_kick=math.radians(2.0)),
    dict(pitch_over_altitude=300.0, pitch_kick=math.radians(0.5)),
])
def test_no_gravity_no_drag_reproduces_rocket_equation(pitch):
    # Closed form (rocket equation): with thrust along the velocity and no other force,
    # the speed gain is c ln(m0/mf) whatever the path. Mass ratio 10, c = 4500 m/s ->
    # 10,361.6 m/s (common textbook worked example).
    r = simulate_ascent(10000.0, 9000.0, vacuum_thrust=3.0e5, vacuum_isp=4500.0 / G0,
                        gravity=False, **pitch)
    exact = 4500.0 * math.log(10.0)
    assert r.burnout_speed == pytest.approx(exact, rel=1e-6)
    assert r.burnout_speed == pytest.approx(10361.6, abs=0.05)
    assert r.ideal_delta_v == pytest.approx(exact, rel=1e-9)
    assert r.mean_exhaust_velocity == pytest.approx(4500.0, rel=1e-9)
    assert r.gravity_loss == r.drag_loss == r.pressure_loss == 0.0
    # closed form: constant mass flow F / c, so t_burn = mp c / F
    assert r.burn_time == pytest.approx(9000.0 * 4500.0 / 3.0e5, rel=1e-9)


def test_constant_engine_function_reproduces_rocket_equation():
    # Same closed form through the thrust_and_isp(pa) entry point (pressure-independent engine).
    r = simulate_ascent(5000.0, 3000.0, thrust_and_isp=lambda pa: (2.0e5, 320.0), gravity=False,
                        pitch_over_time=3.0, pitch_kick=0.01)
    assert r.burnout_speed == pytest.approx(320.0 * G0 * math.log(5000.0 / 2000.0), rel=1e-6)


def test_vertical_burn_gravity_loss_closed_form():
    # Closed form for a vertical burn in a uniform field g (short burn near the surface,
    # so g = mu/R^2 to within 2 h/R): gravity loss = g t_burn, speed = c ln(m0/m) - g t,
    # altitude = c (t - (m/mdot) ln(m0/m)) - g t^2 / 2. Since g falls as the vehicle
    # climbs, the loss is bracketed by g(r_burnout) t_burn and g(R) t_burn.
    m0, mp, thrust, isp = 1000.0, 100.0, 3.0e4, 300.0
    c = isp * G0
    mdot = thrust / c
    r = simulate_ascent(m0, mp, vacuum_thrust=thrust, vacuum_isp=isp)
    t_b = mp / mdot
    assert r.burn_time == pytest.approx(t_b, rel=1e-9)
    g_surface = EARTH_MU / EARTH_RADIUS**2
    g_top = EARTH_MU / (EARTH_RADIUS + r.burnout_altitude) ** 2
    assert g_top * t_b < r.gravity_loss < g_surface * t_b
    assert r.gravity_loss == pytest.approx(g_surface * t_b, rel=2 * r.burnout_altitude / EARTH_RADIUS)
    m_bo = m0 - mp
    assert r.burnout_speed == pytest.approx(c * math.log(m0 / m_bo) - g_surface * t_b, rel=1e-4)
    h = c * (t_b - m_bo / mdot * math.log(m0 / m_bo)) - g_surface * t_b**2 / 2
    assert r.burnout_altitude == pytest.approx(h, rel=1e-3)
    assert r.burnout_flight_path_angle == pytest.approx(math.pi / 2, abs=1e-12)


def _full_ascent():
    # Invented demo vehicle ("Kestrel-2" first stage of the invented Larkspur Launch Co.)
    return simulate_ascent(500e3, 400e3, vacuum_thrust=8.0e6, vacuum_isp=320.0, exit_area=5.0,
                           drag_coefficient=0.3, reference_area=10.0, pitch_over_altitude=500.0,
                           pitch_kick=math.radians(1.0))


def test_loss_budget_closes_and_losses_are_positive():
    # Exact identity of the speed equation dv/dt = F/m - D/m - g sin(gamma):
    # v_burnout = c_vac ln(m0/mf) - gravity - drag - pressure losses.
    r = _full_ascent()
    budget = r.vacuum_delta_v - r.gravity_loss - r.drag_loss - r.pressure_loss
    assert r.burnout_speed == pytest.approx(budget, rel=1e-6)
    assert r.vacuum_delta_v == pytest.approx(320.0 * G0 * math.log(5.0), rel=1e-12)
    assert r.gravity_loss > 0 and r.drag_loss > 0 and r.pressure_loss > 0
    # Bounds (closed form): pa <= 101325 Pa (1976 sea level) and m >= m_burnout.
    assert r.pressure_loss < 101325.0 * 5.0 * r.burn_time / 100e3
    # Gravity turn: gamma' = -(g - v^2/r) cos(gamma) / v < 0, so the path bends over
    # from the kicked 89 deg.
    assert r.burnout_flight_path_angle < math.radians(89.0)
    assert r.burnout_downrange > 0
    # F(pa) = F_vac - pa Ae lowers the mean exhaust velocity below the vacuum value.
    assert r.mean_exhaust_velocity < 320.0 * G0
    assert r.ideal_delta_v < r.vacuum_delta_v


def test_engine_function_equals_exit_area_model():
    # Consistency of the two engine entry points (same model written as a function).
    def engine(pa):
        f = 8.0e6 - pa * 5.0
        return f, 320.0 * f / 8.0e6

    a = _full_ascent()
    b = simulate_ascent(500e3, 400e3, thrust_and_isp=engine, drag_coefficient=0.3,
                        reference_area=10.0, pitch_over_altitude=500.0,
                        pitch_kick=math.radians(1.0))
    assert b.burnout_speed == pytest.approx(a.burnout_speed, rel=1e-7)
    assert b.pressure_loss == pytest.approx(a.pressure_loss, rel=1e-6)


@pytest.mark.parametrize("kwargs, field", [
    (dict(liftoff_mass=1000.0, propellant_mass=1000.0), "propellant_mass"),
    (dict(liftoff_mass=-1.0, propellant_mass=1.0), "liftoff_mass"),
    (dict(liftoff_mass=1e6, propellant_mass=5e5), "thrust"),  # thrust-to-weight below 1
    (dict(liftoff_mass=1000.0, propellant_mass=500.0, pitch_kick=-0.1), "pitch_kick"),
    (dict(liftoff_mass=1000.0, propellant_mass=500.0, pitch_over_time=2.0,
          pitch_over_altitude=10.0), "pitch_over_altitude"),
    (dict(liftoff_mass=1000.0, propellant_mass=500.0, drag_coefficient=-1.0), "drag_coefficient/reference_area"),
])
def test_bad_inputs_name_the_field(kwargs, field):
    with pytest.raises(InputError) as info:
        simulate_ascent(vacuum_thrust=3.0e4, vacuum_isp=300.0, **kwargs)
    assert info.value.field == field


def test_engine_needs_one_description():
    with pytest.raises(InputError, match="vacuum_thrust"):
        simulate_ascent(1000.0, 500.0, vacuum_isp=300.0)
    with pytest.raises(InputError, match="thrust_and_isp"):
        simulate_ascent(1000.0, 500.0, thrust_and_isp=lambda pa: (1e5, 300.0), vacuum_isp=300.0)
