"""Formulations (solid grains, monopropellants) and hydrazine decomposition."""

import math

import pytest

from perfchain.errors import InputError
from perfchain.performance.chain import performance_of
from perfchain.propellants.decomposition import check_ammonia_dissociation
from perfchain.propellants.formulation import make_formulation, parse_formulation
from perfchain.propellants.ingredients import custom_ingredient, get_ingredient
from perfchain.propellants.mixture import make_propellant
from perfchain.thermo.decomposition import frozen_nozzle, hydrazine_decomposition

COMPOSITE = "AP=0.68, Al=0.18, HTPB=0.14"


def test_text_mapping_and_ingredient_forms_agree():
    a = make_formulation(COMPOSITE)
    b = make_formulation({"ammonium perchlorate": 0.68, "aluminium": 0.18, get_ingredient("HTPB"): 0.14})
    c = make_formulation("AP=68%, Al=18%, HTPB=14%")
    assert a.elements == b.elements == c.elements and a.enthalpy == b.enthalpy == c.enthalpy
    assert a.name == COMPOSITE and a.is_formulation
    assert (a.oxidizer, a.fuel, a.mixture_ratio, a.equivalence_ratio, a.fuel_percent) == (None,) * 5


def test_element_totals_and_enthalpy_are_mass_weighted():
    # per kg: 0.68/117.49 kmol NH4ClO4 (CRC formula weight), 0.18/26.98 kmol Al
    p = make_formulation(COMPOSITE)
    assert p.elements["Cl"] == pytest.approx(0.68 / 117.49, rel=1e-4)
    assert p.elements["Al"] == pytest.approx(0.18 / 26.982, rel=1e-4)
    ap, htpb = get_ingredient("AP"), get_ingredient("HTPB")
    assert p.enthalpy == pytest.approx(0.68 * ap.enthalpy + 0.14 * htpb.enthalpy, rel=1e-12)


def test_bulk_density_adds_volumes():
    # theoretical maximum density 1 / sum(w/rho): 1 / (0.68/1950 + 0.18/2699 + 0.14/920) (hand)
    p = make_formulation(COMPOSITE)
    assert p.bulk_density == pytest.approx(1.0 / (0.68 / 1950 + 0.18 / 2699 + 0.14 / 920), rel=1e-12)
    assert make_formulation("H2O2-98").bulk_density == get_ingredient("H2O2-98").density


def test_reactants_block_recomputes_what_the_chain_burns():
    p = make_formulation(COMPOSITE)
    r = p.reactants_dict()
    assert r["enthalpy"] == p.enthalpy
    assert r["elements"] == {e: 1e3 * n for e, n in p.elements.items()}     # mol/kg
    assert [i["name"] for i in r["ingredients"]] == ["AP", "Al", "HTPB"]
    biprop = make_propellant("LOX", "RP-1", 2.5).reactants_dict()
    assert [round(i["mass_fraction"], 6) for i in biprop["ingredients"]] == [round(2.5 / 3.5, 6), round(1 / 3.5, 6)]


def test_bipropellant_view_is_unchanged():
    p = make_propellant("LOX", "RP-1", mixture_ratio=2.56)
    assert not p.is_formulation and p.name == "LOX/RP-1" and p.describe() == "LOX/RP-1 at O/F 2.56"
    # the same numbers as the premixed formulation of the same masses
    q = make_formulation({"LOX": 2.56 / 3.56, "RP-1": 1 / 3.56})
    assert q.enthalpy == pytest.approx(p.enthalpy, rel=1e-12)
    for e in p.elements:
        assert q.elements[e] == pytest.approx(p.elements[e], rel=1e-12)


def test_a_formulation_can_be_a_bipropellant_fuel():
    # LOX with RP-1 carrying 10 % aluminium: the fuel is a blend by mass
    p = make_propellant("LOX", "RP-1=0.9, Al=0.1", mixture_ratio=2.0)
    rp1, al = get_ingredient("RP-1"), get_ingredient("Al")
    assert p.fuel.elements["Al"] == pytest.approx(0.1 * al.elements["Al"])
    assert p.fuel.elements["C"] == pytest.approx(0.9 * rp1.elements["C"])


@pytest.mark.parametrize("parts,field,text", [
    ("AP=0.68, Al=0.18, HTPB=0.1", "propellant", "these sum to 0.96"),
    ({"AP": 0.7, "Al": 0.2, "HTPB": 0.2}, "propellant", "these sum to 1.1"),
    ("AP=0.68, Al=0.18, HTPB=0.140002", "propellant", "these sum to 1.000002"),
    ("AP=0.68, Alu=0.18, HTPB=0.14", "propellant", "did you mean"),
    ("AP=0.68, Al=-0.18, HTPB=0.5", "propellant.Al", "a mass fraction in (0, 1]"),
    ("AP 0.68, Al=0.32", "propellant", "NAME=FRACTION"),
    ("AP=0.5, ap=0.5", "propellant.ap", "each ingredient once"),
    ("Al=0.5, HTPB=0.5", "propellant", "oxidizing power"),
    ("KN", "propellant", "reducing power"),
    ("water", "propellant", "oxidizing power"),
    ("", "propellant", "NAME=FRACTION"),
])
def test_bad_formulations_are_one_line(parts, field, text):
    with pytest.raises(InputError) as info:
        make_formulation(parts)
    assert info.value.field == field
    assert text in str(info.value) and "\n" not in str(info.value)


def test_sum_within_tolerance_is_accepted_and_normalized():
    p = make_formulation("AP=0.68, Al=0.18, HTPB=0.1400005")
    assert math.fsum(w for _, w in p.parts) == pytest.approx(1.0, abs=1e-15)


def test_monopropellant_flag_of_custom_ingredients():
    azide = custom_ingredient("my-mono", {"N": 2, "H": 4}, "50.63 kJ/mol", monopropellant=True)
    assert make_formulation(azide).parts[0][0] is azide
    with pytest.raises(InputError, match="oxidizing power"):
        make_formulation(custom_ingredient("my-fuel", {"N": 2, "H": 4}, "50.63 kJ/mol"))


def test_parse_formulation_keeps_names():
    assert parse_formulation("KN=0.65,sorbitol=0.35") == {"KN": 0.65, "sorbitol": 0.35}


# Adiabatic decomposition of hydrogen peroxide at 1 atm, from the liquid at 25 C:
# about 1020 K for 90 % and 1220 K for 98 % (peroxide handbooks and Sutton & Biblarz,
# Rocket Propulsion Elements, monopropellant table; from memory, +/- 30 K).
@pytest.mark.parametrize("grade,temperature", [("H2O2-90", 1020.0), ("H2O2-98", 1220.0)])
def test_peroxide_decomposition_temperature(grade, temperature):
    # vacuum ambient: a 1 atm chamber at 1 atm ambient is infeasible (perfchain.performance.ambient)
    r = performance_of(make_formulation(grade), 101325.0, area_ratio=2.0, ambient_pressure=0.0)
    assert r.chamber.temperature == pytest.approx(temperature, abs=30)
    assert set(r.chamber.composition) >= {"H2O", "O2"}
    assert r.mixture_ratio is None and r.oxidizer is None and r.isp_vacuum > 0


def test_nitrous_oxide_decomposition_temperature():
    """N2O decomposes to N2 + 1/2 O2 at about 1640 C (1913 K) adiabatically from the gas at room
    temperature (Zakirov, Sweeting, Lawrence & Sellers, Nitrous oxide as a rocket propellant, Acta
    Astronautica 48, 2001; from memory, so +/- 60 K). Gas enthalpy of formation +82.05 kJ/mol
    (NIST-JANAF Thermochemical Tables, 4th ed., N2O(g)). The bundled record, the saturated liquid
    at 20 C, lies 11.04 kJ/mol lower (its source): its chamber is cooler by that energy over the
    products' cp (energy balance, closed form; cp varies over the 200 K, hence 10 %)."""
    gas = custom_ingredient("N2O-gas", {"N": 2, "O": 1}, "82.05 kJ/mol", phase="gas", monopropellant=True)
    hot = performance_of(make_formulation({gas: 1.0}), 10e5, area_ratio=2.0, ambient_pressure=0.0)
    assert hot.chamber.temperature == pytest.approx(1913.0, abs=60)
    assert set(hot.chamber.composition) >= {"N2", "O2"}
    liquid = performance_of(make_formulation("N2O"), 10e5, area_ratio=2.0, ambient_pressure=0.0)
    drop = (gas.enthalpy - get_ingredient("N2O").enthalpy) / liquid.chamber.cp
    assert hot.chamber.temperature - liquid.chamber.temperature == pytest.approx(drop, rel=0.1)


def test_monopropellants_go_through_the_chain():
    # nitromethane decomposes hot (well above 2000 K); its Isp exceeds peroxide's
    # (Sutton & Biblarz monopropellant table, from memory: qualitative)
    nm = performance_of(make_formulation("nitromethane"), 2e6, area_ratio=20)
    h2o2 = performance_of(make_formulation("H2O2-98"), 2e6, area_ratio=20)
    assert nm.chamber.temperature > 2000 and nm.isp_vacuum > h2o2.isp_vacuum > 0


def test_composite_without_metal_goes_through_the_chain():
    # 86 % AP / 14 % HTPB: Tc near 2900-3000 K for non-aluminized composites of this solids
    # loading at 1000 psia, Isp to 1 atm 230-250 s (Sutton & Biblarz, solid-propellant tables;
    # from memory, loose); the chlorine leaves as HCl (an earlier product set lacked HCl and
    # gave ~2500 K). The independent all-species Cantera calculation (tests/plain_reference) pins it.
    r = performance_of(make_formulation("AP=0.86, HTPB=0.14"), 6894757.29, exit_pressure=101325.0)
    assert 2800 < r.chamber.temperature < 3100
    assert r.chamber.composition["HCL"] > 0.1
    assert 225 < r.isp_ambient < 255
    assert r.bulk_density == pytest.approx(1.0 / (0.86 / 1950 + 0.14 / 920))


# Hydrazine at a fixed ammonia dissociation X: chamber temperature about 1650 K at X = 0
# falling to about 870 K at X = 1 (Sutton & Biblarz, Rocket Propulsion Elements,
# hydrazine decomposition figure; from memory, +/- 40 K).
@pytest.mark.parametrize("x,temperature", [(0.0, 1650.0), (1.0, 870.0)])
def test_hydrazine_temperature_against_dissociation(x, temperature):
    assert hydrazine_decomposition(x).temperature == pytest.approx(temperature, abs=40)


def test_hydrazine_temperature_falls_with_dissociation():
    # NH3 -> 1/2 N2 + 3/2 H2 absorbs 45.9 kJ/mol (NASA data): monotone falling
    t = [hydrazine_decomposition(x / 10).temperature for x in range(11)]
    assert all(a > b for a, b in zip(t, t[1:]))


def test_hydrazine_matches_equilibrium_where_they_coincide():
    # At 1 atm the equilibrium products are almost fully dissociated. Fed the ammonia
    # dissociation of the equilibrium chamber (Cantera data, independent solver path),
    # the energy balance must give its temperature, and the frozen nozzle its frozen Isp.
    r = performance_of(make_formulation("N2H4"), 101325.0, area_ratio=3.0, flow="frozen",
                       ambient_pressure=0.0)
    y = r.chamber.composition["NH3"]              # 4(1-X) / (5 + 4X)
    x = (4 - 5 * y) / (4 + 4 * y)
    c = hydrazine_decomposition(x)
    assert c.temperature == pytest.approx(r.chamber.temperature, abs=0.5)
    n = frozen_nozzle(c, 101325.0, area_ratio=3.0, ambient_pressure=0.0)
    assert n.cstar == pytest.approx(r.cstar, rel=5e-4)
    assert n.isp_vacuum == pytest.approx(r.isp_vacuum, rel=5e-4)


@pytest.mark.parametrize("value,propellant,text", [
    (-0.1, "N2H4", "a fraction from 0 to 1"), (1.01, "N2H4", "a fraction from 0 to 1"),
    (float("nan"), "N2H4", "a fraction from 0 to 1"), ("half", "N2H4", "a fraction from 0 to 1"),
    (0.5, "H2O2-98", "only for hydrazine alone"), (0.5, "AP=0.86, HTPB=0.14", "only for hydrazine alone"),
])
def test_bad_ammonia_dissociation(value, propellant, text):
    with pytest.raises(InputError) as info:
        check_ammonia_dissociation(value, make_formulation(propellant))
    assert info.value.field == "ammonia_dissociation" and text in str(info.value)
    assert "\n" not in str(info.value)


def test_hybrid_pairs_work_as_bipropellants():
    # N2O/paraffin near its optimum O/F of about 7-8 (hybrid-rocket literature,
    # Karabeyoglu et al.; from memory, loose): Isp vac at eps 10 in 270-300 s
    r = performance_of(make_propellant("N2O", "paraffin", 7.5), 3e6, area_ratio=10)
    assert 270 < r.isp_vacuum < 300
    assert make_propellant("GOX", "HDPE", 2.0).fuel.name == "HDPE"


def test_hydrazine_beyond_the_data_says_how_far_they_reach():
    # fully dissociated ammonia (X = 1) expands frozen below the 200 K start of the NASA data by
    # area ratio 50 at 10 bar; the refusal names the area ratio where the data end, and that
    # limit is the real one: just inside it the point is solved at >= 200 K, just beyond refused
    import re

    import perfchain as pc
    from perfchain.errors import SolverError

    args = dict(propellant="N2H4", ammonia_dissociation=1.0, chamber_pressure="10 bar")
    with pytest.raises(SolverError) as info:
        pc.point(**args, area_ratio=50)
    limit = float(re.search(r"up to area ratio ([0-9.]+)", str(info.value)).group(1))
    assert 2 < limit < 50 and "\n" not in str(info.value)
    inside = pc.point(**args, area_ratio=limit * 0.995)
    assert 200.0 <= inside.exit.temperature < 205.0
    with pytest.raises(SolverError):
        pc.point(**args, area_ratio=limit * 1.005)
