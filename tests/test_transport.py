"""Gas transport properties (perfchain.thermo.transport) against sources outside the project.

* Cantera's own mixture-averaged transport (gri30.yaml, transport_model="mixture-averaged") for
  the same gas composition, where its data cover every species present.
* Pure-species viscosity of N2, CO2 and H2O against the reference correlations in CoolProp
  (Lemmon & Jacobsen, Int. J. Thermophys. 25 (2004) 21 for N2; Laesecke & Muzny, J. Phys.
  Chem. Ref. Data 46 (2017) 013107 for CO2; Huber et al., J. Phys. Chem. Ref. Data 38 (2009)
  101, the IAPWS 2008 formulation, for H2O), each inside its stated range.
* The reaction contribution of a dissociating diatomic gas in closed form (Butler & Brokaw,
  J. Chem. Phys. 26 (1957) 1636), and the equilibrium cp against a finite difference of plain
  Cantera equilibria.
"""

from __future__ import annotations

import json

import cantera as ct
import numpy as np
import pytest

from perfchain.constants import R_UNIVERSAL
from perfchain.errors import InputError
from perfchain.thermo import transport_kinetic as kin
from perfchain.thermo.products import product_species
from perfchain.thermo.transport import UNCOVERED_LIMIT, gas_transport
from perfchain.thermo.transport_data import species_transport

#: gri30 names that the NASA data spell otherwise
_NASA_NAME = {"AR": "Ar", "CH2O": "HCHO,formaldehy", "C2H2": "C2H2,acetylene", "CH2CO": "CH2CO,ketene",
              "C2H3": "C2H3,vinyl", "CH3CHO": "CH3CHO,ethanal", "HCCO": "CHCO,ketyl"}


def _cantera_case(reactants, temperature, pressure):
    """gri30 equilibrium at (T, p) with mixture-averaged transport; its composition in NASA names."""
    gas = ct.Solution("gri30.yaml")
    gas.transport_model = "mixture-averaged"
    gas.TPX = temperature, pressure, reactants
    gas.equilibrate("TP")
    comp = {_NASA_NAME.get(n, n): x for n, x in zip(gas.species_names, gas.X) if x > 1e-9}
    return gas, comp


# Tolerances: both sides use Wilke's rule for viscosity, and the same GRI-Mech Lennard-Jones
# data; Cantera evaluates the collision integrals from the full kinetic theory (tables of
# Monchick & Mason for polar molecules), this module from the Neufeld et al. correlation with
# Brokaw's polar correction, which differ by up to ~4 % for water near 1000 K (0.5 % for the
# nonpolar species). For conductivity Cantera combines species by the average of the
# arithmetic and harmonic means, this module by the Mason-Saxena rule: a further 2-3 %.
VISCOSITY_TOL = 0.04
CONDUCTIVITY_TOL = 0.05


@pytest.mark.parametrize("reactants, temperature, pressure", [
    ("CH4:1, O2:3.2", 3500.0, 7e6),       # LOX/methane chamber
    ("H2:3, O2:1", 3300.0, 1e7),          # LOX/LH2 chamber
    ("CH4:1, O2:1.6", 3000.0, 5e6),       # fuel-rich methane gas generator side
    ("CH4:1, O2:3.2", 2000.0, 1e5),       # nozzle exit
    ("H2:3, O2:1", 900.0, 1e4),           # cold, water-rich exit
    ("N2:0.79, O2:0.21", 300.0, 101325.0),
])
def test_mixture_against_cantera_mixture_averaged(reactants, temperature, pressure):
    gas, comp = _cantera_case(reactants, temperature, pressure)
    t = gas_transport(list(comp), list(comp.values()), temperature, pressure)
    assert t.uncovered == () and t.excluded == ()
    assert t.viscosity == pytest.approx(gas.viscosity, rel=VISCOSITY_TOL)
    assert t.thermal_conductivity == pytest.approx(gas.thermal_conductivity, rel=CONDUCTIVITY_TOL)
    # same NASA-vs-GRI thermo within 0.2 % (the cp fits differ slightly)
    assert t.cp_frozen == pytest.approx(gas.cp_mass, rel=2e-3)


@pytest.mark.parametrize("fluid, name, temperatures, tol", [
    # Lemmon & Jacobsen (2004), valid to 2000 K: within 1 % (measured 0.2-0.6 %)
    ("Nitrogen", "N2", (1000.0, 1500.0, 2000.0), 0.01),
    # Laesecke & Muzny (2017), valid to 2000 K: within 1 % (measured 0.4 %)
    ("CarbonDioxide", "CO2", (1000.0, 1500.0, 2000.0), 0.01),
    # IAPWS 2008 (Huber et al. 2009), valid to 1173 K: within 2 % (a polar molecule; measured 1.1 %)
    ("Water", "H2O", (1000.0, 1150.0), 0.02),
])
def test_pure_viscosity_against_reference_correlations(fluid, name, temperatures, tol):
    cp_ = pytest.importorskip("CoolProp.CoolProp")
    for T in temperatures:
        ref = cp_.PropsSI("V", "T", T, "P", 1e5, fluid)
        assert gas_transport([name], [1.0], T, 1e5).viscosity == pytest.approx(ref, rel=tol), T


@pytest.mark.parametrize("name", ["N2", "H2O", "CO2"])
def test_pure_viscosity_up_to_3000_k_against_cantera(name):
    """Above 2000 K no reference correlation applies (CoolProp extrapolates); Cantera's full
    kinetic theory with the same GRI-Mech data is the check there (0.5 % measured)."""
    gas = ct.Solution("gri30.yaml")
    gas.transport_model = "mixture-averaged"
    for T in (2500.0, 3000.0):
        gas.TPX = T, 1e5, {name: 1.0}
        assert gas_transport([name], [1.0], T, 1e5).viscosity == pytest.approx(gas.viscosity, rel=0.01)


def test_reaction_conductivity_of_a_dissociating_diatomic_closed_form():
    """H2 <=> 2H: lambda_r = (p D / R T) (dh^2 / R T^2) x_H x_H2 / (x_H + 2 x_H2)^2 (Butler & Brokaw 1957)."""
    T, p, x = 3500.0, 1e5, np.array([0.3, 0.7])       # H, H2
    t = gas_transport(["H", "H2"], list(x), T, p)
    recs = [species_transport("H"), species_transport("H2")]
    m = [r.molar_mass for r in recs]
    sig = [r.diameter for r in recs]
    eps = [r.well_depth for r in recs]
    d = kin.binary_diffusion(T, p, m, sig, eps, [0.0, 0.0])[0, 1]
    from perfchain.thermo.products import gas_species

    dh = 2 * gas_species("H").thermo.h(T) - gas_species("H2").thermo.h(T)
    expected = (p * d / (R_UNIVERSAL * T)) * dh ** 2 / (R_UNIVERSAL * T * T) * x[0] * x[1] / (x[0] + 2 * x[1]) ** 2
    assert t.thermal_conductivity_equilibrium - t.thermal_conductivity == pytest.approx(expected, rel=1e-9)


def test_reaction_terms_do_not_depend_on_the_reaction_set():
    """Any complete set of independent reactions gives the same lambda_r (Butler & Brokaw 1957):
    recompute with the null space of the element matrix (scipy) instead of formation reactions."""
    from scipy.linalg import null_space

    from perfchain.thermo.products import gas_species

    gas, comp = _cantera_case("CH4:1, O2:3.2", 3500.0, 7e6)
    names = [n for n in comp if comp[n] > 1e-8]
    x = np.array([comp[n] for n in names])
    x /= x.sum()
    T, p = 3500.0, 7e6
    t = gas_transport(names, list(x), T, p)
    elements = sorted({e for n in names for e in gas_species(n).composition})
    e_mat = np.array([[gas_species(n).composition.get(e, 0.0) for n in names] for e in elements])
    nu = null_space(e_mat).T
    recs = [species_transport(n) for n in names]
    sig, eps = np.array([r.diameter for r in recs]), np.array([r.well_depth for r in recs])
    delta = kin.reduced_dipole([r.dipole for r in recs], eps, sig)
    d = kin.binary_diffusion(T, p, [r.molar_mass for r in recs], sig, eps, delta)
    h = np.array([gas_species(n).thermo.h(T) for n in names])
    a = np.zeros((len(nu), len(nu)))
    for k in range(len(names)):
        for l in range(k + 1, len(names)):
            v = nu[:, k] / x[k] - nu[:, l] / x[l]
            a += R_UNIVERSAL * T / (p * d[k, l]) * x[k] * x[l] * np.outer(v, v)
    dh = nu @ h
    lam_r = dh @ np.linalg.solve(a, dh) / (R_UNIVERSAL * T * T)
    assert t.thermal_conductivity_equilibrium - t.thermal_conductivity == pytest.approx(lam_r, rel=1e-6)


@pytest.mark.parametrize("reactants, temperature, pressure", [
    ("CH4:1, O2:3.2", 3500.0, 7e6), ("H2:3, O2:1", 3300.0, 1e7), ("CH4:1, O2:3.2", 2000.0, 1e5)])
def test_equilibrium_cp_against_plain_cantera_finite_difference(reactants, temperature, pressure):
    """cp of the reacting gas = dh/dT at fixed p along equilibrium states (plain Cantera, NASA data)."""
    gas = ct.Solution(thermo="ideal-gas", species=list(product_species(frozenset("CHO"), condensed=False).gas))

    def h(T):
        gas.TPX = T, pressure, reactants
        gas.equilibrate("TP")
        return gas.enthalpy_mass

    dT = 0.5
    cp_eq = (h(temperature + dT) - h(temperature - dT)) / (2 * dT)
    h(temperature)
    comp = {n: x for n, x in zip(gas.species_names, gas.X) if x > 1e-10}
    t = gas_transport(list(comp), list(comp.values()), temperature, pressure)
    assert t.cp_equilibrium == pytest.approx(cp_eq, rel=1e-4)
    assert t.prandtl_equilibrium == pytest.approx(t.viscosity * cp_eq / t.thermal_conductivity_equilibrium, rel=1e-4)


def test_given_equilibrium_cp_is_used():
    t = gas_transport(["H2O", "H2", "OH", "H"], [0.6, 0.3, 0.05, 0.05], 3000.0, 5e6, cp_equilibrium=9000.0)
    assert t.cp_equilibrium == 9000.0
    assert t.prandtl_equilibrium == pytest.approx(t.viscosity * 9000.0 / t.thermal_conductivity_equilibrium)


def test_condensed_left_out_and_uncovered_reported():
    t = gas_transport(["H2O", "H2", "AL2O3(L)", "CL"], [0.5, 0.4, 0.05, 0.05], 3000.0, 5e6)
    assert t.excluded == ("AL2O3(L)",)
    assert t.uncovered == ("CL",)
    assert t.uncovered_fraction == pytest.approx(0.05 / 0.95)
    assert not t.ok and t.uncovered_fraction > UNCOVERED_LIMIT
    assert any("AL2O3(L)" in n for n in t.notes) and any("CL" in n for n in t.notes)


def test_species_sources_named():
    t = gas_transport(["H2O", "HCL"], [0.5, 0.5], 2000.0, 1e5)
    sources = dict(t.species_sources)
    assert sources["H2O"].startswith("gri30.yaml")
    assert sources["HCL"].startswith("Poling et al. (2001)")


def test_bundled_data_match_the_chemicals_package():
    """mechanisms/transport.toml holds what docs/tools/transport_data.py takes from `chemicals`."""
    pytest.importorskip("chemicals")
    import importlib.util
    import pathlib
    import tomllib

    tool = pathlib.Path(__file__).resolve().parents[1] / "docs" / "tools" / "transport_data.py"
    spec = importlib.util.spec_from_file_location("transport_data_tool", tool)
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    from perfchain.thermo.transport_data import transport_file

    with open(transport_file(), "rb") as fh:
        bundled = tomllib.load(fh)["species"]
    for name, (cas, geometry) in mod.SPECIES.items():
        rec = mod.record(name, cas, geometry)
        if rec is None:
            assert name not in bundled
            continue
        assert bundled[name]["well_depth"] == rec["well_depth"], name
        assert bundled[name]["diameter"] == rec["diameter"], name


@pytest.mark.parametrize("args, field", [
    ((["H2O"], [1.0], -5.0, 1e5), "temperature"),
    ((["H2O"], [1.0], 1000.0, 0.0), "pressure"),
    ((["H2O", "H2"], [1.0], 1000.0, 1e5), "mole_fractions"),
    ((["H2O", "XYZ"], [0.5, 0.5], 1000.0, 1e5), "species"),
    ((["H2O"], [-1.0], 1000.0, 1e5), "mole_fractions"),
])
def test_bad_input_one_line(args, field):
    with pytest.raises(InputError) as exc:
        gas_transport(*args)
    assert str(exc.value).startswith(field + ":") and "\n" not in str(exc.value)


def test_point_json_stations_carry_transport():
    """JSON contract of issue 14: every station object has the five transport keys."""
    from click.testing import CliRunner

    from perfchain.cli import main

    out = CliRunner().invoke(main, ["point", "--oxidizer", "LOX", "--fuel", "LH2", "--mixture-ratio", "6",
                                    "--chamber-pressure", "100 bar", "--area-ratio", "40", "--json"])
    assert out.exit_code == 0, out.output
    d = json.loads(out.output)
    for st in ("chamber", "throat", "exit"):
        s = d[st]
        for key in ("viscosity", "thermal_conductivity", "thermal_conductivity_equilibrium", "prandtl",
                    "prandtl_equilibrium"):
            assert isinstance(s[key], float) and s[key] > 0, (st, key)
        # the reaction contribution only adds (Butler & Brokaw: a positive quadratic form)
        assert s["thermal_conductivity_equilibrium"] >= s["thermal_conductivity"]
    # hot chamber: the reaction term dominates; cold exit: it vanishes
    assert d["chamber"]["thermal_conductivity_equilibrium"] > 1.5 * d["chamber"]["thermal_conductivity"]
    assert d["exit"]["thermal_conductivity_equilibrium"] < 1.01 * d["exit"]["thermal_conductivity"]


def test_sweep_rows_have_no_transport_columns_by_default():
    from perfchain.study.sweep import sweep

    df = sweep("LOX", "LH2", mixture_ratio="6", chamber_pressure="100 bar", area_ratio="40")
    assert not any(c.endswith("_viscosity") for c in df.columns)


def test_sweep_transport_columns_when_asked_equal_the_point():
    """Opt-in sweep columns: the same numbers as the point of the same inputs (rows never mix),
    with their units declared (study.columns)."""
    import perfchain as pc

    df = pc.sweep("LOX", "LH2", mixture_ratio="5,6", chamber_pressure="100 bar", area_ratio="40",
                  transport=True)
    assert df.attrs["units"]["chamber_viscosity"] == "Pa s"
    assert df.attrs["units"]["throat_thermal_conductivity_equilibrium"] == "W/(m K)"
    assert df.attrs["units"]["exit_prandtl"] == "1"
    p = pc.point("LOX", "LH2", mixture_ratio=6, chamber_pressure="100 bar", area_ratio=40)
    row = df[df.mixture_ratio == 6.0].iloc[0]
    for st in ("chamber", "throat", "exit"):
        for key in ("viscosity", "thermal_conductivity", "thermal_conductivity_equilibrium", "prandtl",
                    "prandtl_equilibrium"):
            assert row[f"{st}_{key}"] == getattr(getattr(p, st), key), (st, key)


def test_sweep_transport_flag_on_the_command_line(tmp_path):
    from click.testing import CliRunner

    from perfchain.cli import main

    out = tmp_path / "t.csv"
    res = CliRunner().invoke(main, ["sweep", "--oxidizer", "LOX", "--fuel", "RP-1", "--mixture-ratio", "2.6",
                                    "--chamber-pressure", "70 bar", "--area-ratio", "20", "--transport",
                                    "--workers", "1", "--out", str(out)])
    assert res.exit_code == 0, res.output
    header = out.read_text().splitlines()[0].split(",")
    assert "exit_prandtl_equilibrium" in header and "chamber_viscosity" in header


def test_sweep_transport_must_be_a_flag():
    from perfchain.study.grid import make_grid

    with pytest.raises(InputError, match="^transport: got 'yes'"):
        make_grid("LOX", "RP-1", mixture_ratio="2.6", chamber_pressure="70 bar", area_ratio="20", transport="yes")


def test_point_with_condensed_products_names_them():
    """Aluminized composite: alumina is left out of the gas and the notes say so; the gas species
    without data (Cl, AlCl, AlOH...) stay under the 5 % limit, so the values are given."""
    from perfchain.performance.chain import performance

    r = performance(propellant="AP=0.68, Al=0.18, HTPB=0.14", chamber_pressure=7e6, area_ratio=10,
                    transport=True)
    assert any("AL2O3(L)" in n and "gas phase" in n for n in r.notes)
    assert r.chamber.viscosity is not None and r.chamber.condensed_mass_fraction > 0.2


def test_station_with_too_much_uncovered_gas_is_withheld():
    """Never an impossible number: 10 % of the gas without data -> no values, and a note."""
    from dataclasses import replace

    from perfchain.performance.chain import performance
    from perfchain.performance.transport import add_transport

    r = performance("LOX", "LH2", mixture_ratio=6.0, chamber_pressure=1e7, area_ratio=40.0)
    bad = replace(r, chamber=replace(r.chamber, composition={"H2O": 0.5, "HCL": 0.4, "CL": 0.1}))
    out = add_transport(bad)
    assert out.chamber.viscosity is None and out.chamber.prandtl is None
    assert out.throat.viscosity is not None
    assert any(n.startswith("transport properties at the chamber not given") and "CL" in n for n in out.notes)
