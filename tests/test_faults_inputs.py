"""Faults of inputs (issue 12): each was a traceback, a silent misreading or a message quoting SI
numbers; each must now be one line naming the field and the value as typed, exit 2.
"""

from __future__ import annotations

import json

import pytest

from perfchain.errors import InputError
from perfchain.study.schema import parse_study

from test_cli_study import TINY, invoke, one_line_error

POINT = ["point", "--oxidizer", "LOX", "--fuel", "RP-1", "--chamber-pressure", "70 bar", "--area-ratio", "40"]


def one_line(result, start):
    """The one error line (exit 2, no traceback) that starts with ``error: start``."""
    one_line_error(result, start)
    return [ln for ln in result.output.strip().splitlines() if ln.startswith("error: ")][0]


@pytest.mark.parametrize("option, text", [("--equivalence-ratio", "1e-310"), ("--fuel-percent", "1e-320")])
def test_mixture_whose_of_overflows(option, text):
    # phi = 1e-310 means O/F = O/F_st / phi = inf: the propellant would be oxidizer alone
    line = one_line(invoke(*POINT, option, text), option[2:].replace("-", "_") + f": got '{text}'")
    assert "finite" in line


@pytest.mark.parametrize("args, field", [
    (POINT + ["--mixture-ratio", "3_3"], "mixture_ratio: got '3_3'"),
    (POINT + ["--mixture-ratio", "٣"], "mixture_ratio: got '٣'"),          # an Arabic-Indic digit three
    (["sweep", "--oxidizer", "LOX", "--fuel", "RP-1", "--mixture-ratio", "2.6", "--chamber-pressure", "7_0 bar",
      "--area-ratio", "40"], "chamber_pressure: got '7_0 bar'"),
    (["sweep", "--oxidizer", "LOX", "--fuel", "RP-1", "--mixture-ratio", "2.6", "--chamber-pressure", "70 bar",
      "--area-ratio", "4_0"], "area_ratio: got '4_0'"),
    (["deltav", "--payload", "1 t", "--stage", "isp=300 s, mass=10 t, propellant_fraction=0.8_5"],
     "--stage 1: propellant_fraction: got '0.8_5'"),
])
def test_numbers_from_text_are_plain_decimals(args, field):
    one_line(invoke(*args), field)   # Python's float() reads '3_3' as 33 and '٣' as 3


def test_messages_quote_the_text_typed_not_si():
    # 1160.3 psi is 7 999 986.9 Pa (NIST SP 811: 1 psi = 6894.757 Pa), above the 80 bar chamber's throat
    line = one_line(invoke("point", "--oxidizer", "LOX", "--fuel", "RP-1", "--mixture-ratio", "2.5",
                           "--chamber-pressure", "80 bar", "--exit-pressure", "1160.3 psi"),
                    "exit_pressure: got '1160.3 psi'")
    assert "7999" not in line


def test_the_default_ambient_pressure_is_named():
    line = one_line(invoke("point", "--oxidizer", "LOX", "--fuel", "RP-1", "--mixture-ratio", "2.5",
                           "--chamber-pressure", "0.5 bar", "--area-ratio", "40"), "ambient_pressure:")
    assert "got '1 atm (the default)'" in line and "None" not in line


def test_deltav_json_is_always_json():
    r = invoke("deltav", "--payload", "1 t", "--stage", "isp=300 s, dry=1 t, propellant=9 t, thrust=1e-320 N",
               "--json")
    assert r.exit_code == 0, r.output

    def refuse(constant):
        raise ValueError(f"{constant} is not JSON (RFC 8259, section 6)")

    data = json.loads(r.stdout, parse_constant=refuse)
    assert data["stages"][0]["burn_time"] is None   # 9 t at 1e-320 N: no finite burn time


def test_toml_nested_thousands_deep():
    with pytest.raises(InputError) as exc:
        parse_study("a = " + "[" * 3000 + "]" * 3000)
    assert exc.value.field == "study" and "nested" in exc.value.allowed


def test_run_refuses_devices_and_huge_files(tmp_path):
    line = one_line(invoke("run", "/dev/zero", "--out", tmp_path / "o"), "study: got '/dev/zero'")
    assert "regular file" in line
    big = tmp_path / "big.toml"
    with open(big, "wb") as fh:
        fh.truncate(11 * 2**20)     # sparse: no disk used
    assert "at most 10 MiB" in one_line(invoke("run", big, "--out", tmp_path / "o"), "study:")
    assert "is a directory" in one_line(invoke("run", tmp_path, "--out", tmp_path / "o"), "Invalid value")


@pytest.mark.parametrize("old, new, start, allowed", [
    ("[1.6, 2.2]", '["2.2"]', "engine[1].mixture_ratio[1]: got '2.2'", "a number (not in quotes)"),
    ("area_ratio = 40", 'area_ratio = "40"', "engine[1].area_ratio[1]: got '40'", "a number (not in quotes)"),
    ("plots = false", 'plots = "yes"', "output.plots: got 'yes'", "true or false (not in quotes)"),
    ("plots = false", "plots = 1", "output.plots: got 1", "true or false (not in quotes)"),
])
def test_study_values_have_strict_types(tmp_path, old, new, start, allowed):
    study = tmp_path / "s.toml"
    study.write_text(TINY.replace(old, new))
    assert allowed in one_line(invoke("run", study, "--out", tmp_path / "o"), start)


def test_run_asks_for_yes_above_the_grid_limit(tmp_path, monkeypatch):
    from perfchain.study import grid

    monkeypatch.setattr(grid, "MAX_POINTS", 1)      # the 2-point grid above stands for one of 20,001
    study = tmp_path / "s.toml"
    study.write_text(TINY)
    line = one_line(invoke("run", study, "--out", tmp_path / "a"), "engine[1]: got 'a grid of 2 points'")
    assert "--yes" in line and not (tmp_path / "a" / "tables").exists()
    r = invoke("run", study, "--out", tmp_path / "b", "--yes")
    assert r.exit_code == 0, r.output


def test_cluster_without_workers_stops_after_the_timeout():
    distributed = pytest.importorskip("distributed")
    # before, the sweep waited without end; returning at all is the check (no timing asserted)
    with distributed.LocalCluster(n_workers=0, processes=False, protocol="tcp", host="127.0.0.1",
                                  dashboard_address=None) as c:
        line = one_line(invoke("sweep", "--oxidizer", "LOX", "--fuel", "RP-1", "--mixture-ratio", "2.6",
                               "--chamber-pressure", "70 bar", "--area-ratio", "40", "--cluster",
                               c.scheduler_address, "--cluster-timeout", "1"), "cluster:")
    assert "none joined within 1 s" in line


def test_a_point_that_fails_in_vacuum_fails_at_every_ambient():
    # A frozen LOX/RP-1 expansion to area ratio 300 leaves the gas data range: the first ambient
    # pressure (vacuum) failed, and deriving the others from a vacuum template was an AttributeError.
    from perfchain.study.sweep import sweep

    df = sweep("LOX", "RP-1", mixture_ratio="0.8507", chamber_pressure="10 bar", area_ratio="300",
               flow="frozen", ambient_pressure="0 Pa,1 atm", composition_top=0)
    assert list(df.status) == ["failed", "failed"] and df.reason.str.len().min() > 0


def test_nearly_pure_methane_fails_at_once_with_its_reason():
    # LOX/LCH4 at O/F 0.01: liquid methane cannot reach 200 K (the data's edge) adiabatically, since even
    # the least enthalpy any products can have at 200 K is above the propellant's. The loop used to
    # step down to 200 K and spend ~35 s on near-frozen condensed states before "did not converge".
    line = one_line(invoke("point", "--oxidizer", "LOX", "--fuel", "LCH4", "--mixture-ratio", "0.01",
                           "--chamber-pressure", "70 bar", "--area-ratio", "40"), "no temperature in the data range")
    assert "enthalpy target" in line


def test_least_value_bounds_the_equilibrium_from_below():
    # closed-form argument: the equilibrium amounts meet the element totals, so their h is at least the
    # linear program's least h; mixing entropy is never negative, so the same holds for s
    from perfchain.propellants.mixture import make_propellant
    from perfchain.thermo.equilibrium import EquilibriumSystem
    from perfchain.thermo.temperature_loop import least_value

    s = EquilibriumSystem(make_propellant("LOX", "RP-1", 0.8).elements)   # graphite forms
    for T in (400.0, 1500.0):
        st = s.tp(T, 3e6)
        assert least_value(s, "h", T, 3e6) <= st.h and least_value(s, "s", T, 3e6) <= st.s
    methane = make_propellant("LOX", "LCH4", 0.01)
    assert least_value(EquilibriumSystem(methane.elements), "h", 200.0, 7e6) > methane.enthalpy
