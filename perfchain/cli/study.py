"""``perfchain run STUDY.toml --out DIR`` and ``perfchain new-study [PATH]``.

Parse -> call :mod:`perfchain.study.schema` / :mod:`perfchain.study.runner` -> print. No physics here.
"""

from __future__ import annotations

from pathlib import Path

import click

from perfchain.errors import InputError

__all__ = ["run", "new_study", "STARTER"]

STARTER = '''\
# perfchain study file (TOML). Data only: nothing in it is executed.
# Run it with:   perfchain run THIS_FILE.toml --out results/
# Every dimensioned value needs a unit as text: "20 bar", "300 psi", "350 kg", "2.5 m**3", "15 deg".
# All names below are invented.

[study]
title = "Starter study: a small upper-stage engine"
description = "Edit me. One engine grid, one comparison, one vehicle."
author = ""

# Ingredients of your own (optional). Bundled ones: see `perfchain ingredients`.
# [[ingredient]]
# name = "hexane"
# formula = { C = 6, H = 14 }
# enthalpy = "-198.7 kJ/mol"        # molar enthalpy at the storage state
# temperature = "298.15 K"
# density = "655 kg/m**3"
# phase = "liquid"

# Blends by mass fraction (optional; no heat of mixing).
# [[blend]]
# name = "ethanol-90"
# parts = { ethanol = 0.9, water = 0.1 }

[[engine]]
name = "Starter-1"
oxidizer = "LOX"
fuel = "RP-1"
mixture_ratio = [2.0, 2.3, 2.6, 2.9]        # O/F by mass
# (a solid grain or monopropellant instead of oxidizer, fuel and mixture_ratio:
#  propellant = "NC=0.57, NG=0.43"  or  propellant = "H2O2-98"; any name may be "LOX @ 80 K")
chamber_pressure = ["40 bar", "70 bar"]     # the first one is the design point
area_ratio = [40, 80]                        # or: exit_pressure = ["0.1 bar"]
ambient_pressure = ["0 Pa"]                  # or: altitude = ["0 km", "10 km"]
flow = ["shifting"]                          # shifting, frozen, frozen-throat
objective = "isp_vacuum"                     # isp_vacuum, isp_ambient, density_isp, density_isp_ambient
# design_mixture_ratio = 2.4                 # default: the optimum O/F for the objective
contraction_ratio = 4.0                      # chamber/throat area; leave out for an infinite-area chamber
thrust = "30 kN"                             # sizes the throat and flows at the design point
thrust_at = "vacuum"
efficiency = { cstar_efficiency = 0.97, conical_half_angle = "15 deg" }
# [engine.uncertainty]                       # the design point's spread (syntax of --vary)
# samples = 2000
# vary = { mixture_ratio = "+/-2%", cstar_efficiency = "0.95..0.98", chamber_pressure = "+/-3%" }

[[comparison]]
name = "Pairs at 70 bar"
pairs = ["LOX/RP-1", "LOX/LCH4"]
chamber_pressure = "70 bar"
area_ratio = 60
ambient_pressure = "0 Pa"
objective = "isp_vacuum"
rank_by = "density_isp"

[[vehicle]]
name = "Starter vehicle"
payload = "250 kg"
target = "4 km/s"                            # optional: the largest payload for this delta-v

[[vehicle.stage]]                            # first stage first
name = "upper stage"
engine = "Starter-1"                         # or: isp = "320 s"
which = "vacuum"                             # vacuum (upper stage) or ambient
propellant = "3 t"                           # masses: dry + propellant, mass + propellant_fraction,
structural_ratio = 0.12                      #   or propellant + structural_ratio
# [vehicle.uncertainty]                      # the delta-v's spread; stage inputs as stageN.KEY
# vary = { "stage1.isp" = "+/-1%", "stage1.structural_ratio" = "0.10..0.14", payload = "+/-10%" }

# [vehicle.fixed_tank]                       # delta-v against O/F for a fixed tank volume
# engines = ["Starter-1"]
# tank_volume = "2.5 m**3"
# fixed_dry_mass = "200 kg"
# tank_mass_per_volume = "20 kg/m**3"

[output]
formats = ["parquet", "csv"]
units = "si"                                 # si or us
plots = true
plot_formats = ["png", "svg"]
'''


@click.command("run")
@click.argument("study", type=click.Path(dir_okay=False, path_type=Path))
@click.option("--out", "out", required=True, type=click.Path(file_okay=True, path_type=Path),
              help="Output folder (new or empty, unless --overwrite).")
@click.option("--units", type=click.Choice(["si", "us"], case_sensitive=False), default=None,
              help="Units of tables and report (default: the study's [output] units).")
@click.option("--overwrite", is_flag=True, help="Write into a folder that already holds files.")
@click.option("--workers", type=click.IntRange(min=1), default=1, show_default=True,
              help="Worker processes for the engine grids.")
@click.option("--no-plots", is_flag=True, help="Skip the plots.")
@click.option("--yes", is_flag=True, help="Allow engine grids above 20,000 points.")
def run(study, out, units, overwrite, workers, no_plots, yes):
    """Run every grid, optimum, comparison and vehicle of STUDY.toml into --out.

    The folder gets the study's tables, plots, a copy of the study, provenance.json and
    report.html. With --overwrite, the files a previous run listed in provenance.json and
    this run does not write again are removed; nothing else in the folder is touched, and a
    folder where the run would write over the study file itself is refused.
    """
    from perfchain.study.runner import run_study
    from perfchain.study.schema import parse_study, read_study_text

    text = read_study_text(study)
    spec = parse_study(text, source=str(study))
    report = run_study(spec, out, study_text=text, source=str(study), units=units, overwrite=overwrite,
                       workers=workers, plots=False if no_plots else None, confirm=yes)
    click.echo(str(report))


@click.command("new-study")
@click.argument("path", required=False, type=click.Path(dir_okay=False, path_type=Path))
@click.option("--force", is_flag=True, help="Replace an existing file.")
def new_study(path, force):
    """Write a commented starter study to PATH (default: stdout)."""
    if path is None:
        click.echo(STARTER, nl=False)
        return
    if path.exists() and not force:
        raise InputError("path", str(path), "a file that does not exist yet (or --force)")
    try:
        path.write_text(STARTER, encoding="utf-8")
    except OSError as exc:
        raise InputError("path", str(path), f"a writable file path ({exc.strerror})") from None
    click.echo(f"wrote {path}", err=True)
