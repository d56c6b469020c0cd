"""Two-phase flow loss of metallised solid propellants: an empirical correlation of the Isp loss.

The correlation of the Solid Performance Program (SPP) of the U.S. Air Force Rocket Propulsion
Laboratory (Nickerson, Coats et al., 1980s), as reproduced in Sutton & Biblarz, Rocket Propulsion
Elements, solid-propellant performance chapter (from memory; exponents and constants as
remembered, so treat the loss as an estimate of +/- 30 % of itself):

    loss [% of Isp] = C3 xi^C4 D_p^C5 / (p_c^0.15 eps^0.08 D_t^C6)

with xi the condensed products in the chamber [mol per 100 g], D_p the mean particle
diameter [um], p_c [psia], eps the area ratio [-], D_t the throat diameter [in]; C4 = 0.5,
C3 = 9.0 for xi >= 0.09 and C4 = 1.0, C3 = 30.0 below; C5 = C6 = 1.0 for D_t < 1 in,
C5 = 1.0, C6 = 0.8 for 1-2 in, C5 = 0.8, C6 = 0.8 above 2 in. The particle diameter, when not
given, is Hermsen's correlation (R. W. Hermsen, J. Spacecraft Rockets 18, 1981; from memory)
with a long residence time: D_p = 0.454 p_c^(1/3) xi^(1/3) (1 + 0.045 D_t) [um].

Validity (the motors it was fitted to, from memory): aluminised AP composites, 200-2000 psia,
throat diameters 0.5-60 in, xi up to ~0.4 mol/100 g. Outside it, the value is reported with a
note, never silently.
"""

from __future__ import annotations

import math

from perfchain.errors import InputError

__all__ = ["TWO_PHASE_SOURCE", "TWO_PHASE_VALIDITY", "particle_diameter", "two_phase_loss",
           "two_phase_factor", "with_two_phase", "two_phase_note"]

_SPP_SOURCE = ("Solid Performance Program (SPP) two-phase loss correlation, as given in Sutton & "
               "Biblarz, Rocket Propulsion Elements (from memory)")
TWO_PHASE_SOURCE = _SPP_SOURCE + "; particle size after Hermsen, J. Spacecraft Rockets 18 (1981) (from memory)"
TWO_PHASE_VALIDITY = {"chamber_pressure_psia": (200.0, 2000.0), "throat_diameter_in": (0.5, 60.0),
                      "xi_mol_per_100g": (0.0, 0.4)}
_PSI, _INCH = 6894.757293168, 0.0254
#: the largest loss applied [-]: far outside its range the correlation's own value can pass 100 %
LOSS_CAP = 0.5


def particle_diameter(xi: float, chamber_pressure: float, throat_diameter: float) -> float:
    """Mean condensed-particle diameter by Hermsen's correlation (long residence time) [m].

    Parameters
    ----------
    xi : float
        Condensed products in the chamber [mol per 100 g].
    chamber_pressure : float
        [Pa]
    throat_diameter : float
        [m]

    Examples
    --------
    xi = 0.33 mol/100 g, 1000 psia, 4 in throat: 0.454 * 10 * 0.6910 * 1.18 = 3.70 um
    (closed form of the correlation):

    >>> round(particle_diameter(0.33, 1000 * 6894.757293168, 4 * 0.0254) * 1e6, 2)
    3.7
    """
    pc = chamber_pressure / _PSI
    dt = throat_diameter / _INCH
    return 0.454 * pc ** (1 / 3) * xi ** (1 / 3) * (1.0 + 0.045 * dt) * 1e-6


def two_phase_loss(condensed_mass_fraction: float, condensed_molar_mass: float, chamber_pressure: float,
                   area_ratio: float, throat_diameter: float, particle_size: float | None = None) -> dict:
    """Isp loss from particle velocity and thermal lag, as a fraction of the ideal Isp [-].

    Parameters
    ----------
    condensed_mass_fraction : float
        Mass of condensed products per mass of propellant in the chamber [-].
    condensed_molar_mass : float
        Mean molar mass of those products [kg/kmol] (101.96 for alumina).
    chamber_pressure : float
        [Pa]
    area_ratio : float
        [-]
    throat_diameter : float
        [m]
    particle_size : float, optional
        Mean particle diameter [m]; default Hermsen's correlation.

    Returns
    -------
    dict
        ``loss`` [-], ``factor`` = 1 - loss [-], ``xi`` [mol/100 g], ``particle_diameter`` [m],
        ``in_range`` (bool) and ``source``.

    Examples
    --------
    The correlation's own formula at xi = 0.333 mol/100 g (34 % alumina), D_p = 4 um, 1000 psia,
    eps = 10, D_t = 4 in: 9.0 * 0.333^0.5 * 4^0.8 / (1000^0.15 * 10^0.08 * 4^0.8) = 1.53 %:

    >>> r = two_phase_loss(0.3395, 101.96, 1000 * 6894.757293168, 10.0, 4 * 0.0254, 4e-6)
    >>> round(r["loss"] * 100, 2), r["in_range"]
    (1.53, True)
    """
    for name, v in (("condensed_mass_fraction", condensed_mass_fraction),
                    ("condensed_molar_mass", condensed_molar_mass), ("chamber_pressure", chamber_pressure),
                    ("area_ratio", area_ratio), ("throat_diameter", throat_diameter)):
        if isinstance(v, bool) or not isinstance(v, (int, float)) or not v > 0 or not math.isfinite(v):
            raise InputError(name, v, "a positive finite number")
    if condensed_mass_fraction >= 1:
        raise InputError("condensed_mass_fraction", condensed_mass_fraction, "a fraction below 1")
    xi = condensed_mass_fraction / condensed_molar_mass * 100.0
    dp = particle_size if particle_size is not None else particle_diameter(xi, chamber_pressure,
                                                                           throat_diameter)
    if isinstance(dp, bool) or not isinstance(dp, (int, float)) or not dp > 0:
        raise InputError("particle_size", dp, "a particle diameter above 0 m")
    pc, dt, dpu = chamber_pressure / _PSI, throat_diameter / _INCH, dp * 1e6
    c3, c4 = (9.0, 0.5) if xi >= 0.09 else (30.0, 1.0)
    c5, c6 = (1.0, 1.0) if dt < 1.0 else (1.0, 0.8) if dt < 2.0 else (0.8, 0.8)
    loss = c3 * xi ** c4 * dpu ** c5 / (pc ** 0.15 * area_ratio ** 0.08 * dt ** c6) / 100.0
    lim = TWO_PHASE_VALIDITY
    in_range = (lim["chamber_pressure_psia"][0] <= pc <= lim["chamber_pressure_psia"][1]
                and lim["throat_diameter_in"][0] <= dt <= lim["throat_diameter_in"][1]
                and xi <= lim["xi_mol_per_100g"][1])
    return {"loss": min(loss, LOSS_CAP), "factor": 1.0 - min(loss, LOSS_CAP), "correlation_loss": loss, "xi": xi,
            "particle_diameter": dp, "in_range": bool(in_range),
            "source": TWO_PHASE_SOURCE if particle_size is None else _SPP_SOURCE + "; particle size as given"}


def two_phase_factor(perf, throat_diameter: float, particle_size: float | None = None) -> dict | None:
    """The two-phase loss of an ideal operating point (None if its chamber holds no condensed phase).

    Parameters
    ----------
    perf : Performance
        Ideal point; its chamber station gives the condensed mass fraction.
    throat_diameter : float
        [m]
    particle_size : float, optional
        [m]

    Examples
    --------
    A gas-only point has no two-phase loss:

    >>> from perfchain.performance.chain import performance
    >>> p = performance("LOX", "LH2", mixture_ratio=6.0, chamber_pressure="50 bar", area_ratio=20)
    >>> two_phase_factor(p, 0.1) is None
    True
    """
    ch = perf.chamber
    w = ch.condensed_mass_fraction
    if not w > 0:
        return None
    # mean molar mass of the condensed products from the chamber composition (mole fractions)
    from perfchain.thermo.products import condensed_molar_masses

    mm = condensed_molar_masses(tuple(sorted(ch.composition)))
    moles = {k: ch.composition[k] for k in mm}
    n = sum(moles.values())
    mean = sum(moles[k] * mm[k] for k in moles) / n if n > 0 else 101.96
    return two_phase_loss(w, mean, perf.chamber_pressure, perf.area_ratio, throat_diameter, particle_size)


def with_two_phase(perf, model, throat_diameter=None, particle_size=None, sized_throat=None):
    """The loss model with the two-phase factor filled in by default, and a note for the record.

    Applied when the chamber holds condensed products and the model's ``two_phase`` is left at 1
    (a factor given directly wins). The throat diameter is ``throat_diameter`` [m], else the
    one sized without this loss (``sized_throat()``, a callable; the ~1 % change the loss makes
    to the sized throat is far inside the correlation's accuracy); with neither, no factor and
    a note saying why.

    Returns
    -------
    tuple
        (LossModel, dict or None): the model and the two-phase record (None without condensed).

    Examples
    --------
    >>> from perfchain.performance.loss_model import LossModel
    >>> from perfchain.performance.chain import performance
    >>> p = performance("LOX", "LH2", mixture_ratio=6.0, chamber_pressure="50 bar", area_ratio=20)
    >>> with_two_phase(p, LossModel(), 0.1)
    (LossModel(cstar_efficiency=1.0, conical_half_angle=None, bell_exit_angle=None, divergence_factor=None, boundary_layer=1.0, kinetic=1.0, two_phase=1.0, cf_efficiency=1.0), None)
    """
    from dataclasses import replace

    if not perf.chamber.condensed_mass_fraction > 0 or model.two_phase != 1.0:
        return model, None
    if throat_diameter is None and sized_throat is not None:
        throat_diameter = sized_throat()
    if throat_diameter is None:
        return model, {"applied": False, "note": "two-phase loss not applied: the correlation needs a "
                       "throat diameter (give a thrust to size one)", "source": TWO_PHASE_SOURCE}
    rec = two_phase_factor(perf, throat_diameter, particle_size)
    rec["applied"] = True
    rec["throat_diameter"] = float(throat_diameter)
    if not rec["in_range"]:
        rec["note"] = "outside the correlation's validity range: an extrapolation"
    if rec["correlation_loss"] > LOSS_CAP:
        rec["note"] = (f"outside the correlation's validity range: it gives {rec['correlation_loss']:.3g} "
                       f"of the Isp here, capped at {LOSS_CAP:.0%}; not a usable estimate, give a two-phase "
                       "factor from test data")
    return replace(model, two_phase=rec["factor"]), rec


def two_phase_note(rec: dict | None, throat: str | None = None) -> str | None:
    """The two-phase record of a delivered point in words: the loss, its inputs, whether the point
    lies in the correlation's range, and the source; or why it was not applied (None without one).

    Parameters
    ----------
    rec : dict or None
        ``losses["two_phase"]`` of a delivered point (:func:`with_two_phase`).
    throat : str, optional
        The throat diameter as text in the reader's units; default in mm.

    Examples
    --------
    >>> two_phase_note({"applied": False, "note": "two-phase loss not applied: no throat", "source": "S"})
    'two-phase flow loss not applied: no throat (S)'
    >>> two_phase_note({"applied": True, "loss": 0.0153, "xi": 0.333, "particle_diameter": 4e-6,
    ...                 "throat_diameter": 0.1016, "in_range": True, "source": "S"})
    'two-phase flow loss 1.53 % of the momentum thrust (0.333 mol/100 g condensed, particles 4 um, throat 101.6 mm); S'
    """
    if not rec:
        return None
    if not rec["applied"]:
        return f"two-phase flow loss {rec['note'].removeprefix('two-phase loss ')} ({rec['source']})"
    throat = throat or f"{rec['throat_diameter'] * 1e3:.4g} mm"
    where = "" if rec["in_range"] else "; OUTSIDE the correlation's validity range: an extrapolation"
    if rec.get("correlation_loss", 0.0) > LOSS_CAP:
        where = "; " + rec["note"].replace("outside", "OUTSIDE", 1)
    return (f"two-phase flow loss {rec['loss'] * 100:.2f} % of the momentum thrust ({rec['xi']:.3g} mol/100 g "
            f"condensed, particles {rec['particle_diameter'] * 1e6:.2g} um, throat {throat}){where}; {rec['source']}")
