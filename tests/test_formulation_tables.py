"""Formulations in sweeps, comparisons and study files, and the two examples built on them
(a solid kick motor, a university-style N2O hybrid) run end to end."""

import json
import math
import sys
from pathlib import Path

import pandas as pd
import pytest
from click.testing import CliRunner

import perfchain as pc
from perfchain.cli.main import main
from perfchain.constants import G0
from perfchain.errors import InputError
from perfchain.propellants.formulation import make_formulation
from perfchain.study.runner import compute_study
from perfchain.study.schema import dump_study, parse_study

sys.path.insert(0, str(Path(__file__).parent))
from plain_reference import plain_shifting_point  # noqa: E402

EXAMPLES = Path(__file__).resolve().parent.parent / "examples"
DOUBLE_BASE = "NC=0.57, NG=0.43"   # C, H, O, N only: every product species is in the data


def cli(*args):
    return CliRunner().invoke(main, list(args))


def one_line(res) -> str:
    assert res.exit_code == 2, res.output
    out = res.output.strip()
    assert out.count("\n") == 0 and "Traceback" not in out and out.startswith("error: ")
    return out


# --- sweeps --------------------------------------------------------------------------------

def test_a_formulation_sweeps_without_an_o_f_axis():
    df = pc.sweep(propellant=DOUBLE_BASE, chamber_pressure="40 bar,70 bar", area_ratio="10,60",
                  ambient_pressure="1 atm,0 Pa")
    assert len(df) == 8 and set(df.status) == {"ok"}
    assert df.attrs["perfchain"]["grid_order"] == ["chamber_pressure", "area_ratio", "ambient_pressure", "flow"]
    assert df.propellant.unique().tolist() == [DOUBLE_BASE] and df.mixture_ratio.isna().all()
    assert df.oxidizer.isna().all() and df.attrs["units"]["propellant"] == ""
    # rows never mix: each row is the number the point gets alone
    row = df[(df.chamber_pressure == 70e5) & (df.area_ratio == 60) & (df.ambient_pressure == 0)].iloc[0]
    alone = pc.point(propellant=DOUBLE_BASE, chamber_pressure="70 bar", area_ratio=60, ambient_pressure="0 Pa")
    assert row.isp_vacuum == alone.isp_vacuum and row.chamber_temperature == alone.chamber.temperature


def test_sweep_tables_carry_the_reactants_of_every_point():
    """A table's provenance states, per mixture ratio, the reactants block a point's JSON has (so
    each row can be recomputed); it is the point's own, and the point's block recomputes its
    chamber independently (test_propellant_points.py::test_reactants_block_recomputes_the_same_chamber)."""
    grain = pc.sweep(propellant=DOUBLE_BASE, chamber_pressure="40 bar", area_ratio=10).attrs["perfchain"]
    alone = pc.point(propellant=DOUBLE_BASE, chamber_pressure="40 bar", area_ratio=10).to_dict()["reactants"]
    assert grain["reactants"] == [{"mixture_ratio": None, **alone}]
    pair = pc.sweep("LOX", "RP-1", mixture_ratio="2.2,2.6", chamber_pressure="70 bar", area_ratio=10).attrs
    by_ratio = {r["mixture_ratio"]: r for r in pair["perfchain"]["reactants"]}
    point = pc.point(oxidizer="LOX", fuel="RP-1", mixture_ratio=2.6, chamber_pressure="70 bar", area_ratio=10)
    assert sorted(by_ratio) == [2.2, 2.6] and by_ratio[2.6]["elements"] == point.to_dict()["reactants"]["elements"]
    assert by_ratio[2.6]["enthalpy"] == point.reactant_enthalpy


def test_sweep_rows_against_the_plain_equilibrium():
    # an independent shifting calculation (tests/plain_reference.py: every NASA gas species of the
    # elements, Cantera's own solver, the throat by maximum mass flux)
    df = pc.sweep(propellant=DOUBLE_BASE, chamber_pressure="1000 psi", exit_pressure="1 atm")
    ref = plain_shifting_point(make_formulation(DOUBLE_BASE), 6894757.293168361, exit_pressure=101325.0)
    assert df.chamber_temperature[0] == pytest.approx(ref["chamber_temperature"], rel=1e-9)
    assert df.isp_ambient[0] == pytest.approx(ref["isp_ambient"], rel=1e-8)


def test_sweep_takes_ingredient_records_in_a_formulation():
    mine = pc.custom_ingredient("my-ng", {"C": 3, "H": 5, "N": 3, "O": 9}, "-370.8 kJ/mol", phase="liquid",
                                monopropellant=True)   # nitroglycerine, NIST Chemistry WebBook (from memory)
    df = pc.sweep(propellant={"NC": 0.57, mine: 0.43}, chamber_pressure="40 bar", area_ratio="10,20", workers=2)
    assert list(df.status) == ["ok", "ok"]
    assert df.attrs["perfchain"]["inputs"]["propellant"][1][0]["name"] == "my-ng"   # the record, kept


def test_cli_sweep_with_a_propellant(tmp_path):
    out = tmp_path / "t.csv"
    res = cli("sweep", "--propellant", "H2O2-98", "--chamber-pressure", "10 bar,20 bar", "--area-ratio", "10",
              "--out", str(out))
    assert res.exit_code == 0, res.output
    table = pd.read_csv(out)
    assert table.propellant.tolist() == ["H2O2-98", "H2O2-98"] and table.mixture_ratio.isna().all()
    meta = json.loads((tmp_path / "t.csv.meta.json").read_text())
    assert meta["options"]["propellant"] == "H2O2-98" and meta["units"]["propellant"] == ""


@pytest.mark.parametrize("args, start", [
    (["--propellant", "H2O2-98", "--mixture-ratio", "2,3"], "error: mixture_ratio: got '2,3'"),
    (["--propellant", "H2O2-98", "--fuel", "RP-1"], "error: propellant: got 'H2O2-98'"),
    (["--oxidizer", "LOX", "--fuel", "RP-1"], "error: mixture_ratio: got None"),
    (["--propellant", "AP=0.7, HTPB=0.2"], "error: propellant: got 'AP=0.7, HTPB=0.2'"),
])
def test_cli_sweep_refuses_in_one_line(args, start):
    line = one_line(cli("sweep", *args, "--chamber-pressure", "10 bar", "--area-ratio", "10"))
    assert line.startswith(start)


# --- comparisons ---------------------------------------------------------------------------

def test_formulations_stand_beside_pairs_in_compare():
    res = cli("compare", "--pair", "N2O4/MMH", "--propellant", DOUBLE_BASE, "--propellant", "H2O2-98",
              "--chamber-pressure", "20 bar", "--area-ratio", "40", "--ambient-pressure", "0 Pa", "--json")
    assert res.exit_code == 0, res.output
    rows = json.loads(res.output)["pairs"]
    assert [r["pair"] for r in rows] == ["N2O4/MMH", DOUBLE_BASE, "H2O2-98"]   # ranked by vacuum Isp
    db = rows[1]
    assert db["mixture_ratio"] is None and db["oxidizer"] is None and db["at_bound"] is False
    alone = pc.point(propellant=DOUBLE_BASE, chamber_pressure="20 bar", area_ratio=40, ambient_pressure="0 Pa")
    assert db["isp_vacuum"] == alone.isp_vacuum
    assert db["density_isp"] == pytest.approx(alone.bulk_density * alone.isp_vacuum, rel=1e-15)  # definition


def test_readable_compare_carries_the_cautions_of_what_it_compares():
    # the project's safety rule: every readable result a team could act on carries the caution;
    # a solid formulation adds the explosives one, a monopropellant its own (as `point` does)
    # N2O (the usual hybrid oxidizer) adds its tank hazard: self-pressurizing, can decompose
    # explosively (common practice in hybrid-motor safety guidance; from memory)
    from perfchain.api.point_layout import CAUTION, MONOPROPELLANT_CAUTION, NITROUS_CAUTION, SOLID_CAUTION

    args = ("--chamber-pressure", "20 bar", "--area-ratio", "10")
    res = cli("compare", "--pair", "N2O/paraffin", "--propellant", "AP=0.86, HTPB=0.14", *args)
    assert res.exit_code == 0, res.output
    assert res.output.rstrip().endswith(SOLID_CAUTION + "\n" + NITROUS_CAUTION + "\n" + CAUTION)
    pairs = cli("compare", "--pair", "LOX/RP-1", "--propellant", "H2O2-98", *args).output
    assert MONOPROPELLANT_CAUTION in pairs and SOLID_CAUTION not in pairs and pairs.rstrip().endswith(CAUTION)
    assert NITROUS_CAUTION not in pairs
    cold = cli("point", "--oxidizer", "N2O @ 270 K", "--fuel", "HTPB", "--mixture-ratio", "6", *args).output
    assert NITROUS_CAUTION in cold and cold.rstrip().endswith(CAUTION)
    lox = cli("point", "--oxidizer", "LOX", "--fuel", "paraffin", "--mixture-ratio", "2.4", *args).output
    assert NITROUS_CAUTION not in lox and lox.rstrip().endswith(CAUTION)


def test_api_compare_with_propellants_only():
    df = pc.compare(propellants=["H2O2-90", "H2O2-98"], chamber_pressure="10 bar", area_ratio=20)
    # more peroxide, more energy: 98 % beats 90 % (Sutton & Biblarz, monopropellant table; from memory)
    assert df.pair.tolist() == ["H2O2-98", "H2O2-90"] and df.mixture_ratio.isna().all()


def test_compare_refuses_in_one_line():
    assert one_line(cli("compare", "--chamber-pressure", "20 bar", "--area-ratio", "10")).startswith(
        "error: pair: got 'none'")
    line = one_line(cli("compare", "--propellant", "H2O2-98", "--propellant", "htp-98", "--chamber-pressure",
                        "20 bar", "--area-ratio", "10"))
    assert "distinct propellants" in line


# --- study files ---------------------------------------------------------------------------

STUDY = """
[study]
title = "formulation engines (invented Osprey motors)"
[[engine]]
name = "Osprey-S"
propellant = "NC=0.57, NG=0.43"
chamber_pressure = ["40 bar", "70 bar"]
area_ratio = [10, 40]
ambient_pressure = ["0 Pa"]
thrust = "20 kN"
[[engine]]
name = "Osprey-M"
propellant = { "H2O2-98" = 1.0 }
chamber_pressure = "10 bar"
area_ratio = 20
[[comparison]]
name = "beside"
pairs = ["N2O/paraffin"]
propellants = ["NC=0.57, NG=0.43", { "H2O2-98" = 1.0 }]
chamber_pressure = "30 bar"
area_ratio = 10
ambient_pressure = "0 Pa"
[[vehicle]]
name = "Kick (invented)"
payload = "100 kg"
[[vehicle.stage]]
engine = "Osprey-S"
structural_ratio = 0.12
propellant = "400 kg"
"""


def test_study_with_formulation_engines():
    study = parse_study(STUDY)
    assert parse_study(dump_study(study)) == study
    res = compute_study(study)
    assert res.optima["Osprey-S"] == [] and "optima" not in res.tables
    grid = res.grids["Osprey-S"]
    assert len(grid) == 4 and set(grid.status) == {"ok"} and grid.mixture_ratio.isna().all()
    design = res.design["Osprey-S"]
    assert design.propellant == DOUBLE_BASE and design.sizing["oxidizer_mass_flow"] is None
    assert design.chamber_pressure == 40e5 and design.area_ratio == 10.0   # the first of each list
    assert [r["pair"] for r in res.comparisons["beside"]][1:] == [DOUBLE_BASE, "H2O2-98"]
    stage = res.stages[0]
    assert stage["pair"] == DOUBLE_BASE and stage["mixture_ratio"] is None
    # rocket equation, m0/mf = (400 + 0.12/0.88*400 + 100) / (0.12/0.88*400 + 100) (Tsiolkovsky)
    dry = 0.12 / 0.88 * 400
    want = stage["exhaust_velocity"] * math.log((400 + dry + 100) / (dry + 100))
    assert res.vehicles[0]["total_delta_v"] == pytest.approx(want, rel=1e-12)


@pytest.mark.parametrize("change, start, words", [
    ('oxidizer = "LOX"\n', "engine[1].oxidizer", "only with oxidizer and fuel"),
    ('mixture_ratio = [2.0]\n', "engine[1].mixture_ratio", "has none of"),
    ('propellant = "NC=0.5, NG=0.4"\n', "engine[1].propellant", "these sum to 0.9"),
])
def test_bad_formulation_engines_are_one_line(change, start, words):
    text = ('[study]\ntitle = "t"\n[[engine]]\nname = "E"\nchamber_pressure = "40 bar"\narea_ratio = 10\n'
            + ('propellant = "NC=0.57, NG=0.43"\n' if not change.startswith("propellant") else "") + change)
    with pytest.raises(InputError) as info:
        compute_study(parse_study(text))
    message = str(info.value)
    assert message.startswith(start) and words in message and "\n" not in message


def test_an_engine_needs_a_propellant_of_some_kind():
    with pytest.raises(InputError) as info:
        parse_study('[study]\ntitle = "t"\n[[engine]]\nname = "E"\nchamber_pressure = "40 bar"\narea_ratio = 10\n')
    assert str(info.value).startswith("engine[1].oxidizer: got 'missing'") and "propellant" in str(info.value)


def test_o_f_trades_refuse_a_formulation_engine():
    # refused when the study is read (parse_study), before any grid is computed
    stage_of = STUDY.replace('structural_ratio = 0.12', 'structural_ratio = 0.12\nmixture_ratio = 2.0')
    with pytest.raises(InputError) as info:
        parse_study(stage_of)
    assert info.value.field == "vehicle[1].stage[1].mixture_ratio" and "no O/F" in str(info.value)
    tank = STUDY + ('[vehicle.fixed_tank]\nengines = ["Osprey-S"]\ntank_volume = "0.3 m**3"\n'
                    'fixed_dry_mass = "40 kg"\ntank_mass_per_volume = "15 kg/m**3"\n')
    with pytest.raises(InputError) as info:
        parse_study(tank)
    assert "fixed_tank" in info.value.field and "formulation" in str(info.value)


def test_a_stage_engine_may_burn_a_formulation():
    """`deltav --stage "formulation=..."` and pc.delta_v(dict(formulation=...)): the stage's exhaust
    velocity is the point's own (pc.point with propellant=...), then the rocket equation
    (Tsiolkovsky: dv = c ln(m0/mf))."""
    grain = "AP=0.68, Al=0.18, HTPB=0.14"
    engine = "chamber_pressure=55 bar, area_ratio=60, cstar_efficiency=0.97"
    res = cli("deltav", "--payload", "300 kg", "--stage", f"formulation={grain}, {engine}, propellant=390 kg, "
              "structural_ratio=0.1", "--json")
    assert res.exit_code == 0, res.output
    stage = json.loads(res.output)["stages"][0]
    alone = pc.point(propellant=grain, chamber_pressure="55 bar", area_ratio=60, cstar_efficiency=0.97)
    c = alone.delivered["exhaust_velocity_vacuum"]
    assert stage["exhaust_velocity"] == pytest.approx(c, rel=1e-12)
    dry = 0.1 / 0.9 * 390
    assert stage["delta_v"] == pytest.approx(c * math.log((390 + dry + 300) / (dry + 300)), rel=1e-12)
    py = pc.delta_v([dict(formulation={"AP": 0.68, "Al": 0.18, "HTPB": 0.14}, chamber_pressure="55 bar",
                          area_ratio=60, cstar_efficiency=0.97, propellant_mass="390 kg", structural_ratio=0.1)],
                    "300 kg")
    assert py.total_delta_v == pytest.approx(stage["delta_v"], rel=1e-12)
    mono = cli("deltav", "--payload", "30 kg", "--stage", "formulation=N2H4, ammonia_dissociation=0.4, "
               "chamber_pressure=10 bar, area_ratio=50, propellant=100 kg, dry=60 kg")
    assert mono.exit_code == 0 and "N2H4, 10 bar, area ratio 50, frozen" in mono.output


@pytest.mark.parametrize("stage, start", [
    ("formulation=AP=0.68, Al=0.18, HTPB=0.15", "error: --stage 1: formulation: got 'AP=0.68, Al=0.18, HTPB=0.15'"),
    ("formulation=AP=0.86, HTPB=0.14, oxidizer=LOX", "error: --stage 1: formulation:"),
    ("formulation=AP=0.86, HTPB=0.14, mixture_ratio=2", "error: --stage 1: mixture_ratio: got '2'"),
    ("formulation=H2O2-98, ammonia_dissociation=0.3", "error: --stage 1: ammonia_dissociation: got '0.3'"),
])
def test_stage_formulation_refusals_are_one_line(stage, start):
    line = one_line(cli("deltav", "--payload", "30 kg", "--stage", f"{stage}, chamber_pressure=20 bar, "
                        "area_ratio=20, propellant=100 kg, dry=60 kg"))
    assert line.startswith(start)


# --- the two examples, end to end ------------------------------------------------------------

def run_example(name, tmp_path):
    out = tmp_path / name
    res = cli("run", str(EXAMPLES / f"{name}.toml"), "--out", str(out))
    assert res.exit_code == 0, res.output
    assert (out / "report.html").is_file() and (out / "study.toml").is_file()
    return out / "tables", (out / "report.html").read_text()


def test_solid_kick_motor_example(tmp_path):
    tables, report = run_example("solid_kick_motor", tmp_path)
    assert "explosive" in report and "invented" in report
    # the default two-phase loss is named with its source and range beside the design point
    from perfchain.performance.losses_two_phase import TWO_PHASE_SOURCE

    assert "Note: two-phase flow loss" in report and TWO_PHASE_SOURCE.replace("&", "&amp;") in report
    assert "ammonium perchlorate" in report.split("Safety.")[1][:800]   # the report's own safety paragraph
    grid = pd.read_csv(tables / "engine-petrel-k-grid.csv")
    assert len(grid) == 12 and set(grid.status) == {"ok"}
    # vacuum Isp rises with area ratio at every chamber pressure (ideal nozzle; closed-form trend)
    for _, line in grid.groupby("chamber_pressure"):
        isp = line.sort_values("area_ratio").isp_vacuum.tolist()
        assert all(a < b for a, b in zip(isp, isp[1:]))
    vehicle = pd.read_csv(tables / "vehicles.csv").iloc[0]
    stage = pd.read_csv(tables / "vehicle-stages.csv").iloc[0]
    # rocket equation (Tsiolkovsky): the stage's delta-v from its own exhaust velocity and masses
    assert stage.delta_v == pytest.approx(stage.exhaust_velocity * math.log(stage.mass_ratio), rel=1e-12)
    assert vehicle.total_delta_v == pytest.approx(stage.delta_v, rel=1e-12) and vehicle.total_delta_v > 2000
    assert stage.isp == pytest.approx(stage.exhaust_velocity / G0, rel=1e-12)


def test_university_hybrid_example(tmp_path):
    tables, report = run_example("university_hybrid", tmp_path)
    assert "decompose explosively" in report
    optima = pd.read_csv(tables / "optima.csv")
    best = optima[(optima.engine == "Gorse-P") & (optima.objective == "isp_ambient")]
    # N2O/paraffin peaks near O/F 7-8 (hybrid-rocket literature, Karabeyoglu et al.; from memory, loose)
    assert ((best.mixture_ratio > 7.0) & (best.mixture_ratio < 9.0)).all()
    # sea-level Isp near 230-240 s at 20-25 bar, area ratio 4.5 (same literature; from memory, loose)
    assert ((best.objective_value > 220) & (best.objective_value < 245)).all()
    comparison = pd.read_csv(tables / "comparisons.csv")
    assert comparison.pair.str.startswith("N2O@278.15K/").all() and len(comparison) == 3
