"""``perfchain point``: one operating point, as a table for a person or as JSON."""

from __future__ import annotations

import json
import math

import click

from perfchain.errors import InputError
from perfchain.performance.chain import performance

__all__ = ["point", "format_point"]

_CAUTION = ("Theoretical estimate, not a test result. Propellants and hot-fire work can kill: "
            "follow local codes, range safety and licensed practice.")


def _float(text, field, allowed):
    try:
        return float(text)
    except (TypeError, ValueError):
        raise InputError(field, text, allowed) from None


def point_options(f):
    """The options that state one operating point (shared with later commands)."""
    opts = [
        click.option("--oxidizer", required=True, help="Oxidizer name, e.g. LOX, N2O4, H2O2-98."),
        click.option("--fuel", required=True, help="Fuel name, e.g. RP-1, LH2, LCH4, MMH."),
        click.option("--mixture-ratio", help="O/F by mass."),
        click.option("--equivalence-ratio", help="Equivalence ratio (>1 fuel-rich)."),
        click.option("--fuel-percent", help="Fuel mass per cent."),
        click.option("--chamber-pressure", required=True, help="With a unit: '1000 psi', '20 bar', '7 MPa'."),
        click.option("--area-ratio", help="Exit/throat area ratio (> 1)."),
        click.option("--exit-pressure", help="Exit pressure with a unit, e.g. '1 atm'."),
        click.option("--ambient-pressure", default=None,
                     help="Ambient pressure with a unit; '0 Pa' is vacuum. [default: 1 atm]"),
        click.option("--flow", default="shifting", show_default=True,
                     help="Composition model: shifting, frozen or frozen-throat."),
    ]
    for opt in reversed(opts):
        f = opt(f)
    return f


def point_kwargs(oxidizer, fuel, mixture_ratio, equivalence_ratio, fuel_percent, chamber_pressure,
                 area_ratio, exit_pressure, ambient_pressure, flow) -> dict:
    """CLI text -> keyword arguments of :func:`perfchain.performance.chain.performance`."""
    return dict(
        oxidizer=oxidizer, fuel=fuel, chamber_pressure=chamber_pressure,
        mixture_ratio=None if mixture_ratio is None else _float(mixture_ratio, "mixture_ratio", "an O/F by mass above 0"),
        equivalence_ratio=None if equivalence_ratio is None else _float(equivalence_ratio, "equivalence_ratio", "an equivalence ratio above 0"),
        fuel_percent=None if fuel_percent is None else _float(fuel_percent, "fuel_percent", "a fuel mass per cent in (0, 100)"),
        area_ratio=None if area_ratio is None else _float(area_ratio, "area_ratio", "an exit/throat area ratio above 1"),
        exit_pressure=exit_pressure, ambient_pressure=ambient_pressure, flow=flow,
    )


def delivered_options(f):
    """Options for delivered performance, finite chamber, altitude and sizing."""
    opts = [
        click.option("--cstar-efficiency", help="Combustion (c*) efficiency in (0, 1]."),
        click.option("--nozzle-half-angle", help="Conical nozzle half-angle with a unit, e.g. '15deg'."),
        click.option("--divergence-factor", help="Divergence factor in (0, 1] (instead of the half-angle)."),
        click.option("--cf-efficiency", help="Other thrust-coefficient losses combined, in (0, 1]."),
        click.option("--contraction-ratio", help="Chamber/throat area ratio (> 1); default infinite."),
        click.option("--altitude", help="Altitude with a unit, e.g. '11 km' (instead of --ambient-pressure)."),
        click.option("--thrust", help="Thrust to size the chamber for, with a unit, e.g. '5 kN'."),
        click.option("--thrust-at", type=click.Choice(["vacuum", "ambient"]), default="vacuum",
                     show_default=True, help="Where the thrust is given."),
    ]
    for opt in reversed(opts):
        f = opt(f)
    return f


def delivered_kwargs(cstar_efficiency, nozzle_half_angle, divergence_factor, cf_efficiency,
                     contraction_ratio, altitude, thrust, thrust_at) -> dict:
    """CLI text -> the delivered-performance keyword arguments of ``performance``."""
    from perfchain.units import to_si

    losses = {}
    if cstar_efficiency is not None:
        losses["cstar_efficiency"] = _float(cstar_efficiency, "cstar_efficiency", "a factor in (0, 1]")
    if nozzle_half_angle is not None:
        a = to_si(nozzle_half_angle, "angle", "nozzle_half_angle")
        if not 0.0 < a < math.pi / 4:
            raise InputError("nozzle_half_angle", nozzle_half_angle, "an angle between 0 and 45 deg, exclusive")
        losses["conical_half_angle"] = a
    if divergence_factor is not None:
        losses["divergence_factor"] = _float(divergence_factor, "divergence_factor", "a factor in (0, 1]")
    if cf_efficiency is not None:
        losses["cf_efficiency"] = _float(cf_efficiency, "cf_efficiency", "a factor in (0, 1]")
    out = {"losses": losses or None, "thrust": thrust, "thrust_at": thrust_at, "altitude": altitude}
    if contraction_ratio is not None:
        out["contraction_ratio"] = _float(contraction_ratio, "contraction_ratio",
                                          "a chamber/throat area ratio above 1")
    return out


@click.command("point")
@point_options
@delivered_options
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object (SI units).")
def point(as_json, cstar_efficiency, nozzle_half_angle, divergence_factor, cf_efficiency,
          contraction_ratio, altitude, thrust, thrust_at, **kwargs):
    """Performance of one operating point (chamber, throat, exit, c*, Cf, Isp).

    Ideal by default; efficiency options add delivered values, and --thrust sizes the
    thrust chamber.
    """
    args = point_kwargs(**kwargs)
    extra = delivered_kwargs(cstar_efficiency, nozzle_half_angle, divergence_factor, cf_efficiency,
                             contraction_ratio, altitude, thrust, thrust_at)
    if extra["altitude"] is not None and kwargs["ambient_pressure"] is not None:
        raise InputError("altitude", altitude, "either --altitude or --ambient-pressure, not both")
    result = performance(**args, **extra)
    if as_json:
        click.echo(json.dumps(result.to_dict(), indent=2, allow_nan=False))
    else:
        click.echo(format_point(result))


def format_point(r) -> str:
    """A plain-text summary of a :class:`~perfchain.performance.chain.Performance` for a person."""
    lines = [
        f"perfchain | {r.oxidizer} / {r.fuel} | {r.flow} flow",
        f"  O/F {r.mixture_ratio:.4g} (stoichiometric {r.stoichiometric_mixture_ratio:.4g}, "
        f"equivalence ratio {r.equivalence_ratio:.4g}, {r.fuel_percent:.3g} % fuel)",
        "",
        f"  {'':22s}{'chamber':>12s}{'throat':>12s}{'exit':>12s}",
    ]
    rows = [
        ("pressure [bar]", lambda s: s.pressure / 1e5, "{:12.4f}"),
        ("temperature [K]", lambda s: s.temperature, "{:12.1f}"),
        ("density [kg/m3]", lambda s: s.density, "{:12.5g}"),
        ("molar mass [kg/kmol]", lambda s: s.molar_mass, "{:12.4f}"),
        ("gamma (isentropic)", lambda s: s.gamma, "{:12.4f}"),
        ("sound speed [m/s]", lambda s: s.sound_speed, "{:12.1f}"),
        ("velocity [m/s]", lambda s: s.velocity, "{:12.1f}"),
        ("Mach", lambda s: s.mach, "{:12.4f}"),
        ("condensed mass frac.", lambda s: s.condensed_mass_fraction, "{:12.4f}"),
    ]
    for label, get, fmt in rows:
        lines.append(f"  {label:22s}" + "".join(fmt.format(get(s)) for s in (r.chamber, r.throat, r.exit)))
    lines += [
        "",
        f"  area ratio            {r.area_ratio:10.4f}",
        f"  c*                    {r.cstar:10.1f} m/s",
        f"  Cf vacuum / ambient   {r.cf_vacuum:10.4f} / {r.cf_ambient:.4f}  (ambient {r.ambient_pressure / 1e5:.5g} bar)",
        f"  Isp vacuum / ambient  {r.isp_vacuum:10.2f} / {r.isp_ambient:.2f} s",
    ]
    lines += _delivered_lines(r)
    lines += ["", "  chamber products (mole fraction):"]
    for name, x in list(r.chamber.composition.items())[:12]:
        lines.append(f"    {name:14s} {x:.5f}")
    lines += ["", "  " + _CAUTION]
    return "\n".join(lines)


def _delivered_lines(r) -> list:
    lines = []
    if r.finite_chamber:
        fc = r.finite_chamber
        lines.append(f"  contraction ratio     {fc['contraction_ratio']:10.4g}  (nozzle-inlet stagnation "
                     f"{fc['nozzle_inlet_stagnation_pressure'] / 1e5:.5g} bar, Mach {fc['nozzle_inlet_mach']:.3f})")
    if r.delivered:
        d = r.delivered
        lines += [f"  delivered c*          {d['cstar']:10.1f} m/s",
                  f"  delivered Isp vac/amb {d['isp_vacuum']:10.2f} / {d['isp_ambient']:.2f} s",
                  "  Isp vacuum lost to:   " + (", ".join(
                      f"{k} {v:.2f} s" for k, v in r.losses["isp_vacuum_loss"].items() if v) or "nothing")]
    if r.separation and r.ambient_pressure > 0:
        sp = r.separation
        flag = "SEPARATION LIKELY" if sp["flag"] else "flows full"
        lines.append(f"  separation ({sp['criterion']}): {flag}; flows full below "
                     f"{sp['full_flow_ambient_pressure'] / 1e5:.4g} bar ambient")
    if r.sizing:
        z = r.sizing
        lines.append(f"  sizing for {z['thrust'] / 1e3:.4g} kN ({z['thrust_at']}): throat D "
                     f"{z['throat_diameter'] * 1e3:.2f} mm, exit D {z['exit_diameter'] * 1e3:.1f} mm, "
                     f"mass flow {z['mass_flow']:.4g} kg/s")
    return lines


@click.command("ingredients")
@click.option("--json", "as_json", is_flag=True, help="Print JSON (SI units).")
def ingredients(as_json):
    """List the bundled ingredients with their storage state and sources."""
    from perfchain.propellants.ingredients import list_ingredients

    rows = [{"name": i.name, "aliases": list(i.aliases), "role": i.role, "formula": i.formula_text,
             "enthalpy": i.enthalpy, "temperature": i.temperature, "phase": i.phase,
             "density": i.density, "sources": dict(i.sources), "parts": [list(p) for p in i.parts]}
            for i in list_ingredients()]
    if as_json:
        click.echo(json.dumps(rows, indent=2))
        return
    click.echo(f"{'name':12s} {'role':9s} {'T [K]':>8s} {'h [kJ/kg]':>11s} {'rho [kg/m3]':>12s}  aliases")
    for r in rows:
        click.echo(f"{r['name']:12s} {r['role']:9s} {r['temperature']:8.2f} {r['enthalpy'] / 1e3:11.1f} "
                   f"{r['density']:12.4g}  {', '.join(r['aliases'])}")
    click.echo("\nHandle every propellant under your site's safety rules: hydrazines and N2O4 are toxic "
               "(hydrazines are suspected carcinogens), cryogens burn and asphyxiate, N2O can decompose "
               "explosively, concentrated H2O2 and oxygen feed fires.")
