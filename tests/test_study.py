"""Study files: round trip, every bad input as one line, and each example computed on a reduced grid."""

import math
from pathlib import Path

import pytest

from perfchain.constants import G0
from perfchain.errors import InputError
from perfchain.study.runner import compute_study
from perfchain.study.schema import dump_study, load_study, parse_study

EXAMPLES = Path(__file__).resolve().parent.parent / "examples"
STUDIES = sorted(EXAMPLES.glob("*.toml"))

BASE = """
[study]
title = "t"
[[engine]]
name = "E1"
oxidizer = "LOX"
fuel = "RP-1"
mixture_ratio = [2.2, 2.6]
chamber_pressure = "70 bar"
area_ratio = 40
"""


def error_of(text):
    with pytest.raises(InputError) as info:
        parse_study(text)
    message = str(info.value)
    assert "\n" not in message
    return message


def test_there_are_at_least_three_examples():
    assert len(STUDIES) >= 3


@pytest.mark.parametrize("path", STUDIES, ids=lambda p: p.stem)
def test_example_round_trips(path):
    study = load_study(path)
    text = dump_study(study)
    assert parse_study(text) == study
    assert dump_study(parse_study(text)) == text


def test_round_trip_keeps_units_and_custom_ingredients():
    study = parse_study(BASE + """
[[ingredient]]
name = "hexane-x"
formula = { C = 6, H = 14 }
enthalpy = "-198.7 kJ/mol"
density = "655 kg/m**3"
[[blend]]
name = "ethanol-90"
parts = { ethanol = 0.9, water = 0.1 }
[[vehicle]]
name = "V \\"quoted\\""
payload = "0 kg"
[[vehicle.stage]]
engine = "E1"
mass = "3 t"
propellant_fraction = "88 %"
[vehicle.fixed_tank]
engines = ["E1"]
tank_volume = "500 L"
fixed_dry_mass = "40 kg"
tank_mass_per_volume = "0 kg/m**3"
""")
    again = parse_study(dump_study(study))
    assert again == study
    assert again.vehicle[0].stage[0].propellant_fraction == 0.88
    assert again.vehicle[0].fixed_tank.tank_volume == "500 L"


@pytest.mark.parametrize("extra, field, hint", [
    ('feul = "x"', "engine[1].feul", "did you mean 'fuel'"),
    ('efficiency = { cstar_eficiency = 0.9 }', "engine[1].efficiency.cstar_eficiency", "cstar_efficiency"),
])
def test_unknown_keys_suggest_the_intended_one(extra, field, hint):
    message = error_of(BASE + extra)
    assert message.startswith(field + ":") and hint in message


def test_unknown_section_suggests():
    message = error_of(BASE + "[[vehicel]]\nname = 'v'\n")
    assert message.startswith("vehicel:") and "'vehicle'" in message


def test_malformed_toml_gives_line_and_column():
    line = BASE.count("\n") + 1  # the bad line comes right after BASE
    message = error_of(BASE + "thrust = = 3\n")
    assert f"line {line}, column 10" in message


@pytest.mark.parametrize("text, field", [
    (BASE.replace('fuel = "RP-1"\n', ""), "engine[1].fuel"),
    (BASE.replace('[study]\ntitle = "t"\n', ""), "study"),
    (BASE.replace("area_ratio = 40\n", ""), "engine[1].exit"),
])
def test_missing_keys(text, field):
    assert error_of(text).startswith(field + ":")


@pytest.mark.parametrize("key, value, field", [
    ("chamber_pressure", '"70"', "engine[1].chamber_pressure"),       # bare number as text
    ("chamber_pressure", "70", "engine[1].chamber_pressure"),         # bare number
    ("chamber_pressure", '"70 kg"', "engine[1].chamber_pressure"),    # wrong kind of unit
    ("thrust", '"3 bar"', "engine[1].thrust"),
])
def test_wrong_units(key, value, field):
    text = BASE.replace('chamber_pressure = "70 bar"', "") + f"{key} = {value}\n"
    if key != "chamber_pressure":
        text = BASE + f"{key} = {value}\n"
    message = error_of(text)
    assert message.startswith(field) and "with a unit" in message


def test_undefined_engine_reference():
    message = error_of(BASE + '[[vehicle]]\nname = "V"\npayload = "1 t"\n'
                       '[[vehicle.stage]]\nengine = "E2"\ndry = "1 t"\npropellant = "5 t"\n')
    assert message.startswith("vehicle[1].stage[1].engine: got 'E2'") and "'E1'" in message


def test_undefined_ingredient_reference():
    study = parse_study(BASE.replace('"RP-1"', '"RP-2"'))
    with pytest.raises(InputError) as info:
        compute_study(study)
    assert str(info.value).startswith("engine[1].fuel: got 'RP-2'")


def test_blend_of_undefined_ingredient():
    study = parse_study(BASE + '[[blend]]\nname = "mix"\nparts = { ethanol = 0.5, watr = 0.5 }\n')
    with pytest.raises(InputError) as info:
        compute_study(study)
    assert str(info.value).startswith("blend[1].parts: got 'watr'")


def test_stage_mass_sets_as_the_deltav_command():
    message = error_of(BASE + '[[vehicle]]\nname = "V"\npayload = "1 t"\n'
                       '[[vehicle.stage]]\nisp = "300 s"\ndry = "1 t"\nmass = "5 t"\n')
    assert message.startswith("vehicle[1].stage[1].masses:")


def _compute(path, **kw):
    if not kw:   # the shared, computed-once result (tests/conftest.py)
        from conftest import example_result

        return example_result(Path(path).stem)
    return compute_study(load_study(path), max_list=2, **kw)


def test_upper_stage_example_budgets():
    res = _compute(EXAMPLES / "upper_stage_trade.toml")
    assert set(res.grids) == {"Moth-M", "Moth-K", "Moth-H"}
    assert all((g.status == "ok").all() for g in res.grids.values())
    for vehicle in res.vehicles:
        stages = [s for s in res.stages if s["vehicle"] == vehicle["vehicle"]]
        # rocket equation dv = c ln(m0/mf), stage by stage (closed form)
        for s in stages:
            assert math.isclose(s["delta_v"], s["exhaust_velocity"] * math.log(s["initial_mass"] / s["burnout_mass"]),
                                rel_tol=1e-12)
        assert math.isclose(vehicle["total_delta_v"], sum(s["delta_v"] for s in stages), rel_tol=1e-12)
        # the upper stage flies the engine's delivered vacuum exhaust velocity
        top = stages[-1]
        assert math.isclose(top["exhaust_velocity"], res.design[top["engine"]].delivered["exhaust_velocity_vacuum"])
    # LOX/LH2 has the highest vacuum Isp and the lowest bulk density of the three
    # (Sutton & Biblarz, Rocket Propulsion Elements, Table 5-5; from memory)
    rows = {r["pair"]: r for r in res.comparisons["Upper-stage pairs at 50 bar, area ratio 80"]}
    assert max(rows, key=lambda p: rows[p]["isp_vacuum"]) == "LOX/LH2"
    assert min(rows, key=lambda p: rows[p]["bulk_density"]) == "LOX/LH2"


def test_test_stand_example_sizing_and_separation():
    res = _compute(EXAMPLES / "student_test_stand.toml")
    short, long_ = res.design["Pebble-3"], res.design["Pebble-3X"]
    for p in (short, long_):
        # sizing closed forms: mdot = F / (Isp g0), At = mdot c* / pc (Sutton & Biblarz ch. 3)
        mdot = 3000.0 / (p.delivered["isp_ambient"] * G0)
        assert math.isclose(p.sizing["mass_flow"], mdot, rel_tol=1e-9)
        assert math.isclose(p.sizing["throat_area"], mdot * p.delivered["cstar"] / p.chamber_pressure, rel_tol=1e-9)
        assert p.altitude == 0.0 and math.isclose(p.ambient_pressure, 101325.0, rel_tol=1e-9)
    # Summerfield criterion pe/pa < 0.4 (Summerfield et al. 1954; common practice): the
    # area-ratio-8 nozzle separates at sea level at 20 bar, the 4.5 one does not
    assert long_.separation["flag"] and not short.separation["flag"]
    assert long_.exit.pressure / 101325.0 < 0.4 < short.exit.pressure / 101325.0


def test_kick_stage_example_fixed_tank():
    res = _compute(EXAMPLES / "kick_stage_storables.toml")
    table = res.fixed_tank[0]
    assert (table.status == "ok").all()
    # fixed-tank rocket equation: mp = rho V, mf = payload + fixed dry + k V (closed form)
    mf = 120.0 + 45.0 + 30.0 * 0.25
    for _, r in table.iterrows():
        assert math.isclose(r.propellant_mass, r.bulk_density * 0.25, rel_tol=1e-12)
        assert math.isclose(r.delta_v, r.exhaust_velocity * math.log((mf + r.propellant_mass) / mf), rel_tol=1e-12)
    # N2O4 is denser than MMH, so the delta-v optimum lies at a higher O/F than the Isp
    # optimum (the module's closed-form argument in perfchain.study.tradeoff)
    n = next(b for b in res.fixed_tank_best if b["pair"] == "N2O4/MMH")
    assert n["delta_v_mixture_ratio"] > n["isp_mixture_ratio"] and n["delta_v_gain"] >= 0
