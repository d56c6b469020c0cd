"""Isentropic nozzle expansion with shifting or frozen composition.

From the stagnation (chamber) state the flow expands at constant entropy and
constant total enthalpy, so at any pressure the velocity is
``u = sqrt(2 (h0 - h))``. The composition along the way follows a flow model:

``shifting``
    chemical equilibrium at every station (infinitely fast reactions);
``frozen``
    the chamber composition throughout (infinitely slow reactions);
``frozen-throat``
    equilibrium up to the throat, the throat composition from there on.

The throat is where the flow speed equals the sound speed of the model (the
equilibrium sound speed for shifting flow, 2-3 % below the frozen one), which
is also where the mass flux rho*u peaks. The exit is found by its supersonic
area ratio ``A/A* = (rho u)* / (rho u)`` or by its pressure.
"""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass

import numpy as np
from scipy.optimize import brentq

from perfchain.thermo.equilibrium import EquilibriumSystem, MixState
from perfchain.errors import InputError, SolverError
from perfchain.thermo.flow_models import FLOW_MODELS, check_flow, near_transition

__all__ = ["FLOW_MODELS", "Expansion", "expand", "check_flow", "throat_of", "subsonic_state"]

@dataclass(frozen=True)
class Expansion:
    """Solved nozzle expansion (states and flow quantities, SI).

    Attributes
    ----------
    flow : str
    chamber, throat, exit : MixState
    throat_velocity, exit_velocity : float
        [m/s]
    throat_sound_speed, exit_sound_speed, chamber_sound_speed : float
        Sound speed of the flow model [m/s].
    throat_mass_flux : float
        rho*u at the throat [kg/(m^2 s)].
    area_ratio : float
        Exit area / throat area [-].
    """

    flow: str
    chamber: MixState
    throat: MixState
    exit: MixState
    chamber_sound_speed: float
    throat_velocity: float
    throat_sound_speed: float
    exit_velocity: float
    exit_sound_speed: float
    throat_mass_flux: float
    area_ratio: float

    @property
    def cstar(self) -> float:
        """Characteristic velocity p0 A* / mdot [m/s]."""
        return self.chamber.p / self.throat_mass_flux

    def thrust_per_mass_flow(self, ambient_pressure: float) -> float:
        """Thrust / mass flow = u_e + (p_e - p_a) A_e / mdot [m/s]."""
        return self.exit_velocity + (self.exit.p - ambient_pressure) * self.area_ratio / self.throat_mass_flux


class _Path:
    """States along one isentrope under one flow model."""

    def __init__(self, system: EquilibriumSystem, chamber: MixState, flow: str):
        self.system = system
        self.chamber = chamber
        self.h0, self.s0 = chamber.h, chamber.s
        self.before, self.after = FLOW_MODELS[flow]
        self.freeze_ref = chamber
        self._last = chamber

    def state(self, p: float, after_throat: bool = False) -> MixState:
        shifting = self.after if after_throat else self.before
        if shifting:
            st = self.system.sp(self.s0, p, self._last)
            self._last = st
        else:
            st = self.system.frozen_sp(self.freeze_ref, self.s0, p)
        return st

    def velocity(self, st: MixState) -> float:
        dh = self.h0 - st.h
        return math.sqrt(2.0 * dh) if dh > 0 else 0.0

    def sound_speed(self, st: MixState, after_throat: bool = False) -> float:
        shifting = self.after if after_throat else self.before
        return self.system.sound_speed(st, shifting)


def expand(system: EquilibriumSystem, chamber: MixState, flow: str = "shifting",
           area_ratio: float | None = None, exit_pressure: float | None = None,
           throat: tuple | None = None) -> Expansion:
    """Expand the chamber products isentropically to the exit.

    Parameters
    ----------
    system : EquilibriumSystem
    chamber : MixState
        Stagnation state (the chamber of an infinite-area chamber) [SI].
    flow : str
        ``"shifting"``, ``"frozen"`` or ``"frozen-throat"``.
    area_ratio : float, optional
        Supersonic exit area / throat area [-], > 1.
    exit_pressure : float, optional
        Exit pressure [Pa], below the throat pressure.
    throat : tuple, optional
        ``throat_of(system, chamber, flow)`` already solved for this chamber.

    Returns
    -------
    Expansion

    Examples
    --------
    Frozen expansion of argon, a monatomic ideal gas (gamma = 5/3 exactly), to
    area ratio 4: the closed-form A/A*(M) of NACA Report 1135 with gamma = 5/3
    gives Mach 3.441 and p/p0 = 0.01838:

    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> sys_ar = EquilibriumSystem(get_ingredient("Ar").elements)
    >>> c = sys_ar.tp(3000.0, 1e6)
    >>> e = expand(sys_ar, c, "frozen", area_ratio=4.0)
    >>> round(e.exit.p / c.p, 4), round(e.exit_velocity / e.exit_sound_speed, 2)
    (0.0184, 3.44)
    """
    flow = check_flow(flow)
    if (area_ratio is None) == (exit_pressure is None):
        raise InputError("exit", "both" if area_ratio is not None else "neither",
                         "exactly one of area_ratio or exit_pressure")
    path = _Path(system, chamber, flow)
    p0 = chamber.p
    a0 = system.sound_speed(chamber, path.before)
    g0 = chamber.density * a0 * a0 / p0
    throat, u_t, a_t = throat if throat is not None else _throat(path, p0, g0)
    G_t = throat.density * u_t
    if not FLOW_MODELS[flow][1]:
        path.freeze_ref = throat if path.before else chamber
    if exit_pressure is not None:
        if not exit_pressure < throat.p:
            raise InputError("exit_pressure", exit_pressure,
                             f"a pressure below the throat pressure {throat.p:.6g} Pa "
                             "(a supersonic exit)")
        ex = path.state(exit_pressure, after_throat=True)
        u_e = path.velocity(ex)
        eps = G_t / (ex.density * u_e)
    else:
        if not area_ratio > 1.0:
            raise InputError("area_ratio", area_ratio, "an exit/throat area ratio above 1")
        ex, u_e = _exit_by_area_ratio(path, throat, G_t, area_ratio, g0)
        eps = area_ratio
    a_e = path.sound_speed(ex, after_throat=True)
    system.check(throat)
    system.check(ex)
    _check_isentrope(system, chamber, (throat, u_t), (ex, u_e), G_t, eps)
    return Expansion(flow, chamber, throat, ex, a0, u_t, a_t, u_e, a_e, G_t, eps)


def throat_of(system: EquilibriumSystem, stagnation: MixState, flow: str = "shifting"):
    """Sonic throat of a stagnation state: (state, velocity [m/s], sound speed [m/s]).

    Parameters
    ----------
    system : EquilibriumSystem
    stagnation : MixState
        Nozzle-inlet stagnation state [SI].
    flow : str
        ``"shifting"``, ``"frozen"`` or ``"frozen-throat"``.

    Returns
    -------
    tuple
        (throat state, velocity [m/s], sound speed [m/s]); velocity = sound speed.

    Examples
    --------
    Argon, a monatomic ideal gas (gamma = 5/3): the closed forms of NACA Report 1135 give
    T*/T0 = 2/(g+1) = 0.75 and p*/p0 = 0.75^2.5 = 0.48714:

    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> sys_ar = EquilibriumSystem(get_ingredient("Ar").elements)
    >>> c = sys_ar.tp(3000.0, 1e6)
    >>> t, u, a = throat_of(sys_ar, c, "frozen")
    >>> round(t.T / c.T, 6), round(t.p / c.p, 5), round(u / a, 6)
    (0.75, 0.48714, 1.0)
    """
    path = _Path(system, stagnation, check_flow(flow))
    a0 = system.sound_speed(stagnation, path.before)
    return _throat(path, stagnation.p, stagnation.density * a0 * a0 / stagnation.p)


def subsonic_state(system: EquilibriumSystem, stagnation: MixState, mass_flux: float,
                   throat_pressure: float, flow: str = "shifting"):
    """Subsonic state on the isentrope whose rho*u equals ``mass_flux`` [kg/(m^2 s)].

    Used for a finite-area chamber's nozzle inlet.

    Parameters
    ----------
    system : EquilibriumSystem
    stagnation : MixState
        Stagnation state [SI].
    mass_flux : float
        rho*u to match [kg/(m^2 s)], below the throat's.
    throat_pressure : float
        Sonic pressure of this isentrope [Pa] (the lower end of the search).
    flow : str
        ``"shifting"``, ``"frozen"`` or ``"frozen-throat"``.

    Returns
    -------
    tuple
        (state, velocity [m/s]).

    Examples
    --------
    Argon (gamma = 5/3) at half the throat mass flux, i.e. A/A* = 2: the subsonic root of the
    closed form A/A*(M) of NACA Report 1135, M = 0.29817:

    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> sys_ar = EquilibriumSystem(get_ingredient("Ar").elements)
    >>> c = sys_ar.tp(3000.0, 1e6)
    >>> t, u, _ = throat_of(sys_ar, c, "frozen")
    >>> st, v = subsonic_state(sys_ar, c, t.density * u / 2, t.p, "frozen")
    >>> round(v / sys_ar.sound_speed(st, False), 5)
    0.29817
    """
    path = _Path(system, stagnation, check_flow(flow))

    def f(x):
        st = path.state(math.exp(x))
        return st.density * path.velocity(st) - mass_flux, st

    lo, hi = math.log(throat_pressure), math.log(stagnation.p * (1 - 1e-12))
    x = brentq(lambda x: f(x)[0], lo, hi, xtol=1e-13, rtol=1e-15, maxiter=200)
    st = f(x)[1]
    return st, path.velocity(st)


def _check_isentrope(system, chamber, *stations_and_flux):
    """Never return a nozzle that breaks its own conservation laws (entropy, mass flux)."""
    (throat, u_t), (ex, u_e), G_t, eps = stations_and_flux
    for st, name in ((throat, "throat"), (ex, "exit")):
        if abs(st.s - chamber.s) > 1e-7 * abs(chamber.s):
            raise SolverError(f"{name} state misses the chamber entropy", system.point)
    if not (u_e > 0 and abs(G_t / (ex.density * u_e) / eps - 1.0) < 1e-7):
        raise SolverError(f"exit state does not reach area ratio {eps:.6g} inside the data range",
                          system.point)


def _throat(path: _Path, p0: float, gamma: float):
    """Sonic point: u(p) = a(p) along the isentrope, solved in ln p; near a melting plateau
    (:func:`~perfchain.thermo.flow_models.near_transition`) the sonic point of highest rho u."""
    cache = {}

    def f(x):
        if x not in cache:
            st = path.state(p0 * math.exp(x))
            u = path.velocity(st)
            a = path.sound_speed(st)
            cache[x] = (u * u - a * a) / (a * a), st, u, a
        return cache[x][0]

    g = min(max(gamma, 1.05), 1.7)
    guess = math.log((2.0 / (g + 1.0)) ** (g / (g - 1.0)))
    lo, hi = guess - 0.08, guess + 0.08
    for _ in range(20):
        if f(lo) > 0:
            break
        lo -= 0.1
    for _ in range(20):
        if f(hi) < 0:
            break
        hi = min(hi + 0.1, -1e-6)
    if not (f(lo) > 0 > f(hi)):
        raise SolverError("no sonic throat found along the isentrope", path.system.point)
    x = brentq(f, lo, hi, xtol=1e-12, rtol=1e-14, maxiter=100)
    f(x)
    cond = path.system.cond_species
    if cond and near_transition([c.thermo.min_temp for c in cond], [c.thermo.max_temp for c in cond],
                                cache[x][1].T, path.chamber.T):
        x = _highest_sonic_point(path, f, cache, x)
    if not path.before:
        x = _frozen_plateau_edge(path, f, cache, x)
    _, st, u, a = cache[x]
    return st, u, a


def _frozen_plateau_edge(path: _Path, f, cache, x: float) -> float:
    """A frozen throat on a melting plateau moved to the plateau's edge where rho u is higher
    there (in ln(p/p0)). At the edge the frozen sound speed jumps down, so u^2 - a^2 jumps
    through zero and rho u peaks at the edge itself; the root of f stops within the band where
    :meth:`~perfchain.thermo.equilibrium.EquilibriumSystem.frozen_sp` still accepts the one-phase
    state (its entropy tolerance, ~3e-8 in ln p), just inside. The edge: the pressure where the
    upper phase alone at the transition temperature has the chamber entropy; at fixed T and
    composition s is linear in ln p (ideal gas), so a secant of two such states is exact."""
    st, sys_ = cache[x][1], path.system
    if st.T not in {t for c in sys_.cond_species for t in (c.thermo.min_temp, c.thermo.max_temp)}:
        return x
    upper = sys_._frozen_phases(path.freeze_ref.condensed, st.T, above=True)
    s1 = sys_.make_state(st.T, st.p, st.X, st.n_gas, upper).s
    s2 = sys_.make_state(st.T, st.p * math.exp(1e-3), st.X, st.n_gas, upper).s
    edge = x + 1e-3 * (s1 - path.s0) / (s1 - s2)
    if not x < edge < 0.0:
        return x
    f(edge)
    return edge if cache[edge][1].density * cache[edge][2] > cache[x][1].density * cache[x][2] else x


def _highest_sonic_point(path: _Path, f, cache, x0: float) -> float:
    """Every sonic point of p/p0 = 0.95 ... 0.2 (a scan in 40 steps of ln p, then Brent on each
    sign change of f): the one of highest rho u, which is the throat (in ln(p/p0))."""
    def flux(x):
        _, st, u, _ = cache[x]
        return st.density * u

    best = x0
    grid = np.linspace(math.log(0.95), math.log(0.2), 41)
    vals = [f(x) for x in grid]
    for xa, xb, fa, fb in zip(grid[:-1], grid[1:], vals[:-1], vals[1:]):
        if fa < 0 < fb:      # subsonic at the higher pressure, supersonic below: a hump's top
            x = brentq(f, xb, xa, xtol=1e-12, rtol=1e-14, maxiter=100)
            f(x)
            if flux(x) > flux(best):
                best = x
    return best


def _exit_by_area_ratio(path: _Path, throat: MixState, G_t: float, eps: float, gamma: float):
    """Supersonic exit with A/A* = eps: safeguarded Newton in x = ln(p / p_throat).

    f(x) = ln((rho u)* / (rho u)) - ln eps has the exact slope
    df/dx = -(p / rho) (1/a^2 - 1/u^2) along the isentrope (from dh = dp/rho
    and a^2 = (dp/drho)_s of the flow model), so 3-5 states usually suffice.
    """
    target = math.log(eps)

    def evaluate(x):
        st = path.state(throat.p * math.exp(x), after_throat=True)   # SolverError: out of data
        u = path.velocity(st)
        if not u > 0:
            return -target, -1.0, st, u
        f = math.log(G_t / (st.density * u)) - target
        try:
            a = path.sound_speed(st, after_throat=True)
            slope = -(st.p / st.density) * (1.0 / (a * a) - 1.0 / (u * u))
        except SolverError:      # no slope here (e.g. a melting plateau): bisect instead
            slope = math.nan
        return f, slope, st, u

    # first guess: calorically perfect gas with the throat's isentropic exponent
    from perfchain.nozzle.isentropic import exit_pressure_ratio_for_area_ratio

    g = min(max(gamma, 1.05), 1.7)
    try:
        with warnings.catch_warnings():   # an absurd area ratio overflows the closed form: fine
            warnings.simplefilter("ignore")
            ratio = float(exit_pressure_ratio_for_area_ratio(eps, g)) / (2.0 / (g + 1.0)) ** (g / (g - 1.0))
        x = math.log(ratio) if ratio > 0 else -g * math.log(eps)
    except (ValueError, ArithmeticError):
        x = -g * math.log(eps)   # A/A* ~ (p*/p)^(1/g) far downstream
    lo, hi = -math.inf, 0.0          # f(lo) > 0 > f(hi)
    for it in range(120):
        try:
            f, slope, st, u = evaluate(x)
        except SolverError:
            if not math.isfinite(lo) and x < -60:
                raise
            lo = max(lo, x) if math.isfinite(lo) else x   # too far: the answer lies above
            x = 0.5 * (x + hi)
            continue
        if abs(f) < 1e-11:   # area ratio met to 1e-11 relative
            return st, u
        if f > 0:
            lo = x
        else:
            hi = x
        if math.isfinite(lo) and hi - lo < 1e-12:
            if abs(f) < 1e-8:
                return st, u     # at the solver's noise floor
            break   # bracket closed without meeting the target: not a smooth isentrope here
        # Newton while it behaves; plain bisection after 12 steps (e.g. on a melting plateau,
        # where the slope of the equilibrium model does not see the phase fraction change)
        step = -f / slope if (slope < 0 and it < 12) else math.nan
        x_new = x + step
        if not (lo < x_new < hi) or not math.isfinite(x_new):
            x_new = 0.5 * (lo + hi) if math.isfinite(lo) else x - 1.0
        if abs(x_new - x) < 1e-10 and abs(f) < 1e-8:
            return st, u         # ln p settled to 1e-10; solver noise is ~1e-11
        x = x_new
    raise SolverError(f"area ratio {eps:g} not reached inside the thermodynamic data range "
                      f"({path.system.gas.min_temp:g}-{path.system.gas.max_temp:g} K)", path.system.point)
