"""A study engine's thermal block: the chamber design in the run, its files and its report section."""

import math
from pathlib import Path

import pytest

from perfchain.errors import InputError
from perfchain.study.runner import compute_study
from perfchain.study.schema import load_study, parse_study

EXAMPLE = Path(__file__).resolve().parent.parent / "examples" / "regen_chamber_heat_flux.toml"


@pytest.fixture(scope="module")
def wren():
    return compute_study(load_study(EXAMPLE), max_list=1)


def test_example_designs_each_thermal_engine(wren):
    assert set(wren.thermal) == {"Wren-25", "Wren-25C"}
    bell, cone = wren.thermal["Wren-25"], wren.thermal["Wren-25C"]
    for d in (bell, cone):
        g = d.geometry
        # closed forms: Vc = L* At, Dc = Dt sqrt(CR) (definitions of L* and contraction ratio)
        assert g.chamber_volume == pytest.approx(1.1 * g.throat_area, rel=1e-12)
        assert g.chamber_diameter == pytest.approx(g.throat_diameter * math.sqrt(3.5), rel=1e-12)
        assert d.performance.losses["factors"]["cstar_efficiency"] == 0.96
        assert min(s["wall_temperature"] for s in d.stations) == 750.0
    # the throat is sized for 25 kN at sea level with the delivered Cf: the bell (divergence ~0.99)
    # needs a smaller throat than the 15 deg cone (0.983)
    assert bell.geometry.throat_diameter < cone.geometry.throat_diameter
    assert cone.contour.divergence_factor == pytest.approx((1 + math.cos(math.radians(15))) / 2, rel=1e-12)


def test_report_shows_the_thermal_section(wren, tmp_path):
    from perfchain.study.report import render_report
    from perfchain.study.thermal import write_thermal

    figs = write_thermal(wren.thermal, {"Wren-25": "wren-25", "Wren-25C": "wren-25c"}, tmp_path)
    assert (tmp_path / "tables" / "engine-wren-25-contour.csv").exists()
    assert (tmp_path / "plots" / "wren-25-heat-flux.png").read_bytes()[:4] == b"\x89PNG"
    meta = {"perfchain": "x", "cantera": "x", "python": "x", "date": "x", "study_file": "x", "study_sha256": "0" * 64,
            "thermo_data": {"gas": "g", "condensed": "c", "source": "s"},
            "ingredient_data": {"file": "f", "sha256": "0" * 64}}
    html = render_report(wren, units="si", figures=figs, meta=meta, study_text="", files=[])
    assert html.count("Thrust chamber and wall heat flux") == 2
    assert "licensed practice" in html and "wren-25 heat" not in html
    assert html.count("contour and wall heat flux") >= 2


BASE = """
[study]
title = "t"
[[engine]]
name = "E"
oxidizer = "LOX"
fuel = "RP-1"
mixture_ratio = [2.6]
chamber_pressure = "40 bar"
area_ratio = 8
thrust = "10 kN"
"""


@pytest.mark.parametrize("extra, field", [
    ('[engine.thermal]\ncharacteristic_length = "0 m"\ncontraction_ratio = 3.0\n',
     "engine[1].thermal.characteristic_length"),
    ('[engine.thermal]\nbell_length_fraction = 0.99\ncontraction_ratio = 3.0\n',
     "engine[1].thermal.bell_length_fraction"),
    ('[engine.thermal]\ncontour = "spike"\n', "engine[1].thermal.contour"),
])
def test_bad_thermal_blocks_are_one_line(extra, field):
    with pytest.raises(InputError) as err:
        parse_study(BASE + extra)
    assert str(err.value).startswith(field) and "\n" not in str(err.value)


def test_thermal_block_needs_a_contraction_ratio_and_a_size():
    with pytest.raises(InputError) as err:
        parse_study(BASE + '[engine.thermal]\ncharacteristic_length = "1 m"\n')
    assert str(err.value).startswith("engine[1].thermal.contraction_ratio:")
    with pytest.raises(InputError) as err:
        parse_study(BASE.replace('thrust = "10 kN"', '') + '[engine.thermal]\ncontraction_ratio = 3.0\n')
    assert str(err.value).startswith("engine[1].thermal.throat_diameter:")
