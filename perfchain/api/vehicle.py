"""Vehicles: stages, ideal delta-v, and the inverse problems (the Python face of ``perfchain deltav``).

Every quantity takes text with a unit (``"28.5 t"``, ``"350 s"``), a pint Quantity or an
SI number; fractions also take ``"85 %"``. A stage may be given as a
:class:`~perfchain.vehicle.stages.Stage`, the command line's text
(``"isp=350 s, dry=28.5 t, propellant=161.5 t"``) or a dict of :func:`stage` keywords.
Ideal means the rocket equation: no gravity, drag or steering losses.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["stage", "stage_keywords", "stack_keywords", "delta_v", "DeltaV", "propellant_for_delta_v", "max_payload", "optimal_staging"]


def stage(spec=None, *, isp=None, exhaust_velocity=None, dry_mass=None, propellant_mass=None, total_mass=None,
          propellant_fraction=None, structural_ratio=None, thrust=None, name=""):
    """One stage from any accepted way of stating it.

    Parameters
    ----------
    spec : str, optional
        The command line's ``--stage`` text instead of the keywords, e.g.
        ``"isp=350 s, dry=28.5 t, propellant=161.5 t"``.
    isp, exhaust_velocity : str, Quantity or float
        Exactly one: specific impulse [s] or effective exhaust velocity [m/s].
    dry_mass, propellant_mass, total_mass : str, Quantity or float
        Masses [kg]: ``dry_mass + propellant_mass``, ``total_mass + propellant_fraction``
        or ``propellant_mass + structural_ratio``.
    propellant_fraction, structural_ratio : float or str
        Propellant / stage mass, or dry / stage mass [-], in (0, 1) (or ``"85 %"``).
    thrust : str, Quantity or float, optional
        Constant thrust [N]; gives the burn time.
    name : str

    Returns
    -------
    perfchain.vehicle.stages.Stage
        ``exhaust_velocity`` [m/s], ``dry_mass``, ``propellant_mass`` [kg], ``thrust`` [N].

    Examples
    --------
    Curtis, Orbital Mechanics for Engineering Students (from memory): 161.5 t of propellant at
    structural ratio 0.15 is a 190 t stage with 28.5 t dry:

    >>> import perfchain as pc
    >>> s = pc.stage(isp="350 s", propellant_mass="161.5 t", structural_ratio=0.15)
    >>> round(s.dry_mass, 6), round(s.total_mass, 6)
    (28500.0, 190000.0)
    >>> pc.stage("isp=350 s, dry=28.5 t, propellant=161.5 t").total_mass
    190000.0
    """
    keywords = dict(isp=isp, exhaust_velocity=exhaust_velocity, dry_mass=dry_mass,
                    propellant_mass=propellant_mass, total_mass=total_mass,
                    propellant_fraction=propellant_fraction, structural_ratio=structural_ratio, thrust=thrust)
    if spec is not None:
        from perfchain.errors import InputError

        if any(v is not None for v in keywords.values()):
            raise InputError("stage", spec, "either the stage text or the keywords, not both")
        return _stage(spec, "stage", name=name)
    return _stage({**keywords, "name": name}, "stage")


def _stage(item, where: str, name=None):
    """A Stage from a Stage, a ``--stage`` text or a dict of keywords; messages name ``where``."""
    return _stage_and_engine(item, where, name)[0]


def _stage_and_engine(item, where: str, name=None) -> tuple:
    """(Stage, a line on its engine or None): an engine given as a propellant point is solved here."""
    from perfchain.vehicle.rocket import Stage, make_stage

    if isinstance(item, Stage):
        return item, None
    kw, engine = _keywords_and_engine(item, where, name)
    return make_stage(**kw), engine


def stage_keywords(item, where: str = "stage", name=None) -> dict:
    """One stage as given -> the checked SI keywords of :func:`perfchain.vehicle.stages.make_stage`.

    Parameters
    ----------
    item : Stage, str or dict
        A Stage (its ``exhaust_velocity``, ``dry_mass``, ``propellant_mass``), a ``--stage``
        text or a dict of :func:`stage` keywords. A stage whose engine is given as a
        propellant point (``oxidizer``, ``fuel``, ``mixture_ratio``, ``chamber_pressure``...)
        gets that point's exhaust velocity, solved here.
    where : str
        The stage's name in messages.
    name : str, optional
        The stage's label when the text names none.

    Returns
    -------
    dict
        ``isp`` [s] or ``exhaust_velocity`` [m/s], one mass set [kg] or fractions [-],
        ``thrust`` [N] if given, ``name``.

    Examples
    --------
    >>> stage_keywords("isp=350 s, dry=28.5 t, propellant=161.5 t")
    {'isp': 350.0, 'dry_mass': 28500.0, 'propellant_mass': 161500.0, 'name': ''}
    """
    return _keywords_and_engine(item, where, name)[0]


def _keywords_and_engine(item, where: str, name=None) -> tuple[dict, str | None]:
    """:func:`stage_keywords` and the line on the stage's engine (None without one)."""
    from perfchain.errors import InputError
    from perfchain.inputs.vehicle import STAGE_KEYS, parse_stage_text, stage_args
    from perfchain.vehicle.rocket import Stage

    if isinstance(item, Stage):
        return {"exhaust_velocity": item.exhaust_velocity, "dry_mass": item.dry_mass,
                "propellant_mass": item.propellant_mass, "thrust": item.thrust, "name": item.name}, None
    if isinstance(item, str):
        kw = parse_stage_text(item, where)
        keys = {v: k for k, v in STAGE_KEYS.items()}   # messages use the keys as typed
        kw.setdefault("name", name or "")
        prefix = f"{where}: "
    elif isinstance(item, dict):
        kw, keys, prefix = dict(item), None, f"{where}." if where != "stage" else ""
    else:
        raise InputError(where, item, "a Stage, a stage text such as 'isp=350 s, dry=1 t, propellant=9 t', "
                         "or a dict of stage keywords")
    kw, engine = _engine_exhaust_velocity(kw, prefix, where)
    return stage_args(**kw, keys=keys, prefix=prefix, where=where), engine


def _engine_exhaust_velocity(kw: dict, prefix: str, where: str) -> tuple[dict, str | None]:
    """Stage keywords with an engine's keys replaced by its exhaust velocity [m/s], and a line on it.

    The engine is a propellant point (:data:`perfchain.inputs.vehicle.ENGINE_KEYS`): its delivered
    exhaust velocity when efficiencies are given, else the ideal one; vacuum unless ``which=ambient``.
    """
    from perfchain.errors import InputError
    from perfchain.inputs.vehicle import ENGINE_KEYS, engine_args
    from perfchain.performance.chain import performance
    from perfchain.study.tradeoff import point_exhaust_velocity

    engine = {k: kw.pop(k) for k in ENGINE_KEYS if k in kw}
    if not engine:
        return kw, None
    if kw.get("isp") is not None or kw.get("exhaust_velocity") is not None:
        raise InputError(where, "isp or exhaust_velocity with an engine", "either isp / exhaust_velocity or an "
                         "engine stated as a propellant point (oxidizer, fuel, mixture_ratio or formulation, chamber_pressure, ...)")
    args, which = engine_args(engine, prefix)
    r = performance(**args)
    try:
        c = point_exhaust_velocity(r, which)
    except InputError as exc:
        raise InputError(prefix + "which", which, exc.allowed) from None
    exit_ = f"area ratio {r.area_ratio:.4g}"
    mixture = "" if r.mixture_ratio is None else f", O/F {r.mixture_ratio:.4g}"
    line = (f"{r.propellant}{mixture}, {r.chamber_pressure / 1e5:.4g} bar, {exit_}, "
            f"{r.flow}: {'delivered' if r.delivered else 'ideal'} {which} exhaust velocity")
    if which == "ambient":
        line += f" at {r.ambient_pressure / 1e5:.4g} bar" + ("" if r.flows_full else " (separated: cut-nozzle estimate)")
    if r.chamber.condensed_mass_fraction > 0 and (r.losses or {}).get("two_phase", {}).get("applied") is not True:
        line += "; no two-phase flow loss (no thrust sizes the engine's throat)"
    return {**kw, "exhaust_velocity": c}, line


def _stack(stages, label: str) -> tuple[list, list]:
    """(items as given, Stages) of a stack; one stage may come alone; ``label`` names stage ``{i}``."""
    items, stack, _ = _stack_and_engines(stages, label)
    return items, stack


def _items(stages, label: str) -> list:
    """The stages of a stack as given, in a list (one stage may come alone)."""
    from perfchain.errors import InputError

    items = [stages] if isinstance(stages, (str, dict)) or not hasattr(stages, "__iter__") else list(stages)
    if not items:
        raise InputError(label.format(i="").strip(" []"), "none", "at least one stage, first stage first")
    return items


def _stack_and_engines(stages, label: str) -> tuple[list, list, list]:
    """:func:`_stack` and, per stage, the line on its engine (None for one given by Isp or speed)."""
    items = _items(stages, label)
    pairs = [_stage_and_engine(s, label.format(i=i)) for i, s in enumerate(items, 1)]
    return items, [p[0] for p in pairs], [p[1] for p in pairs]


def stack_keywords(stages, label: str = "stages[{i}]") -> list:
    """Each stage of a stack (as :func:`delta_v` takes it) -> its checked SI keywords (:func:`stage_keywords`).

    >>> [k["isp"] for k in stack_keywords(["isp=300 s, dry=2 t, propellant=20 t"])]
    [300.0]
    """
    return [stage_keywords(s, label.format(i=i)) for i, s in enumerate(_items(stages, label), 1)]


@dataclass(frozen=True)
class DeltaV:
    """Ideal delta-v of a vehicle (SI): what ``perfchain deltav --json`` prints.

    Attributes
    ----------
    payload_mass, liftoff_mass : float
        [kg]
    payload_fraction : float
        Payload / lift-off mass [-].
    total_delta_v : float
        [m/s]
    stages : tuple of dict
        First stage first: ``name``, ``initial_mass``, ``burnout_mass`` [kg], ``mass_ratio`` [-],
        ``delta_v`` [m/s], ``burn_time`` [s] (with a thrust), ``exhaust_velocity`` [m/s],
        ``dry_mass``, ``propellant_mass`` [kg].
    target : dict or None
        With a target: ``target_delta_v`` [m/s], ``max_payload`` [kg], and for one stage given
        by its structural ratio ``propellant_needed``, ``stage_mass_needed``,
        ``liftoff_mass_needed`` [kg].
    """

    payload_mass: float
    liftoff_mass: float
    payload_fraction: float
    total_delta_v: float
    stages: tuple
    target: dict | None = None

    def to_dict(self) -> dict:
        """The JSON-ready dict (SI); ``target`` only when one was given."""
        out = {"stages": [dict(s) for s in self.stages], "total_delta_v": self.total_delta_v,
               "payload_fraction": self.payload_fraction, "liftoff_mass": self.liftoff_mass,
               "payload_mass": self.payload_mass}
        if self.target is not None:
            out["target"] = dict(self.target)
        return out

    def __repr__(self) -> str:
        from perfchain.api.display import format_delta_v

        return format_delta_v(self.to_dict())

    def _repr_html_(self) -> str:
        from html import escape

        return f"<pre>{escape(repr(self))}</pre>"


def delta_v(stages, payload, *, target=None, names=None) -> DeltaV:
    """Ideal delta-v of a stack of stages carrying a payload (the rocket equation, no losses).

    Parameters
    ----------
    stages : list of Stage, str or dict
        First stage first (see :func:`stage`); one stage may be given alone.
    payload : str, Quantity or float
        Payload mass [kg], 0 allowed.
    target : str, Quantity or float, optional
        A delta-v [m/s] to reach: adds the largest payload for it, and for a single stage
        given by its structural ratio the propellant that stage needs.
    names : dict, optional
        Names of ``payload``, ``target`` and each stage (``"stages[{i}]"``) in messages.

    Returns
    -------
    DeltaV
        ``.to_dict()`` is the JSON object ``perfchain deltav --json`` prints.

    Examples
    --------
    Curtis, Orbital Mechanics for Engineering Students (from memory): one stage, Isp 350 s,
    28.5 t dry, 161.5 t propellant, 10 t payload -> 5.657 km/s with g0 = 9.81; 5655.3 m/s
    with the exact g0 (closed form 350 g0 ln(200/38.5)):

    >>> import perfchain as pc
    >>> r = pc.delta_v(["isp=350 s, dry=28.5 t, propellant=161.5 t"], "10 t")
    >>> round(r.total_delta_v, 1), r.payload_fraction
    (5655.3, 0.05)
    """
    from perfchain.errors import InputError
    from perfchain.inputs import value
    from perfchain.vehicle.rocket import Vehicle, max_payload as largest, propellant_for_delta_v as sizing

    names = {"payload": "payload", "target": "target", "stage": "stages[{i}]", **(names or {})}
    payload_mass = value("payload", payload, name=names["payload"])
    items, stack, engines = _stack_and_engines(stages, names["stage"])
    result = Vehicle(stack, payload_mass).performance()
    rows = tuple({**r.to_dict(), "exhaust_velocity": s.exhaust_velocity, "dry_mass": s.dry_mass,
                  "propellant_mass": s.propellant_mass, **({"thrust": s.thrust} if s.thrust else {}),
                  **({"engine": e} if e else {})} for r, s, e in zip(result.stages, stack, engines))
    out = None
    if target is not None:
        dv = value("delta_v", target, name=names["target"])
        try:
            out = {"target_delta_v": dv, "max_payload": largest(stack, dv)}
        except InputError as exc:
            raise InputError(names["target"], target, exc.allowed) from None
        if len(stack) == 1 and _by_structural_ratio(items[0]):
            if payload_mass <= 0:
                raise InputError(names["payload"], payload, f"a mass above 0 kg to size the propellant for "
                                 f"{names['target']}")
            need = sizing(dv, stack[0].exhaust_velocity, stack[0].structural_ratio, payload_mass)
            out.update(propellant_needed=need.propellant_mass, stage_mass_needed=need.stage_mass,
                       liftoff_mass_needed=need.liftoff_mass)
    return DeltaV(payload_mass, result.liftoff_mass, result.payload_fraction, result.total_delta_v, rows, out)


def _by_structural_ratio(item) -> bool:
    """True when a stage was stated by its structural ratio (so sizing it for a target makes sense)."""
    from perfchain.inputs.vehicle import parse_stage_text

    if isinstance(item, str):
        return "structural_ratio" in parse_stage_text(item)
    return isinstance(item, dict) and item.get("structural_ratio") is not None


def propellant_for_delta_v(delta_v, *, structural_ratio, payload, isp=None, exhaust_velocity=None):
    """Propellant one stage needs to give ``delta_v`` to a payload (closed form of the rocket equation).

    Parameters
    ----------
    delta_v : str, Quantity or float
        Target [m/s].
    structural_ratio : float or str
        Dry / stage mass [-], in (0, 1).
    payload : str, Quantity or float
        [kg], above 0.
    isp, exhaust_velocity : str, Quantity or float
        Exactly one: [s] or [m/s].

    Returns
    -------
    perfchain.vehicle.inverse.SingleStageSizing
        ``propellant_mass``, ``dry_mass``, ``stage_mass``, ``liftoff_mass`` [kg], ``mass_ratio`` [-].

    Examples
    --------
    The inverse of the Curtis single stage (from memory): 10 t payload, structural ratio 0.15,
    Isp 350 s and 5655.3 m/s need 161.5 t of propellant:

    >>> import perfchain as pc
    >>> s = pc.propellant_for_delta_v("5655.305726 m/s", structural_ratio=0.15, payload="10 t", isp="350 s")
    >>> round(s.propellant_mass), round(s.liftoff_mass)
    (161500, 200000)
    """
    from perfchain.inputs import value
    from perfchain.vehicle.rocket import propellant_for_delta_v as sizing

    c = _exhaust_velocity(isp, exhaust_velocity)
    return sizing(value("delta_v", delta_v), c, value("structural_ratio", structural_ratio),
                  _payload_above_0(payload))


def _payload_above_0(payload) -> float:
    from perfchain.errors import InputError
    from perfchain.inputs import typed, value

    m = value("payload", payload)
    if not m > 0:
        raise InputError("payload", typed(payload), "a mass above 0 kg")
    return m


def _exhaust_velocity(isp, exhaust_velocity) -> float:
    from perfchain.constants import G0
    from perfchain.inputs import exactly_one, value

    key = exactly_one("isp/exhaust_velocity", isp=isp, exhaust_velocity=exhaust_velocity)
    return value("isp", isp) * G0 if key == "isp" else value("exhaust_velocity", exhaust_velocity)


def max_payload(stages, delta_v) -> float:
    """Largest payload [kg] a stack of stages can bring to ``delta_v`` [m/s] (ideal).

    Parameters
    ----------
    stages : list of Stage, str or dict
        First stage first (see :func:`stage`).
    delta_v : str, Quantity or float
        [m/s]

    Examples
    --------
    The Curtis stage (from memory) gives 5655.3 m/s to 10 t (exact g0), so 10 t is its largest
    payload for that delta-v:

    >>> import perfchain as pc
    >>> round(pc.max_payload("isp=350 s, dry=28.5 t, propellant=161.5 t", "5655.305726 m/s"))
    10000
    """
    from perfchain.inputs import value
    from perfchain.vehicle.rocket import max_payload as largest

    return largest(_stack(stages, "stages[{i}]")[1], value("delta_v", delta_v))


def optimal_staging(delta_v, *, structural_ratios, payload, isp=None, exhaust_velocity=None):
    """The delta-v split among stages that minimises lift-off mass (Lagrange multiplier).

    Parameters
    ----------
    delta_v : str, Quantity or float
        Target [m/s].
    structural_ratios : list of float or str
        Dry / stage mass per stage [-], first stage first.
    payload : str, Quantity or float
        [kg], above 0.
    isp, exhaust_velocity : list
        Exactly one, one value per stage: [s] or [m/s].

    Returns
    -------
    perfchain.vehicle.staging.StagingResult

    Examples
    --------
    Curtis (from memory): two identical stages, Isp 350 s (g0 9.81), structural ratio 0.15,
    10 t payload, 7.407 km/s -> 200 t lift-off with an equal split:

    >>> import perfchain as pc
    >>> r = pc.optimal_staging("7406.85755 m/s", structural_ratios=[0.15, 0.15], payload="10 t",
    ...                        exhaust_velocity=[350 * 9.81] * 2)
    >>> round(r.liftoff_mass, -1), [round(d, 2) for d in r.delta_v_split]
    (200000.0, [3703.43, 3703.43])
    """
    from perfchain.inputs import value
    from perfchain.vehicle.rocket import optimal_staging as best

    from perfchain.constants import G0
    from perfchain.inputs import exactly_one

    key = exactly_one("isp/exhaust_velocity", isp=isp, exhaust_velocity=exhaust_velocity)
    cs = [value(key, x, name=f"{key}[{k}]") * (G0 if key == "isp" else 1.0)
          for k, x in enumerate(isp if key == "isp" else exhaust_velocity)]
    eps = [value("structural_ratio", e, name=f"structural_ratios[{k}]") for k, e in enumerate(structural_ratios)]
    return best(value("delta_v", delta_v), cs, eps, _payload_above_0(payload))

