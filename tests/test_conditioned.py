"""Conditioned propellants: liquids at a chosen storage temperature (CoolProp EOS)."""

import pytest

from perfchain.errors import InputError
from perfchain.performance.chain import performance_of
from perfchain.propellants.conditioned import conditioned, saturated_liquid
from perfchain.propellants.formulation import make_formulation
from perfchain.propellants.ingredients import get_ingredient
from perfchain.propellants.mixture import make_propellant
from perfchain.thermo.products import gas_species

KJ = 1e6  # J/kmol per kJ/mol


def molar(ing):
    return ing.enthalpy * ing.molar_mass / KJ


def test_n2o_saturated_liquid_at_20c():
    # ESDU 91022, Thermophysical properties of nitrous oxide (1991), as tabulated in the
    # hybrid-rocket literature: 786.6 kg/m3 and 50.6 bar at 20 C (from memory)
    h_l, rho, p = saturated_liquid("NitrousOxide", 293.15)
    assert rho == pytest.approx(786.6, rel=0.005)
    assert p == pytest.approx(50.6e5, rel=0.01)
    assert get_ingredient("N2O").density == pytest.approx(rho, abs=0.1)


def test_n2o_heat_of_vaporization_at_20c():
    # 16.53 kJ/mol at the normal boiling point 184.7 K (NIST Chemistry WebBook; from
    # memory) carried to 20 C by Watson's correlation (exponent 0.38; common practice)
    import CoolProp.CoolProp as CP

    h_vap = (CP.PropsSI("Hmolar", "T", 293.15, "Q", 1, "NitrousOxide")
             - CP.PropsSI("Hmolar", "T", 293.15, "Q", 0, "NitrousOxide")) / 1e3
    watson = 16.53 * ((309.52 - 293.15) / (309.52 - 184.67)) ** 0.38
    assert h_vap == pytest.approx(watson, rel=0.05)
    assert h_vap / 44.013 * 1e3 == pytest.approx(170, rel=0.05)   # ~170 kJ/kg, ESDU 91022 (from memory)


@pytest.mark.parametrize("name", ["LOX", "LCH4", "LH2", "N2O"])
def test_records_agree_with_nasa_gas_plus_the_equation_of_state(name):
    # Two independent routes to the liquid enthalpy: the record (NASA TP-2002-211556
    # cryogen values, from memory) and the NASA gas at 298.15 K (Cantera's data) plus the
    # EOS's h(saturated liquid, T) - h(ideal gas, 298.15 K) (CoolProp). LH2 is para-hydrogen.
    import CoolProp

    ing = get_ingredient(name)
    state = CoolProp.AbstractState("HEOS", ing.fluid)
    state.update(CoolProp.QT_INPUTS, 0.0, ing.temperature)
    h_liquid = state.hmolar()
    state.update(CoolProp.PT_INPUTS, 1.0, 298.15)        # 1 Pa: the ideal gas
    gas = gas_species({"LOX": "O2", "LCH4": "CH4", "LH2": "H2", "N2O": "N2O"}[name])
    route = gas.thermo.h(298.15) / KJ + (h_liquid - state.hmolar()) / 1e3
    assert molar(ing) == pytest.approx(route, abs=0.1)


def test_record_temperature_gives_the_record_back():
    for name in ["LOX", "LCH4", "LH2", "N2O", "NH3"]:
        ing = get_ingredient(name)
        assert conditioned(name, ing.temperature) is ing


def test_densified_oxygen_and_hydrogen():
    # saturated O2 at 80 K: 1190 kg/m3; para-H2 at 15 K: 76.0 kg/m3
    # (NIST Chemistry WebBook fluid tables; from memory)
    assert get_ingredient("LOX@80K").density == pytest.approx(1190, rel=0.003)
    assert get_ingredient("LH2 @ 15 K").density == pytest.approx(76.0, rel=0.005)
    # colder is lower in enthalpy by about cp dT (liquid O2 cp ~ 53.5 J/mol/K, from memory)
    dh = molar(get_ingredient("LOX")) - molar(get_ingredient("LOX@80K"))
    assert dh == pytest.approx(53.5e-3 * 10.17, rel=0.05)


def test_syntax_forms_agree():
    a = get_ingredient("LOX@80K")
    b = get_ingredient("lox @ 80 K")
    c = conditioned("LOX", 80.0)
    assert a.enthalpy == b.enthalpy == c.enthalpy and a.name == "LOX@80K"
    assert get_ingredient("N2O @ 0 degC").temperature == pytest.approx(273.15)


@pytest.mark.parametrize("text,allowed", [
    ("LOX@50K", "54.361 to 154.099 K"),          # below the triple point (54.361 K, Schmidt & Wagner)
    ("LOX@160K", "54.361 to 154.099 K"),         # above the critical point (154.58 K)
    ("N2O@40degC", "182.33 to 309.021 K"),        # N2O is supercritical above 309.52 K
    ("LOX@80", "with a unit"),
    ("RP-1@300K", "only for a liquid with an equation of state"),
])
def test_storage_temperature_outside_the_liquid_range(text, allowed):
    with pytest.raises(InputError) as info:
        get_ingredient(text, field="oxidizer")
    assert info.value.field == "oxidizer.temperature"
    assert allowed in str(info.value) and "\n" not in str(info.value)


def test_bulk_density_picks_up_conditioned_densities():
    warm = make_propellant("LOX", "LCH4", 3.5)
    cold = make_propellant("LOX@66K", "LCH4@95K", 3.5)
    ro, rf = get_ingredient("LOX@66K").density, get_ingredient("LCH4@95K").density
    assert cold.bulk_density == pytest.approx(4.5 / (3.5 / ro + 1 / rf), rel=1e-12)
    assert cold.bulk_density > 1.07 * warm.bulk_density


def test_conditioned_propellants_go_through_the_chain():
    # colder reactants carry less enthalpy: a slightly cooler chamber
    warm = performance_of(make_propellant("LOX", "LCH4", 3.5), 5e6, area_ratio=20)
    cold = performance_of(make_propellant("LOX@66K", "LCH4@95K", 3.5), 5e6, area_ratio=20)
    assert 0 < warm.chamber.temperature - cold.chamber.temperature < 30
    assert cold.bulk_density > warm.bulk_density
    tank = performance_of(make_formulation("N2O@273.15K"), 2e6, area_ratio=10)
    assert tank.chamber.temperature < performance_of(make_formulation("N2O"), 2e6, area_ratio=10).chamber.temperature
