"""The Python API (`import perfchain as pc`): same inputs and numbers as the CLI, units at the edge."""

import json
import subprocess
import sys

import numpy as np
import pint
import pytest
from click.testing import CliRunner

import perfchain as pc
from perfchain.cli.main import main
from perfchain.errors import InputError

POINT = dict(oxidizer="LOX", fuel="RP-1", mixture_ratio=2.6, chamber_pressure="70 bar", area_ratio=40)


def cli_json(*args):
    res = CliRunner().invoke(main, list(args))
    assert res.exit_code == 0, res.output
    return json.loads(res.output)


@pytest.fixture(scope="module")
def lox_rp1():
    return pc.point(**POINT)


# ------------------------------------------------------------------ import
def test_import_perfchain_loads_nothing_heavy():
    # the top level is a lazy table: no solver, pandas or numpy until a name is used
    code = ("import sys, perfchain; "
            "print(sorted(m for m in ('cantera', 'pandas', 'numpy', 'pint', 'scipy', 'perfchain.api') "
            "if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]"


def test_every_public_name_resolves():
    for name in pc.__all__:
        assert getattr(pc, name) is not None, name
    with pytest.raises(AttributeError):
        pc.no_such_name


# ------------------------------------------------------------------ point
def test_point_equals_the_cli_json_exactly(lox_rp1):
    d = cli_json("point", "--oxidizer", "LOX", "--fuel", "RP-1", "--mixture-ratio", "2.6",
                 "--chamber-pressure", "70 bar", "--area-ratio", "40", "--json")
    assert json.loads(json.dumps(lox_rp1.to_dict())) == d


def test_point_with_delivered_blocks_equals_the_cli_json():
    r = pc.point(oxidizer="N2O4", fuel="MMH", fuel_percent=40, chamber_pressure="10 bar", area_ratio=100,
                 ambient_pressure="0 Pa", cstar_efficiency=0.97, nozzle_half_angle="15 deg",
                 contraction_ratio=3, thrust="400 N")
    d = cli_json("point", "--oxidizer", "N2O4", "--fuel", "MMH", "--fuel-percent", "40", "--chamber-pressure",
                 "10 bar", "--area-ratio", "100", "--ambient-pressure", "0 Pa", "--cstar-efficiency", "0.97",
                 "--nozzle-half-angle", "15 deg", "--contraction-ratio", "3", "--thrust", "400 N", "--json")
    assert json.loads(json.dumps(r.to_dict())) == d
    # delivered c* is the ideal c* times the c* efficiency, by its definition
    assert r.delivered["cstar"] == pytest.approx(0.97 * r.cstar, rel=1e-12)


@pytest.mark.parametrize("pressure", [pc.Q_(70, "bar"), pint.UnitRegistry().Quantity(7, "MPa"), 7e6,
                                      np.int64(7_000_000), np.float64(7e6)])
def test_quantities_and_numpy_scalars_give_the_same_point(lox_rp1, pressure):
    r = pc.point(oxidizer="LOX", fuel="RP-1", mixture_ratio=np.float64(2.6), chamber_pressure=pressure,
                 area_ratio=np.int64(40))
    assert r.to_dict() == lox_rp1.to_dict()


def test_point_reads_well(lox_rp1):
    text = repr(lox_rp1)
    assert text.startswith("perfchain | LOX / RP-1 | shifting flow") and "licensed practice" in text
    html = lox_rp1._repr_html_()
    assert html.startswith("<div") and "c*" in html and "licensed practice" in html


def test_vacuum_and_ambient_isp_differ_by_the_pressure_thrust(lox_rp1):
    # closed form: c_vac - c_amb = p_a eps c* / p_c (thrust coefficient definition), for a
    # nozzle that flows full (at sea level this one separates: perfchain.performance.ambient)
    r = pc.point(**POINT, ambient_pressure="0.2 bar")
    assert r.flows_full and not lox_rp1.flows_full
    lhs = (r.isp_vacuum - r.isp_ambient) * pc.G0
    assert lhs == pytest.approx(r.ambient_pressure * r.area_ratio * r.cstar / r.chamber_pressure, rel=1e-12)


def test_lox_rp1_against_sutton_table_5_5():
    # Sutton & Biblarz, Rocket Propulsion Elements, Table 5-5 (from memory, so +/- 1.5 %):
    # LOX/RP-1, 1000 psia, O/F 2.56, shifting, expanded to 1 atm: Tc 3676 K, c* 1799 m/s, Isp 300 s
    r = pc.point(oxidizer="LOX", fuel="RP-1", mixture_ratio=2.56, chamber_pressure=pc.Q_(1000, "psi"),
                 exit_pressure="1 atm")
    assert r.chamber.temperature == pytest.approx(3676, rel=0.015)
    assert r.cstar == pytest.approx(1799, rel=0.015)
    assert r.isp_ambient == pytest.approx(300, rel=0.015)


@pytest.mark.parametrize("bad, start", [
    (dict(chamber_pressure="70"), "chamber_pressure: got '70'; allowed: a pressure with a unit"),
    (dict(chamber_pressure=pc.Q_(-3, "bar")), "chamber_pressure: got '-3 bar'; allowed: a pressure above 0 Pa"),
    (dict(area_ratio="abc"), "area_ratio: got 'abc'; allowed: an exit/throat area ratio above 1"),
    (dict(mixture_ratio=np.float64(-1.0)), "mixture_ratio: got -1.0; allowed: an O/F by mass above 0"),
    (dict(oxidizer="LOXX"), "oxidizer: got 'LOXX'; allowed: a known ingredient"),
    (dict(area_ratio=None, exit_pressure="80 bar"), "exit_pressure: got '80 bar'; allowed: a pressure below"),
    (dict(altitude="90 km"), "altitude: got '90 km'; allowed: an altitude from 0 to 86 km"),
])
def test_bad_inputs_are_one_line_naming_field_and_typed_value(bad, start):
    with pytest.raises(InputError) as info:
        pc.point(**{**POINT, **bad})
    assert str(info.value).startswith(start), str(info.value)
    assert "\n" not in str(info.value)


# ------------------------------------------------------------------ ingredients
def test_ingredients_listing_matches_the_cli():
    table = pc.ingredients()
    rows = cli_json("ingredients", "--json")
    assert table["name"].tolist() == [r["name"] for r in rows]
    assert table.attrs["units"]["enthalpy"] == "J/kg"


def test_custom_ingredients_and_blends_run_through_point():
    # NIST-JANAF: CH4(g) enthalpy of formation -74.87 kJ/mol; the same gas as a custom record
    ch4 = pc.custom_ingredient("my-methane", {"C": np.int64(1), "H": 4}, pc.Q_(-74.87, "kJ/mol"), phase="gas")
    assert ch4.molar_mass == pytest.approx(16.043, abs=1e-3)   # IUPAC atomic weights
    mix = pc.blend("my-fuel", {ch4: np.float64(0.5), "GCH4": 0.5})
    r = pc.point(oxidizer="GOX", fuel=mix, equivalence_ratio=1.0, chamber_pressure="10 bar", area_ratio=10)
    assert r.fuel == "my-fuel" and r.isp_vacuum > 0


# ------------------------------------------------------------------ sweep
GRID = dict(mixture_ratio="2.2:2.6:0.4", chamber_pressure="50 bar,70 bar", area_ratio=[10, 40])


@pytest.fixture(scope="module")
def table():
    return pc.sweep("LOX", "RP-1", **GRID)


def test_sweep_has_the_cli_columns_and_values(table):
    import io

    import pandas as pd

    res = CliRunner().invoke(main, ["sweep", "--oxidizer", "LOX", "--fuel", "RP-1", "--mixture-ratio", "2.2,2.6",
                                    "--chamber-pressure", "50 bar,70 bar", "--area-ratio", "10,40", "--workers", "1"])
    assert res.exit_code == 0, res.output
    cli = pd.read_csv(io.StringIO(res.output))
    assert list(table.columns) == list(cli.columns)
    assert table.mixture_ratio.tolist() == [2.2, 2.2, 2.2, 2.2, 2.6, 2.6, 2.6, 2.6]
    pd.testing.assert_series_equal(table.isp_vacuum, cli.isp_vacuum)


def test_sweep_units_are_in_attrs(table):
    units = table.attrs["units"]
    assert set(units) == set(table.columns)
    assert (units["chamber_pressure"], units["isp_vacuum"], units["exit_temperature"], units["area_ratio"]) == \
        ("Pa", "s", "K", "1")


def test_sweep_rows_equal_single_points(table):
    row = table.iloc[-1]
    r = pc.point(oxidizer="LOX", fuel="RP-1", mixture_ratio=row.mixture_ratio, chamber_pressure=row.chamber_pressure,
                 area_ratio=row.area_ratio)
    assert (row.isp_vacuum, row.cstar) == (r.isp_vacuum, r.cstar)


@pytest.mark.parametrize("grid", [
    dict(mixture_ratio=[2.2, 2.6], chamber_pressure=[pc.Q_(50, "bar"), 7e6], area_ratio=np.array([10, 40])),
    dict(mixture_ratio=np.array([2.2, 2.6]), chamber_pressure=pc.Q_(np.array([5, 7]), "MPa"), area_ratio="10:40:30"),
])
def test_sweep_grid_forms_agree(table, grid):
    assert pc.sweep("LOX", "RP-1", **grid).isp_vacuum.tolist() == table.isp_vacuum.tolist()


def test_sweep_as_xarray_has_the_grid_axes_as_dimensions(table):
    pytest.importorskip("xarray")
    ds = pc.sweep("LOX", "RP-1", **GRID, ambient_pressure="0 Pa,1 atm", as_xarray=True)
    assert list(ds.sizes) == ["mixture_ratio", "chamber_pressure", "area_ratio", "ambient_pressure", "flow"]
    assert dict(ds.sizes) == {"mixture_ratio": 2, "chamber_pressure": 2, "area_ratio": 2, "ambient_pressure": 2,
                              "flow": 1}
    assert ds.isp_vacuum.attrs["units"] == "s" and ds.chamber_pressure.attrs["units"] == "Pa"
    v = ds.isp_vacuum.sel(mixture_ratio=2.6, chamber_pressure=7e6, area_ratio=40.0, ambient_pressure=0.0,
                          flow="shifting")
    assert float(v) == table.isp_vacuum.iloc[-1]


def test_missing_xarray_is_one_line_naming_the_extra(table, monkeypatch):
    monkeypatch.setitem(sys.modules, "xarray", None)   # import xarray now raises ImportError
    with pytest.raises(pc.PerfchainError) as info:
        pc.to_xarray(table)
    assert "\n" not in str(info.value) and "perfchain[xarray]" in str(info.value)


def test_sweep_takes_ingredients_of_your_own():
    # a blend of RP-1 with itself is RP-1: same elements and enthalpy per kg (ideal mixing)
    twin = pc.blend("my-kerosene", {"RP-1": np.float64(0.5), pc.ingredient("RP-1"): 0.5})
    a = pc.sweep("LOX", twin, mixture_ratio=[2.2, 2.6], chamber_pressure="70 bar", area_ratio=40)
    b = pc.sweep("LOX", "RP-1", mixture_ratio=[2.2, 2.6], chamber_pressure="70 bar", area_ratio=40)
    assert a.fuel.unique().tolist() == ["my-kerosene"] and list(a.status) == ["ok", "ok"]
    assert a.isp_vacuum.tolist() == pytest.approx(b.isp_vacuum.tolist(), rel=1e-9)
    assert a.attrs["perfchain"]["inputs"]["fuel"]["name"] == "my-kerosene"   # the record in the provenance


def test_sweep_with_own_ingredients_in_worker_processes():
    twin = pc.blend("my-kerosene", {"RP-1": 1.0})
    one = pc.sweep("LOX", twin, mixture_ratio=[2.2, 2.6], chamber_pressure="70 bar", area_ratio=40)
    two = pc.sweep("LOX", twin, mixture_ratio=[2.2, 2.6], chamber_pressure="70 bar", area_ratio=40, workers=2)
    assert one.equals(two)


@pytest.mark.parametrize("bad, start", [
    (dict(mixture_ratio="2.2,abc"), "mixture_ratio: got 'abc'"),
    (dict(chamber_pressure="50,70"), "chamber_pressure: got '50'"),
    (dict(area_ratio="40:10:5"), "area_ratio: got '40:10:5'"),
    (dict(workers=0), "workers: got 0"),
    (dict(chunk_solves="many"), "chunk_solves: got 'many'"),
    (dict(flow="shifting,sideways"), "flow: got 'sideways'"),
])
def test_bad_sweep_inputs_are_one_line(bad, start):
    with pytest.raises(InputError) as info:
        pc.sweep("LOX", "RP-1", **{**GRID, **bad})
    assert str(info.value).startswith(start), str(info.value)


# ------------------------------------------------------------------ compare, optimum
def test_compare_equals_the_cli_json():
    df = pc.compare(["LOX/RP-1", ("LOX", "LCH4")], chamber_pressure="70 bar", area_ratio=40)
    d = cli_json("compare", "--pair", "LOX/RP-1", "--pair", "LOX/LCH4", "--chamber-pressure", "70 bar",
                 "--area-ratio", "40", "--json")
    # the JSON rows also carry each row's reactants block (a nested record, not a table column)
    rows = [{k: v for k, v in r.items() if k != "reactants"} for r in d["pairs"]]
    assert all(r["reactants"]["elements"] for r in d["pairs"])
    assert df[list(rows[0])].to_dict(orient="records") == rows
    assert df.attrs["units"]["isp_vacuum"] == "s" and df.attrs["units"]["density_isp"] == "kg s/m^3"


def test_compare_over_a_grid_ranks_within_each_point():
    df = pc.compare(["LOX/RP-1", "LOX/LH2"], chamber_pressure="70 bar", area_ratio="10,40")
    assert df.area_ratio.tolist() == [10.0, 10.0, 40.0, 40.0] and df["rank"].tolist() == [1, 2, 1, 2]
    # Sutton & Biblarz, Table 5-5 (from memory): LOX/LH2 has the higher Isp at every area ratio
    assert df.pair.tolist() == ["LOX/LH2", "LOX/RP-1"] * 2


def test_optimum_point_is_a_point_result():
    o = pc.optimum("LOX", "RP-1", chamber_pressure="70 bar", area_ratio=40, altitude="0 km")
    assert isinstance(o.performance, pc.PointResult) and o.performance.mixture_ratio == o.mixture_ratio
    # the optimum is no worse than its neighbours (definition of a maximum)
    for r in (o.mixture_ratio * 0.97, o.mixture_ratio * 1.03):
        assert pc.point(oxidizer="LOX", fuel="RP-1", mixture_ratio=r, chamber_pressure="70 bar",
                        area_ratio=40).isp_vacuum <= o.value + 1e-9


# ------------------------------------------------------------------ vehicle
CURTIS = "isp=350 s, dry=28.5 t, propellant=161.5 t"


def test_delta_v_equals_the_cli_json():
    r = pc.delta_v([CURTIS], "10 t", target="5 km/s")
    assert r.to_dict() == cli_json("deltav", "--payload", "10 t", "--stage", CURTIS, "--target", "5 km/s", "--json")
    assert "total delta-v" in repr(r)


def test_curtis_stage_in_every_form():
    # Curtis, Orbital Mechanics for Engineering Students (from memory); closed form with exact g0:
    # 350 s * 9.80665 m/s^2 * ln(200 / 38.5)
    import math

    expected = 350 * pc.G0 * math.log(200 / 38.5)
    for stage in (CURTIS, pc.stage(isp=pc.Q_(350, "s"), dry_mass="28.5 t", propellant_mass=np.float64(161500)),
                  {"isp": "350 s", "total_mass": "190 t", "propellant_fraction": "85 %"},
                  pc.stage(isp=350, propellant_mass="161.5 t", structural_ratio=0.15)):
        assert pc.delta_v(stage, pc.Q_(10, "t")).total_delta_v == pytest.approx(expected, rel=1e-12)


def test_inverse_problems():
    import math

    # inverse of the Curtis stage (from memory): 10 t to 5655.3 m/s at eps 0.15 needs 161.5 t
    dv = f"{350 * pc.G0 * math.log(200 / 38.5)!r} m/s"
    s = pc.propellant_for_delta_v(dv, structural_ratio="15 %", payload="10 t", isp="350 s")
    assert s.propellant_mass == pytest.approx(161500, rel=1e-9)
    assert pc.max_payload([CURTIS], dv) == pytest.approx(10000, rel=1e-9)
    # Curtis two equal stages (from memory): 7.407 km/s with g0 = 9.81 -> 200 t lift-off
    r = pc.optimal_staging("7406.85755 m/s", structural_ratios=[0.15, "15 %"], payload="10 t",
                           exhaust_velocity=["3433.5 m/s", 3433.5])
    assert r.liftoff_mass == pytest.approx(200000, rel=1e-6)


@pytest.mark.parametrize("call, start", [
    (lambda: pc.stage(isp="350", dry_mass="1 t", propellant_mass="2 t"), "isp: got '350'"),
    (lambda: pc.stage(isp="350 s", propellant_mass="2 t"), "stage: got 'propellant_mass'"),
    (lambda: pc.delta_v([CURTIS, "isp=350 s, dry=-1 t, propellant=1 t"], "1 t"), "stages[2]: dry: got '-1 t'"),
    (lambda: pc.delta_v([{"isp": "350 s", "dry_mass": "1 t"}], "1 t"), "stages[1]: got 'dry_mass'"),
    (lambda: pc.delta_v(CURTIS, "-1 t"), "payload: got '-1 t'"),
    (lambda: pc.delta_v(CURTIS, "1 t", target="20 km/s"), "target: got '20 km/s'"),
    (lambda: pc.propellant_for_delta_v("5 km/s", structural_ratio=1.5, payload="1 t", isp="300 s"),
     "structural_ratio: got 1.5"),
])
def test_bad_vehicle_inputs_are_one_line(call, start):
    with pytest.raises(InputError) as info:
        call()
    assert str(info.value).startswith(start), str(info.value)


# ------------------------------------------------------------------ studies
def test_run_study_writes_the_report(tmp_path):
    from perfchain.cli.study import STARTER

    study = tmp_path / "s.toml"
    study.write_text(STARTER.replace('plots = true', 'plots = false'))
    report = pc.run_study(study, tmp_path / "out", max_list=2)
    assert report.name == "report.html" and report.is_file()
    assert (tmp_path / "out" / "tables").is_dir()
    with pytest.raises(InputError, match="^study: got"):
        pc.run_study(tmp_path / "missing.toml", tmp_path / "out2")
