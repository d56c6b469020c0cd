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
    ("N2H4", 50.63, 0.05), ("MMH", 54.15, 0.1), ("UDMH", 48.6, 0.35), ("N2O4", -19.5, 0.1),
    ("H2O2", -187.8, 0.05), ("ethanol", -277.6, 0.05), ("GCH4", -74.87, 0.02),
    # REFERENCES.md, NASA TP-2002-211556 cryogens at the boiling point; from memory
    ("LOX", -12.979, 0.3), ("LH2", -9.012, 0.3), ("LCH4", -89.23, 0.3),
])
def test_enthalpies_match_published_values(name, h, tol):
    assert molar_h(name) == pytest.approx(h, abs=tol)


def test_gas_ingredients_agree_with_the_nasa_data():
    # Cantera's shipped NASA Glenn fits (an outside source) at 298.15 K; the
    # NASA fit gives -74.60 kJ/mol for CH4, JANAF -74.87: they differ by 0.27
    assert molar_h("GCH4") == pytest.approx(gas_species("CH4").thermo.h(298.15) / KJ, abs=0.3)
    n2o = get_ingredient("N2O")
    assert n2o.enthalpy * n2o.molar_mass / KJ == pytest.approx(gas_species("N2O").thermo.h(298.15) / KJ, abs=0.5)


def test_cryogens_lie_below_the_gas_by_about_the_heat_of_vaporization():
    # O2: h_gas(90.17 K) - h_liq = heat of vaporization 6.82 kJ/mol (NIST WebBook; from memory)
    h_gas = gas_species("O2").thermo.h(298.15) / KJ - 29.4 * (298.15 - 90.17) / 1e3  # cp ~ 29.4 J/mol/K
    assert h_gas - molar_h("LOX") == pytest.approx(6.82, abs=0.4)


@pytest.mark.parametrize("name,rho", [("LOX", 1141), ("LH2", 70.85), ("N2O4", 1442), ("N2H4", 1008),
                                      ("MMH", 875), ("H2O2", 1443), ("ethanol", 789)])
def test_densities(name, rho):  # REFERENCES.md densities (CRC / NIST; from memory)
    assert get_ingredient(name).density == pytest.approx(rho, rel=0.002)


def test_names_are_case_insensitive_with_aliases():
    assert get_ingredient("ch4(l)") is get_ingredient("LCH4")
    assert get_ingredient("rp-1").name == "RP-1"
    for n in ["LOX", "LH2", "LCH4", "RP-1", "N2O4", "MMH", "UDMH", "N2H4", "H2O2-90", "H2O2-98", "N2O",
              "GOX", "GH2", "GCH4", "ethanol", "ethanol-75", "NH3"]:
        assert get_ingredient(n.lower()).name == n


def test_blend_mass_balance():
    # 75 % ethanol / 25 % water by mass: element totals are the mass-weighted sums
    e75 = get_ingredient("ethanol-75")
    eth, w = get_ingredient("ethanol"), get_ingredient("water")
    for el in ("C", "H", "O"):
        assert e75.elements[el] == pytest.approx(0.75 * eth.elements.get(el, 0) + 0.25 * w.elements.get(el, 0))
    with pytest.raises(InputError, match="sum to 1"):
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
