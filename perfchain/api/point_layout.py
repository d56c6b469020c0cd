"""The readable layout of one operating point: the answer first, then stations, products, warnings, caution.

Blocks, in order: a title line with the operating conditions; the headline (Isp in vacuum and
at the ambient pressure, ideal and delivered side by side, c*, Cf, chamber temperature, O/F and
the flow model); one row per station with its properties as columns; the main products of each
station on one line; what else the point carries (finite chamber, Isp losses, sizing); the
warnings (separation, condensed phases, model notes); the safety caution.
:func:`perfchain.api.display.format_point` (terminal and ``repr``) and
:func:`perfchain.api.display.html_point` (notebooks) draw these blocks. Values are in the
output units of :mod:`perfchain.study.columns`: ``si`` (bar, K, m/s, kg/m^3) or ``us``
(psia, degR, ft/s, lbm/ft^3).
"""

from __future__ import annotations

from dataclasses import dataclass

from perfchain.performance.losses_two_phase import two_phase_note
from perfchain.study.columns import to_unit, unit_label
from perfchain.study.labels import LOSS_LABELS, name, station_label, unit, value_label

__all__ = ["CAUTION", "SOLID_CAUTION", "MONOPROPELLANT_CAUTION", "NITROUS_CAUTION", "PointLayout", "point_layout", "cautions",
           "formulation_cautions", "FLOW_WORDS", "PRODUCTS_SHOWN"]

CAUTION = ("Theoretical estimate, not a test result. Propellants and hot-fire work can kill: "
           "follow local codes, range safety and licensed practice.")
#: extra cautions by what a propellant holds (formulations only; a pair has the general one)
SOLID_CAUTION = ("Solid and composite propellants (AP, AN, KN, nitrocellulose, metal powders) are "
                 "explosive or deflagration hazards: mixing, casting and motor work only under licensed "
                 "practice and local explosives law.")
MONOPROPELLANT_CAUTION = ("Monopropellants decompose on their own: concentrated H2O2 and N2O can detonate or "
                          "decompose explosively, hydrazine is toxic and a suspected carcinogen.")
#: for anything burning nitrous oxide (most hybrids): the hazard of the tank and its feed lines
NITROUS_CAUTION = ("Nitrous oxide is self-pressurizing and can decompose explosively when heated, "
                   "compressed fast or contaminated, in the tank and the feed lines: clean for oxygen service, "
                   "remote filling and firing, local codes and licensed practice.")

#: what each flow model assumes, in words
FLOW_WORDS = {"shifting": "composition in equilibrium all the way to the exit",
              "frozen": "composition fixed at the chamber's",
              "frozen-throat": "equilibrium to the throat, fixed after it"}
#: products listed per station (largest mole fractions first)
PRODUCTS_SHOWN = 6

#: (station field, unit kind or None, format) of the station rows; labels from perfchain.study.labels
_STATION_COLUMNS = (("pressure", "pressure", ".5g"), ("temperature", "temperature", ".1f"),
                    ("density", "density", ".5g"), ("molar_mass", "molar_mass", ".3f"), ("gamma", None, ".4f"),
                    ("sound_speed", "speed", ".1f"), ("velocity", "speed", ".1f"), ("mach", None, ".3f"),
                    ("area_ratio", None, ".4g"), ("condensed_mass_fraction", None, ".4f"))
#: the gas transport columns, shown when a station has them (perfchain.performance.transport)
_TRANSPORT_COLUMNS = (("viscosity", "viscosity", ".4g"), ("thermal_conductivity", "conductivity", ".4g"),
                      ("thermal_conductivity_equilibrium", "conductivity", ".4g"), ("prandtl", None, ".3f"),
                      ("prandtl_equilibrium", None, ".3f"))


@dataclass(frozen=True)
class PointLayout:
    """The blocks of a readable point, as text cells (values already in output units).

    Attributes
    ----------
    title, mixture, flow : str
        The conditions line, the propellant line and the flow model with what it assumes.
    headline : list of tuple
        (label, ideal, delivered) text; delivered is ``""`` when no efficiency was given. The
        flow model is the headline's last line, ``flow``.
    delivered : bool
        Whether the headline has a delivered column.
    station_head : list of str
        Column labels with units; ``station_rows`` one list of cells per station.
    station_rows : list of list
    products : list of tuple
        (station, ``"H2O 0.334, CO 0.296, ..."``).
    details, warnings, cautions : list of str
    """

    title: str
    mixture: str
    flow: str
    headline: list
    delivered: bool
    station_head: list
    station_rows: list
    products: list
    details: list
    warnings: list
    cautions: list


def _q(value, kind, units, fmt=".4g") -> str:
    return f"{to_unit(value, kind, units):{fmt}} {unit_label(kind, units)}"


def _mixture(r) -> str:
    if r.mixture_ratio is None:   # a formulation: its parts, no O/F
        parts = (getattr(r, "reactants", None) or {}).get("ingredients", [])
        what = ", ".join(f"{p['name']} {100 * p['mass_fraction']:.4g} %" for p in parts)
        kind = "monopropellant" if len(parts) == 1 else "formulation by mass"
        return f"{kind}: {what} (no O/F)"
    return (f"O/F {r.mixture_ratio:.4g} (stoichiometric {r.stoichiometric_mixture_ratio:.4g}, "
            f"equivalence ratio {r.equivalence_ratio:.4g}, {r.fuel_percent:.3g} % fuel)")


def _title(r, units) -> str:
    name = r.propellant if r.mixture_ratio is None else f"{r.oxidizer} / {r.fuel}"
    ambient = "vacuum" if r.ambient_pressure == 0 else f"ambient {_q(r.ambient_pressure, 'pressure', units)}"
    if r.altitude is not None:
        ambient += f" at {_q(r.altitude, 'altitude', units, '.6g')}"
    return (f"perfchain | {name} | {r.flow} flow | chamber {_q(r.chamber_pressure, 'pressure', units)} | "
            f"area ratio {r.area_ratio:.4g} | {ambient}")


def _headline(r, units) -> list:
    d = r.delivered or {}

    def both(key, fmt, kind=None):
        ideal = format(to_unit(getattr(r, key), kind, units), fmt)
        return ideal, (format(to_unit(d[key], kind, units), fmt) if key in d else "")

    def head(column, where=""):
        u = unit(column, units)
        return name(column) + where + (f" ({u})" if u else "")

    at = f" at {_q(r.ambient_pressure, 'pressure', units)}"
    vacuum = r.ambient_pressure == 0     # the ambient values are the vacuum ones: shown once
    rows = [(head("isp_vacuum"), *both("isp_vacuum", ".2f"))]
    rows += [] if vacuum else [(head("isp_ambient", at), *both("isp_ambient", ".2f"))]
    rows += [(head("cstar"), *both("cstar", ".1f", "speed")), (head("cf_vacuum"), *both("cf_vacuum", ".4f"))]
    rows += [] if vacuum else [(head("cf_ambient", at), *both("cf_ambient", ".4f"))]
    rows += [(head("chamber_temperature"), format(to_unit(r.chamber.temperature, "temperature", units), ".1f"), "")]
    rows.append((head("mixture_ratio"), "none (formulation)" if r.mixture_ratio is None else f"{r.mixture_ratio:.4g}",
                 ""))
    return rows


def _stations(r, units) -> tuple[list, list]:
    columns = _STATION_COLUMNS
    if any(getattr(s, "viscosity", None) is not None for s in (r.chamber, r.throat, r.exit)):
        columns += _TRANSPORT_COLUMNS
    head = ["Station"] + [station_label(key, units) for key, _, _ in columns]
    rows = []
    for s in (r.chamber, r.throat, r.exit):
        cells = [s.name]
        for key, kind, fmt in columns:
            v = getattr(s, key)
            cells.append("-" if v is None else format(to_unit(v, kind, units), fmt))
        rows.append(cells)
    return head, rows


def _products(r) -> list:
    out = []
    for s in (r.chamber, r.throat, r.exit):
        best = sorted(s.composition.items(), key=lambda kv: -kv[1])[:PRODUCTS_SHOWN]
        out.append((s.name, ", ".join(f"{n} {x:.3g}" for n, x in best)))
    return out


def _details(r, units) -> list:
    out = []
    if r.finite_chamber:
        fc = r.finite_chamber
        out.append(f"finite chamber: contraction ratio {fc['contraction_ratio']:.4g}, nozzle-inlet stagnation "
                   f"pressure {_q(fc['nozzle_inlet_stagnation_pressure'], 'pressure', units)}, "
                   f"inlet Mach {fc['nozzle_inlet_mach']:.3f}")
    if r.losses:
        lost = ", ".join(f"{LOSS_LABELS.get(k, k)} {_q(v, 'time', units, '.2f')}"
                         for k, v in r.losses["isp_vacuum_loss"].items() if v) or "nothing"
        out.append(f"vacuum Isp lost to: {lost}")
        tp = r.losses.get("two_phase")
        if tp:
            out.append(two_phase_note(tp, tp.get("throat_diameter") and _q(tp["throat_diameter"], "diameter", units)))
    if r.sizing:
        z = r.sizing
        out.append(f"sized for {_q(z['thrust'], 'force', units)} ({z['thrust_at']}): throat diameter "
                   f"{_q(z['throat_diameter'], 'diameter', units)}, exit diameter "
                   f"{_q(z['exit_diameter'], 'diameter', units)}, mass flow {_q(z['mass_flow'], 'mass_flow', units)}")
    return out


def _warnings(r, units) -> list:
    out = []
    if r.ambient_pressure > 0 and not r.flows_full:
        out.append(f"SEPARATED at {_q(r.ambient_pressure, 'pressure', units)} ambient (p_e/p_a "
                   f"{r.exit_ambient_pressure_ratio:.4g}, {r.separation_criterion}): the ambient values are the "
                   f"nozzle cut at its separation station (p {_q(r.separation_pressure, 'pressure', units)}, area "
                   f"ratio {r.separation_area_ratio:.4g}), a conservative estimate")
    elif r.separation and r.ambient_pressure > 0:
        sp = r.separation
        if sp["flag"]:
            out.append(f"separation likely ({sp['criterion']})")
        out.append(f"flows full below {_q(sp['full_flow_ambient_pressure'], 'pressure', units)} ambient "
                   f"({sp['criterion']})")
    condensed = [s for s in (r.chamber, r.throat, r.exit) if s.condensed_mass_fraction > 0]
    if condensed:
        out.append("condensed products (mass fraction): " + ", ".join(
            f"{s.name} {s.condensed_mass_fraction:.4f}" for s in condensed)
            + "; particles assumed in velocity and thermal equilibrium with the gas")
    out += [f"note: {n}" for n in (getattr(r, "notes", None) or ())]
    return out


def cautions(r) -> list[str]:
    """The general caution, and those for what the point burns: solid or monopropellant
    formulations, nitrous oxide (oxidizer of a pair or part of a formulation).

    >>> from types import SimpleNamespace as NS
    >>> cautions(NS(mixture_ratio=2.6, oxidizer="LOX", fuel="RP-1")) == [CAUTION]
    True
    >>> cautions(NS(mixture_ratio=7.0, oxidizer="N2O@270K", fuel="paraffin")) == [NITROUS_CAUTION, CAUTION]
    True
    """
    if r.mixture_ratio is None:
        parts = (getattr(r, "reactants", None) or {}).get("ingredients", [])
        return formulation_cautions([[p["phase"] for p in parts]], [p["name"] for p in parts])
    return [NITROUS_CAUTION] * _burns_nitrous([r.oxidizer, r.fuel]) + [CAUTION]


def formulation_cautions(phases, names=()) -> list[str]:
    """The cautions for formulations given as the phases of their parts, one list per formulation:
    the solid one if any part is a solid, the monopropellant one for a single non-solid part,
    the nitrous-oxide one if any of ``names`` (ingredient names, pairs' oxidizers included) is
    N2O, then the general caution.

    >>> formulation_cautions([["solid", "solid"], ["liquid"]]) == [SOLID_CAUTION, MONOPROPELLANT_CAUTION, CAUTION]
    True
    >>> formulation_cautions([["liquid"]], ["N2O"]) == [MONOPROPELLANT_CAUTION, NITROUS_CAUTION, CAUTION]
    True
    """
    solid = any("solid" in f for f in phases)
    mono = any(len(f) == 1 and "solid" not in f for f in phases)
    return ([SOLID_CAUTION] * solid + [MONOPROPELLANT_CAUTION] * mono
            + [NITROUS_CAUTION] * _burns_nitrous(names) + [CAUTION])


def _burns_nitrous(names) -> bool:
    """True if any ingredient name is nitrous oxide, at any storage temperature (``N2O@270K``)."""
    return any(str(n).split("@")[0].strip().upper() == "N2O" for n in names if n)


def point_layout(r, units: str = "si") -> PointLayout:
    """The blocks of a :class:`~perfchain.performance.chain.Performance` for a person to read.

    Parameters
    ----------
    r : Performance
        SI values.
    units : str
        ``si`` (bar, K, m/s) or ``us`` (psia, degR, ft/s).

    Returns
    -------
    PointLayout

    Examples
    --------
    Ideal LOX/RP-1 at O/F 2.6, 70 bar, area ratio 40 in vacuum (the numbers of the point page):

    >>> import perfchain as pc
    >>> r = pc.point(oxidizer="LOX", fuel="RP-1", mixture_ratio=2.6, chamber_pressure="70 bar",
    ...              area_ratio=40, ambient_pressure="0 Pa")
    >>> lay = point_layout(r)
    >>> lay.headline[0], lay.station_head[:3]
    (('Vacuum Isp (s)', '356.98', ''), ['Station', 'Pressure (bar)', 'Temperature (K)'])
    >>> point_layout(r, "us").station_rows[0][:3]
    ['chamber', '1015.3', '6616.5']
    """
    head, rows = _stations(r, units)
    flow = f"{value_label(r.flow)}: {FLOW_WORDS.get(r.flow, r.flow)}"
    return PointLayout(_title(r, units), _mixture(r), flow, _headline(r, units), bool(r.delivered), head, rows,
                       _products(r), _details(r, units), _warnings(r, units), cautions(r))
