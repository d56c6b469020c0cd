"""A study's engines: ingredients resolved, lists in SI, and the engine's grid, optima and design point.

Composition only: the physics lives in :mod:`perfchain.study.sweep`,
:mod:`perfchain.study.optimum` and :mod:`perfchain.performance.chain`.
"""

from __future__ import annotations

from dataclasses import dataclass

from perfchain.errors import InputError
from perfchain.study.names import name_key, shrink
from perfchain.study.schema import Engine, Study

__all__ = ["resolve_ingredients", "lookup", "formulation_parts", "EngineSettings", "engine_settings",
           "engine_grid", "engine_optima", "engine_point"]


def resolve_ingredients(study: Study) -> dict:
    """Study ingredients and blends by case-folded name; bundled names may not be redefined.

    Parameters
    ----------
    study : Study

    Returns
    -------
    dict
        Case-folded name -> :class:`~perfchain.propellants.ingredients.Ingredient`.

    Examples
    --------
    A study's own ingredient is kept under its case-folded name:

    >>> from perfchain.study.schema import parse_study
    >>> s = parse_study('[study]\\ntitle = "t"\\n[[ingredient]]\\nname = "hexane"\\n'
    ...                 'formula = { C = 6, H = 14 }\\nenthalpy = "-198.7 kJ/mol"\\n'
    ...                 '[[vehicle]]\\nname = "V"\\npayload = "1 kg"\\n[[vehicle.stage]]\\n'
    ...                 'isp = "300 s"\\ndry = "1 t"\\npropellant = "9 t"\\n')
    >>> list(resolve_ingredients(s))
    ['hexane']
    """
    from perfchain.propellants.ingredients import blend, custom_ingredient, get_ingredient

    custom: dict = {}

    def taken(name, field):
        try:
            get_ingredient(name)
        except InputError:
            return
        raise InputError(field, name, "a name that is not a bundled ingredient (see `perfchain ingredients`)")

    for i, spec in enumerate(study.ingredient, 1):
        taken(spec.name, f"ingredient[{i}].name")
        custom[name_key(spec.name)] = custom_ingredient(spec.name, spec.formula, spec.enthalpy, spec.temperature,
                                                      spec.density, spec.phase)
    for i, spec in enumerate(study.blend, 1):
        taken(spec.name, f"blend[{i}].name")
        parts = {lookup(k, custom, f"blend[{i}].parts"): v for k, v in spec.parts.items()}
        custom[name_key(spec.name)] = blend(spec.name, parts, spec.density)
    return custom


def lookup(name: str, custom: dict, field: str):
    """A study ingredient or a bundled one, by name; one-line error naming ``field``.

    Parameters
    ----------
    name : str
    custom : dict
        From :func:`resolve_ingredients`.
    field : str
        Key path named in the error.

    Returns
    -------
    Ingredient

    Examples
    --------
    >>> lookup("lox", {}, "engine[1].oxidizer").name
    'LOX'
    """
    from perfchain.propellants.ingredients import get_ingredient

    if name_key(name) in custom:
        return custom[name_key(name)]
    try:
        return get_ingredient(name, field=field)
    except InputError as exc:
        if custom:
            raise InputError(field, name, exc.allowed[:-1] + "; or one of this study's: "
                             + ", ".join(c.name for c in custom.values()) + ")") from None
        raise


# --------------------------------------------------------------------------- engines
@dataclass
class EngineSettings:
    """An engine's lists in SI (after the grid cap) and its resolved ingredients.

    A formulation engine has ``oxidizer`` and ``fuel`` None, ``mixture_ratio`` ``[None]`` and
    ``propellant`` its parts, ``{Ingredient: mass fraction}`` as the study gives them.
    """

    spec: Engine
    oxidizer: object
    fuel: object
    mixture_ratio: list
    chamber_pressure: list
    exit_key: str
    exits: list
    ambient_pressure: list
    altitude: list | None
    flow: list
    losses: object
    propellant: dict | None = None

    @property
    def label(self) -> str:
        """What the engine burns: ``"LOX/RP-1"`` or the formulation's name."""
        if self.propellant is None:
            return f"{self.oxidizer.name}/{self.fuel.name}"
        from perfchain.propellants.formulation import make_formulation

        return make_formulation(self.propellant).name

    def propellant_kwargs(self, mixture_ratio=None) -> dict:
        """``oxidizer``, ``fuel`` and ``mixture_ratio`` of performance(), or its ``propellant``."""
        if self.propellant is None:
            return {"oxidizer": self.oxidizer, "fuel": self.fuel, "mixture_ratio": mixture_ratio}
        return {"propellant": dict(self.propellant)}

    def point_kwargs(self) -> dict:
        """Keyword arguments of performance() at the design chamber pressure, exit, ambient, flow."""
        kw = {"chamber_pressure": self.chamber_pressure[0], self.exit_key: self.exits[0],
              "flow": self.flow[0]}
        if self.altitude is not None:
            kw["altitude"] = self.altitude[0]
        else:
            kw["ambient_pressure"] = self.ambient_pressure[0]
        return kw


def engine_settings(spec: Engine, index: int, custom: dict, cap) -> EngineSettings:
    """An engine's lists in SI (at most ``cap`` values each) and its ingredients.

    Parameters
    ----------
    spec : Engine
    index : int
        1-based place of the engine in the study (named in errors).
    custom : dict
        From :func:`resolve_ingredients`.
    cap : int or None
        Most values per list (evenly spaced, ends kept).

    Returns
    -------
    EngineSettings

    Examples
    --------
    1000 psi = 6 894 757.293168 Pa (NIST SP 811, 2008):

    >>> from perfchain.study.schema import parse_study
    >>> s = parse_study('[study]\\ntitle = "t"\\n[[engine]]\\nname = "E"\\noxidizer = "LOX"\\n'
    ...                 'fuel = "RP-1"\\nmixture_ratio = [2.56]\\nchamber_pressure = "1000 psi"\\n'
    ...                 'exit_pressure = "1 atm"\\n')
    >>> es = engine_settings(s.engine[0], 1, resolve_ingredients(s), None)
    >>> round(es.chamber_pressure[0], 6), es.exit_key, es.ambient_pressure
    (6894757.293168, 'exit_pressure', [101325.0])
    """
    from perfchain.atmosphere import pressure
    from perfchain.inputs import value
    from perfchain.performance.losses import LossModel

    where = f"engine[{index}]"
    if spec.propellant is None:
        ox, fu, parts = (lookup(spec.oxidizer, custom, f"{where}.oxidizer"),
                         lookup(spec.fuel, custom, f"{where}.fuel"), None)
    else:
        ox = fu = None
        parts = formulation_parts(spec.propellant, custom, f"{where}.propellant")

    def si(values, key):
        return [value(key, v, name=f"{where}.{key}") for v in shrink(values, cap)]

    if spec.area_ratio is not None:
        exit_key, exits = "area_ratio", shrink(spec.area_ratio, cap)
    else:
        exit_key, exits = "exit_pressure", si(spec.exit_pressure, "exit_pressure")
    alt = None
    if spec.altitude is not None:
        alt = si(spec.altitude, "altitude")
        pa = [float(pressure(z)) for z in alt]
    else:
        pa = si(spec.ambient_pressure or ["1 atm"], "ambient_pressure")
    losses = spec.efficiency.loss_model(f"{where}.efficiency") if spec.efficiency else LossModel()
    return EngineSettings(spec, ox, fu, [None] if parts else shrink(spec.mixture_ratio, cap),
                          si(spec.chamber_pressure, "chamber_pressure"),
                          exit_key, exits, pa, alt, shrink(spec.flow, cap), losses, parts)


def formulation_parts(given, custom: dict, field: str) -> dict:
    """A study's formulation (text or table) as ``{Ingredient: mass fraction}``, names looked up among
    the study's own ingredients too; checked as a whole (fractions sum to 1, energy to release).

    Parameters
    ----------
    given : str or dict
        ``"AP=0.86, HTPB=0.14"``, ``{"AP": 0.86, "HTPB": 0.14}`` or one monopropellant name.
    custom : dict
        From :func:`resolve_ingredients`.
    field : str
        Key path named in errors.

    Returns
    -------
    dict
        Ingredient -> mass fraction [-], as given.

    Examples
    --------
    >>> parts = formulation_parts("AP=0.86, HTPB=0.14", {}, "engine[1].propellant")
    >>> [(i.name, w) for i, w in parts.items()]
    [('AP', 0.86), ('HTPB', 0.14)]
    """
    from perfchain.inputs import propellant as check_propellant
    from perfchain.propellants.ingredients import parse_formulation

    named = parse_formulation(given, field) if isinstance(given, str) else dict(given)
    parts = {lookup(k, custom, field): w for k, w in named.items()}
    check_propellant(parts, field)
    return parts


def engine_grid(es: EngineSettings, workers: int, confirm: bool = False):
    """The engine's full performance table (SI), one row per grid point, delivered columns added.

    Parameters
    ----------
    es : EngineSettings
    workers : int
        Worker processes.
    confirm : bool
        Allow grids above :data:`perfchain.study.grid.MAX_POINTS` points.

    Returns
    -------
    pandas.DataFrame
        The columns of :func:`perfchain.study.sweep.sweep` plus ``delivered_cstar`` [m/s],
        ``delivered_isp_vacuum`` and ``delivered_isp_ambient`` [s].

    Examples
    --------
    Sea-level Isp of about 300 s (Sutton & Biblarz, Rocket Propulsion Elements, Table 5-5;
    from memory, +/- 1 %); no efficiencies given, so delivered equals ideal:

    >>> from perfchain.study.schema import parse_study
    >>> s = parse_study('[study]\\ntitle = "t"\\n[[engine]]\\nname = "E"\\noxidizer = "LOX"\\n'
    ...                 'fuel = "RP-1"\\nmixture_ratio = [2.56]\\nchamber_pressure = "1000 psi"\\n'
    ...                 'exit_pressure = "1 atm"\\n')
    >>> es = engine_settings(s.engine[0], 1, resolve_ingredients(s), None)
    >>> df = engine_grid(es, 1)
    >>> bool(abs(df.isp_ambient[0] / 300 - 1) < 0.01), bool(df.delivered_isp_ambient[0] == df.isp_ambient[0])
    (True, True)
    """
    from perfchain.study.sweep import sweep

    amb = {"altitude": es.altitude} if es.altitude is not None else {"ambient_pressure": es.ambient_pressure}
    lists = dict(chamber_pressure=es.chamber_pressure, flow=es.flow, **{es.exit_key: es.exits}, **amb)
    if es.propellant is None:
        lists.update(oxidizer=es.oxidizer, fuel=es.fuel, mixture_ratio=es.mixture_ratio)
    else:
        lists.update(propellant=dict(es.propellant))
    df = sweep(workers=workers, progress=False, confirm=confirm, **lists)   # study ingredients too
    return _add_delivered(df, es.losses)


def _add_delivered(df, losses):
    """Delivered c*, vacuum and ambient Isp columns for the ok rows (NaN elsewhere)."""
    import numpy as np

    from perfchain.performance.losses import delivered

    ok = df["status"] == "ok"
    for key in ("cstar", "isp_vacuum", "isp_ambient"):
        df[f"delivered_{key}"] = np.nan
    if ok.any():
        d = delivered(df.loc[ok, "cstar"].to_numpy(), df.loc[ok, "cf_vacuum"].to_numpy(),
                      df.loc[ok, "area_ratio"].to_numpy(), df.loc[ok, "exit_pressure"].to_numpy(),
                      df.loc[ok, "chamber_pressure"].to_numpy(), df.loc[ok, "ambient_pressure"].to_numpy(), losses)
        for key in ("cstar", "isp_vacuum", "isp_ambient"):
            df.loc[ok, f"delivered_{key}"] = d[key]
    cut = ok & (df["flows_full"] == False) if "flows_full" in df else ok & False  # noqa: E712 (a column)
    if cut.any():   # a separated nozzle: the factors applied to the nozzle cut at its separation station
        c, pc, eps, p_sep = (df.loc[cut, k].to_numpy() for k in ("cstar", "chamber_pressure",
                                                                 "separation_area_ratio", "separation_pressure"))
        cf_cut = (df.loc[cut, "separation_velocity"].to_numpy() + p_sep * eps * c / pc) / c
        d = delivered(c, cf_cut, eps, p_sep, pc, df.loc[cut, "ambient_pressure"].to_numpy(), losses)
        df.loc[cut, "delivered_isp_ambient"] = d["isp_ambient"]
    return df


def engine_optima(es: EngineSettings) -> list[dict]:
    """Optimum O/F at each chamber pressure, for the engine's objective and each Isp shown.

    Parameters
    ----------
    es : EngineSettings

    Returns
    -------
    list of dict
        ``engine, chamber_pressure`` [Pa], ``objective, mixture_ratio`` [-],
        ``objective_value``, ``isp_vacuum, isp_ambient`` [s], ``cstar`` [m/s],
        ``chamber_temperature`` [K], ``bulk_density`` [kg/m^3], ``at_bound``; none for a
        formulation engine (it has no O/F to optimize).

    Examples
    --------
    LOX/RP-1 at 1000 psia to 1 atm: the sea-level Isp peaks near O/F 2.3-2.6 (Sutton &
    Biblarz, Rocket Propulsion Elements, Table 5-5; from memory):

    >>> from perfchain.study.schema import parse_study
    >>> s = parse_study('[study]\\ntitle = "t"\\n[[engine]]\\nname = "E"\\noxidizer = "LOX"\\n'
    ...                 'fuel = "RP-1"\\nmixture_ratio = [2.56]\\nchamber_pressure = "1000 psi"\\n'
    ...                 'exit_pressure = "1 atm"\\n')
    >>> es = engine_settings(s.engine[0], 1, resolve_ingredients(s), None)
    >>> rows = engine_optima(es)
    >>> [r["objective"] for r in rows], bool(2.2 < rows[1]["mixture_ratio"] < 2.7)
    (['isp_vacuum', 'isp_ambient'], True)
    """
    from perfchain.study.optimum import NoFullFlowOptimum, optimum_mixture_ratio

    if es.propellant is not None:
        return []   # a formulation has no O/F to optimize
    objectives = [es.spec.objective, "isp_vacuum"]
    if es.ambient_pressure[0] > 0:
        objectives.append("isp_ambient")
    rows = []
    for pc in es.chamber_pressure:
        for objective in dict.fromkeys(objectives):
            try:
                o = optimum_mixture_ratio(es.oxidizer, es.fuel, pc, **{es.exit_key: es.exits[0]},
                                          ambient_pressure=es.ambient_pressure[0], flow=es.flow[0],
                                          objective=objective)
            except NoFullFlowOptimum as exc:
                if objective == es.spec.objective and es.spec.design_mixture_ratio is None:
                    # the design point needs this optimum: say that none exists, one line
                    raise InputError(f"{es.spec.name}.objective", objective, exc.allowed + " (or set "
                                     "design_mixture_ratio)") from None
                rows.append({"engine": es.spec.name, "chamber_pressure": pc, "objective": objective,
                             "at_bound": False, "note": "no full-flowing O/F in the search range"})
                continue
            p = o.performance
            rows.append({"engine": es.spec.name, "chamber_pressure": pc, "objective": objective,
                         "mixture_ratio": o.mixture_ratio, "objective_value": o.value,
                         "isp_vacuum": p.isp_vacuum, "isp_ambient": p.isp_ambient, "cstar": p.cstar,
                         "chamber_temperature": p.chamber.temperature, "bulk_density": p.bulk_density,
                         "at_bound": o.at_bound, "flows_full": p.flows_full, "ambient_model": p.ambient_model})
    return rows


def engine_point(es: EngineSettings, mixture_ratio: float | None):
    """The engine's delivered point at a mixture ratio (design pressure, exit, ambient, flow).

    Parameters
    ----------
    es : EngineSettings
    mixture_ratio : float or None
        O/F [-]; None for a formulation engine.

    Returns
    -------
    Performance

    Examples
    --------
    Sea-level Isp of about 300 s (Sutton & Biblarz, Table 5-5; from memory, +/- 1 %):

    >>> from perfchain.study.schema import parse_study
    >>> s = parse_study('[study]\\ntitle = "t"\\n[[engine]]\\nname = "E"\\noxidizer = "LOX"\\n'
    ...                 'fuel = "RP-1"\\nmixture_ratio = [2.56]\\nchamber_pressure = "1000 psi"\\n'
    ...                 'exit_pressure = "1 atm"\\n')
    >>> es = engine_settings(s.engine[0], 1, resolve_ingredients(s), None)
    >>> bool(abs(engine_point(es, 2.56).isp_ambient / 300 - 1) < 0.01)
    True
    """
    from perfchain.performance.chain import performance

    return performance(**es.propellant_kwargs(mixture_ratio), **es.point_kwargs(),
                       contraction_ratio=es.spec.contraction_ratio, losses=es.losses,
                       thrust=es.spec.thrust, thrust_at=es.spec.thrust_at)

