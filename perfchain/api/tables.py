"""Tables, comparisons and studies: the Python face of ``perfchain sweep``, ``compare`` and ``run``.

Grid arguments take one value, a list or numpy array, or the command line's text forms
(``"2.0,2.4,2.8"``, ``"1.6:3.6:0.1"``, ``"20 bar,50 bar"``), checked by
:func:`perfchain.inputs.grid`. Tables are pandas DataFrames in SI units with the unit of
every column in ``DataFrame.attrs["units"]``.
"""

from __future__ import annotations

__all__ = ["sweep", "compare", "to_xarray", "run_study"]


def sweep(oxidizer=None, fuel=None, *, mixture_ratio=None, chamber_pressure, propellant=None, area_ratio=None,
          exit_pressure=None, ambient_pressure=None, altitude=None, flow="shifting", workers=1, cluster=None,
          checkpoint=None, progress=False, confirm=False, composition_top=5, chunk_solves=256, as_xarray=False,
          transport=False):
    """Performance over a full grid of operating points, one row per point (``perfchain sweep``).

    The grid is the product mixture ratio x chamber pressure x (area ratio or exit
    pressure) x (ambient pressure or altitude) x flow model, the last varying fastest;
    a formulation (``propellant``) has no mixture-ratio axis.

    Parameters
    ----------
    oxidizer, fuel : str or Ingredient
        Names or records of your own (:func:`perfchain.custom_ingredient`, :func:`perfchain.blend`).
    mixture_ratio : grid
        O/F values by mass [-], > 0 (with oxidizer and fuel).
    propellant : str, Mapping or Ingredient, optional
        Instead of oxidizer, fuel and mixture_ratio: a formulation by mass fraction
        (``"AP=0.86, HTPB=0.14"``, ``{"AP": 0.86, "HTPB": 0.14}``, keys may be Ingredient
        records) or one monopropellant (``"H2O2-98"``).
    chamber_pressure : grid
        [Pa] (text with units, Quantities, or SI numbers).
    area_ratio : grid, optional
        Exit/throat area ratios [-], > 1; exactly one of ``area_ratio``, ``exit_pressure``.
    exit_pressure : grid, optional
        [Pa]
    ambient_pressure : grid, optional
        [Pa], 0 is vacuum; default 1 atm. Not with ``altitude``.
    altitude : grid, optional
        Geometric altitudes [m], 0-86 km (U.S. Standard Atmosphere 1976).
    flow : str or list of str
        ``"shifting"``, ``"frozen"``, ``"frozen-throat"``; text may list several (``"shifting,frozen"``).
    workers : int
        Local worker processes (1: this process).
    cluster : str or distributed.Client, optional
        A running Dask scheduler (needs the ``cluster`` extra).
    checkpoint : str or Path, optional
        Folder for finished chunks; running the same sweep again reuses them.
    progress : bool
        Show a progress bar.
    confirm : bool
        Allow grids above 20,000 points (the CLI's ``--yes``).
    composition_top : int
        Species kept per station composition column (0: none).
    chunk_solves : int
        Solves per chunk (the unit of batching, checkpoints and progress).
    as_xarray : bool
        Return an xarray Dataset over the grid axes instead (needs the ``xarray`` extra).
    transport : bool
        Add the gas transport columns at chamber, throat and exit (viscosity [Pa s],
        conductivities [W/(m K)], Prandtl numbers); off by default, as they cost more than the
        rest of a point (``perfchain sweep --transport``).

    Returns
    -------
    pandas.DataFrame or xarray.Dataset
        The columns of ``perfchain sweep`` (SI), ``status`` ``"ok"``/``"failed"`` and
        ``reason``; units in ``attrs["units"]`` (per variable ``attrs["units"]`` in a Dataset),
        provenance in ``attrs["perfchain"]``.

    Examples
    --------
    LOX/RP-1 at 1000 psia expanded to 1 atm: about 300 s at sea level near O/F 2.56
    (Sutton & Biblarz, Rocket Propulsion Elements, Table 5-5; from memory, +/- 1 %):

    >>> import perfchain as pc
    >>> df = pc.sweep("LOX", "RP-1", mixture_ratio="2.2:2.6:0.2", chamber_pressure=pc.Q_(1000, "psi"),
    ...               exit_pressure="1 atm")
    >>> df.mixture_ratio.tolist(), df.attrs["units"]["isp_ambient"]
    ([2.2, 2.4, 2.6], 's')
    >>> bool(abs(df.isp_ambient.iloc[-1] / 300 - 1) < 0.01)
    True

    A monopropellant sweeps chamber pressure and nozzle only:

    >>> pc.sweep(propellant="H2O2-90", chamber_pressure="10 bar,20 bar", area_ratio=10).propellant.tolist()
    ['H2O2-90', 'H2O2-90']
    """
    from perfchain.inputs import count
    from perfchain.study.sweep import sweep as run_sweep

    df = run_sweep(oxidizer, fuel, mixture_ratio=mixture_ratio, chamber_pressure=chamber_pressure,
                   propellant=propellant,
                   area_ratio=area_ratio, exit_pressure=exit_pressure, ambient_pressure=ambient_pressure,
                   altitude=altitude, flow=flow, confirm=bool(confirm), cluster=cluster, checkpoint=checkpoint,
                   workers=count(workers, "workers", "a whole number of worker processes, at least 1", 1),
                   progress=bool(progress),
                   composition_top=count(composition_top, "composition_top",
                                         "a whole number of species, 0 or more"),
                   chunk_solves=count(chunk_solves, "chunk_solves",
                                      "a whole number of solves per chunk, at least 1", 1),
                   transport=transport)
    return to_xarray(df) if as_xarray else df


def to_xarray(df):
    """A sweep table as an xarray Dataset whose dimensions are the grid axes.

    Parameters
    ----------
    df : pandas.DataFrame
        A table from :func:`sweep` (its ``attrs`` name the grid axes and units).

    Returns
    -------
    xarray.Dataset
        One variable per column, each with ``attrs["units"]``; raises a one-line
        :class:`~perfchain.errors.DataError` naming the ``xarray`` extra if xarray is
        not installed.
    """
    from perfchain.study.sweep import to_xarray as convert

    return convert(df)


def compare(pairs=None, *, chamber_pressure, propellants=None, area_ratio=None, exit_pressure=None,
            ambient_pressure=None, altitude=None, flow="shifting", objective="isp_vacuum", rank_by=None):
    """Propellant pairs side by side, each at its own optimum O/F, ranked best first (``perfchain compare``).

    Every grid argument may hold several values; the pairs are then compared and
    ranked at each combination (chamber pressure x exit x ambient x flow).

    Parameters
    ----------
    pairs : list of str or (oxidizer, fuel)
        ``"LOX/RP-1"``, or a tuple of names or Ingredient records.
    propellants : list of str, Mapping or Ingredient, optional
        Formulations and monopropellants beside the pairs (``"AP=0.86, HTPB=0.14"``,
        ``"H2O2-98"``), each as it is: no O/F to optimize (``mixture_ratio`` None).
    chamber_pressure : grid
        [Pa]
    area_ratio, exit_pressure : grid, optional
        Exactly one: [-] or [Pa].
    ambient_pressure, altitude : grid, optional
        [Pa] (default 1 atm) or [m]; at most one.
    flow : str or list of str
    objective : str
        What the optimum O/F maximizes: ``isp_vacuum``, ``isp_ambient`` [s], ``density_isp``,
        ``density_isp_ambient`` [kg s/m^3].
    rank_by : str, optional
        The ranking column (default the objective); also ``cstar``, ``chamber_temperature``,
        ``bulk_density``.

    Returns
    -------
    pandas.DataFrame
        The grid columns, then ``rank``, ``pair``, ``oxidizer``, ``fuel``, ``objective``,
        ``mixture_ratio``, ``chamber_temperature``, ``cstar``, ``isp_vacuum``, ``isp_ambient``,
        ``bulk_density``, ``density_isp``, ``density_isp_ambient``, ``at_bound``, ``flows_full``,
        ``ambient_model``, ``note`` and ``reactants`` (per row, the dict a point's JSON has:
        enthalpy [J/kg], element totals, ingredients; None without an optimum); units in
        ``attrs["units"]``.

    Examples
    --------
    LOX/LH2 beats LOX/RP-1 on vacuum Isp and loses on density-Isp (Sutton & Biblarz,
    Rocket Propulsion Elements, Table 5-5; from memory):

    >>> import perfchain as pc
    >>> df = pc.compare(["LOX/RP-1", "LOX/LH2"], chamber_pressure="70 bar", area_ratio=40)
    >>> df.pair.tolist(), bool(df.density_isp.iloc[0] < df.density_isp.iloc[1])
    (['LOX/LH2', 'LOX/RP-1'], True)

    A monopropellant stands beside them (98 % H2O2 gives far less than either; from memory):

    >>> pc.compare(["LOX/RP-1"], propellants=["H2O2-98"], chamber_pressure="70 bar", area_ratio=40).pair.tolist()
    ['LOX/RP-1', 'H2O2-98']
    """
    import itertools

    import pandas as pd

    from perfchain.study.optimum import compare_pairs

    axes, ambient_key = _compare_axes(chamber_pressure, area_ratio, exit_pressure, ambient_pressure, altitude, flow)
    checked = _pairs(pairs, propellants)
    formulations = [propellants] if isinstance(propellants, str) else list(propellants or ())
    rows = []
    for combo in itertools.product(*axes.values()):
        point = dict(zip(axes, combo))
        pa = point["ambient_pressure"] if ambient_key == "ambient_pressure" else _pressure_at(point["altitude"])
        exit_key = "area_ratio" if "area_ratio" in point else "exit_pressure"
        ranked = compare_pairs(checked, point["chamber_pressure"], ambient_pressure=pa, flow=point["flow"],
                               objective=objective, rank_by=rank_by, propellants=formulations,
                               **{exit_key: point[exit_key]})
        base = {**point, "ambient_pressure": pa} if ambient_key == "altitude" else point
        rows += [{**base, **r} for r in ranked]
    df = pd.DataFrame(rows)
    df.attrs["units"] = _units(df)
    return df


def _compare_axes(chamber_pressure, area_ratio, exit_pressure, ambient_pressure, altitude, flow):
    """The checked grid axes of a comparison, in loop order, and how the ambient is stated."""
    from perfchain.errors import InputError
    from perfchain.inputs import exactly_one, grid
    from perfchain.thermo.flow_models import check_flow

    exit_key = exactly_one("exit", area_ratio=area_ratio, exit_pressure=exit_pressure)
    if altitude is not None and ambient_pressure is not None:
        raise InputError("ambient", "both", "one of ambient_pressure or altitude")
    ambient_key = "altitude" if altitude is not None else "ambient_pressure"
    flows = flow.split(",") if isinstance(flow, str) else list(flow)
    axes = {"chamber_pressure": grid("chamber_pressure", chamber_pressure).tolist(),
            exit_key: grid(exit_key, area_ratio if exit_key == "area_ratio" else exit_pressure).tolist(),
            ambient_key: grid(ambient_key, altitude if altitude is not None else
                              ("1 atm" if ambient_pressure is None else ambient_pressure)).tolist(),
            "flow": list(dict.fromkeys(check_flow(f) for f in flows))}
    return axes, ambient_key


def _pressure_at(z: float) -> float:
    from perfchain.atmosphere import pressure

    return float(pressure(z))


def _pairs(pairs, propellants=None) -> list:
    from perfchain.errors import InputError
    from perfchain.inputs import pair

    if isinstance(pairs, str):
        pairs = [pairs]
    if not pairs and not propellants:
        raise InputError("pairs", pairs, "at least one OXIDIZER/FUEL pair, e.g. ['LOX/RP-1'], or propellants")
    pairs = pairs or []
    return [pair(p, "pairs") for p in pairs]


def _units(df) -> dict:
    """Unit of each column of a comparison table (text and flags: "")."""
    from perfchain.study.sweep import column_unit

    text = {"pair", "oxidizer", "fuel", "objective", "flow", "at_bound", "note", "ambient_model", "reactants"}
    return {c: "" if c in text else column_unit(c) for c in df.columns}


def run_study(path, out, *, units=None, overwrite=False, workers=1, max_list=None, plots=None, progress=False,
              confirm=False):
    """Run a study file into a folder: tables, plots, report (``perfchain run``).

    Parameters
    ----------
    path : str or Path
        The study file (TOML; data only, nothing in it is executed).
    out : str or Path
        Output folder: new or empty unless ``overwrite``.
    units : str, optional
        ``"si"`` or ``"us"`` for tables and report (default: the study's ``[output]``).
    overwrite : bool
        Write into a folder that already holds files.
    workers : int
        Worker processes for the engine grids.
    max_list : int, optional
        Cap every list of the study at this many values (a quick look).
    plots : bool, optional
        Override the study's ``[output] plots``.
    progress : bool
        Print progress lines on stderr.
    confirm : bool
        Allow engine grids above 20,000 points (``perfchain run --yes``).

    Returns
    -------
    pathlib.Path
        The HTML report, written last.

    Examples
    --------
    The rocket equation for a single stage of Isp 350 s, 28.5 t dry, 161.5 t propellant and
    10 t payload gives 5655.3 m/s (closed form; the Curtis example, from memory):

    >>> import tempfile, pathlib, perfchain as pc
    >>> d = pathlib.Path(tempfile.mkdtemp())
    >>> _ = (d / "s.toml").write_text('[study]\\ntitle = "t"\\n[[vehicle]]\\nname = "V"\\npayload = "10 t"\\n'
    ...     '[[vehicle.stage]]\\nisp = "350 s"\\ndry = "28.5 t"\\npropellant = "161.5 t"\\n'
    ...     '[output]\\nformats = ["csv"]\\nplots = false\\n')
    >>> report = pc.run_study(d / "s.toml", d / "out")
    >>> report.name, "5655.3" in report.read_text()
    ('report.html', True)
    """
    from perfchain.inputs import count
    from perfchain.study.runner import run_study as run, stderr_progress
    from perfchain.study.schema import parse_study, read_study_text

    text = read_study_text(path)    # a regular UTF-8 file of at most 10 MiB, read once
    spec = parse_study(text, source=str(path))
    return run(spec, out, study_text=text, source=str(path), units=units, overwrite=bool(overwrite),
               workers=count(workers, "workers", "a whole number of worker processes, at least 1", 1),
               max_list=None if max_list is None else count(max_list, "max_list", "a whole number, at least 1", 1),
               plots=plots, confirm=bool(confirm), progress=stderr_progress if progress else None)
