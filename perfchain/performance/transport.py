"""Transport properties at the stations of a point: viscosity, conductivity and Prandtl numbers.

The gas at chamber, throat and exit goes to :func:`perfchain.thermo.transport.gas_transport`
(Wilke viscosity, Mason-Saxena conductivity, the Butler & Brokaw reaction contribution);
condensed products are left out of the gas and the point's notes say so. A station whose gas
holds more than :data:`perfchain.thermo.transport.UNCOVERED_LIMIT` of species without transport
data keeps its transport fields None, with a note naming them.
"""

from __future__ import annotations

from dataclasses import replace

from perfchain.nozzle.stations import with_transport
from perfchain.performance.result import Performance

__all__ = ["add_transport", "TRANSPORT_NOTE"]

#: how the notes of a point name what its transport properties leave out
TRANSPORT_NOTE = "transport properties are of the gas phase alone (perfchain.thermo.transport)"


def add_transport(result: Performance) -> Performance:
    """The point with transport properties at chamber, throat and exit.

    Parameters
    ----------
    result : Performance

    Returns
    -------
    Performance
        The same record, its stations' transport fields filled; its notes name the condensed
        products left out of the gas and any station whose values are withheld.

    Examples
    --------
    LOX/LH2 at O/F 6, 100 bar: the equilibrium Prandtl number in the chamber lies below the
    frozen one, as the reaction contribution raises the conductivity more than the equilibrium
    cp (Gordon & McBride, NASA RP-1311, part I, section 5; both near 0.5-0.7 there); an
    all-gas point needs no note:

    >>> from perfchain.performance.chain import performance
    >>> r = add_transport(performance("LOX", "LH2", mixture_ratio=6.0, chamber_pressure=1e7,
    ...                               area_ratio=40.0))
    >>> c = r.chamber
    >>> 0.4 < c.prandtl_equilibrium < c.prandtl < 0.8, r.notes
    (True, None)
    """
    stations, notes, excluded = {}, [], set()
    for key in ("chamber", "throat", "exit"):
        st = getattr(result, key)
        if st is None:
            continue
        new, tr = with_transport(st)
        stations[key] = new
        excluded.update(tr.excluded)
        if not tr.ok:
            notes.append(f"transport properties at the {key} not given: gas species without "
                         f"transport data ({', '.join(tr.uncovered)}) make "
                         f"{tr.uncovered_fraction:.1%} of the gas")
    if excluded:
        notes.insert(0, f"{TRANSPORT_NOTE}; condensed products left out: {', '.join(sorted(excluded))}")
    if not notes:
        return replace(result, **stations)
    return replace(result, **stations, notes=tuple(result.notes or ()) + tuple(notes))
