"""The ``perfchain deltav`` command: JSON keys, published values, and every bad-input path."""

import json
import math

import pytest
from click.testing import CliRunner

from perfchain.constants import G0
from perfchain.cli.main import main

CURTIS_STAGE = "isp=350 s, dry=28.5 t, propellant=161.5 t"


def run(*args):
    return CliRunner().invoke(main, ["deltav", *args])


def run_json(*args):
    result = run(*args, "--json")
    assert result.exit_code == 0, result.output
    return json.loads(result.stdout)


def test_curtis_single_stage_json():
    # Curtis, Orbital Mechanics for Engineering Students (from memory): payload 10 t,
    # payload / lift-off mass 0.05, structural ratio 0.15, Isp 350 s -> 5.657 km/s with
    # g0 rounded to 9.81; stated as an exhaust velocity 350 * 9.81 = 3433.5 m/s.
    r = run_json("--payload", "10 t", "--stage",
                 "exhaust_velocity=3433.5 m/s, dry=28.5 t, propellant=161.5 t")
    assert r["total_delta_v"] == pytest.approx(5657.0, abs=1.0)
    assert r["payload_fraction"] == pytest.approx(0.05, rel=1e-12)
    assert r["liftoff_mass"] == pytest.approx(200000.0, rel=1e-12)
    (s,) = r["stages"]
    assert {"initial_mass", "burnout_mass", "mass_ratio", "delta_v"} <= set(s)
    assert "burn_time" not in s
    assert s["mass_ratio"] == pytest.approx(200 / 38.5, rel=1e-12)
    assert "target" not in r


def test_curtis_two_equal_stages_json():
    # Curtis (from memory): two equal stages -> 7.407 km/s. Each step has payload fraction
    # sqrt(0.05) of its mass: stage masses 200 t (1 - sqrt 0.05) = 155.279 t and
    # 200 t sqrt(0.05) - 10 t = 34.721 t, propellant fraction 0.85 (eps 0.15).
    r = run_json("--payload", "10 t",
                 "--stage", "exhaust_velocity=3433.5 m/s, mass=155.279 t, propellant_fraction=0.85",
                 "--stage", "exhaust_velocity=3433.5 m/s, mass=34.721 t, propellant_fraction=85 %")
    assert r["total_delta_v"] == pytest.approx(7407.0, abs=1.0)
    assert [s["initial_mass"] for s in r["stages"]] == pytest.approx([200000.0, 44721.0])


def test_three_mass_statements_agree():
    a = run_json("--payload", "10 t", "--stage", CURTIS_STAGE)
    b = run_json("--payload", "10 t", "--stage", "isp=350 s, mass=190 t, propellant_fraction=0.85")
    c = run_json("--payload", "10 t", "--stage", "isp=350 s, propellant=161.5 t, structural_ratio=0.15")
    for other in (b, c):
        assert other["total_delta_v"] == pytest.approx(a["total_delta_v"], rel=1e-12)
    # exact g0 (3rd CGPM): 350 s * 9.80665 * ln(200/38.5)
    assert a["total_delta_v"] == pytest.approx(350 * G0 * math.log(200 / 38.5), rel=1e-12)


def test_burn_time_from_thrust():
    # Definition at constant thrust: t = propellant * c / F.
    r = run_json("--payload", "10 t", "--stage", CURTIS_STAGE + ", thrust=3 MN")
    assert r["stages"][0]["burn_time"] == pytest.approx(161500 * 350 * G0 / 3e6, rel=1e-12)


def test_target_max_payload_and_propellant_round_trip():
    # Round trip through the rocket equation (closed form inverse).
    stage = "isp=350 s, propellant=161.5 t, structural_ratio=0.15"
    r = run_json("--payload", "10 t", "--stage", stage, "--target", "6 km/s")
    t = r["target"]
    assert t["target_delta_v"] == 6000.0
    again = run_json("--payload", f"{t['max_payload']} kg", "--stage", stage)
    assert again["total_delta_v"] == pytest.approx(6000.0, rel=1e-9)
    sized = run_json("--payload", "10 t", "--stage",
                     f"isp=350 s, propellant={t['propellant_needed']} kg, structural_ratio=0.15")
    assert sized["total_delta_v"] == pytest.approx(6000.0, rel=1e-9)
    assert sized["liftoff_mass"] == pytest.approx(t["liftoff_mass_needed"], rel=1e-12)
    # two stages: only the largest payload
    two = run_json("--payload", "1 t", "--stage", CURTIS_STAGE, "--stage", stage, "--target", "7 km/s")
    assert set(two["target"]) == {"target_delta_v", "max_payload"}


def test_table_for_people():
    result = run("--payload", "10 t", "--stage", CURTIS_STAGE, "--target", "5 km/s")
    assert result.exit_code == 0
    assert "5655.3" in result.output and "largest payload" in result.output
    assert not result.output.lstrip().startswith("{")


@pytest.mark.parametrize("args, words", [
    (["--payload", "10 t", "--stage", "isp=350 s, dry=28.5, propellant=161.5 t"], "--stage 1: dry"),
    (["--payload", "10 t", "--stage", "ispp=350 s, dry=28.5 t, propellant=161.5 t"], "did you mean 'isp'"),
    (["--payload", "10 t", "--stage", "isp=350 s, isp=300 s, dry=1 t, propellant=2 t"], "--stage 1: isp"),
    (["--payload", "10 t", "--stage", "isp=350 s, exhaust_velocity=3 km/s, dry=1 t, propellant=2 t"],
     "exactly one of isp"),
    (["--payload", "10 t", "--stage", "dry=1 t, propellant=2 t"], "exactly one of isp"),
    (["--payload", "10 t", "--stage", "isp=350 s, dry=1 t, mass=2 t"], "dry + propellant"),
    (["--payload", "10 t", "--stage", "isp=350 s, propellant=2 t"], "dry + propellant"),
    (["--payload", "10 t", "--stage", "isp=350 s, mass=2 t, propellant_fraction=1.2"],
     "--stage 1: propellant_fraction"),
    (["--payload", "10 t", "--stage", "isp=350 s, propellant=2 t, structural_ratio=0"],
     "--stage 1: structural_ratio"),
    (["--payload", "10 t", "--stage", "isp=350 s, propellant=2 t, structural_ratio=abc"],
     "--stage 1: structural_ratio"),
    (["--payload", "10 t", "--stage", "isp=350 s, dry=-1 t, propellant=2 t"], "--stage 1: dry"),
    (["--payload", "10 t", "--stage", "isp=350 s, dry=1 m, propellant=2 t"], "--stage 1: dry"),
    (["--payload", "10 t", "--stage", "isp=350, dry=1 t, propellant=2 t"], "--stage 1: isp"),
    (["--payload", "10 t", "--stage", "isp 350 s, dry=1 t, propellant=2 t"], "key=value"),
    (["--payload", "10 t", "--stage", CURTIS_STAGE + ", thrust=3000"], "--stage 1: thrust"),
    (["--payload", "10 t", "--stage", CURTIS_STAGE, "--stage", "isp=350 s, dry=1 t"], "--stage 2"),
    (["--payload", "10", "--stage", CURTIS_STAGE], "--payload"),
    (["--payload", "-1 t", "--stage", CURTIS_STAGE], "--payload"),
    (["--payload", "10 t", "--stage", CURTIS_STAGE, "--target", "9 km"], "--target"),
    (["--payload", "10 t", "--stage", CURTIS_STAGE, "--target", "0 m/s"], "--target"),
    # Closed form: zero payload gives 350 s g0 ln(1/0.15) = 6511.5 m/s at most
    (["--payload", "10 t", "--stage", "isp=350 s, propellant=1 t, structural_ratio=0.15",
      "--target", "7 km/s"], "short of the target by 488.5 m/s"),
    (["--payload", "0 kg", "--stage", "isp=350 s, propellant=1 t, structural_ratio=0.15",
      "--target", "5 km/s"], "--payload"),
    (["--payload", "10 t"], "--stage"),
    (["--stage", CURTIS_STAGE], "--payload"),
    (["--payload", "10 t", "--stage", CURTIS_STAGE, "--bogus"], "--bogus"),
])
def test_bad_input_is_one_line_exit_2(args, words):
    result = run(*args)
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: "), result.stderr
    assert words in lines[0]
    assert result.stdout == ""


def test_target_too_small_to_bound_the_payload_is_an_error():
    # Regression: a near-zero target delta-v once gave a huge payload (a rounding artefact)
    # although any payload meets it; it must be refused with one line that says so.
    from click.testing import CliRunner

    from perfchain.cli.main import main

    res = CliRunner().invoke(main, ["deltav", "--payload", "1 t", "--stage", "isp=300 s, dry=1 t, propellant=1 t",
                                    "--target", "1e-300 m/s"])
    assert res.exit_code == 2 and res.output.strip().count("\n") == 0 and "bound the payload" in res.output


def test_readable_table_ends_with_what_it_leaves_out_and_the_caution():
    # the project's safety rule for results someone could act on; the ideal rocket equation
    # carries no gravity, drag or steering losses (any launch-vehicle text; common practice)
    from perfchain.cli.vehicle import DELTA_V_CAUTION

    res = run("--payload", "10 t", "--stage", "exhaust_velocity=3433.5 m/s, dry=28.5 t, propellant=161.5 t")
    assert res.exit_code == 0, res.output
    assert res.output.rstrip().endswith(DELTA_V_CAUTION)
    assert "total delta-v" in res.output and "gravity, drag and steering" in DELTA_V_CAUTION
    assert DELTA_V_CAUTION not in run("--json", "--payload", "10 t", "--stage",
                                      "exhaust_velocity=3433.5 m/s, dry=28.5 t, propellant=161.5 t").output
