"""Wall heat flux along the contour: ``perfchain chamber`` and :func:`perfchain.chamber`.

Sources: Bartz, D. R., "A simple equation for rapid estimation of rocket nozzle convective heat
transfer coefficients", Jet Propulsion 27 (1957) 49-51 (the correlation and its sigma
correction, recomputed here in closed form); Sutton & Biblarz, Rocket Propulsion Elements,
ch. 8 (recovery factor Pr^(1/3); the Space Shuttle main engine's throat heat flux of about
160 MW/m^2; from memory).
"""

import json
import math

import pandas as pd
import pytest
from click.testing import CliRunner

import perfchain as pc
from perfchain.cli.main import main
from perfchain.nozzle.heat_flux import bartz_coefficient

BASE = ["chamber", "--oxidizer", "LOX", "--fuel", "RP-1", "--mixture-ratio", "2.6", "--chamber-pressure", "70 bar",
        "--area-ratio", "12", "--contraction-ratio", "4", "--characteristic-length", "1.1 m", "--stations", "24"]


def run(args):
    return CliRunner().invoke(main, args)


@pytest.fixture(scope="module")
def cli_json():
    res = run(BASE + ["--thrust", "50 kN", "--wall-temperature", "750 K", "--json"])
    assert res.exit_code == 0, res.output
    return json.loads(res.output)


def test_json_contract(cli_json):
    d = cli_json
    for key in ("throat_diameter", "chamber_diameter", "chamber_length", "contour", "peak_heat_flux",
                "peak_heat_flux_x", "safety"):
        assert key in d
    for st in d["contour"]:
        for key in ("x", "radius", "area_ratio", "pressure", "temperature", "mach", "heat_transfer_coefficient",
                    "adiabatic_wall_temperature", "heat_flux"):
            assert isinstance(st[key], float) and math.isfinite(st[key])
    xs = [st["x"] for st in d["contour"]]
    assert xs[0] == 0.0 and xs == sorted(xs) and xs[-1] > d["chamber_length"]
    assert d["peak_heat_flux"] == max(st["heat_flux"] for st in d["contour"])
    assert "licensed practice" in d["safety"] and "preliminary" in d["safety"].lower()


def test_bartz_recomputed_by_hand_at_the_throat(cli_json):
    # Bartz (1957), SI form, from the tool's own reported stagnation values and throat station:
    # h = 0.026/Dt^0.2 (mu^0.2 cp/Pr^0.6)_0 (p0/c*)^0.8 (Dt/Rc)^0.1 (At/A)^0.9 sigma,
    # sigma = 1/([0.5 Tw/T0 (1 + (g-1)/2 M^2) + 0.5]^0.68 (1 + (g-1)/2 M^2)^0.12)
    d, b = cli_json, cli_json["bartz"]
    th = next(st for st in d["contour"] if st["area_ratio"] == 1.0)
    assert th["mach"] == pytest.approx(1.0, abs=1e-9)
    stag = 1 + 0.5 * (th["gamma"] - 1) * th["mach"] ** 2
    sigma = 1 / ((0.5 * 750.0 / b["stagnation_temperature"] * stag + 0.5) ** 0.68 * stag ** 0.12)
    h = (0.026 / b["throat_diameter"] ** 0.2 * b["viscosity"] ** 0.2 * b["cp"] / b["prandtl"] ** 0.6
         * (b["stagnation_pressure"] / b["cstar"]) ** 0.8 * (b["throat_diameter"] / b["throat_curvature_radius"]) ** 0.1
         * sigma)
    assert th["heat_transfer_coefficient"] == pytest.approx(h, rel=1e-12)
    # adiabatic wall temperature with the turbulent recovery factor Pr^(1/3) (Sutton & Biblarz ch. 8)
    taw = th["temperature"] + th["prandtl"] ** (1 / 3) * (b["stagnation_temperature"] - th["temperature"])
    assert th["adiabatic_wall_temperature"] == pytest.approx(taw, rel=1e-12)
    assert th["heat_flux"] == pytest.approx(h * (taw - 750.0), rel=1e-12)
    # the throat radius of curvature is the mean of 1.5 Rt and 0.382 Rt (common practice)
    assert b["throat_curvature_radius"] == pytest.approx(0.941 * b["throat_diameter"] / 2, rel=1e-12)
    # c* of the correlation is p0 / (rho u)* of the same expansion: within 1 % of the ideal c*
    # referred to the injector pressure (a finite chamber loses some stagnation pressure)
    assert b["cstar"] == pytest.approx(d["performance"]["cstar"], rel=0.02)


def test_contour_gas_matches_the_point(cli_json):
    # the stations' gas comes from the same isentrope as the point's throat and exit (solved here on the
    # full species set, there on a pruned one: equal to the solvers' tolerance)
    d, perf = cli_json, cli_json["performance"]
    th = next(st for st in d["contour"] if st["area_ratio"] == 1.0)
    for st, ref in ((th, perf["throat"]), (d["contour"][-1], perf["exit"])):
        assert st["pressure"] == pytest.approx(ref["pressure"], rel=1e-6)
        assert st["temperature"] == pytest.approx(ref["temperature"], rel=1e-6)
        assert st["mach"] == pytest.approx(ref["mach"], rel=1e-6)
    # the cylinder is the finite chamber's nozzle inlet (contraction ratio 4)
    assert d["contour"][0]["pressure"] == pytest.approx(perf["finite_chamber"]["nozzle_inlet_pressure"], rel=1e-6)


def test_heat_flux_peaks_near_the_throat(cli_json):
    # Bartz's (At/A)^0.9 makes the peak sit at or just upstream of the throat (Sutton & Biblarz ch. 8,
    # from memory: the peak is at the throat or slightly upstream)
    d = cli_json
    x_t = d["chamber_length"]
    assert abs(d["peak_heat_flux_x"] - x_t) <= 0.05 * x_t
    # a LOX/RP-1 throat at 70 bar sees tens of MW/m^2 (Sutton & Biblarz ch. 8, from memory: 10-160 MW/m^2
    # across engines, the high end for the largest pressures)
    assert 10e6 < d["peak_heat_flux"] < 160e6
    for st in d["contour"]:
        assert st["heat_flux"] > 0 and st["adiabatic_wall_temperature"] > 750.0


def test_heat_flux_scales_with_throat_diameter_to_the_minus_0_2():
    # Bartz (1957): h ~ Dt^-0.2 with the radii of curvature in proportion to the throat (Dt/Rc fixed);
    # the same point, so the gas is identical at every area ratio
    kw = dict(oxidizer="LOX", fuel="RP-1", mixture_ratio=2.6, chamber_pressure="50 bar", area_ratio=6,
              contraction_ratio=3, characteristic_length="1.0 m", points=20)
    small, big = pc.chamber(throat_diameter="40 mm", **kw), pc.chamber(throat_diameter="160 mm", **kw)
    for a, b in zip(small.stations, big.stations):
        assert b["area_ratio"] == pytest.approx(a["area_ratio"], rel=1e-9)
        assert b["heat_transfer_coefficient"] / a["heat_transfer_coefficient"] == pytest.approx(4.0 ** -0.2, rel=1e-6)
        assert b["heat_flux"] / a["heat_flux"] == pytest.approx(4.0 ** -0.2, rel=1e-6)


def test_heat_transfer_coefficient_scales_with_chamber_pressure_to_the_0_8():
    # Bartz (1957): h ~ (p0/c*)^0.8. Over 3-12 MPa the chamber composition of LOX/RP-1 shifts a little
    # (less dissociation at higher pressure), which moves c*, mu, cp and Pr by 1-2 %; those shifts
    # largely cancel in the group, so h / pc^0.8 at the throat stays within 1.5 % of constant.
    kw = dict(oxidizer="LOX", fuel="RP-1", mixture_ratio=2.6, area_ratio=8, contraction_ratio=4,
              characteristic_length="1.1 m", throat_diameter="80 mm", points=20, wall_temperature="700 K")
    ratios = []
    for p in (3e6, 6e6, 12e6):
        d = pc.chamber(chamber_pressure=p, **kw)
        ratios.append(d.stations[d.contour.throat_index]["heat_transfer_coefficient"] / p ** 0.8)
    assert max(ratios) / min(ratios) - 1 < 0.015
    # at fixed gas properties the correlation itself scales exactly (closed form)
    h = [bartz_coefficient(0.08, p, 1800.0, 1e-4, 2000.0, 0.6, 0.04, 1.0, 1.2) for p in (3e6, 6e6, 12e6)]
    assert h[2] / h[0] == pytest.approx(4.0 ** 0.8, rel=1e-12)


def test_space_shuttle_main_engine_class_throat_heat_flux():
    # Sutton & Biblarz, Rocket Propulsion Elements, ch. 8 (from memory): the SSME's throat heat flux is
    # about 160 MW/m^2. Engine (from memory, public figures): LOX/LH2 at O/F 6.0, 20.6 MPa, throat
    # 262 mm, contraction ratio 2.96, area ratio 77.5; hot-wall temperature taken as 800 K. The Bartz
    # correlation is itself good to about +/- 30 % at the throat, so the check allows 0.7-1.3 times.
    d = pc.chamber("LOX", "LH2", mixture_ratio=6.0, chamber_pressure="20.6 MPa", area_ratio=77.5,
                   contraction_ratio=2.96, characteristic_length="0.9 m", throat_diameter="262 mm",
                   wall_temperature="800 K", points=24)
    q = d.stations[d.contour.throat_index]["heat_flux"]
    assert 0.7 * 160e6 < q < 1.3 * 160e6


def test_bell_divergence_feeds_the_delivered_chain(cli_json):
    d = cli_json
    assert d["performance"]["losses"]["factors"]["divergence"] == pytest.approx(d["nozzle"]["divergence_factor"],
                                                                              rel=1e-12)
    assert d["nozzle"]["kind"] == "bell" and d["nozzle"]["divergence_factor"] > 0.983
    # sized with the delivered Isp: F = Cf_delivered pc At (definition of Cf)
    perf = d["performance"]
    at = math.pi * d["throat_diameter"] ** 2 / 4
    assert perf["delivered"]["cf_vacuum"] * perf["chamber_pressure"] * at == pytest.approx(50e3, rel=1e-9)


def test_out_writes_the_table_and_plot(tmp_path):
    res = run(BASE + ["--throat-diameter", "60 mm", "--contour", "conical", "--nozzle-half-angle", "15deg",
                      "--out", str(tmp_path)])
    assert res.exit_code == 0, res.output
    names = sorted(p.name for p in tmp_path.iterdir())
    assert names == ["chamber-contour.csv", "chamber-contour.parquet", "chamber-heat-flux.png", "chamber.json"]
    csv = pd.read_csv(tmp_path / "chamber-contour.csv", comment="#")
    pq = pd.read_parquet(tmp_path / "chamber-contour.parquet")
    assert list(csv.columns) == list(pq.columns) and len(csv) == len(pq) > 20
    assert pq.attrs["units"]["heat_flux"] == "W/m2"
    assert (tmp_path / "chamber-heat-flux.png").read_bytes()[:4] == b"\x89PNG"
    assert "licensed practice" in res.output


@pytest.mark.parametrize("extra, field", [
    (["--thrust", "50 kN", "--characteristic-length", "0 m"], "characteristic_length"),
    (["--thrust", "50 kN", "--characteristic-length", "-1 m"], "characteristic_length"),
    (["--thrust", "50 kN", "--contraction-ratio", "0"], "contraction_ratio"),
    (["--thrust", "50 kN", "--contraction-ratio", "-3"], "contraction_ratio"),
    (["--thrust", "50 kN", "--bell-length-fraction", "0.95"], "bell_length_fraction"),
    (["--thrust", "50 kN", "--bell-length-fraction", "0.5"], "bell_length_fraction"),
    (["--thrust", "50 kN", "--wall-temperature", "5000 K"], "wall_temperature"),
    (["--thrust", "50 kN", "--throat-diameter", "50 mm"], "throat"),
    (["--thrust", "50 kN", "--contour", "spike"], "contour"),
])
def test_bad_input_is_one_line_exit_2(extra, field):
    res = run(BASE + extra)
    assert res.exit_code == 2, res.output
    line = res.output.strip()
    assert "\n" not in line and line.startswith(f"error: {field}:"), line
    assert "Traceback" not in res.output
