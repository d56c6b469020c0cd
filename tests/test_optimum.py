"""Optimum mixture ratio by bounded search, against handbook optima, and pair comparison."""

import pytest

from perfchain.errors import InputError
from perfchain.study.optimum import compare_pairs, optimum_mixture_ratio, parse_pair
from perfchain.performance.chain import performance


@pytest.fixture(scope="module")
def rp1_sea_level():
    return optimum_mixture_ratio("LOX", "RP-1", "1000 psi", exit_pressure="1 atm", objective="isp_ambient")


def test_lox_rp1_optimum_near_handbook(rp1_sea_level):
    # Sutton & Biblarz, Rocket Propulsion Elements, Table 5-5 / Fig. 5-1 (from memory): LOX/RP-1,
    # 1000 psia, expanded to 1 atm, shifting: best sea-level Isp near O/F 2.3-2.6, about 300 s.
    o = rp1_sea_level
    assert 2.3 <= o.mixture_ratio <= 2.6
    assert o.value == pytest.approx(300.0, rel=0.015)
    assert not o.at_bound


def test_optimum_is_a_peak_not_a_grid_value(rp1_sea_level):
    # a maximum: 3 % either side is worse (definition of the optimum; not a grid scan so the
    # answer is no round number)
    o = rp1_sea_level
    for f in (0.97, 1.03):
        p = performance("LOX", "RP-1", mixture_ratio=o.mixture_ratio * f, chamber_pressure="1000 psi",
                        exit_pressure="1 atm")
        assert p.isp_ambient < o.value
    assert round(o.mixture_ratio, 2) != round(o.mixture_ratio, 1)


def test_n2o4_n2h4_optimum_near_handbook():
    # Sutton & Biblarz, Rocket Propulsion Elements, Table 5-5 (from memory): N2O4/N2H4, 1000 psia
    # to 1 atm, shifting: best O/F about 1.2-1.4, Isp about 292 s.
    o = optimum_mixture_ratio("N2O4", "N2H4", "1000 psi", exit_pressure="1 atm", objective="isp_ambient")
    assert 1.2 <= o.mixture_ratio <= 1.45
    assert o.value == pytest.approx(292.0, rel=0.02)


def test_compare_ranks_by_the_column_asked():
    # LOX/LH2 has the higher Isp and the far lower bulk density than LOX/RP-1, so ranking by
    # density-Isp turns the order round (Sutton & Biblarz, Table 5-5, densities; from memory).
    by_isp = compare_pairs(["LOX/LH2", "LOX/RP-1"], "70 bar", area_ratio=30)
    assert [r["pair"] for r in by_isp] == ["LOX/LH2", "LOX/RP-1"] and by_isp[0]["rank"] == 1
    # LOX/LH2 vacuum-Isp optimum is far fuel-rich of stoichiometric 7.94 (common practice: 4-6)
    assert 3.5 < by_isp[0]["mixture_ratio"] < 6.5
    by_rho = compare_pairs(["LOX/LH2", "LOX/RP-1"], "70 bar", area_ratio=30, rank_by="density_isp")
    assert [r["pair"] for r in by_rho] == ["LOX/RP-1", "LOX/LH2"]
    r = by_rho[0]
    assert r["density_isp"] == pytest.approx(r["bulk_density"] * r["isp_vacuum"], rel=1e-12)


@pytest.mark.parametrize("call", [
    lambda: optimum_mixture_ratio("LOX", "RP-1", "70 bar", area_ratio=30, objective="thrust"),
    lambda: compare_pairs(["LOX/RP-1"], "70 bar", area_ratio=30, rank_by="price"),
    lambda: compare_pairs(["LOX/RP-1", "LOX / RP-1"], "70 bar", area_ratio=30),
    lambda: parse_pair("LOX-RP-1"),
])
def test_bad_choices_are_input_errors(call):
    with pytest.raises(InputError):
        call()
