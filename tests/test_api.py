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
    # closed form: c_vac - c_amb = p_a eps c* / p_c (thrust coefficient definition)
    r = lox_rp1
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
