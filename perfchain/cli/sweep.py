"""``perfchain sweep`` (a table over a grid) and ``perfchain compare`` (pairs at their optimum)."""

from __future__ import annotations

import os
import sys

import click

from perfchain.cli.edges import check_output, json_text, out_option, quote_as_typed, units_option

__all__ = ["sweep", "compare", "SEPARATION_HELP"]

SEPARATION_HELP = ("Flow-separation criterion for ambient values: summerfield (default, k=0.4), "
                   "summerfield:K (K from 0.25 to 0.5) or schmucker; a separated nozzle gets the "
                   "cut-nozzle estimate.")


def _workers(text):
    from perfchain.inputs import count

    if text is None:
        return os.cpu_count() or 1
    return count(text, "workers", "a whole number of worker processes, at least 1", 1)


def _nozzle_options(lists: bool):
    """--area-ratio, --exit-pressure, --ambient-pressure, --altitude, --flow (lists for sweep)."""
    texts = (("Exit/throat area ratios: '10,40,80'.", "Exit/throat area ratio (> 1)."),
             ("Exit pressures with units: '1 atm,0.5 bar'.", "Exit pressure with a unit, e.g. '1 atm'."),
             ("Ambient pressures with units (default '1 atm'); '0 Pa' is vacuum.",
              "Ambient pressure with a unit (default '1 atm'); '0 Pa' is vacuum."),
             ("Altitudes with units, US Standard Atmosphere 1976: '0 km,10 km'.",
              "Altitude with a unit, US Standard Atmosphere 1976: '10 km'."),
             ("Flow models: 'shifting,frozen'.", "shifting, frozen or frozen-throat."))
    names = ("--area-ratio", "--exit-pressure", "--ambient-pressure", "--altitude", "--flow")
    pick = 0 if lists else 1

    def wrap(f):
        for name, text in reversed(list(zip(names, texts))):
            extra = {"default": "shifting", "show_default": True} if name == "--flow" else {}
            f = click.option(name, help=text[pick], **extra)(f)
        return f
    return wrap


@click.command("sweep")
@click.option("--oxidizer", help="Oxidizer name, e.g. LOX, N2O4, N2O.")
@click.option("--fuel", help="Fuel name, e.g. RP-1, LCH4, MMH, paraffin.")
@click.option("--mixture-ratio", help="O/F values, comma-separated and/or ranges (stop included): "
              "'2.0,2.4,2.8', '2.6 to 4.0 step 0.2', '1.6:3.6:0.1'.")
@click.option("--propellant", help="Instead of --oxidizer/--fuel/--mixture-ratio: a formulation by mass, "
              "'AP=0.68, Al=0.18, HTPB=0.14', or a monopropellant, e.g. H2O2-98 (no O/F axis).")
@click.option("--chamber-pressure", required=True, help="Pressures with units: '20 bar,50 bar,100 bar', "
              "'20, 50, 100 bar' (one unit for the list) or '30 to 100 bar step 10'.")
@_nozzle_options(lists=True)
@click.option("--out", "out", help="Output table: .csv, .parquet or .json (default: CSV on stdout).")
@click.option("--units", help="Units of the table: si (bar, K, m/s, mm) or us (psia, degR, ft/s, in). "
              "[default: SI base units (Pa, K, m/s, m)]")
@click.option("--workers", help="Local worker processes (default: one per core).")
@click.option("--cluster", help="Address of a running Dask scheduler, e.g. tcp://127.0.0.1:8786.")
@click.option("--cluster-timeout", help="Seconds to wait for the cluster's first worker "
              "[default: 60, or PERFCHAIN_CLUSTER_TIMEOUT].")
@click.option("--composition-top", default="5", show_default=True,
              help="Species kept per station in the composition columns (0: none).")
@click.option("--chunk-solves", default="256", show_default=True,
              help="Solves per chunk: the unit of batching, checkpointing and progress.")
@click.option("--yes", is_flag=True, help="Allow grids above 20,000 points.")
@click.option("--separation", help=SEPARATION_HELP)
@click.option("--transport", is_flag=True, help="Add the gas transport columns at each station (viscosity, "
              "conductivity, Prandtl numbers); a few ms per station.")
@quote_as_typed
def sweep(oxidizer, fuel, mixture_ratio, propellant, chamber_pressure, area_ratio, exit_pressure,
          ambient_pressure, altitude, flow, out, units, workers, cluster, cluster_timeout, composition_top,
          chunk_solves, yes, separation, transport):
    """Performance over a full grid of operating points, one row per point (SI units).

    Finished chunks are kept in <out>.parts/ while the sweep runs; running the
    same command again after an interruption resumes from them.
    """
    from perfchain.study.execution import run_chunks
    from perfchain.study.sweep import check_out, make_grid, sweep_to_file
    from perfchain.study.tables import table_columns, write_csv

    if units is not None:
        from perfchain.study.columns import check_units

        units = check_units(units)
    grid = make_grid(oxidizer, fuel, mixture_ratio=mixture_ratio, chamber_pressure=chamber_pressure,
                     area_ratio=area_ratio, exit_pressure=exit_pressure, ambient_pressure=ambient_pressure,
                     altitude=altitude, flow=flow, confirm=yes, separation=separation, propellant=propellant,
                     transport=transport)
    from perfchain.inputs import count

    n = _workers(workers)
    top = str(count(composition_top, "composition_top", "a whole number of species, 0 or more"))
    solves = str(count(chunk_solves, "chunk_solves", "a whole number of solves per chunk, at least 1", 1))
    if out is None:
        results, _ = run_chunks(grid, workers=n, cluster=cluster, top=int(top), solves=int(solves),
                                cluster_timeout=cluster_timeout)
        cols = table_columns(grid, results)
        if units is not None:
            from perfchain.study.files import load_chunk
            from perfchain.study.outfiles import convert_rows

            results = [convert_rows(load_chunk(rows), units)[0] for rows in results]
        write_csv(sys.stdout.buffer, cols, results)
        sys.stdout.flush()
        return
    check_out(out)
    options = {"oxidizer": oxidizer, "fuel": fuel, "mixture_ratio": mixture_ratio, "propellant": propellant,
               "chamber_pressure": chamber_pressure, "area_ratio": area_ratio, "exit_pressure": exit_pressure,
               "ambient_pressure": ambient_pressure, "altitude": altitude, "flow": flow,
               "composition_top": top, "separation": separation, "units": units, "transport": transport}
    path = sweep_to_file(out, grid, workers=n, cluster=cluster, top=int(top), options=options,
                         solves=int(solves), cluster_timeout=cluster_timeout, units=units)
    click.echo(f"wrote {grid.size} points to {path}", err=True)


#: (column, format) of the readable comparison; labels and units from perfchain.study.labels
_COMPARE_COLUMNS = (("rank", "d"), ("pair", "s"), ("mixture_ratio", ".3f"), ("chamber_temperature", ".0f"),
                    ("cstar", ".1f"), ("isp_vacuum", ".1f"), ("isp_ambient", ".1f"), ("bulk_density", ".1f"),
                    ("density_isp", ".0f"))


@click.command("compare")
@click.option("--pair", "pairs", multiple=True, help="OXIDIZER/FUEL; repeat: --pair LOX/RP-1 --pair LOX/LCH4.")
@click.option("--propellant", "propellants", multiple=True, help="A formulation or monopropellant to stand "
              "beside the pairs (no O/F to optimize); repeat: --propellant 'AP=0.86, HTPB=0.14' --propellant H2O2-98.")
@click.option("--chamber-pressure", required=True, help="With a unit: '70 bar'.")
@_nozzle_options(lists=False)
@click.option("--objective", default="isp_vacuum", show_default=True,
              help="What the optimum O/F maximizes: isp_vacuum, isp_ambient, density_isp, density_isp_ambient.")
@click.option("--rank-by", help="Ranking column (default: the objective); also cstar, chamber_temperature, bulk_density.")
@click.option("--separation", help=SEPARATION_HELP)
@click.option("--json", "as_json", is_flag=True, help="Print JSON (SI units).")
@out_option
@units_option
@quote_as_typed
def compare(pairs, propellants, chamber_pressure, area_ratio, exit_pressure, ambient_pressure, altitude, flow,
            objective, rank_by, separation, as_json, out, units):
    """Propellant pairs side by side, each at its own optimum O/F, ranked best first.

    Formulations (--propellant) stand beside them as they are: they have no O/F.
    """
    from perfchain.atmosphere import pressure
    from perfchain.inputs import nozzle_args
    from perfchain.study.optimum import compare_pairs

    path, units = check_output(out, units)
    nz = nozzle_args(chamber_pressure=chamber_pressure, area_ratio=area_ratio, exit_pressure=exit_pressure,
                     ambient_pressure=ambient_pressure, altitude=altitude, flow=flow)
    pa = nz["ambient_pressure"] if "altitude" not in nz else float(pressure(nz["altitude"]))
    rows = compare_pairs(list(pairs), nz["chamber_pressure"], area_ratio=nz.get("area_ratio"),
                         exit_pressure=nz.get("exit_pressure"), ambient_pressure=pa, flow=nz["flow"],
                         objective=objective, rank_by=rank_by, separation=separation, propellants=list(propellants))
    exit_ = {k: nz[k] for k in ("area_ratio", "exit_pressure", "altitude") if k in nz}
    context = {"chamber_pressure": nz["chamber_pressure"], **exit_, "ambient_pressure": pa, "flow": nz["flow"],
               "objective": objective, "rank_by": rank_by or objective}
    if as_json:
        click.echo(json_text({**context, "pairs": rows}))
    else:
        click.echo("\n".join(_compare_lines(rows, context, units or "si") + [""]
                              + _compare_cautions(propellants, pairs)))
    if path is not None:
        from perfchain.study.outfiles import write_rows

        table = [{**{k: v for k, v in r.items() if k != "reactants"}, **context} for r in rows]
        inputs = {"pairs": list(pairs), "propellants": list(propellants), "chamber_pressure": chamber_pressure,
                  "area_ratio": area_ratio, "exit_pressure": exit_pressure, "ambient_pressure": ambient_pressure,
                  "altitude": altitude, "flow": flow, "objective": objective, "rank_by": rank_by,
                  "separation": separation, "units": units}
        click.echo(f"wrote {len(table)} rows to {write_rows(path, table, units=units, inputs=inputs)}", err=True)


def _quantity(value, kind, units, fmt=".4g"):
    """An SI value as text in the output units: ``'70 bar'``."""
    from perfchain.study.columns import to_unit, unit_label

    return f"{to_unit(value, kind, units):{fmt}} {unit_label(kind, units)}"


def _compare_lines(rows, context, units) -> list[str]:
    """The readable comparison: what was compared under which conditions, then one row per propellant."""
    from perfchain.api.display import text_table
    from perfchain.study.columns import column_kind, to_unit
    from perfchain.study.labels import label, value_label

    where = [f"chamber pressure {_quantity(context['chamber_pressure'], 'pressure', units)}"]
    if "area_ratio" in context:
        where.append(f"area ratio {context['area_ratio']:.4g}")
    else:
        where.append(f"exit pressure {_quantity(context['exit_pressure'], 'pressure', units)}")
    amb = f"ambient pressure {_quantity(context['ambient_pressure'], 'pressure', units)}"
    if "altitude" in context:
        amb += f" (altitude {_quantity(context['altitude'], 'altitude', units, '.6g')}, US Standard Atmosphere 1976)"
    where += [amb, f"{context['flow']} flow"]
    lines = ["perfchain compare | " + " | ".join(where),
             f"each pair at its optimum O/F for {value_label(context['objective'])}; ranked by "
             f"{value_label(context['rank_by'])}", ""]
    body = [["-" if r.get(key) is None else format(to_unit(r[key], column_kind(key), units), fmt)
             for key, fmt in _COMPARE_COLUMNS] for r in rows]
    table = text_table([label(key, units) for key, _ in _COMPARE_COLUMNS], body, left=(1,), width=8)
    depth = len(table) - len(rows)
    for n, text in enumerate(table):
        notes = [] if n < depth else _compare_notes(rows[n - depth], context)
        lines.append(text + (f"  ({'; '.join(notes)})" if notes else ""))
    return lines


def _compare_cautions(propellants, pairs=()) -> list[str]:
    """The point command's cautions: the general one, those of the formulations compared, and the
    nitrous-oxide one where a formulation or a pair's oxidizer is N2O."""
    from perfchain.api.point_layout import formulation_cautions
    from perfchain.propellants.formulation import make_formulation
    from perfchain.propellants.ingredients import get_ingredient

    parts = [make_formulation(p).parts for p in propellants]
    names = [i.name for f in parts for i, _ in f] + [get_ingredient(p.split("/")[0]).name for p in pairs]
    return formulation_cautions([[i.phase for i, _ in f] for f in parts], names)


def _compare_notes(r, context) -> list[str]:
    notes = [r["note"]] if r.get("note") else []
    notes += ["optimum at the search bound"] if r["at_bound"] else []
    if r.get("flows_full") is False and context["ambient_pressure"] != 0:
        notes.append(f"ambient: {r['ambient_model']}")
    return notes
