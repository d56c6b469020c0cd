"""Ingredient records and mixtures against published data."""

import pytest

from perfchain.errors import InputError
from perfchain.propellants.ingredients import blend, custom_ingredient, get_ingredient, list_ingredients
from perfchain.propellants.mixture import make_propellant, stoichiometric_mixture_ratio
from perfchain.thermo.products import gas_species

KJ = 1e6  # J/kmol per kJ/mol


def molar_h(name):
    i = get_ingredient(name)
    return i.enthalpy * i.molar_mass / KJ  # kJ/mol


@pytest.mark.parametrize("name,h,tol", [
    # liquids at 298.15 K: NIST Chemistry WebBook, condensed-phase enthalpy of formation of
    # N2H4, MMH (+54.1 to +54.2; from memory), UDMH (+48.3 to +48.9; from memory), H2O2, ethanol
    ("N2H4", 50.63, 0.05), ("MMH", 54.15, 0.1), ("UDMH", 48.6, 0.35),
    ("H2O2", -187.8, 0.05), ("ethanol", -277.6, 0.05),
    ("N2O4", -19.5, 0.1),  # CRC Handbook of Chemistry and Physics, N2O4(l); from memory
    ("GCH4", -74.87, 0.02),  # NIST-JANAF Thermochemical Tables, 4th ed. (Chase 1998), CH4(g)
    # cryogens at the normal boiling point, relative to the elements' reference states: NASA Glenn
    # data, McBride, Zehe & Gordon, NASA TP-2002-211556; from memory, hence 0.3 kJ/mol
    ("LOX", -12.979, 0.3), ("LH2", -9.012, 0.3), ("LCH4", -89.23, 0.3),
])
def test_enthalpies_match_published_values(name, h, tol):
    assert molar_h(name) == pytest.approx(h, abs=tol)


def test_gas_ingredients_agree_with_the_nasa_data():
    # Cantera's shipped NASA Glenn fits (an outside source) at 298.15 K; the
    # NASA fit gives -74.60 kJ/mol for CH4, JANAF -74.87: they differ by 0.27
    assert molar_h("GCH4") == pytest.approx(gas_species("CH4").thermo.h(298.15) / KJ, abs=0.3)


def test_liquid_n2o_lies_below_the_gas_by_the_heat_of_vaporization_and_more():
    # The N2O record is the saturated liquid at 20 C: below the NASA gas value by the
    # heat of vaporization (16.53 kJ/mol at the normal boiling point 184.7 K, NIST
    # WebBook; from memory, taken to 293.15 K by Watson's correlation, exponent 0.38,
    # critical point 309.52 K; common practice) plus the non-ideality of the
    # saturated vapour at 50 bar (several kJ/mol): so 8-14 kJ/mol below.
    n2o = get_ingredient("N2O")
    assert n2o.temperature == 293.15 and n2o.phase.startswith("liquid")
    h_vap = 16.53 * ((309.52 - 293.15) / (309.52 - 184.67)) ** 0.38
    gap = gas_species("N2O").thermo.h(293.15) / KJ - molar_h("N2O")
    assert h_vap < gap < h_vap + 6.0


@pytest.mark.parametrize("name,nasa", [("Al", "AL(cr)"), ("Mg", "Mg(cr)"), ("water", "H2O(L)")])
def test_condensed_records_agree_with_the_nasa_data(name, nasa):
    # NASA Glenn thermodynamic database (McBride, Zehe & Gordon, NASA/TP-2002-211556),
    # as shipped with Cantera: condensed species at 298.15 K
    import cantera as ct

    sp = {s.name: s for s in ct.Species.list_from_file("nasa_condensed.yaml")}
    assert molar_h(name) == pytest.approx(sp[nasa].thermo.h(298.15) / KJ, abs=0.01)


# Gross heats of combustion at 298.15 K to CO2(g), H2O(l), N2(g) [kJ/mol] from memory:
# sucrose 5644 and methanol 726.1 (CRC Handbook), paraffin wax about 46.5 MJ/kg
# (hybrid-fuel literature, 46-47 MJ/kg), PMMA 25-27 MJ/kg (polymer heat-of-combustion
# tables); products from CODATA Key Values (CO2 -393.51, H2O(l) -285.83 kJ/mol).
@pytest.mark.parametrize("name,heat,rel", [
    ("sucrose", 5644.0, 0.002), ("methanol", 726.1, 0.002),
    ("paraffin", 46.5 * 450.88, 0.015), ("PMMA", 26.0 * 100.12, 0.04),
])
def test_formation_enthalpies_reproduce_heats_of_combustion(name, heat, rel):
    i = get_ingredient(name)
    f = i.formula
    products = f.get("C", 0) * -393.51 + f.get("H", 0) / 2 * -285.83
    assert products - molar_h(name) == pytest.approx(-heat, rel=rel)


@pytest.mark.parametrize("name,molar_mass", [
    # CRC Handbook formula weights (from memory)
    ("AP", 117.49), ("AN", 80.04), ("KN", 101.10), ("sucrose", 342.30), ("sorbitol", 182.17),
    ("NG", 227.09), ("nitromethane", 61.04), ("ADN", 124.06),
])
def test_formulas_give_handbook_molar_masses(name, molar_mass):
    assert get_ingredient(name).molar_mass == pytest.approx(molar_mass, abs=0.01)


def test_nitrocellulose_nitrogen_content():
    # 12.6 % N by mass as stated in the record (C6H(10-x)O5(NO2)x, x = 2.45)
    nc = get_ingredient("NC")
    from perfchain.propellants.ingredients import atomic_weight

    assert nc.elements["N"] * atomic_weight("N") == pytest.approx(0.126, abs=2e-4)


@pytest.mark.parametrize("name,role", [
    # propellant valences: AP NH4ClO4 = 0 + 4 - 1 - 8 = -5, KNO3 = 1 + 0 - 6 = -5,
    # NG C3H5N3O9 = 12 + 5 - 18 = -1, NC C6H7.55O9.9N2.45 = 24 + 7.55 - 19.8 > 0
    ("AP", "oxidizer"), ("AN", "oxidizer"), ("KN", "oxidizer"), ("ADN", "oxidizer"), ("NG", "oxidizer"),
    ("Al", "fuel"), ("Mg", "fuel"), ("HTPB", "fuel"), ("paraffin", "fuel"), ("NC", "fuel"),
    ("sorbitol", "fuel"), ("water", "inert"),
])
def test_roles_from_valences(name, role):
    assert get_ingredient(name).role == role


def test_cryogens_lie_below_the_gas_by_about_the_heat_of_vaporization():
    # O2: h_gas(90.17 K) - h_liq = heat of vaporization 6.82 kJ/mol (NIST WebBook; from memory)
    h_gas = gas_species("O2").thermo.h(298.15) / KJ - 29.4 * (298.15 - 90.17) / 1e3  # cp ~ 29.4 J/mol/K
    assert h_gas - molar_h("LOX") == pytest.approx(6.82, abs=0.4)


@pytest.mark.parametrize("name,rho", [("LOX", 1141), ("LH2", 70.85), ("N2O4", 1442), ("N2H4", 1008),
                                      ("MMH", 875), ("H2O2", 1443), ("ethanol", 789), ("AP", 1950)])
def test_densities(name, rho):
    # All from memory (not re-read): LOX at 90.2 K and LH2 at 20.3 K, saturated liquid, NIST
    # Chemistry WebBook fluid data; ethanol at 20 C, CRC Handbook of Chemistry and Physics;
    # N2O4 at 21 C, N2H4 and MMH at 20 C, H2O2 (100 %) at 25 C, AP: handbook values, source
    # not recorded.
    assert get_ingredient(name).density == pytest.approx(rho, rel=0.002)


def test_names_are_case_insensitive_with_aliases():
    assert get_ingredient("ch4(l)") is get_ingredient("LCH4")
    assert get_ingredient("rp-1").name == "RP-1"
    for n in ["LOX", "LH2", "LCH4", "RP-1", "N2O4", "MMH", "UDMH", "N2H4", "H2O2-90", "H2O2-98", "N2O",
              "GOX", "GH2", "GCH4", "ethanol", "ethanol-75", "NH3", "AP", "AN", "KN", "Al", "Mg", "HTPB",
              "paraffin", "HDPE", "PMMA", "sorbitol", "sucrose", "NC", "NG", "ADN", "ADN-63", "H2O2",
              "H2O2-85", "nitromethane", "methanol"]:
        assert get_ingredient(n.lower()).name == n
    for alias, n in [("ammonium perchlorate", "AP"), ("aluminum", "Al"), ("aluminium", "Al"),
                     ("potassium nitrate", "KN"), ("wax", "paraffin"), ("H2O2-100", "H2O2")]:
        assert get_ingredient(alias).name == n


def test_blend_mass_balance():
    # 75 % ethanol / 25 % water by mass: element totals are the mass-weighted sums
    e75 = get_ingredient("ethanol-75")
    eth, w = get_ingredient("ethanol"), get_ingredient("water")
    for el in ("C", "H", "O"):
        assert e75.elements[el] == pytest.approx(0.75 * eth.elements.get(el, 0) + 0.25 * w.elements.get(el, 0))
    with pytest.raises(InputError, match="sum to 1 within 1e-6 .these sum to 0.9."):
        blend("bad", {"ethanol": 0.5, "water": 0.4})


def test_custom_ingredient_and_stoichiometry():
    # C2H5OH + 3 O2 -> 2 CO2 + 3 H2O: O/F = 3*31.998/46.069 = 2.0837
    fuel = custom_ingredient("my-ethanol", {"C": 2, "H": 6, "O": 1}, "-277.6 kJ/mol", density="789 kg/m^3")
    assert stoichiometric_mixture_ratio(get_ingredient("LOX"), fuel) == pytest.approx(2.0837, rel=1e-4)
    p = make_propellant("LOX", fuel, fuel_percent=25.0)
    assert p.mixture_ratio == pytest.approx(3.0)
    assert p.equivalence_ratio == pytest.approx(2.0837 / 3.0, rel=1e-4)


def test_bulk_density():
    # (1 + r) / (r/rho_o + 1/rho_f), LOX/RP-1 r = 2.56: 3.56 / (2.56/1141 + 1/810) = 1023.5 (hand)
    assert make_propellant("LOX", "RP-1", mixture_ratio=2.56).bulk_density == pytest.approx(1023.5, abs=0.1)


@pytest.mark.parametrize("kwargs,field", [
    (dict(oxidizer="LOXX", fuel="RP-1", mixture_ratio=2), "oxidizer"),
    (dict(oxidizer="LOX", fuel="LOX", mixture_ratio=2), "fuel"),
    (dict(oxidizer="RP-1", fuel="LOX", mixture_ratio=2), "oxidizer"),
    (dict(oxidizer="LOX", fuel="RP-1", mixture_ratio=0), "mixture_ratio"),
    (dict(oxidizer="LOX", fuel="RP-1", mixture_ratio=-1), "mixture_ratio"),
    (dict(oxidizer="LOX", fuel="RP-1", fuel_percent=100), "fuel_percent"),
    (dict(oxidizer="LOX", fuel="RP-1"), "mixture"),
    (dict(oxidizer="LOX", fuel="RP-1", mixture_ratio=2, equivalence_ratio=1), "mixture"),
])
def test_bad_mixture_input(kwargs, field):
    with pytest.raises(InputError) as info:
        make_propellant(**kwargs)
    assert info.value.field == field
    assert "\n" not in str(info.value)


def test_every_bundled_record_has_sources():
    for ing in list_ingredients():
        assert ing.sources, ing.name


def test_listing_caution_names_the_energetic_solids_it_lists():
    # the project's safety rule: the listing that offers AP, NC, NG and metal powders warns about
    # them as it warns about hydrazines and N2O (explosives hazards: common practice)
    from click.testing import CliRunner

    from perfchain.cli.main import main

    out = CliRunner().invoke(main, ["ingredients"]).output
    caution = out.strip().splitlines()[-1]
    assert all(get_ingredient(n).phase in ("solid", "liquid") for n in ("AP", "NC", "NG", "Al"))
    for word in ("AP", "nitrocellulose", "nitroglycerin", "metal powders", "hydrazines", "N2O"):
        assert word in caution, word
