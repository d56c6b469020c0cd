"""--out and --units on point, sweep, compare and deltav; deltav's engine and its thrust-to-weight.

Files are read back with pandas and compared with the SI JSON of the same command. Unit factors
are exact: 1 psi = 6894.757293168 Pa, 1 ft = 0.3048 m, 1 lb = 0.45359237 kg (NIST SP 811,
Appendix B), 1 K = 1.8 degR.
"""

import json
import math

import pandas as pd
import pytest
from click.testing import CliRunner

import perfchain as pc
from perfchain.cli.main import main
from perfchain.constants import G0

PSI, FT, LB = 6894.757293168, 0.3048, 0.45359237
POINT = ["point", "--oxidizer", "LOX", "--fuel", "RP-1", "--mixture-ratio", "2.6", "--chamber-pressure", "70 bar",
         "--area-ratio", "20", "--ambient-pressure", "0 Pa"]
STAGE = "dry=4.1 t, propellant=38 t"
ENGINE = "oxidizer=LOX, fuel=RP-1, mixture_ratio=2.6, chamber_pressure=70 bar, area_ratio=20"


def run(*args):
    return CliRunner().invoke(main, list(args))


def ok_json(*args):
    r = run(*args, "--json")
    assert r.exit_code == 0, r.output
    return json.loads(r.stdout)


def read(path):
    return pd.read_csv(path) if path.suffix == ".csv" else pd.read_parquet(path)


def one_line_exit_2(r, starts):
    assert r.exit_code == 2 and "Traceback" not in r.output, r.output
    assert r.stderr.count("\n") == 1 and r.stderr.startswith("error: " + starts), r.stderr


@pytest.fixture(scope="module")
def point_json():
    return ok_json(*POINT)


@pytest.mark.parametrize("ext", [".csv", ".parquet", ".json"])
def test_point_out_round_trips_in_si(tmp_path, point_json, ext):
    path = tmp_path / f"p{ext}"
    r = run(*POINT, "--out", str(path))
    assert r.exit_code == 0, r.output
    if ext == ".json":
        d = json.loads(path.read_text())
        t, units = pd.DataFrame(d["rows"], columns=d["columns"]), d["metadata"]["units"]
    else:
        t = read(path)
        units = json.loads((tmp_path / "p.csv.meta.json").read_text())["units"] if ext == ".csv" else t.attrs["units"]
    assert len(t) == 1 and units["chamber_pressure"] == "Pa" and units["isp_vacuum"] == "s"
    assert t.chamber_pressure[0] == 7e6 and t.isp_vacuum[0] == point_json["isp_vacuum"]
    assert t.exit_mach[0] == point_json["exit"]["mach"]


def test_point_units_us_in_the_file_and_on_screen(tmp_path, point_json):
    path = tmp_path / "p.parquet"
    r = run(*POINT, "--out", str(path), "--units", "us")
    assert r.exit_code == 0, r.output
    t = pd.read_parquet(path)
    assert t.attrs["units"]["chamber_pressure"] == "psia" and t.attrs["units"]["cstar"] == "ft/s"
    assert t.chamber_pressure[0] == pytest.approx(7e6 / PSI, rel=1e-12)
    assert t.chamber_temperature[0] == pytest.approx(point_json["chamber"]["temperature"] * 1.8, rel=1e-12)
    assert t.cstar[0] == pytest.approx(point_json["cstar"] / FT, rel=1e-12)
    assert t.isp_vacuum[0] == point_json["isp_vacuum"]          # seconds either way
    assert f"{7e6 / PSI:.4g} psia" in r.stdout and "degR" in r.stdout and "ft/s" in r.stdout


def test_point_json_stays_si_with_units(point_json):
    assert ok_json(*POINT, "--units", "us") == point_json


@pytest.mark.parametrize("args, starts", [
    (["--units", "imperial"], "units: got 'imperial'; allowed: one of si, us"),
    (["--out", "table.xlsx"], "out: got 'table.xlsx'; allowed: a file name ending in .csv, .json, .parquet"),
    (["--out", "/no/such/folder/p.csv"], "out: got '/no/such/folder/p.csv'"),
])
def test_point_bad_output_options(args, starts):
    one_line_exit_2(run(*POINT, *args), starts)


def test_sweep_units_us_round_trip(tmp_path):
    base = ["sweep", "--oxidizer", "LOX", "--fuel", "RP-1", "--mixture-ratio", "2.4, 2.6",
            "--chamber-pressure", "1000 psi", "--area-ratio", "40", "--workers", "1"]
    si, us = tmp_path / "si.csv", tmp_path / "us.csv"
    assert run(*base, "--out", str(si)).exit_code == 0
    assert run(*base, "--out", str(us), "--units", "us").exit_code == 0
    a, b = pd.read_csv(si), pd.read_csv(us)
    meta = json.loads((tmp_path / "us.csv.meta.json").read_text())
    assert meta["units"]["chamber_pressure"] == "psia" and meta["units_system"] == "us"
    assert b.chamber_pressure.tolist() == pytest.approx([1000.0, 1000.0], rel=1e-12)
    assert b.exit_velocity.tolist() == pytest.approx((a.exit_velocity / FT).tolist(), rel=1e-12)
    assert b.isp_vacuum.tolist() == a.isp_vacuum.tolist()
    one_line_exit_2(run(*base, "--units", "SI-ish"), "units: got 'SI-ish'")


COMPARE = ["compare", "--propellant", "H2O2-98", "--chamber-pressure", "10 bar", "--area-ratio", "20",
           "--ambient-pressure", "0.5 bar"]


def test_compare_header_states_the_conditions_and_out_round_trips(tmp_path):
    r = run(*COMPARE, "--units", "us")
    assert r.exit_code == 0, r.output
    head = r.stdout.splitlines()[0]
    assert f"chamber pressure {1e6 / PSI:.4g} psia" in head and "area ratio 20" in head
    assert f"ambient pressure {0.5e5 / PSI:.4g} psia" in head and "shifting flow" in head
    path = tmp_path / "c.json"
    assert run(*COMPARE, "--out", str(path)).exit_code == 0
    d = json.loads(path.read_text())
    (row,) = d["rows"]
    js = ok_json(*COMPARE)
    assert row["pair"] == "H2O2-98" and row["isp_vacuum"] == js["pairs"][0]["isp_vacuum"]
    assert row["chamber_pressure"] == 1e6 and row["area_ratio"] == 20 and row["ambient_pressure"] == 5e4
    assert js["area_ratio"] == 20 and d["metadata"]["units"]["ambient_pressure"] == "Pa"
    one_line_exit_2(run(*COMPARE, "--out", "c.txt"), "out: got 'c.txt'")
    one_line_exit_2(run(*COMPARE, "--units", "furlongs"), "units: got 'furlongs'; allowed: one of si, us")


def test_deltav_engine_equals_the_same_exhaust_velocity_by_hand():
    c = pc.point(oxidizer="LOX", fuel="RP-1", mixture_ratio=2.6, chamber_pressure="70 bar",
                 area_ratio=20).exhaust_velocity_vacuum
    a = ok_json("deltav", "--payload", "1 t", "--stage", f"{ENGINE}, {STAGE}")
    b = ok_json("deltav", "--payload", "1 t", "--stage", f"exhaust_velocity={c!r} m/s, {STAGE}")
    assert a["total_delta_v"] == b["total_delta_v"]
    # Tsiolkovsky, closed form: dv = c ln(m0 / mf)
    assert a["total_delta_v"] == pytest.approx(c * math.log(43.1 / 5.1), rel=1e-12)
    assert a["stages"][0]["engine"].startswith("LOX/RP-1, O/F 2.6, 70 bar, area ratio 20")


def test_deltav_engine_delivered_and_ambient():
    r = pc.point(oxidizer="LOX", fuel="RP-1", mixture_ratio=2.6, chamber_pressure="70 bar", area_ratio=20,
                 cstar_efficiency=0.97)
    a = ok_json("deltav", "--payload", "1 t", "--stage", f"{ENGINE}, cstar_efficiency=0.97, {STAGE}")
    assert a["stages"][0]["exhaust_velocity"] == r.delivered["exhaust_velocity_vacuum"]
    # Sutton & Biblarz, Rocket Propulsion Elements, Table 5-5 (from memory, +/- 1 %): LOX/RP-1 at
    # O/F 2.56, 1000 psia, expanded to 1 atm: about 300 s at sea level (shifting)
    sea = ok_json("deltav", "--payload", "1 t", "--stage", "oxidizer=LOX, fuel=RP-1, mixture_ratio=2.56, "
                  f"chamber_pressure=1000 psi, exit_pressure=1 atm, which=ambient, {STAGE}")
    assert sea["stages"][0]["exhaust_velocity"] / G0 == pytest.approx(300.0, rel=0.01)


def test_deltav_thrust_to_weight_and_burn_time_closed_forms():
    r = ok_json("deltav", "--payload", "1 t", "--stage", f"isp=300 s, {STAGE}, thrust=600 kN",
                "--stage", "isp=340 s, dry=0.5 t, propellant=4 t, thrust=50 kN")
    s1, s2 = r["stages"]
    m0_1, mf_1 = 4.1e3 + 38e3 + 4.5e3 + 1e3, 4.1e3 + 4.5e3 + 1e3
    # T/W = F / (m g0) at ignition and at burnout; burn time = m_p c / F at constant thrust
    assert s1["thrust_to_weight"] == pytest.approx(600e3 / (m0_1 * G0), rel=1e-12)
    assert s1["thrust_to_weight_burnout"] == pytest.approx(600e3 / (mf_1 * G0), rel=1e-12)
    assert s1["burn_time"] == pytest.approx(38e3 * 300 * G0 / 600e3, rel=1e-12)
    assert s2["thrust_to_weight"] == pytest.approx(50e3 / (5.5e3 * G0), rel=1e-12)
    text = run("deltav", "--payload", "1 t", "--stage", f"isp=300 s, {STAGE}, thrust=600 kN").stdout
    # one stage: no upper stack, so m0 = 43.1 t
    assert f"  {600e3 / ((m0_1 - 4.5e3) * G0):.2f}  " in text and "Thrust-to-weight" in text and "at ignition" in text


def test_deltav_out_and_units(tmp_path):
    path = tmp_path / "v.csv"
    r = run("deltav", "--payload", "1 t", "--stage", f"isp=300 s, {STAGE}, thrust=600 kN", "--out", str(path),
            "--units", "us")
    assert r.exit_code == 0, r.output
    t = pd.read_csv(path)
    assert t.initial_mass[0] == pytest.approx(43.1e3 / LB, rel=1e-12) and t.stage[0] == 1
    assert t.total_delta_v[0] == pytest.approx(300 * G0 * math.log(43.1 / 5.1) / FT, rel=1e-12)
    assert t.thrust[0] == pytest.approx(600e3 / 4.4482216152605, rel=1e-12)   # 1 lbf = 4.4482216152605 N
    assert "lbm" in r.stdout and "ft/s" in r.stdout


@pytest.mark.parametrize("stage, starts", [
    (f"isp=300 s, {ENGINE}, {STAGE}", "--stage 1: got 'isp or exhaust_velocity with an engine'"),
    (f"{ENGINE}, which=sideways, {STAGE}", "--stage 1: which: got 'sideways'; allowed: one of vacuum, ambient"),
    (f"oxidizer=LOX, fuel=RP-1, mixture_ratio=2.6, area_ratio=20, {STAGE}", "--stage 1: chamber_pressure: got"),
    (f"{ENGINE.replace('70 bar', '70')}, {STAGE}", "--stage 1: chamber_pressure: got '70'"),
])
def test_deltav_bad_engines(stage, starts):
    one_line_exit_2(run("deltav", "--payload", "1 t", "--stage", stage), starts)


def test_deltav_bad_units_and_out():
    one_line_exit_2(run("deltav", "--payload", "1 t", "--stage", f"isp=300 s, {STAGE}", "--units", "cgs"),
                    "units: got 'cgs'")
    one_line_exit_2(run("deltav", "--payload", "1 t", "--stage", f"isp=300 s, {STAGE}", "--out", "v.ods"),
                    "out: got 'v.ods'; allowed: a file name ending in .csv, .json, .parquet")
