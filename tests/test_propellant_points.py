"""Formulations and monopropellants as points: the --propellant contract of `perfchain point` and
pc.point, the reactants block, hydrazine at a fixed ammonia dissociation, and the bad-input lines."""

import json
import math
import sys
from pathlib import Path
from types import SimpleNamespace

import pytest
from click.testing import CliRunner

import perfchain as pc
from perfchain.cli.main import main
from perfchain.constants import G0
from perfchain.errors import InputError
from perfchain.propellants.formulation import make_formulation
from perfchain.propellants.ingredients import get_ingredient

sys.path.insert(0, str(Path(__file__).parent))
from plain_reference import plain_shifting_point  # noqa: E402

THOUSAND_PSI = ["--chamber-pressure", "1000 psi", "--exit-pressure", "1 atm"]


def point_json(*args):
    res = CliRunner().invoke(main, ["point", *args, "--json"])
    assert res.exit_code == 0, res.output
    return json.loads(res.output)


def one_line_error(*args) -> str:
    res = CliRunner().invoke(main, ["point", *args])
    assert res.exit_code == 2, res.output
    out = res.output.strip()
    assert out.count("\n") == 0 and "Traceback" not in out and out.startswith("error: ")
    return out


def plain(reactants: dict):
    """What the reactants block states, as the plain reference path takes it (kmol/kg, J/kg)."""
    return SimpleNamespace(elements={e: n / 1e3 for e, n in reactants["elements"].items()},
                           enthalpy=reactants["enthalpy"])


# --- the JSON contract ---------------------------------------------------------------------

def test_formulation_json_names_the_propellant_and_has_no_mixture():
    d = point_json("--propellant", "AP=0.86, HTPB=0.14", *THOUSAND_PSI)
    assert d["propellant"] == "AP=0.86, HTPB=0.14"
    for key in ("oxidizer", "fuel", "mixture_ratio", "stoichiometric_mixture_ratio", "equivalence_ratio",
                "fuel_percent", "oxidizer_density", "fuel_density"):
        assert d[key] is None, key
    # theoretical maximum density of the grain: volumes add, 1 / (0.86/1950 + 0.14/920) (definition)
    assert d["bulk_density"] == pytest.approx(1.0 / (0.86 / 1950 + 0.14 / 920), rel=1e-12)
    assert [(i["name"], i["mass_fraction"]) for i in d["reactants"]["ingredients"]] == [("AP", 0.86), ("HTPB", 0.14)]


def test_api_and_cli_agree_bit_for_bit_with_ingredient_keys():
    d = point_json("--propellant", "AP=0.86, HTPB=0.14", *THOUSAND_PSI)
    r = pc.point(propellant={pc.ingredient("AP"): 0.86, "HTPB": 0.14}, chamber_pressure="1000 psi",
                 exit_pressure="1 atm")
    assert r.to_dict() == d


def test_every_point_carries_its_reactants():
    # NH4ClO4: 1 Cl per 117.49 kg/kmol, so 0.86 kg of it holds 0.86/117.49 kmol Cl (IUPAC weights)
    d = point_json("--propellant", "AP=0.86, HTPB=0.14", *THOUSAND_PSI)
    assert d["reactants"]["elements"]["Cl"] == pytest.approx(0.86 / 117.488 * 1e3, rel=1e-4)
    assert d["reactants"]["enthalpy"] == d["reactant_enthalpy"]
    pair = point_json("--oxidizer", "LOX", "--fuel", "RP-1", "--mixture-ratio", "2.56", *THOUSAND_PSI)
    assert pair["propellant"] == "LOX/RP-1"
    assert set(pair["reactants"]["elements"]) == {"C", "H", "O"}


@pytest.mark.parametrize("args", [
    ["--propellant", "H2O2-98"],
    ["--oxidizer", "LOX", "--fuel", "RP-1", "--mixture-ratio", "2.56"],
])
def test_reactants_block_recomputes_the_same_chamber(args):
    # Only the JSON's reactants block goes into an independent equilibrium: every NASA gas
    # species of those elements, Cantera's HP solver from a cold start (tests/plain_reference.py).
    d = point_json(*args, *THOUSAND_PSI)
    ref = plain_shifting_point(plain(d["reactants"]), d["chamber_pressure"], exit_pressure=101325.0)
    assert d["chamber"]["temperature"] == pytest.approx(ref["chamber_temperature"], rel=1e-9)
    assert d["cstar"] == pytest.approx(ref["cstar"], rel=1e-8)
    assert d["isp_ambient"] == pytest.approx(ref["isp_ambient"], rel=1e-8)


def test_compare_rows_carry_reactants_that_recompute_their_chamber():
    # each compared row's reactants block, alone, into the independent plain equilibrium
    # (Cantera's HP solver over every NASA gas species of the elements, tests/plain_reference.py)
    res = CliRunner().invoke(main, ["compare", "--pair", "LOX/RP-1", "--propellant", "AP=0.86, HTPB=0.14",
                                    "--chamber-pressure", "1000 psi", "--area-ratio", "8", "--json"])
    assert res.exit_code == 0, res.output
    rows = json.loads(res.output)["pairs"]
    assert {r["pair"] for r in rows} == {"LOX/RP-1", "AP=0.86, HTPB=0.14"}
    for r in rows:
        ref = plain_shifting_point(plain(r["reactants"]), 1000 * 6894.757293168, area_ratio=8.0)
        assert r["chamber_temperature"] == pytest.approx(ref["chamber_temperature"], rel=1e-9), r["pair"]


def test_api_compare_rows_carry_reactants_that_recompute_their_chamber():
    # the DataFrame of pc.compare carries the same block per row (independent plain equilibrium
    # as above: Cantera's HP solver over every NASA gas species of the elements)
    df = pc.compare(["LOX/LCH4"], propellants=["H2O2-98"], chamber_pressure="1000 psi", area_ratio=8)
    assert df.attrs["units"]["reactants"] == ""
    for _, r in df.iterrows():
        ref = plain_shifting_point(plain(r["reactants"]), 1000 * 6894.757293168, area_ratio=8.0)
        assert r["chamber_temperature"] == pytest.approx(ref["chamber_temperature"], rel=1e-9), r["pair"]


# --- handbook values ---------------------------------------------------------------------------

def test_peroxide_98_monopropellant_point():
    # 98 % H2O2 decomposes adiabatically at about 1220 K to steam and oxygen (Sutton & Biblarz,
    # Rocket Propulsion Elements, monopropellant table; from memory, +/- 30 K)
    d = point_json("--propellant", "H2O2-98", "--chamber-pressure", "10 bar", "--area-ratio", "10")
    assert d["propellant"] == "H2O2-98" and d["mixture_ratio"] is None
    assert d["chamber"]["temperature"] == pytest.approx(1220.0, abs=30)
    # 0.98 kg H2O2 -> 0.98/34.015 kmol O2 / 2 plus the water: O2 mole fraction 0.325 (closed form)
    n_o2, n_h2o = 0.98 / 34.0147 / 2, 0.98 / 34.0147 + 0.02 / 18.0153
    assert d["chamber"]["composition"]["O2"] == pytest.approx(n_o2 / (n_o2 + n_h2o), abs=1e-3)


def test_composite_against_the_plain_equilibrium():
    # the independent plain path keeps every NASA gas species of the elements (HCl included)
    d = point_json("--propellant", "AP=0.88, HTPB=0.12", *THOUSAND_PSI)
    ref = plain_shifting_point(plain(d["reactants"]), d["chamber_pressure"], exit_pressure=101325.0)
    assert d["chamber"]["temperature"] == pytest.approx(ref["chamber_temperature"], rel=1e-9)


def test_composite_without_metal_near_handbook_values():
    # AP/HTPB near 88 % AP without metal: flame temperature about 3000 K, theoretical Isp about
    # 250 s from 1000 psia to 1 atm (Kubota, Propellants and Explosives, AP-HTPB composite
    # charts; from memory, so loose: +/- 5 %)
    d = point_json("--propellant", "AP=0.88, HTPB=0.12", *THOUSAND_PSI)
    assert d["chamber"]["temperature"] == pytest.approx(3000.0, rel=0.05)
    assert d["isp_ambient"] == pytest.approx(250.0, rel=0.05)


def test_aluminized_composite_near_handbook_values():
    # AP 68 / Al 18 / HTPB 14: theoretical Isp 260-265 s from 1000 psia to 1 atm, flame temperature
    # about 3500 K (Sutton & Biblarz, Rocket Propulsion Elements, table of operational solid
    # propellants; from memory, +/- 3 % and +/- 200 K)
    d = pc.point(propellant="AP=0.68, Al=0.18, HTPB=0.14", chamber_pressure="1000 psi",
                 exit_pressure="1 atm").to_dict()
    assert d["isp_ambient"] == pytest.approx(262.5, rel=0.03)
    assert d["chamber"]["temperature"] == pytest.approx(3500.0, abs=200)
    assert d["chamber"]["condensed_mass_fraction"] > 0.25   # 18 % Al makes 34 % Al2O3 by mass


# --- hydrazine ---------------------------------------------------------------------------------

def test_hydrazine_at_a_fixed_dissociation_is_a_full_point():
    d = point_json("--propellant", "N2H4", "--ammonia-dissociation", "0.4", "--chamber-pressure", "10 bar",
                   "--area-ratio", "50", "--ambient-pressure", "0 Pa")
    assert d["ammonia_dissociation"] == 0.4 and d["flow"] == "frozen"
    assert any("frozen" in n and "assumption" in n for n in d["notes"])
    # 3 N2H4 -> 2.4 NH3 + 1.8 N2 + 2.4 H2 at X = 0.4 (the decomposition equation; closed form)
    comp = d["chamber"]["composition"]
    assert comp == pytest.approx({"NH3": 2.4 / 6.6, "N2": 1.8 / 6.6, "H2": 2.4 / 6.6}, rel=1e-12)
    assert comp == d["exit"]["composition"]          # frozen
    # catalytic hydrazine near X = 0.4: theoretical vacuum Isp at area ratio 50 in 235-255 s; flight
    # thrusters deliver about 220-235 s (Sutton & Biblarz, monopropellant chapter; from memory)
    assert 235.0 < d["isp_vacuum"] < 255.0
    # Isp = c / g0 and c* = pc A* / mdot (definitions)
    assert d["isp_vacuum"] * G0 == pytest.approx(d["exhaust_velocity_vacuum"], rel=1e-12)


def test_hydrazine_isp_falls_with_dissociation():
    # ammonia dissociation absorbs heat: Tc and Isp fall as X rises (Sutton & Biblarz, hydrazine
    # performance figure; from memory: qualitative)
    isp = [pc.point(propellant="N2H4", ammonia_dissociation=x, chamber_pressure="1000 psi",
                    exit_pressure="1 atm").isp_ambient for x in (0.0, 0.3, 0.6, 0.9)]
    assert all(a > b for a, b in zip(isp, isp[1:]))


def test_equilibrium_hydrazine_says_real_beds_run_hotter():
    r = pc.point(propellant="hydrazine", chamber_pressure="10 bar", area_ratio=20)
    assert r.ammonia_dissociation is None
    assert any("hotter" in n and "ammonia_dissociation" in n for n in r.notes)
    assert pc.point(propellant="H2O2-98", chamber_pressure="10 bar", area_ratio=20).notes is None


# --- sizing and display ------------------------------------------------------------------------

def test_sizing_a_formulation_gives_the_total_flow_only():
    r = pc.point(propellant="AP=0.86, HTPB=0.14", chamber_pressure="70 bar", area_ratio=10, thrust="5 kN")
    z = r.sizing
    assert z["mass_flow"] == pytest.approx(5000.0 / (r.delivered["isp_vacuum"] * G0), rel=1e-12)  # F = mdot c
    assert z["oxidizer_mass_flow"] is None and z["fuel_mass_flow"] is None and z["fuel_volume_flow"] is None
    assert z["throat_area"] == pytest.approx(z["mass_flow"] * r.delivered["cstar"] / 70e5, rel=1e-12)


def test_readable_point_of_a_formulation():
    text = repr(pc.point(propellant="N2H4", ammonia_dissociation=0.5, chamber_pressure="10 bar", area_ratio=20))
    assert "N2H4 | frozen flow" in text and "no O/F" in text and "note: expansion frozen" in text
    assert "hydrazine is toxic" in text and "licensed practice" in text
    solid = repr(pc.point(propellant="AP=0.86, HTPB=0.14", chamber_pressure="70 bar", area_ratio=10))
    assert "formulation by mass: AP 86 %, HTPB 14 %" in solid and "explosive" in solid


def test_readable_point_says_what_two_phase_loss_it_applied():
    """The default two-phase loss is visible where a user reads the delivered values: its size,
    its inputs and its source when a thrust sizes the throat; why not, without one."""
    from perfchain.performance.losses_two_phase import TWO_PHASE_SOURCE

    grain = dict(propellant="AP=0.68, Al=0.18, HTPB=0.14", chamber_pressure="70 bar", area_ratio=10,
                 cstar_efficiency=0.97)
    r = pc.point(**grain, thrust="20 kN")
    tp = r.losses["two_phase"]
    line = next(x for x in repr(r).splitlines() if "two-phase flow loss" in x)
    # the line states the record's own numbers (loss, particle size, throat) and the source
    assert f"{tp['loss'] * 100:.2f} %" in line and f"particles {tp['particle_diameter'] * 1e6:.2g} um" in line
    assert f"{r.sizing['throat_diameter'] * 1e3:.2f}"[:3] in line and TWO_PHASE_SOURCE in line
    assert "OUTSIDE" not in line   # 70 bar, a 45 mm throat: inside the correlation's range
    tiny = repr(pc.point(**grain, thrust="20 N"))   # a 1.4 mm throat: far below 0.5 in
    assert "OUTSIDE the correlation's validity range" in tiny
    unsized = repr(pc.point(**grain))
    assert "two-phase flow loss not applied" in unsized and "give a thrust" in unsized


def test_conditioned_names_work_inside_a_formulation():
    # N2O as saturated liquid at 0 C: denser than the bundled 20 C record (ESDU 91022; from memory)
    cold = make_formulation("N2O @ 0 degC")
    assert cold.bulk_density > get_ingredient("N2O").density
    r = pc.point(propellant="N2O @ 0 degC", chamber_pressure="20 bar", area_ratio=10)
    assert r.propellant == "N2O@273.15K" and r.reactants["ingredients"][0]["temperature"] == 273.15


# --- bad input: one line, exit 2 ---------------------------------------------------------------

NOZZLE = ["--chamber-pressure", "20 bar", "--area-ratio", "10"]


@pytest.mark.parametrize("args, start, words", [
    (["--propellant", "AP=0.6, HTPB=0.3"], "propellant: got 'AP=0.6, HTPB=0.3'", "these sum to 0.9"),
    (["--propellant", "KN=0.6, N2O4=0.4"], "propellant", "reducing power"),
    (["--propellant", "HTPB=0.8, Al=0.2"], "propellant", "oxidizing power"),
    (["--propellant", "H2O2-98", "--oxidizer", "LOX"], "propellant: got 'H2O2-98'", "not both"),
    (["--propellant", "H2O2-98", "--mixture-ratio", "2"], "mixture_ratio", "no O/F"),
    (["--propellant", "N2H4", "--ammonia-dissociation", "1.2"], "ammonia_dissociation: got '1.2'", "0 to 1"),
    (["--propellant", "N2H4", "--ammonia-dissociation", "-0.1"], "ammonia_dissociation", "0 to 1"),
    (["--propellant", "H2O2-98", "--ammonia-dissociation", "0.5"], "ammonia_dissociation", "hydrazine alone"),
    (["--oxidizer", "N2O4", "--fuel", "N2H4", "--mixture-ratio", "1.3", "--ammonia-dissociation", "0.5"],
     "ammonia_dissociation", "not N2O4/N2H4"),
    (["--propellant", "N2O @ 320 K"], "propellant.temperature: got '320 K'", "N2O as saturated liquid"),
    (["--oxidizer", "LOX @ 40 K", "--fuel", "RP-1", "--mixture-ratio", "2.5"], "oxidizer.temperature", "54.361"),
    (["--propellant", "HTPB=0.1, AP=0.9, htpb=0.0"], "propellant.htpb", "each ingredient once"),
    ([], "oxidizer: got None", "or propellant instead"),
])
def test_bad_propellant_inputs(args, start, words):
    line = one_line_error(*args, *NOZZLE)
    assert line.startswith(f"error: {start}") and words in line


def test_api_refuses_the_same_way():
    with pytest.raises(InputError) as info:
        pc.point(propellant={"AP": 0.7, "HTPB": 0.2}, chamber_pressure="20 bar", area_ratio=10)
    assert info.value.field == "propellant" and "0.9" in str(info.value)
    with pytest.raises(InputError) as info:
        pc.point("LOX", "RP-1", propellant="H2O2-98", chamber_pressure="20 bar", area_ratio=10)
    assert info.value.field == "propellant"
    with pytest.raises(InputError) as info:
        pc.point(propellant="N2H4", ammonia_dissociation=0.4, contraction_ratio=3, chamber_pressure="20 bar",
                 area_ratio=10)
    assert info.value.field == "contraction_ratio"
    assert math.isfinite(pc.point(propellant="N2H4", ammonia_dissociation="0.4", chamber_pressure="20 bar",
                                  area_ratio=10).isp_vacuum)


def test_readme_propellant_commands_run():
    """What a new user copies first: every one-line `perfchain point` of the README's tour with a
    formulation, a hybrid fuel or a storage temperature runs and prints its caution."""
    import shlex

    readme = (Path(__file__).parent.parent / "README.md").read_text()
    lines = [ln.split("  #")[0] for ln in readme.splitlines() if ln.startswith("perfchain point ")
             and any(w in ln for w in ("--propellant", " @ ", "paraffin"))]
    assert len(lines) >= 5
    for line in lines:
        res = CliRunner().invoke(main, shlex.split(line)[1:])
        assert res.exit_code == 0, (line, res.output)
        assert "licensed practice" in res.output


def test_two_phase_loss_takes_a_throat_and_particle_size_directly():
    # the SPP correlation's own formula (as given in Sutton & Biblarz; from memory) at the
    # grain's xi, a 4 in throat and 4 um particles, against what pc.point applies
    from perfchain.performance.losses_two_phase import two_phase_loss

    r = pc.point(propellant="AP=0.68, Al=0.18, HTPB=0.14", chamber_pressure="1000 psi", area_ratio=10,
                 throat_diameter="4 in", particle_size="4 um")
    tp = r.losses["two_phase"]
    assert tp["applied"] and tp["throat_diameter"] == pytest.approx(0.1016, rel=1e-12)
    assert tp["particle_diameter"] == pytest.approx(4e-6, rel=1e-12)
    own = two_phase_loss(r.chamber.condensed_mass_fraction, 101.96, 1000 * 6894.757293168, 10.0, 0.1016, 4e-6)
    assert tp["loss"] == pytest.approx(own["loss"], rel=2e-3)     # mean condensed molar mass ~ alumina's
    # a throat given directly is the one a thrust would have sized: the same loss either way
    sized = pc.point(propellant="AP=0.68, Al=0.18, HTPB=0.14", chamber_pressure="1000 psi", area_ratio=10,
                     thrust="20 kN")
    same = pc.point(propellant="AP=0.68, Al=0.18, HTPB=0.14", chamber_pressure="1000 psi", area_ratio=10,
                    throat_diameter=sized.losses["two_phase"]["throat_diameter"])
    assert same.losses["two_phase"]["loss"] == pytest.approx(sized.losses["two_phase"]["loss"], rel=1e-12)


@pytest.mark.parametrize("extra, field", [
    (["--throat-diameter", "-4 mm"], "throat_diameter"),
    (["--throat-diameter", "40 mm", "--thrust", "2 kN"], "throat_diameter"),
    (["--particle-size", "5 kg"], "particle_size"),
])
def test_bad_two_phase_inputs_give_one_line(extra, field):
    res = CliRunner().invoke(main, ["point", "--propellant", "AP=0.68, Al=0.18, HTPB=0.14", "--chamber-pressure",
                                    "70 bar", "--area-ratio", "10", *extra])
    assert res.exit_code == 2 and res.output.startswith(f"error: {field}:") and res.output.count("\n") == 1


def test_a_given_particle_size_is_not_credited_to_the_particle_correlation():
    # the record names where each input came from: Hermsen's particles only when it sized them
    from perfchain.performance.losses_two_phase import TWO_PHASE_SOURCE

    given = pc.point(propellant="AP=0.68, Al=0.18, HTPB=0.14", chamber_pressure="70 bar", area_ratio=10,
                     throat_diameter="45 mm", particle_size="5 um").losses["two_phase"]["source"]
    assert "Hermsen" not in given and "particle size as given" in given
    sized = pc.point(propellant="AP=0.68, Al=0.18, HTPB=0.14", chamber_pressure="70 bar", area_ratio=10,
                     throat_diameter="45 mm").losses["two_phase"]["source"]
    assert sized == TWO_PHASE_SOURCE
