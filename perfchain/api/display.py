"""How results read for a person: plain text (terminal, ``repr``) and HTML (notebooks).

For an operating point both show the same things: the propellant and mixture, the chamber/throat/exit stations,
c*, Cf and Isp, the delivered, separation and sizing blocks when computed, the main
chamber products, and the safety caution.
"""

from __future__ import annotations

from html import escape

from perfchain.constants import G0

__all__ = ["CAUTION", "SOLID_CAUTION", "MONOPROPELLANT_CAUTION", "format_point", "html_point", "format_delta_v"]

CAUTION = ("Theoretical estimate, not a test result. Propellants and hot-fire work can kill: "
           "follow local codes, range safety and licensed practice.")

#: (label, station getter, format) of the station table
_ROWS = (
    ("pressure [bar]", lambda s: s.pressure / 1e5, "{:.4f}"),
    ("temperature [K]", lambda s: s.temperature, "{:.1f}"),
    ("density [kg/m3]", lambda s: s.density, "{:.5g}"),
    ("molar mass [kg/kmol]", lambda s: s.molar_mass, "{:.4f}"),
    ("gamma (isentropic)", lambda s: s.gamma, "{:.4f}"),
    ("sound speed [m/s]", lambda s: s.sound_speed, "{:.1f}"),
    ("velocity [m/s]", lambda s: s.velocity, "{:.1f}"),
    ("Mach", lambda s: s.mach, "{:.4f}"),
    ("condensed mass frac.", lambda s: s.condensed_mass_fraction, "{:.4f}"),
)


#: extra cautions by what a propellant holds (formulations only; a pair has the general one)
SOLID_CAUTION = ("Solid and composite propellants (AP, AN, KN, nitrocellulose, metal powders) are "
                 "explosive or deflagration hazards: mixing, casting and motor work only under licensed "
                 "practice and local explosives law.")
MONOPROPELLANT_CAUTION = ("Monopropellants decompose on their own: concentrated H2O2 and N2O can detonate or "
                          "decompose explosively, hydrazine is toxic and a suspected carcinogen.")


def _title(r) -> tuple[str, str]:
    if r.mixture_ratio is None:   # a formulation: its parts, no O/F
        parts = (getattr(r, "reactants", None) or {}).get("ingredients", [])
        what = ", ".join(f"{p['name']} {100 * p['mass_fraction']:.4g} %" for p in parts)
        rho = "" if r.bulk_density is None else f"; bulk density {r.bulk_density:.5g} kg/m3"
        kind = "monopropellant" if len(parts) == 1 else "formulation by mass"
        return f"perfchain | {r.propellant} | {r.flow} flow", f"{kind}: {what} (no O/F){rho}"
    return (f"perfchain | {r.oxidizer} / {r.fuel} | {r.flow} flow",
            f"O/F {r.mixture_ratio:.4g} (stoichiometric {r.stoichiometric_mixture_ratio:.4g}, "
            f"equivalence ratio {r.equivalence_ratio:.4g}, {r.fuel_percent:.3g} % fuel)")


def _cautions(r) -> list[str]:
    """The general caution, and the one for solid or monopropellant formulations."""
    out = []
    if r.mixture_ratio is None:
        parts = (getattr(r, "reactants", None) or {}).get("ingredients", [])
        if any(p["phase"] == "solid" for p in parts):
            out.append(SOLID_CAUTION)
        elif len(parts) == 1:
            out.append(MONOPROPELLANT_CAUTION)
    return out + [CAUTION]


def _figures(r) -> list[tuple[str, str]]:
    """(label, value text) of the performance figures, delivered blocks included."""
    rows = [("area ratio", f"{r.area_ratio:10.4f}"), ("c*", f"{r.cstar:10.1f} m/s"),
            ("Cf vacuum / ambient", f"{r.cf_vacuum:10.4f} / {r.cf_ambient:.4f}  "
                                    f"(ambient {r.ambient_pressure / 1e5:.5g} bar)"),
            ("Isp vacuum / ambient", f"{r.isp_vacuum:10.2f} / {r.isp_ambient:.2f} s")]
    if r.ambient_pressure > 0 and getattr(r, "ambient_model", None):   # results from before it: none
        how = "flows full" if r.flows_full else (
            f"SEPARATED: ambient values are the nozzle cut at its separation station (p {r.separation_pressure / 1e5:.4g}"
            f" bar, area ratio {r.separation_area_ratio:.4g}), a conservative estimate")
        rows.append(("ambient model", f"pe/pa {r.exit_ambient_pressure_ratio:.4g}, {r.separation_criterion}: {how}"))
    if r.finite_chamber:
        fc = r.finite_chamber
        rows.append(("contraction ratio", f"{fc['contraction_ratio']:10.4g}  (nozzle-inlet stagnation "
                     f"{fc['nozzle_inlet_stagnation_pressure'] / 1e5:.5g} bar, Mach {fc['nozzle_inlet_mach']:.3f})"))
    if r.delivered:
        d = r.delivered
        lost = ", ".join(f"{k} {v:.2f} s" for k, v in r.losses["isp_vacuum_loss"].items() if v) or "nothing"
        rows += [("delivered c*", f"{d['cstar']:10.1f} m/s"),
                 ("delivered Isp vac/amb", f"{d['isp_vacuum']:10.2f} / {d['isp_ambient']:.2f} s"),
                 ("Isp vacuum lost to:", lost)]
    if r.separation and r.ambient_pressure > 0:
        sp = r.separation
        flag = "SEPARATION LIKELY" if sp["flag"] else "flows full"
        rows.append((f"separation ({sp['criterion']}):", f"{flag}; flows full below "
                     f"{sp['full_flow_ambient_pressure'] / 1e5:.4g} bar ambient"))
    if r.sizing:
        z = r.sizing
        rows.append((f"sizing for {z['thrust'] / 1e3:.4g} kN ({z['thrust_at']}):",
                     f"throat D {z['throat_diameter'] * 1e3:.2f} mm, exit D {z['exit_diameter'] * 1e3:.1f} mm, "
                     f"mass flow {z['mass_flow']:.4g} kg/s"))
    return rows


def format_point(r) -> str:
    """A plain-text summary of a :class:`~perfchain.performance.chain.Performance` for a person.

    The ``perfchain point`` table and the ``repr`` of :func:`perfchain.point` results.
    """
    title, mixture = _title(r)
    lines = [title, f"  {mixture}", "", f"  {'':22s}{'chamber':>12s}{'throat':>12s}{'exit':>12s}"]
    for label, get, fmt in _ROWS:
        lines.append(f"  {label:22s}" + "".join(f"{fmt.format(get(s)):>12s}" for s in (r.chamber, r.throat, r.exit)))
    lines.append("")
    for label, text in _figures(r):
        lines.append(f"  {label:<21s} {text}")
    lines += ["", "  chamber products (mole fraction):"]
    lines += [f"    {name:14s} {x:.5f}" for name, x in list(r.chamber.composition.items())[:12]]
    notes = getattr(r, "notes", None) or ()
    if notes:
        lines += [""] + [f"  note: {n}" for n in notes]
    lines += [""] + ["  " + c for c in _cautions(r)]
    return "\n".join(lines)


def html_point(r) -> str:
    """The same summary as an HTML fragment (a notebook's rich display).

    >>> from types import SimpleNamespace as NS
    >>> st = NS(pressure=7e6, temperature=3600.0, density=5.0, molar_mass=23.0, gamma=1.2,
    ...         sound_speed=1200.0, velocity=0.0, mach=0.0, condensed_mass_fraction=0.0,
    ...         composition={"H2O": 0.3})
    >>> r = NS(oxidizer="LOX", fuel="RP-1", flow="shifting", mixture_ratio=2.6,
    ...        stoichiometric_mixture_ratio=3.4, equivalence_ratio=1.3, fuel_percent=27.8,
    ...        chamber=st, throat=st, exit=st, area_ratio=40.0, cstar=1800.0, cf_vacuum=1.8,
    ...        cf_ambient=1.6, ambient_pressure=101325.0, isp_vacuum=340.0, isp_ambient=300.0,
    ...        finite_chamber=None, delivered=None, separation=None, sizing=None)
    >>> html = html_point(r)
    >>> html.startswith("<div") and "LOX / RP-1" in html and "licensed practice" in html
    True
    """
    title, mixture = _title(r)
    cell = 'style="text-align:right;padding:0 0.6em"'
    head = "".join(f"<th {cell}>{n}</th>" for n in ("", "chamber", "throat", "exit"))
    body = "".join(
        f"<tr><td>{escape(label)}</td>" + "".join(f"<td {cell}>{fmt.format(get(s))}</td>"
                                                 for s in (r.chamber, r.throat, r.exit)) + "</tr>"
        for label, get, fmt in _ROWS)
    figures = "".join(f"<tr><td>{escape(k.rstrip(':'))}</td><td>{escape(v.strip())}</td></tr>"
                      for k, v in _figures(r))
    products = ", ".join(f"{escape(n)} {x:.4f}" for n, x in list(r.chamber.composition.items())[:8])
    notes = "".join(f"<p>Note: {escape(n)}</p>" for n in (getattr(r, "notes", None) or ()))
    cautions = "".join(f"<p><i>{escape(c)}</i></p>" for c in _cautions(r))
    return (f'<div class="perfchain-point"><b>{escape(title)}</b><br>{escape(mixture)}'
            f"<table><thead><tr>{head}</tr></thead><tbody>{body}</tbody></table>"
            f"<table><tbody>{figures}</tbody></table>"
            f"<p>Chamber products (mole fraction): {products}</p>{notes}{cautions}</div>")


def format_delta_v(r: dict) -> str:
    """The ``perfchain deltav`` table of a :meth:`perfchain.api.vehicle.DeltaV.to_dict` (SI).

    >>> r = {"payload_mass": 10.0, "liftoff_mass": 100.0, "payload_fraction": 0.1, "total_delta_v": 6907.8,
    ...      "stages": [{"name": "s1", "exhaust_velocity": 3000.0, "initial_mass": 100.0, "burnout_mass": 10.0,
    ...                  "mass_ratio": 10.0, "delta_v": 6907.8}]}
    >>> print(format_delta_v(r).splitlines()[-1])
    total delta-v 6907.8 m/s
    """
    lines = [f"Ideal delta-v (rocket equation, no losses); payload {r['payload_mass']:.1f} kg, "
             f"lift-off {r['liftoff_mass']:.1f} kg, payload fraction {r['payload_fraction']:.4f}", ""]
    head = ("stage", "c [m/s]", "Isp [s]", "m0 [kg]", "mf [kg]", "m0/mf", "dv [m/s]", "burn [s]")
    rows = []
    for s in r["stages"]:
        burn = s.get("burn_time")
        rows.append((s["name"], f"{s['exhaust_velocity']:.1f}", f"{s['exhaust_velocity'] / G0:.1f}",
                     f"{s['initial_mass']:.1f}", f"{s['burnout_mass']:.1f}", f"{s['mass_ratio']:.4f}",
                     f"{s['delta_v']:.1f}", "-" if burn is None else f"{burn:.1f}"))
    widths = [max(len(x[i]) for x in [head, *rows]) for i in range(len(head))]
    for row in [head, *rows]:
        lines.append("  ".join(cell.ljust(w) if i == 0 else cell.rjust(w)
                               for i, (cell, w) in enumerate(zip(row, widths))))
    lines.append(f"total delta-v {r['total_delta_v']:.1f} m/s")
    t = r.get("target")
    if t:
        lines.append(f"for {t['target_delta_v']:.1f} m/s: largest payload {t['max_payload']:.1f} kg")
        if "propellant_needed" in t:
            lines.append(f"  this stage's exhaust velocity and structural ratio with the given payload "
                         f"need {t['propellant_needed']:.1f} kg propellant, stage "
                         f"{t['stage_mass_needed']:.1f} kg, lift-off {t['liftoff_mass_needed']:.1f} kg")
    return "\n".join(lines)
