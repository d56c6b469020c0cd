"""Uncertainty and sensitivity: sampled statistics against closed forms and published indices,
first-order propagation, determinism, bad inputs and failed samples.

Every tolerance is computed from the sampling error of the statistic it checks (the plain
Monte Carlo error, which bounds the scrambled-Sobol error from above; Owen 1997).
"""

import json
import math

import numpy as np
import pytest
from click.testing import CliRunner

import perfchain as pc
from perfchain.cli.main import main
from perfchain.constants import G0
from perfchain.inputs import point_args
from perfchain.study.uncertainty import point_uncertainty
from perfchain.uncertainty.distributions import uniform
from perfchain.uncertainty.propagation import propagate

LOX_RP1 = dict(oxidizer="LOX", fuel="RP-1", mixture_ratio=2.56, chamber_pressure="70 bar", area_ratio=40)


def test_rocket_equation_with_normal_exhaust_velocity():
    # dv = g0 Isp ln R is linear in Isp: with Isp normal (mean 320 s, sigma 4 s) dv is normal with
    # mean g0 Isp ln R and std g0 sigma ln R (the rocket equation, Tsiolkovsky 1903; a linear map of a
    # normal variable is normal, closed form).
    n = 4096
    u = pc.delta_v_uncertainty(["isp=320 s, dry=3 t, propellant=27 t"], "1 t",
                               vary={"stage1.isp": "normal(320 s, 4 s)"}, samples=n, seed=11)
    ln_r = math.log(31.0 / 4.0)
    mean, std = G0 * 320.0 * ln_r, G0 * 4.0 * ln_r
    s = u.uncertainty["total_delta_v"]
    assert abs(s["mean"] - mean) < 4 * std / math.sqrt(n)
    assert abs(s["std"] - std) < 4 * std / math.sqrt(2 * (n - 1))
    # the normal's 5th and 95th percentiles: mean -/+ 1.6449 std (Abramowitz & Stegun, Table 26.5)
    se_p = math.sqrt(0.05 * 0.95 / n) / (math.exp(-1.6449 ** 2 / 2) / math.sqrt(2 * math.pi) / std)
    assert abs(s["p95"] - (mean + 1.6449 * std)) < 4 * se_p
    assert u.sensitivity["total_delta_v"] == {"stage1.isp": pytest.approx(1.0, abs=0.01)}
    assert u.propagation.failed == 0


def test_sobol_indices_of_a_linear_function():
    # f = sum a_i x_i with independent uniforms: S_i = S_Ti = a_i^2 V_i / sum_j a_j^2 V_j
    # (Saltelli et al. 2008, Global Sensitivity Analysis: The Primer, ch. 1, linear models).
    a = np.array([1.0, -2.0, 0.5])
    dists = [uniform(0.0, 1.0), uniform(2.0, 4.0), uniform(-3.0, 3.0)]
    V = a ** 2 * np.array([d.std ** 2 for d in dists])
    want = V / V.sum()

    def model(X):
        return {"f": X @ a}, [None] * len(X)

    n = 2048
    p = propagate(model, ["x1", "x2", "x3"], dists, [d.mean for d in dists], samples=n, seed=5, method="sobol")
    # sampling error of each estimator, from its own summands (Saltelli 2010, eqs. (b) and (f) of Table 2)
    from perfchain.uncertainty.sampling import saltelli_design, to_inputs

    A, B, AB = saltelli_design(n, 3, 5)
    fA, fB = to_inputs(A, dists) @ a, to_inputs(B, dists) @ a
    var = np.var(np.concatenate([fA, fB]))
    for i, name in enumerate(["x1", "x2", "x3"]):
        fABi = to_inputs(AB[i], dists) @ a
        se_first = np.std(fB * (fABi - fA)) / math.sqrt(n) / var
        se_total = np.std(0.5 * (fA - fABi) ** 2) / math.sqrt(n) / var
        assert abs(p.first["f"][name] - want[i]) < 4 * se_first + 1e-9
        assert abs(p.total["f"][name] - want[i]) < 4 * se_total + 1e-9
        assert p.first["f"][name] == pytest.approx(want[i], abs=0.02)


def test_small_tolerances_follow_first_order_propagation():
    # For small input spreads Isp is linear in the inputs, so its std is sqrt(sum (dIsp/dx_i sigma_i)^2)
    # (first-order propagation of variance, JCGM 100:2008 GUM eq. 10) with the tool's own derivatives:
    # the secants of its one-at-a-time rows (tornado). The sampling error of the sampled std comes from
    # independent scrambles (seeds) of the Sobol sequence (randomised QMC, Owen 1997).
    args = point_args(**LOX_RP1)
    vary = {"mixture_ratio": "+/-0.4%", "chamber_pressure": "+/-1%"}
    runs = [point_uncertainty(args, vary, samples=16, seed=seed)[1] for seed in range(1, 5)]
    p = runs[0]
    stds = np.array([d.std for d in p.distributions])
    widths = np.array([np.subtract(*d.interval(0.9)[::-1]) for d in p.distributions])
    for key in ("isp_vacuum", "isp_ambient", "cstar"):
        lo_hi = np.array([p.tornado[key][name] for name in p.names])
        slopes = (lo_hi[:, 1] - lo_hi[:, 0]) / widths
        predicted = math.sqrt(float(np.sum((slopes * stds) ** 2)))
        sampled = np.array([r.uncertainty_block()[key]["std"] for r in runs])
        error = sampled.std(ddof=1) / math.sqrt(len(runs))
        # 1 % allows for the curvature a secant over the 5-95 % interval leaves out (common practice)
        assert abs(sampled.mean() - predicted) < 4 * error + 0.01 * predicted, (key, sampled, predicted)


def test_same_seed_same_table_with_one_or_two_workers():
    from perfchain.uncertainty.sampling import unit_samples

    args = point_args(**LOX_RP1, cstar_efficiency=0.97, thrust="50 kN")
    vary = {"mixture_ratio": "+/-3%", "cstar_efficiency": "0.95..0.98", "area_ratio": "35..45"}
    one = point_uncertainty(args, vary, samples=12, seed=9, chunk=4)[1].frame()
    two = point_uncertainty(args, vary, samples=12, seed=9, chunk=4, workers=2)[1].frame()
    whole = point_uncertainty(args, vary, samples=12, seed=9)[1].frame()
    assert one.equals(two) and one.equals(whole)
    assert not np.array_equal(unit_samples(24, 3, 9), unit_samples(24, 3, 10))   # the seed matters


def test_a_sample_is_the_point_solved_alone():
    # the batch rows and the array form of the delivered values give the bits of pc.point (the nozzle
    # separates at 1 atm here, so the cut-nozzle path is covered too)
    u = pc.point_uncertainty(**LOX_RP1, cstar_efficiency=0.97, thrust="50 kN", samples=8, seed=4,
                             vary={"mixture_ratio": "+/-3%", "cf_efficiency": "0.97..0.99"})
    df = u.samples()
    assert not u.nominal.flows_full
    for _, row in df.head(3).iterrows():
        r = pc.point(**{**LOX_RP1, "mixture_ratio": row["mixture_ratio"]}, cstar_efficiency=0.97,
                     cf_efficiency=row["cf_efficiency"], thrust="50 kN")
        assert row["isp_vacuum"] == r.isp_vacuum and row["chamber.temperature"] == r.chamber.temperature
        assert row["delivered.isp_ambient"] == pytest.approx(r.delivered["isp_ambient"], rel=1e-14)
        assert row["sizing.mass_flow"] == pytest.approx(r.sizing["mass_flow"], rel=1e-14)


def test_vehicle_samples_are_the_one_vehicle_path():
    u = pc.delta_v_uncertainty(["isp=300 s, mass=200 t, propellant_fraction=0.9",
                                "isp=340 s, propellant=20 t, structural_ratio=0.1"], "2 t", samples=16,
                               vary=["stage1.propellant_fraction=0.88..0.92", "stage2.structural_ratio=+/-5%"])
    for _, row in u.samples().head(4).iterrows():
        r = pc.delta_v([f"isp=300 s, mass=200 t, propellant_fraction={row['stage1.propellant_fraction']!r}",
                        f"isp=340 s, propellant=20 t, structural_ratio={row['stage2.structural_ratio']!r}"], "2 t")
        assert row["total_delta_v"] == r.total_delta_v and row["payload_fraction"] == r.payload_fraction


def _cli(*args):
    return CliRunner().invoke(main, list(args))


POINT = ("point", "--oxidizer", "LOX", "--fuel", "RP-1", "--mixture-ratio", "2.56", "--chamber-pressure", "70 bar",
         "--area-ratio", "40")


def test_cli_contract_point_json():
    r = _cli(*POINT, "--vary", "mixture_ratio=+/-2%", "--vary", "cstar_efficiency=0.95..0.98", "--samples", "16",
             "--json")
    assert r.exit_code == 0, r.output
    data = json.loads(r.stdout)
    assert set(data["uncertainty"]["isp_vacuum"]) == {"mean", "std", "p5", "p50", "p95"}
    assert set(data["sensitivity"]["delivered.isp_vacuum"]) == {"mixture_ratio", "cstar_efficiency"}
    assert data["delivered"]["isp_vacuum"] > 0 and data["uncertainty_run"]["samples"] == 16
    assert data["uncertainty"]["cstar"]["p5"] < data["uncertainty"]["cstar"]["p95"]


def test_cli_deltav_json_and_parquet(tmp_path):
    out = tmp_path / "s.parquet"
    r = _cli("deltav", "--payload", "10 t", "--stage", "isp=350 s, dry=28.5 t, propellant=161.5 t",
             "--vary", "stage1.isp=+/-1%", "--samples", "64", "--samples-out", str(out), "--json")
    assert r.exit_code == 0, r.output
    data = json.loads(r.stdout)
    assert {"total_delta_v", "payload_fraction"} <= set(data["uncertainty"])
    import pandas as pd

    df = pd.read_parquet(out)
    assert len(df) == 64 and {"stage1.isp", "total_delta_v", "failure"} <= set(df.columns)


@pytest.mark.parametrize("spec, words", [
    ("cstar_efficiency=normal(0.97, -0.01)", "vary.cstar_efficiency: got 'normal(0.97, -0.01)'; allowed: a standard "
                                             "deviation above 0"),
    ("cstar_efficiency=0.98..0.95", "vary.cstar_efficiency: got '0.98..0.95'; allowed: a range whose low end"),
    ("cstar_efficiency=0.96..1.01", "vary.cstar_efficiency: got '0.96..1.01'; allowed: a distribution whose samples "
                                    "stay inside a factor in (0, 1] (this one reaches 1.01)"),
    ("mixture_ratio=normal(2.56, 0.7)", "vary.mixture_ratio: got 'normal(2.56, 0.7)'; allowed: a distribution whose"),
    ("mixture_ration=+/-2%", "vary: got 'mixture_ration'; allowed: an input of this calculation"),
    ("chamber_pressure=+/-2 psx", "chamber_pressure"),
])
def test_bad_distributions_are_one_line_errors(spec, words):
    r = _cli(*POINT, "--vary", spec, "--samples", "16")
    assert r.exit_code == 2
    assert len(r.output.strip().splitlines()) == 1 and words in r.output and "Traceback" not in r.output


def test_bad_vehicle_distribution_exit_2():
    r = _cli("deltav", "--payload", "10 t", "--stage", "isp=350 s, dry=28.5 t, propellant=161.5 t",
             "--vary", "stage1.isp=400..300 s")
    assert r.exit_code == 2 and r.output.startswith("error: stage1.isp: got '400..300 s'")


def test_failed_samples_are_counted_never_dropped():
    # a chamber pressure straddling the 1 atm ambient: samples below it cannot exhaust (infeasible)
    args = point_args(oxidizer="LOX", fuel="RP-1", mixture_ratio=2.5, chamber_pressure="1.5 atm", area_ratio=3)
    n = 32
    _, p = point_uncertainty(args, {"chamber_pressure": "normal(1.3 atm, 0.25 atm)"}, samples=n, seed=1)
    run = p.run_block()
    below = int(np.sum(p.inputs[:, 0] <= 101325.0))
    assert below > 0 and run["failed"] == below == sum(run["failure_reasons"].values())
    assert np.isnan(p.values["isp_vacuum"]).sum() == below
    assert len(p.values["isp_vacuum"]) == n and run["samples"] == n


def test_an_ingredient_enthalpy_varies_per_mole():
    # +/-2 kJ/mol on the fuel's formula unit: a sample is the point with that fuel record
    from dataclasses import replace

    from perfchain.propellants.ingredients import get_ingredient

    u = pc.point_uncertainty(**LOX_RP1, vary={"fuel.enthalpy": "+/-2 kJ/mol"}, samples=8, seed=3)
    fuel = get_ingredient("RP-1")
    nominal = u.propagation.run_block()["inputs"]["fuel.enthalpy"]
    assert nominal["nominal"] == pytest.approx(fuel.enthalpy * fuel.molar_mass / 1000.0, rel=1e-15)
    assert nominal["distribution"].endswith("std 1000")     # 2 kJ/mol as 2 sigma
    row = u.samples().iloc[2]
    own = replace(fuel, enthalpy=row["fuel.enthalpy"] / (fuel.molar_mass / 1000.0))
    r = pc.point(**{**LOX_RP1, "fuel": own})
    assert row["isp_vacuum"] == r.isp_vacuum and row["chamber.temperature"] == r.chamber.temperature


def test_sobol_indices_of_a_point():
    # Ideal c* does not depend on the c* efficiency, so its Sobol indices for it are exactly 0 (the
    # estimators' summands vanish, Saltelli 2010); the delivered c* is the product of the two, and the
    # first-order shares of an additive-dominated output add up to about 1 (Saltelli et al. 2008, ch. 1).
    args = point_args(**LOX_RP1)
    _, p = point_uncertainty(args, {"mixture_ratio": "+/-4%", "cstar_efficiency": "0.95..0.98"}, samples=16,
                             seed=7, sensitivity="sobol")
    assert p.first["cstar"]["cstar_efficiency"] == 0.0 and p.total["cstar"]["cstar_efficiency"] == 0.0
    shares = p.first["delivered.cstar"]
    assert shares["cstar_efficiency"] > shares["mixture_ratio"] > 0
    assert p.evaluations == 16 * 4 + 5 and p.failed == 0
