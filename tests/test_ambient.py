"""Ambient performance that knows about separation, and the one feasibility rule (issue 12).

No row or result marked ok carries a non-finite or non-positive Isp, c*, Cf or Tc, or an
ambient pressure at or above the chamber pressure; a separated nozzle's ambient values are
the cut-nozzle estimate F/mdot = u_sep + (p_sep - p_a) A_sep/mdot (Sutton & Biblarz, Rocket
Propulsion Elements, ch. 3, over-expanded nozzles; from memory) at the station where the
Summerfield criterion p/p_a = k (Summerfield, Foster & Swan, Jet Propulsion 24, 1954; from
memory) or Schmucker's p/p_a = (1.88 M - 1)^-0.64 (Schmucker 1973; from memory) holds; the
optimum of an ambient objective is never a separated or infeasible point.
"""

import csv
import io
import json
import math

import pytest
from click.testing import CliRunner
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import perfchain as pc
from perfchain.cli.main import main as cli
from perfchain.constants import G0
from perfchain.errors import InputError, PerfchainError
from perfchain.performance.ambient import infeasibility, separation_rule
from perfchain.performance.chain import performance, performance_of
from perfchain.propellants.mixture import make_propellant
from perfchain.study.optimum import NoFullFlowOptimum, compare_pairs, optimum_mixture_ratio
from perfchain.study.sweep import sweep

FAST = settings(max_examples=6, deadline=None, derandomize=True,
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])
ATM = 101325.0
POSITIVE = ("isp_vacuum", "isp_ambient", "cstar", "cf_vacuum", "cf_ambient", "chamber_temperature")


def run(*args):
    return CliRunner().invoke(cli, [str(a) for a in args], catch_exceptions=False)


def check_ok_row(row):
    """The property every ok row must have (issue 12): finite positive numbers, feasible ambient."""
    for key in POSITIVE:
        v = float(row[key])
        assert math.isfinite(v) and v > 0, (key, v, row)
    assert float(row["ambient_pressure"]) < float(row["chamber_pressure"])
    full = row["flows_full"] in (True, "True")
    assert (row["ambient_model"] == "full-flowing") == full
    if float(row["ambient_pressure"]) > 0 and full:
        assert float(row["exit_ambient_pressure_ratio"]) >= 0.4 - 1e-12   # Summerfield k = 0.4


# ------------------------------------------------------------ the cut-nozzle estimate
def test_separated_isp_is_the_cut_nozzle_hand_calculation():
    # The point: N2O4/N2H4, O/F 2, 10 bar, area ratio 100 at 1 atm gave -1358.97 s.
    r = performance("N2O4", "N2H4", mixture_ratio=2.0, chamber_pressure="10 bar", area_ratio=100)
    assert not r.flows_full and r.ambient_model == "separated-cut (summerfield k=0.4)"
    # Summerfield: the station where p = k p_a, k = 0.4 (exactly)
    assert r.separation_pressure == 0.4 * ATM
    # hand calculation on the tool's own station data: A_sep/mdot = eps_sep A*/mdot = eps_sep c*/p_c
    hand = (r.separation_velocity + (r.separation_pressure - ATM) * r.separation_area_ratio * r.cstar
            / r.chamber_pressure) / G0
    assert r.isp_ambient == pytest.approx(hand, rel=1e-12)
    assert r.cf_ambient == pytest.approx(hand * G0 / r.cstar, rel=1e-12)
    # the station is the exit-by-pressure solve of the same isentrope (an independent solve)
    again = performance_of(make_propellant("N2O4", "N2H4", 2.0), r.chamber_pressure,
                           exit_pressure=r.separation_pressure, ambient_pressure=0.0)
    assert r.separation_velocity == pytest.approx(again.exit.velocity, rel=1e-9)
    assert r.separation_area_ratio == pytest.approx(again.area_ratio, rel=1e-9)
    assert r.separation_mach == pytest.approx(again.exit.mach, rel=1e-9)
    assert 1.0 < r.separation_area_ratio < r.area_ratio
    # vacuum numbers untouched by the ambient model
    assert r.isp_vacuum == performance("N2O4", "N2H4", mixture_ratio=2.0, chamber_pressure="10 bar",
                                       area_ratio=100, ambient_pressure=0.0).isp_vacuum


def test_schmucker_station_satisfies_its_criterion():
    r = performance("LOX", "RP-1", mixture_ratio=2.6, chamber_pressure="20 bar", area_ratio=60,
                    separation="schmucker")
    assert not r.flows_full and r.separation_criterion == "schmucker"
    # Schmucker (from memory): p_sep / p_a = (1.88 M_sep - 1)^-0.64 at the station's own Mach number
    assert r.separation_pressure / ATM == pytest.approx((1.88 * r.separation_mach - 1.0) ** -0.64, rel=1e-9)
    hand = (r.separation_velocity + (r.separation_pressure - ATM) * r.separation_area_ratio * r.cstar
            / r.chamber_pressure) / G0
    assert r.isp_ambient == pytest.approx(hand, rel=1e-12)


@pytest.mark.parametrize("contraction_ratio", [None, 3.0])
def test_cut_estimate_lies_between_the_full_flowing_formula_and_ideal_expansion(contraction_ratio):
    # Sanity band (no published sea-level test value of a vacuum nozzle is known to us reliably
    # enough to quote): the cut nozzle keeps positive thrust, above the full-flowing formula,
    # and below the nozzle expanded exactly to ambient, which gives the largest thrust of any
    # nozzle at that ambient pressure (Sutton & Biblarz ch. 3, optimum expansion; closed form).
    kw = dict(mixture_ratio=2.6, chamber_pressure="30 bar", contraction_ratio=contraction_ratio)
    r = performance("LOX", "RP-1", area_ratio=80, **kw)
    full_flowing = r.isp_vacuum - ATM * r.area_ratio * r.cstar / r.chamber_pressure / G0
    ideal = performance("LOX", "RP-1", exit_pressure=ATM, **kw)
    assert not r.flows_full and full_flowing < 0 < r.isp_ambient < ideal.isp_ambient
    # and above 80 % of it: the cut nozzle loses only (1 - k) p_a A_sep (common practice, loose)
    assert r.isp_ambient > 0.8 * ideal.isp_ambient


def test_delivered_ambient_of_a_separated_nozzle_uses_the_cut_nozzle():
    # c* efficiency scales the whole cut-nozzle thrust per unit throat area (closed form)
    r = performance("N2O4", "N2H4", mixture_ratio=2.0, chamber_pressure="10 bar", area_ratio=100,
                    losses={"cstar_efficiency": 0.9})
    assert r.delivered["isp_ambient"] == pytest.approx(0.9 * r.isp_ambient, rel=1e-12)
    assert r.separation["flag"] is True


def test_cf_efficiency_scales_the_whole_vacuum_cf():
    # the usual overall Cf efficiency: delivered / ideal vacuum Cf (Sutton & Biblarz ch. 3, from
    # memory); the ambient Cf then follows from the thrust equation Cf_amb = Cf_vac - (pa/pc) eps
    r = performance("LOX", "RP-1", mixture_ratio=2.6, chamber_pressure="70 bar", area_ratio=12,
                    losses={"cf_efficiency": 0.97})
    d = r.delivered
    assert r.flows_full
    assert d["cf_vacuum"] == pytest.approx(0.97 * r.cf_vacuum, rel=1e-12)
    assert d["cf_ambient"] == pytest.approx(d["cf_vacuum"] - ATM / r.chamber_pressure * r.area_ratio, rel=1e-12)


# ------------------------------------------------------------ the one feasibility rule
def test_one_rule_refuses_what_point_refuses():
    assert infeasibility(50e5, 60e5) is not None and infeasibility(50e5, 50e5) is not None
    assert infeasibility(50e5, 0.0) is None and infeasibility(50e5, 1e5, 4e5) is None
    assert "exit_pressure" in str(infeasibility(50e5, 1e5, 60e5))
    with pytest.raises(InputError, match="^ambient_pressure: got '60 bar'"):
        performance("LOX", "RP-1", mixture_ratio=2.6, chamber_pressure="50 bar", area_ratio=10,
                    ambient_pressure="60 bar")


def test_regression_point_that_printed_a_negative_isp():
    res = run("point", "--oxidizer", "N2O4", "--fuel", "N2H4", "--mixture-ratio", "2.0",
              "--chamber-pressure", "10 bar", "--area-ratio", "100", "--json")
    d = json.loads(res.output)
    assert res.exit_code == 0 and d["isp_ambient"] > 0 and not d["flows_full"]
    assert d["ambient_model"].startswith("separated-cut") and d["isp_vacuum"] == pytest.approx(323.48, abs=0.01)
    text = run("point", "--oxidizer", "N2O4", "--fuel", "N2H4", "--mixture-ratio", "2.0",
               "--chamber-pressure", "10 bar", "--area-ratio", "100").output
    assert "SEPARATED" in text and "-1358" not in text


def test_regression_sweep_with_ambient_above_chamber_pressure():
    res = run("sweep", "--oxidizer", "N2O4", "--fuel", "N2H4", "--mixture-ratio", "2.0",
              "--chamber-pressure", "0.5 bar,50 bar", "--area-ratio", "10,100", "--workers", "1")
    rows = list(csv.DictReader(io.StringIO(res.output)))
    assert res.exit_code == 0 and len(rows) == 4
    for row in rows:
        if float(row["chamber_pressure"]) < ATM:
            assert row["status"] == "failed" and row["reason"].startswith("ambient_pressure")
            assert row["isp_ambient"] == ""
        else:
            assert row["status"] == "ok"
            check_ok_row(row)
    res = run("sweep", "--oxidizer", "N2O4", "--fuel", "N2H4", "--mixture-ratio", "2.0",
              "--chamber-pressure", "50 bar", "--area-ratio", "10", "--ambient-pressure", "60 bar,1 atm",
              "--workers", "1")
    rows = list(csv.DictReader(io.StringIO(res.output)))
    assert [r["status"] for r in rows] == ["failed", "ok"]
    assert "below the chamber pressure" in rows[0]["reason"]


def test_regression_compare_ranked_a_negative_isp_first():
    res = run("compare", "--pair", "LOX/LCH4", "--pair", "LOX/RP-1", "--chamber-pressure", "60 bar",
              "--area-ratio", "150", "--altitude", "0 km", "--objective", "isp_ambient")
    assert res.exit_code == 2 and "full-flowing" in res.output and "-68.8" not in res.output
    assert len(res.output.strip().splitlines()) == 1 and "Traceback" not in res.output


def test_study_grid_rows_obey_the_rule():
    from perfchain.study.engines import engine_grid, engine_settings, resolve_ingredients
    from perfchain.study.schema import parse_study

    s = parse_study('[study]\ntitle = "t"\n[[engine]]\nname = "Fenwick-A (invented)"\noxidizer = "N2O4"\n'
                    'fuel = "MMH"\nmixture_ratio = [1.8]\nchamber_pressure = ["0.5 bar", "20 bar"]\n'
                    'area_ratio = [60]\nambient_pressure = ["1 atm"]\n'
                    'efficiency = { cstar_efficiency = 0.95 }\n')
    df = engine_grid(engine_settings(s.engine[0], 1, resolve_ingredients(s), None), 1)
    low, high = df.iloc[0], df.iloc[1]
    assert low.status == "failed" and math.isnan(low.delivered_isp_ambient)
    assert high.status == "ok" and not high.flows_full and high.delivered_isp_ambient > 0
    assert high.delivered_isp_ambient == pytest.approx(0.95 * high.isp_ambient, rel=1e-12)


# ------------------------------------------------------------ properties
PCS = ["0.5 bar", "3 bar", "20 bar", "100 bar"]
EPS = [1.5, 6.0, 40.0, 150.0]
AMB = ["0 Pa", "0.3 atm", "1 atm", "60 bar"]
PAIRS = [("LOX", "RP-1", [2.0, 2.6]), ("N2O4", "MMH", [1.6, 2.2]), ("LOX", "LH2", [4.5, 6.0])]


@FAST
@given(pair=st.sampled_from(PAIRS), pcs=st.lists(st.sampled_from(PCS), min_size=1, max_size=2, unique=True),
       eps=st.lists(st.sampled_from(EPS), min_size=1, max_size=2, unique=True),
       amb=st.lists(st.sampled_from(AMB), min_size=1, max_size=2, unique=True),
       sep=st.sampled_from(["summerfield", "schmucker", "summerfield:0.3"]))
def test_cli_sweep_never_marks_an_impossible_row_ok(pair, pcs, eps, amb, sep):
    ox, fu, mrs = pair
    res = run("sweep", "--oxidizer", ox, "--fuel", fu, "--mixture-ratio", ",".join(map(str, mrs)),
              "--chamber-pressure", ",".join(pcs), "--area-ratio", ",".join(map(str, eps)),
              "--ambient-pressure", ",".join(amb), "--separation", sep, "--workers", "1")
    assert res.exit_code == 0, res.output
    rows = list(csv.DictReader(io.StringIO(res.output)))
    assert len(rows) == len(mrs) * len(pcs) * len(eps) * len(amb)
    for row in rows:
        if row["status"] == "ok":
            check_ok_row(row) if sep == "summerfield" else None
            for key in POSITIVE:
                assert math.isfinite(float(row[key])) and float(row[key]) > 0
            assert float(row["ambient_pressure"]) < float(row["chamber_pressure"])
        else:
            assert row["reason"] and "\n" not in row["reason"]


@FAST
@given(pair=st.sampled_from(PAIRS), pc_=st.sampled_from(PCS), eps=st.sampled_from(EPS), amb=st.sampled_from(AMB),
       flow=st.sampled_from(["shifting", "frozen"]))
def test_cli_point_and_python_api_agree_and_never_give_an_impossible_number(pair, pc_, eps, amb, flow):
    ox, fu, mrs = pair
    args = ["point", "--oxidizer", ox, "--fuel", fu, "--mixture-ratio", mrs[0], "--chamber-pressure", pc_,
            "--area-ratio", eps, "--ambient-pressure", amb, "--flow", flow, "--json"]
    res = run(*args)
    try:
        r = pc.point(ox, fu, mixture_ratio=mrs[0], chamber_pressure=pc_, area_ratio=eps, ambient_pressure=amb,
                     flow=flow)
    except PerfchainError as exc:
        assert res.exit_code == 2 and len(res.output.strip().splitlines()) == 1 and str(exc) in res.output
        return
    d = json.loads(res.output)
    assert d["isp_ambient"] == r.isp_ambient and d["flows_full"] == r.flows_full
    d["chamber_temperature"] = d["chamber"]["temperature"]
    check_ok_row(d)


@FAST
@given(pair=st.sampled_from(PAIRS[:2]), pc_=st.sampled_from(["3 bar", "20 bar", "100 bar"]),
       eps=st.sampled_from([4.0, 12.0, 60.0]), amb=st.sampled_from(["0.3 atm", "1 atm"]),
       objective=st.sampled_from(["isp_ambient", "density_isp_ambient"]))
def test_optimum_never_lands_on_a_separated_or_infeasible_point(pair, pc_, eps, amb, objective):
    ox, fu, _ = pair
    try:
        o = pc.optimum(ox, fu, chamber_pressure=pc_, area_ratio=eps, ambient_pressure=amb, objective=objective)
    except NoFullFlowOptimum as exc:
        assert "full-flowing" in str(exc)
        return
    except InputError as exc:       # infeasible input: refused in one line
        assert "ambient" in str(exc) and "\n" not in str(exc)
        return
    p = o.performance
    assert p.flows_full and p.ambient_model == "full-flowing"
    assert p.ambient_pressure < p.chamber_pressure and p.isp_ambient > 0 and o.value > 0


def test_compare_ranks_only_full_flowing_ambient_optima():
    # LOX/RP-1 at 30 bar: area ratio 6 flows full at sea level; LOX/LH2 at area ratio 6 too
    rows = compare_pairs(["LOX/RP-1", "LOX/LH2"], "30 bar", area_ratio=6.0, objective="isp_ambient")
    assert all(r["flows_full"] and r["isp_ambient"] > 0 for r in rows)
    assert [r["pair"] for r in rows] == ["LOX/LH2", "LOX/RP-1"]   # hydrogen first (Sutton Table 5-5)
    with pytest.raises(NoFullFlowOptimum, match="^objective: got 'isp_ambient'"):
        optimum_mixture_ratio("LOX", "LCH4", "60 bar", area_ratio=150, objective="isp_ambient")
    # a vacuum objective is unaffected, and its row says how the ambient value was estimated
    vac = compare_pairs(["LOX/LCH4"], "60 bar", area_ratio=150, objective="isp_vacuum")[0]
    assert vac["ambient_model"].startswith("separated-cut") and vac["isp_ambient"] > 0


def test_separation_rule_parsing():
    assert separation_rule("summerfield:0.35").threshold == 0.35
    with pytest.raises(InputError, match="^separation: got 'summerfield:0.9'"):
        separation_rule("summerfield:0.9")
    with pytest.raises(InputError, match="did you mean 'schmucker'"):
        separation_rule("schmuker")
    res = run("point", "--oxidizer", "LOX", "--fuel", "RP-1", "--mixture-ratio", "2.6", "--chamber-pressure",
              "20 bar", "--area-ratio", "40", "--separation", "bogus")
    assert res.exit_code == 2 and res.output.startswith("error: separation: got 'bogus'")


@FAST
@given(pair=st.sampled_from(PAIRS), pcs=st.lists(st.sampled_from(PCS), min_size=1, max_size=2, unique=True),
       eps=st.lists(st.sampled_from(EPS), min_size=1, max_size=2, unique=True),
       alt=st.lists(st.sampled_from(["0 km", "5 km", "30 km"]), min_size=1, max_size=2, unique=True))
def test_python_sweep_never_marks_an_impossible_row_ok(pair, pcs, eps, alt):
    ox, fu, mrs = pair
    df = pc.sweep(ox, fu, mixture_ratio=mrs, chamber_pressure=",".join(pcs), area_ratio=eps, altitude=",".join(alt))
    assert len(df) == len(mrs) * len(pcs) * len(eps) * len(alt)
    for _, row in df.iterrows():
        if row["status"] == "ok":
            check_ok_row(row)
        else:
            assert row["reason"] and not (row.get("isp_vacuum") == row.get("isp_vacuum") and row.get("isp_vacuum"))


@FAST
@given(pc_=st.sampled_from(["5 bar", "30 bar", "100 bar"]), eps=st.sampled_from([5.0, 20.0, 100.0]),
       objective=st.sampled_from(["isp_ambient", "isp_vacuum"]))
def test_python_compare_never_ranks_a_separated_ambient_optimum(pc_, eps, objective):
    try:
        rows = pc.compare(["LOX/RP-1", "N2O4/MMH"], chamber_pressure=pc_, area_ratio=eps, objective=objective)
    except NoFullFlowOptimum as exc:
        assert objective == "isp_ambient" and "\n" not in str(exc)
        return
    for r in (rows.to_dict("records") if hasattr(rows, "to_dict") else rows):
        if r.get("note"):
            assert objective == "isp_ambient" and r["isp_ambient"] is None or r["isp_ambient"] != r["isp_ambient"]
            continue
        assert r["isp_ambient"] > 0 and r["isp_vacuum"] > 0 and r["cstar"] > 0
        assert r["flows_full"] or objective == "isp_vacuum"
