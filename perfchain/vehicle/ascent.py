"""A simple planar ascent burn and its delta-v losses (gravity, drag, back pressure).

Assumptions (all of them):

- Non-rotating spherical Earth, point-mass gravity ``g = mu / r^2`` with
  ``mu = 3.986004418e14 m^3/s^2`` (WGS 84 / IERS Conventions 2010 value) and
  radius ``R = 6371 km`` (IUGG mean Earth radius, rounded). No Earth rotation,
  no launch-site speed, no oblateness; altitude is ``r - R``.
- Planar motion; thrust always along the velocity (zero angle of attack, no
  lift). Vertical rise until a pitch-over altitude or time, then an
  instantaneous pitch kick that tilts the velocity by a small angle, then a
  gravity turn until burnout (all propellant used). One burn, one stage.
- Drag ``D = 0.5 rho v^2 Cd A`` with constant ``Cd`` and the U.S. Standard
  Atmosphere 1976 density (:mod:`perfchain.atmosphere`, imported only when
  needed); density and pressure are taken as 0 above 86 km (the model's top;
  the 1976 pressure there is 0.37 Pa). Winds none.
- Engine: either a callable ``thrust_and_isp(ambient_pressure_Pa) -> (N, s)``,
  or constant vacuum thrust with nozzle exit area ``Ae``:
  ``F(pa) = F_vac - pa Ae`` and ``Isp(pa) = Isp_vac F(pa) / F_vac`` (constant
  mass flow). Mass flow is ``F / (Isp g0)``.

Loss bookkeeping (exact along the integrated path, since
``dv/dt = F/m - D/m - g sin(gamma)``)::

    burnout_speed = vacuum_delta_v - gravity_loss - drag_loss - pressure_loss

with ``vacuum_delta_v = c_vac ln(m0/mf)``, ``gravity_loss = int g sin(gamma) dt``,
``drag_loss = int D/m dt`` and ``pressure_loss = int (mdot c_vac - F)/m dt``
(``c_vac`` is the exhaust velocity at zero ambient pressure).
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass

import numpy as np

from perfchain.constants import G0
from perfchain.constants import MAX_ALTITUDE
from perfchain.errors import InputError, SolverError

__all__ = ["EARTH_MU", "EARTH_RADIUS", "AscentResult", "simulate_ascent"]

EARTH_MU = 3.986004418e14  #: [m^3/s^2] WGS 84 / IERS Conventions 2010
EARTH_RADIUS = 6371.0e3  #: [m] IUGG mean Earth radius, rounded


@dataclass(frozen=True)
class AscentResult:
    """Burnout state and delta-v budget of one ascent burn, SI units.

    Times [s], altitudes and downrange [m], speeds and losses [m/s], angle [rad]
    (flight-path angle from the local horizontal), impulse [N s].
    """

    burn_time: float
    burnout_altitude: float
    burnout_speed: float
    burnout_flight_path_angle: float
    burnout_downrange: float
    total_impulse: float
    mean_exhaust_velocity: float
    ideal_delta_v: float
    vacuum_delta_v: float
    gravity_loss: float
    drag_loss: float
    pressure_loss: float

    def to_dict(self) -> dict:
        """Plain dict in SI."""
        return asdict(self)


def _engine(thrust_and_isp, vacuum_thrust, vacuum_isp, exit_area):
    if thrust_and_isp is not None:
        if vacuum_thrust is not None or vacuum_isp is not None:
            raise InputError("thrust_and_isp", "given with vacuum_thrust/vacuum_isp",
                             "either a thrust_and_isp function or vacuum_thrust + vacuum_isp")
        if not callable(thrust_and_isp):
            raise InputError("thrust_and_isp", thrust_and_isp, "a function of ambient pressure [Pa]")
        return thrust_and_isp, True
    for field, val in (("vacuum_thrust", vacuum_thrust), ("vacuum_isp", vacuum_isp)):
        if val is None or not (math.isfinite(val) and val > 0):
            raise InputError(field, val, "a number above 0 (or give thrust_and_isp)")
    if not (math.isfinite(exit_area) and exit_area >= 0):
        raise InputError("exit_area", exit_area, "an area of at least 0 m^2")

    def engine(pa):
        thrust = vacuum_thrust - pa * exit_area
        return thrust, vacuum_isp * thrust / vacuum_thrust

    return engine, exit_area > 0


def simulate_ascent(liftoff_mass, propellant_mass, *, thrust_and_isp=None, vacuum_thrust=None,
                    vacuum_isp=None, exit_area=0.0, drag_coefficient=0.0, reference_area=0.0,
                    pitch_over_altitude=None, pitch_over_time=None, pitch_kick=0.0,
                    gravity=True, rtol=1e-10) -> AscentResult:
    """Integrate a vertical rise + gravity turn burn and report the delta-v losses.

    See the module docstring for every assumption. Integrated with
    ``scipy.integrate.solve_ivp`` (DOP853) until all propellant is used.

    Parameters
    ----------
    liftoff_mass, propellant_mass : float
        [kg]; ``0 < propellant_mass < liftoff_mass``.
    thrust_and_isp : callable, optional
        ``f(ambient_pressure [Pa]) -> (thrust [N], isp [s])``.
    vacuum_thrust, vacuum_isp, exit_area : float, optional
        [N], [s], [m^2]: the ``F_vac - pa Ae`` engine model instead.
    drag_coefficient, reference_area : float
        ``Cd`` [-] and ``A`` [m^2]; 0 turns drag off.
    pitch_over_altitude, pitch_over_time : float, optional
        End of the vertical rise [m] or [s] (one of them); neither -> vertical burn.
    pitch_kick : float
        Tilt of the velocity at pitch-over [rad], in [0, pi/2).
    gravity : bool
        False turns gravity off (for checks against the rocket equation).
    rtol : float
        Relative tolerance of the integrator.

    Returns
    -------
    AscentResult

    Examples
    --------
    Gravity and drag off, vacuum engine: the burnout speed is the rocket equation
    (common textbook worked example: mass ratio 10, c = 4500 m/s -> 10,361.6 m/s):

    >>> r = simulate_ascent(10000.0, 9000.0, vacuum_thrust=2.0e5, vacuum_isp=4500 / 9.80665,
    ...                     gravity=False)
    >>> round(r.burnout_speed, 1), round(r.burn_time, 3)
    (10361.6, 202.5)
    """
    m0, mp, cda = _check_inputs(liftoff_mass, propellant_mass, drag_coefficient, reference_area,
                                pitch_over_altitude, pitch_over_time, pitch_kick)
    engine, needs_pressure = _engine(thrust_and_isp, vacuum_thrust, vacuum_isp, exit_area)
    ambient = _ambient_model(needs_pressure, cda > 0)
    m_burnout = m0 - mp
    c_vac = engine(0.0)[1] * G0

    thrust_sl, isp_sl = _liftoff(engine, ambient, m0, gravity)
    rhs = _equations(engine, ambient, EARTH_MU if gravity else 0.0, cda, c_vac)
    burnout, ground, pitch_over = _events(m_burnout, pitch_over_altitude)

    atol = np.array([1e-9, 1e-12, 1e-6, 1e-15, 1e-9 * m0, 1e-9, 1e-9, 1e-9, 1e-9 * m0 * c_vac])
    t_guess = mp / (thrust_sl / (isp_sl * G0))
    t_max = 100.0 * t_guess
    y = np.array([0.0, math.pi / 2, EARTH_RADIUS, 0.0, m0, 0.0, 0.0, 0.0, 0.0])
    phases = [(True, pitch_over_time or t_max,
               [burnout, ground] + ([pitch_over] if pitch_over_altitude else []))]
    if pitch_over_altitude or pitch_over_time:
        phases.append((False, t_max, [burnout, ground]))
    t, y = _integrate(rhs, y, phases, pitch_kick, rtol, atol)

    y = [float(x) for x in y]
    t, impulse = float(t), y[8]
    c_mean = impulse / mp
    ratio = math.log(m0 / m_burnout)
    return AscentResult(
        burn_time=t, burnout_altitude=y[2] - EARTH_RADIUS, burnout_speed=y[0],
        burnout_flight_path_angle=y[1], burnout_downrange=EARTH_RADIUS * y[3],
        total_impulse=impulse, mean_exhaust_velocity=c_mean, ideal_delta_v=c_mean * ratio,
        vacuum_delta_v=c_vac * ratio, gravity_loss=y[5], drag_loss=y[6], pressure_loss=y[7])


def _check_inputs(liftoff_mass, propellant_mass, drag_coefficient, reference_area,
                  pitch_over_altitude, pitch_over_time, pitch_kick):
    """(lift-off mass [kg], propellant mass [kg], Cd A [m^2]) after checking every input."""
    m0, mp = float(liftoff_mass), float(propellant_mass)
    if not (math.isfinite(m0) and m0 > 0):
        raise InputError("liftoff_mass", liftoff_mass, "a mass above 0 kg")
    if not (math.isfinite(mp) and 0 < mp < m0):
        raise InputError("propellant_mass", propellant_mass, f"a mass above 0 and below {m0:g} kg")
    cda = float(drag_coefficient) * float(reference_area)
    if not (drag_coefficient >= 0 and reference_area >= 0 and math.isfinite(cda)):
        raise InputError("drag_coefficient/reference_area", (drag_coefficient, reference_area),
                         "both at least 0")
    if not (0.0 <= pitch_kick < math.pi / 2):
        raise InputError("pitch_kick", pitch_kick, "an angle from 0 to pi/2 rad (exclusive)")
    if pitch_over_altitude is not None and pitch_over_time is not None:
        raise InputError("pitch_over_altitude", pitch_over_altitude, "not together with pitch_over_time")
    for field, val in (("pitch_over_altitude", pitch_over_altitude), ("pitch_over_time", pitch_over_time)):
        if val is not None and not (math.isfinite(val) and val > 0):
            raise InputError(field, val, "a number above 0")
    return m0, mp, cda


def _liftoff(engine, ambient, m0, gravity):
    """(thrust [N], Isp [s]) at lift-off, checked positive and, with gravity, above the weight."""
    p_sl = ambient(0.0)[0]
    thrust_sl, isp_sl = engine(p_sl)
    if not (thrust_sl > 0 and isp_sl > 0):
        raise InputError("thrust", thrust_sl, f"an engine with thrust and Isp above 0 at {p_sl:g} Pa")
    weight = m0 * EARTH_MU / EARTH_RADIUS**2
    if gravity and thrust_sl <= weight:
        raise InputError("thrust", f"{thrust_sl:.6g} N",
                         f"above the lift-off weight {weight:.6g} N (thrust-to-weight above 1)")
    return thrust_sl, isp_sl


def _ambient_model(needs_pressure, needs_density):
    """``ambient(h) -> (pressure [Pa], density [kg/m^3])`` of the 1976 atmosphere, 0 above
    86 km and for whatever the model does not need (the atmosphere is imported only then)."""
    if needs_pressure or needs_density:
        from perfchain import atmosphere

    def ambient(h):
        if not (needs_pressure or needs_density) or h >= MAX_ALTITUDE:
            return 0.0, 0.0
        h = max(h, 0.0)
        return (atmosphere.pressure(h) if needs_pressure else 0.0,
                atmosphere.density(h) if needs_density else 0.0)

    return ambient


def _equations(engine, ambient, mu, cda, c_vac):
    """Right-hand side of the planar point-mass equations, with the loss integrals.

    State: speed, flight-path angle, radius, range angle, mass, then the running gravity,
    drag and back-pressure losses and the impulse; ``vertical`` holds the angle at 90 deg.
    """
    def rhs(_t, y, vertical):
        v, gam, r, _th, m = y[:5]
        pa, rho = ambient(r - EARTH_RADIUS)
        thrust, isp = engine(pa)
        mdot = thrust / (isp * G0)
        g = mu / r**2
        drag = 0.5 * rho * v * v * cda
        g_along = g * math.sin(gam)
        dgam = 0.0 if vertical else -(g - v * v / r) * math.cos(gam) / v
        return [(thrust - drag) / m - g_along, dgam, v * math.sin(gam),
                v * math.cos(gam) / r, -mdot,
                g_along, drag / m, (mdot * c_vac - thrust) / m, thrust]

    return rhs


def _events(m_burnout, pitch_over_altitude):
    """Terminal events: burnout (all propellant used), back on the ground, pitch-over altitude."""
    def burnout(_t, y, _vertical):
        return y[4] - m_burnout
    burnout.terminal = True

    def ground(_t, y, _vertical):
        return y[2] - EARTH_RADIUS + 1.0
    ground.terminal = True

    def pitch_over(_t, y, _vertical):
        return y[2] - EARTH_RADIUS - pitch_over_altitude
    pitch_over.terminal = True
    return burnout, ground, pitch_over


def _integrate(rhs, y, phases, pitch_kick, rtol, atol):
    """Integrate the phases (vertical rise, then gravity turn) until burnout -> (t [s], state)."""
    from scipy.integrate import solve_ivp

    t = 0.0
    for i, (vertical, t_end, events) in enumerate(phases):
        if i > 0:
            y[1] = math.pi / 2 - pitch_kick
        sol = solve_ivp(rhs, (t, t_end), y, method="DOP853", rtol=rtol, atol=atol,
                        events=events, args=(vertical,))
        if not sol.success:
            raise SolverError(f"ascent integration failed: {sol.message}", f"t = {sol.t[-1]:.6g} s")
        t, y = sol.t[-1], sol.y[:, -1].copy()
        if sol.t_events[1].size:
            raise SolverError("the vehicle fell back to the ground before burnout",
                              f"t = {t:.6g} s")
        if sol.t_events[0].size:
            return t, y
    raise SolverError("burnout not reached", f"t = {t:.6g} s, mass {y[4]:.6g} kg")
