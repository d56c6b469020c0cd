"""The `point` command: JSON contract and one-line errors with exit code 2."""

import json

import pytest
from click.testing import CliRunner

from perfchain.cli.main import main
from perfchain.performance.chain import performance

BASE = ["point", "--oxidizer", "LOX", "--fuel", "RP-1", "--mixture-ratio", "2.56",
        "--chamber-pressure", "1000 psi"]


def run(args):
    return CliRunner().invoke(main, args)


def test_json_contract_and_same_numbers_as_the_api():
    res = run(BASE + ["--exit-pressure", "1 atm", "--flow", "shifting", "--json"])
    assert res.exit_code == 0, res.output
    d = json.loads(res.output)
    for key in ["chamber", "throat", "exit", "area_ratio", "cstar", "cf_vacuum", "cf_ambient", "isp_vacuum",
                "isp_ambient", "exhaust_velocity_vacuum", "exhaust_velocity_ambient", "mixture_ratio",
                "stoichiometric_mixture_ratio", "equivalence_ratio", "flow"]:
        assert key in d
    for st in ("chamber", "throat", "exit"):
        for key in ["pressure", "temperature", "density", "molar_mass", "gamma", "sound_speed", "velocity",
                    "mach", "composition"]:
            assert key in d[st]
    api = performance("LOX", "RP-1", mixture_ratio=2.56, chamber_pressure="1000 psi", exit_pressure="1 atm")
    assert d["isp_ambient"] == api.isp_ambient
    # psi -> Pa: 1 psi = 6894.757 Pa (NIST SP 811)
    assert d["chamber_pressure"] == pytest.approx(6894757.29, abs=0.01)


def test_unit_independence():
    a = performance("N2O4", "MMH", mixture_ratio=2.0, chamber_pressure="10 bar", area_ratio=20)
    b = performance("N2O4", "MMH", mixture_ratio=2.0, chamber_pressure="1 MPa", area_ratio=20)
    assert a.isp_vacuum == pytest.approx(b.isp_vacuum, rel=1e-12)


def test_table_output_and_vacuum_ambient():
    res = run(BASE + ["--area-ratio", "20", "--ambient-pressure", "0 Pa"])
    assert res.exit_code == 0
    assert "Vacuum Isp (s)" in res.output and "licensed practice" in res.output
    d = json.loads(run(BASE + ["--area-ratio", "20", "--ambient-pressure", "0 Pa", "--json"]).output)
    assert d["isp_ambient"] == d["isp_vacuum"]


@pytest.mark.parametrize("args,field", [
    (["point", "--oxidizer", "LOXX", "--fuel", "RP-1", "--mixture-ratio", "2", "--chamber-pressure", "20 bar",
      "--area-ratio", "10"], "oxidizer"),
    (["point", "--oxidizer", "LOX", "--fuel", "LOX", "--mixture-ratio", "2", "--chamber-pressure", "20 bar",
      "--area-ratio", "10"], "fuel"),
    (BASE[:-1] + ["1000", "--area-ratio", "10"], "chamber_pressure"),
    (BASE[:-1] + ["-3 bar", "--area-ratio", "10"], "chamber_pressure"),
    (BASE[:-1] + ["0 bar", "--area-ratio", "10"], "chamber_pressure"),
    (BASE + ["--area-ratio", "10", "--ambient-pressure", "-1 Pa"], "ambient_pressure"),
    (BASE + ["--exit-pressure", "2000 psi"], "exit_pressure"),
    (BASE + ["--area-ratio", "1"], "area_ratio"),
    (BASE + ["--area-ratio", "abc"], "area_ratio"),
    (BASE + ["--area-ratio", "10", "--exit-pressure", "1 atm"], "exit"),
    (BASE, "exit"),
    (["point", "--oxidizer", "LOX", "--fuel", "RP-1", "--mixture-ratio", "0", "--chamber-pressure", "20 bar",
      "--area-ratio", "10"], "mixture_ratio"),
    (BASE + ["--area-ratio", "10", "--flow", "sideways"], "flow"),
    (BASE + ["--area-ratio", "10", "--equivalence-ratio", "1"], "mixture"),
])
def test_bad_input_is_one_line_exit_2(args, field):
    res = run(args)
    assert res.exit_code == 2, res.output
    out = res.output.strip()
    assert out.count("\n") == 0 and "Traceback" not in out
    assert out.startswith(f"error: {field}")


def test_missing_option_is_one_line():
    res = run(["point", "--oxidizer", "LOX"])
    assert res.exit_code == 2 and res.output.strip().count("\n") == 0


def test_solver_failure_carries_the_operating_point(monkeypatch):
    from perfchain.thermo import batch
    from perfchain.thermo import equilibrium
    from perfchain.errors import SolverError

    def boom(self, *a, **k):
        raise SolverError("forced failure", self.point)

    def hand_back(bt, rows, h):
        bt.fail(rows, "forced hand-back")

    # the batch solver hands the point back, then the general path fails
    monkeypatch.setattr(batch, "hp", hand_back)
    monkeypatch.setattr(equilibrium.EquilibriumSystem, "hp", boom)
    res = run(BASE + ["--area-ratio", "10"])
    assert res.exit_code == 2
    assert "LOX/RP-1 at O/F 2.56" in res.output and "6.89476e+06 Pa" in res.output


def test_absurd_mixture_ratio_fails_at_once_with_its_reason(monkeypatch):
    # N2O4 with a trace of MMH (O/F 1e15) is nearly pure liquid N2O4, whose decomposition to
    # N2 + 2 O2 is endothermic (formation enthalpies: N2O4(l) -19.5 kJ/mol, N2 and O2 zero; NIST
    # Chemistry WebBook, from memory), so no products above the data's 200 K meet its enthalpy.
    # The linear-program bound proves that before Cantera's HP equilibrium is started from the
    # extrapolated state below the data (it crawled ~25 s to fail): no HP equilibrium is tried.
    from perfchain.thermo import gas

    calls = []
    real = gas.equilibrate_quietly
    monkeypatch.setattr(gas, "equilibrate_quietly", lambda g, mode, **kw: (calls.append(mode), real(g, mode, **kw)))
    res = run(["point", "--oxidizer", "N2O4", "--fuel", "MMH", "--mixture-ratio", "1e15",
               "--chamber-pressure", "20 bar", "--area-ratio", "10"])
    assert res.exit_code == 2 and res.output.strip().count("\n") == 0, res.output
    assert "no temperature in the data range" in res.output and "enthalpy target" in res.output
    assert "HP" not in calls
