"""Fuzzing the edges: generated names, numbers, unit texts and files give either a sane
result or the project's own one-line error, never another exception or a traceback.

Contract (README "Errors"; issue 7): a call of :func:`perfchain.performance.chain.performance`
returns a :class:`Performance` whose numbers are finite and physically sane, or raises a
:class:`~perfchain.errors.PerfchainError` whose message is one line. A CLI call exits 0 with
valid output, or exits 2 with exactly one line on stderr starting ``error: ``.

The examples are derandomized so that the run is the same on every machine: a test that
is marked ``xfail(strict=True)`` for an open bug fails the same way every time and flips
(a strict-xfail error) once the bug is fixed. Tests of bugs already fixed keep a comment
with the bug number.

Operating points are kept cheap: chamber pressures 1-200 bar, pairs that are gas-only at
moderate O/F, mixture ratios drawn around the stoichiometric range.
"""

from __future__ import annotations

import csv
import io
import json
import math

import pytest
from click.testing import CliRunner
from hypothesis import HealthCheck, given, settings
from hypothesis import event as _hypothesis_event
from hypothesis.control import currently_in_test_context
from hypothesis import strategies as st

from perfchain.cli.main import main
from perfchain.errors import PerfchainError
from perfchain.performance.chain import Performance, performance

FUZZ = dict(deadline=None, derandomize=True, database=None,
            suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much])

# ------------------------------------------------------------------ strategies
NAMES = ["LOX", "LH2", "LCH4", "RP-1", "ethanol", "N2O4", "MMH", "UDMH", "N2H4", "H2O2", "H2O2-98",
         "N2O", "NH3", "GOX", "GH2", "GCH4", "air", "water", "argon", "ethanol-75", "H2O2-90",
         "lox", "ch4(l)", "NTO", "hydrazine", "kerosene"]
# pairs that stay gas-only at moderate O/F, with their stoichiometric O/F (mixture.py docstrings,
# closed form from the oxidizing valences; GOX/GH2 7.936, LOX/LCH4 3.99, N2O4/MMH ~2.5 from memory)
CHEAP = [("LOX", "LH2", 7.94), ("GOX", "GH2", 7.94), ("LOX", "LCH4", 3.99), ("N2O4", "MMH", 2.5)]
UNITS = ["bar", "psi", "psia", "MPa", "kPa", "Pa", "atm", "torr", "mbar", "hPa",
         "K", "m", "kg", "s", "deg", "furlong", "bars", "Bar", "pa", "%", ""]

# Garbage without brackets and arithmetic operators (those are fuzzed on their own below,
# test_api_unit_text_with_operators_and_brackets).
SAFE_GARBAGE = st.text(alphabet=st.characters(codec="utf-8", exclude_characters="()[]{}/*^+-=,#\\'\"\x00"),
                       max_size=12)


def _misspell(name):
    return st.sampled_from([name[:-1], name + "X", name.swapcase(), name[::-1], " " + name + " ",
                            name.replace("O", "0"), name + "\n"])


names = st.one_of(st.sampled_from(NAMES), st.sampled_from(NAMES).flatmap(_misspell), SAFE_GARBAGE,
                  st.sampled_from([None, 3, 2.5, b"LOX", ["LOX"], True]))
numbers = st.one_of(st.floats(allow_nan=True, allow_infinity=True),
                    st.sampled_from([0.0, -1.0, 1e300, -1e300, 1e-300, 5e-324]))


def ratios(stoich):
    """Mostly around the stoichiometric O/F, plus zero, negatives, nan, inf, huge, strings."""
    return st.one_of(st.floats(0.4 * stoich, 1.6 * stoich), st.floats(0.4 * stoich, 1.6 * stoich),
                     numbers, st.sampled_from([0, -2, "2.5", "abc", "", None, True, [2.5]]))


def pressure_texts(low_bar=1.0, high_bar=200.0):
    """Pressures as text in many units (same value range), plus wrong units, bare numbers, junk."""
    conv = {"bar": 1.0, "psi": 14.503773773, "MPa": 0.1, "kPa": 100.0, "atm": 0.98692327, "Pa": 1e5}
    good = st.tuples(st.floats(low_bar, high_bar), st.sampled_from(list(conv))).map(
        lambda t: f"{t[0] * conv[t[1]]:.6g} {t[1]}")
    odd = st.tuples(numbers, st.sampled_from(UNITS), st.sampled_from(["", " ", "  "])).map(
        lambda t: f"{t[0]}{t[2]}{t[1]}")
    return st.one_of(good, good, odd, st.floats(1e5, 1e7), SAFE_GARBAGE,
                     st.sampled_from(["20", "-3 bar", "0 bar", "nan bar", "inf psi", None, True]))


area_ratios = st.one_of(st.floats(1.5, 1e4), st.floats(1.5, 300.0),
                        st.sampled_from([1.0, 0.5, 0.0, -4.0, math.nan, math.inf, "10", True, None]))
flows = st.one_of(st.sampled_from(["shifting", "frozen", "frozen-throat", "Frozen", " shifting "]),
                  SAFE_GARBAGE, st.sampled_from([None, 1]))


# ------------------------------------------------------------------ checks
def _floats(obj):
    if isinstance(obj, dict):
        for v in obj.values():
            yield from _floats(v)
    elif isinstance(obj, (list, tuple)):
        for v in obj:
            yield from _floats(v)
    elif isinstance(obj, float):
        yield obj


def event(text):
    """Count an outcome in hypothesis statistics, only inside a hypothesis test."""
    if currently_in_test_context():
        _hypothesis_event(text)


def check_sane(r: Performance):
    """Finite and physically sane (bounds: the gas data range; common practice otherwise)."""
    assert isinstance(r, Performance)
    d = r.to_dict()
    assert all(math.isfinite(x) for x in _floats(d)), d
    # the thermodynamic data of the products cover 200-6000 K (NASA Glenn polynomials)
    assert 200.0 <= r.chamber.temperature <= 6000.0
    assert 0.0 < r.isp_vacuum < 700.0  # no chemical pair exceeds ~530 s (common practice)
    assert r.cstar > 0 and r.isp_ambient <= r.isp_vacuum + 1e-9
    assert r.exit.pressure < r.throat.pressure < r.chamber.pressure
    assert r.exit.temperature <= r.chamber.temperature
    assert abs(r.throat.mach - 1.0) < 1e-6 and r.exit.mach > 1.0
    # steady-flow energy equation, adiabatic nozzle from rest (closed form): h0 = h + u^2/2
    h0 = r.chamber.enthalpy
    for s in (r.throat, r.exit):
        assert abs(h0 - s.enthalpy - s.velocity ** 2 / 2) <= 1e-6 * max(abs(h0), s.velocity ** 2)


def check_error(exc: PerfchainError):
    text = str(exc)
    assert text and "\n" not in text and text == text.strip(), repr(text)


def call(**kw):
    """performance(**kw): a sane result or one PerfchainError line; anything else fails."""
    try:
        r = performance(**kw)
    except PerfchainError as exc:
        check_error(exc)
        event("api: PerfchainError")
        return None
    check_sane(r)
    event("api: result")
    return r


def check_cli(result, command):
    """Exit 0 with valid output, or exit 2 with exactly one 'error: ' line; never a traceback."""
    assert "Traceback" not in result.output
    event(f"{command}: exit {result.exit_code}")
    if result.exit_code == 0:
        return True
    assert result.exit_code == 2, (result.exit_code, result.output, result.exception)
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: "), result.stderr
    assert result.stdout == "", result.stdout
    return False


# ------------------------------------------------------------------ (a) the Python API
def broken_fields(fields):
    """Which inputs get a bad value: none about a third of the time, else one or two."""
    return st.one_of(st.just(frozenset()), st.frozensets(st.sampled_from(fields), min_size=1, max_size=2))


def good_pressure(low_bar, high_bar):
    return pressure_texts(low_bar, high_bar).filter(lambda t: isinstance(t, str) and t[-1:].isalpha()
                                                    and t.split()[-1] in ("bar", "psi", "MPa", "kPa", "atm", "Pa")
                                                    and not t.startswith(("-", "0 ", "nan", "inf")))


@settings(max_examples=120, **FUZZ)
@given(pair=st.sampled_from(CHEAP), data=st.data())
def test_api_generated_points(pair, data):
    ox, fu, stoich = pair
    bad = data.draw(broken_fields(["pc", "mixture", "exit", "ambient", "flow"]))
    pick = lambda field, good, wrong: data.draw(wrong if field in bad else good)  # noqa: E731
    kw = dict(oxidizer=ox, fuel=fu, chamber_pressure=pick("pc", good_pressure(1.0, 200.0), pressure_texts()),
              flow=pick("flow", st.sampled_from(["shifting", "frozen", "frozen-throat", "Frozen"]), flows))
    how = data.draw(st.sampled_from(["mixture_ratio", "mixture_ratio", "equivalence_ratio", "fuel_percent"]))
    good = {"mixture_ratio": st.floats(0.5 * stoich, 1.5 * stoich), "equivalence_ratio": st.floats(0.6, 1.8),
            "fuel_percent": st.floats(100 / (1 + 1.5 * stoich), 100 / (1 + 0.5 * stoich))}[how]
    kw[how] = pick("mixture", good, ratios(stoich))
    if data.draw(st.booleans()):
        kw["area_ratio"] = pick("exit", st.floats(1.5, 300.0), area_ratios)
    else:
        kw["exit_pressure"] = pick("exit", good_pressure(0.05, 0.9), pressure_texts(0.05, 5.0))
    if data.draw(st.booleans()):
        kw["ambient_pressure"] = pick("ambient", st.sampled_from(["0 Pa", "1 atm", "0.5 bar", "3 psi"]),
                                      pressure_texts(0.0, 2.0))
    call(**kw)


@settings(max_examples=60, **FUZZ)
@given(ox=names, fu=names, mr=st.one_of(st.floats(0.5, 8.0), numbers))
def test_api_generated_names(ox, fu, mr):
    r = call(oxidizer=ox, fuel=fu, mixture_ratio=mr, chamber_pressure="20 bar", area_ratio=10.0)
    if r is not None:  # a name that resolved really was an ingredient of that role
        assert r.oxidizer and r.fuel


@settings(max_examples=40, **FUZZ)
@given(tail=st.text(alphabet="()[]{}/*^+-=0 bar", min_size=1, max_size=6))
def test_api_unit_text_with_operators_and_brackets(tail):
    call(oxidizer="LOX", fuel="LCH4", mixture_ratio=3.2, chamber_pressure="50 bar" + tail, area_ratio=20.0)


# regression: stray brackets or operators in a unit text once escaped the parser as a traceback
@pytest.mark.parametrize("text", ["50 bar)", "50 ()", "50 bar/", "50 bar/0"])
def test_api_unit_parser_errors_are_input_errors(text):
    with pytest.raises(PerfchainError):
        performance("LOX", "LCH4", mixture_ratio=3.2, chamber_pressure=text, area_ratio=20.0)


# regression: an area ratio of 1e300 once crashed the expansion instead of a one-line error
@pytest.mark.parametrize("flow", ["shifting", "frozen"])
def test_api_huge_area_ratio_is_an_error_not_a_crash(flow):
    # shifting: ValueError (math domain error); frozen: CanteraError (density = 0)
    call(oxidizer="LOX", fuel="LH2", mixture_ratio=6.0, chamber_pressure="50 bar", area_ratio=1e300, flow=flow)


# regression: extreme area ratios were once extrapolated to impossible Isp instead of flagged
@pytest.mark.parametrize("eps", [1e8, 1e20])
def test_api_extreme_area_ratio_is_flagged_not_extrapolated(eps):
    # Energy bound (closed form): u_e <= sqrt(2 (h_c - h_e)) with h_e >= h(200 K); for LOX/LH2 at
    # O/F 6 that is under ~520 s, so 1500 s or more is a silent wrong answer.
    call(oxidizer="LOX", fuel="LH2", mixture_ratio=6.0, chamber_pressure="50 bar", area_ratio=eps)


# regression: a malformed losses argument once raised a raw Python error, not an InputError
@pytest.mark.parametrize("losses", [{"bogus": 1.0}, 3, "x"])
def test_api_bad_losses_argument(losses):
    call(oxidizer="LOX", fuel="LCH4", mixture_ratio=3.2, chamber_pressure="50 bar", area_ratio=20.0,
         losses=losses)


# ------------------------------------------------------------------ (b) the CLI
def _text(x):
    return x if isinstance(x, str) else repr(x)


cli_numbers = st.one_of(st.floats(0.5, 8.0).map(lambda x: f"{x:.4g}"), numbers.map(repr),
                        SAFE_GARBAGE, st.sampled_from(["", "1e400", "-0", "2,5", "0x10"]))
cli_pressures = pressure_texts().map(_text)
cli_pairs = st.sampled_from(CHEAP)


def _invoke(args):
    return CliRunner().invoke(main, args)


@settings(max_examples=60, **FUZZ)
@given(pair=cli_pairs, data=st.data())
def test_cli_point(pair, data):
    ox, fu, stoich = pair
    bad = data.draw(broken_fields(["ox", "pc", "mixture", "exit", "extra"]))
    pick = lambda field, good, wrong: data.draw(wrong if field in bad else good)  # noqa: E731
    args = ["point", "--oxidizer", pick("ox", st.just(ox), names.map(_text)), "--fuel", fu,
            "--chamber-pressure", pick("pc", good_pressure(1.0, 200.0), cli_pressures),
            "--mixture-ratio", pick("mixture", st.floats(0.5 * stoich, 1.5 * stoich).map(repr), cli_numbers)]
    if data.draw(st.booleans()):
        args += ["--area-ratio", pick("exit", st.floats(1.5, 300).map(repr), cli_numbers)]
    else:
        args += ["--exit-pressure", pick("exit", st.sampled_from(["1 atm", "0.5 bar", "5 psi"]),
                                         pressure_texts(0.05, 5.0).map(_text))]
    good_extra = [("--flow", st.sampled_from(["shifting", "frozen", "frozen-throat"])),
                  ("--ambient-pressure", st.sampled_from(["0 Pa", "1 atm", "0.3 bar"])),
                  ("--altitude", st.sampled_from(["0 km", "11 km", "86 km"])),
                  ("--cstar-efficiency", st.floats(0.9, 1.0).map(repr)),
                  ("--nozzle-half-angle", st.sampled_from(["15deg", "0.2 rad", "12.5 deg"])),
                  ("--contraction-ratio", st.floats(1.5, 10).map(repr)),
                  ("--thrust", st.sampled_from(["5 kN", "1000 lbf"]))]
    bad_extra = [("--flow", flows.map(_text)), ("--ambient-pressure", pressure_texts(0.0, 2.0).map(_text)),
                 ("--altitude", st.sampled_from(["87 km", "-1 m", "5", "nan km"])),
                 ("--cstar-efficiency", cli_numbers),
                 ("--nozzle-half-angle", st.sampled_from(["15", "50 deg", "x", "0 deg"])),
                 ("--contraction-ratio", cli_numbers), ("--thrust", st.sampled_from(["5", "-1 N", "x kN"]))]
    pool = bad_extra if "extra" in bad else good_extra
    for opt, strat in data.draw(st.lists(st.sampled_from(pool), max_size=2, unique_by=lambda t: t[0])):
        if opt == "--altitude" and "--ambient-pressure" in args:
            continue
        args += [opt, data.draw(strat)]
    as_json = data.draw(st.booleans())
    r = _invoke(args + (["--json"] if as_json else []))
    if check_cli(r, "point"):
        if as_json:
            d = json.loads(r.stdout)
            assert d["isp_vacuum"] > 0 and 200 <= d["chamber"]["temperature"] <= 6000
        else:
            assert "Vacuum Isp" in r.stdout


@settings(max_examples=30, **FUZZ)
@given(pair=cli_pairs, data=st.data())
def test_cli_sweep(pair, data):
    ox, fu, stoich = pair
    mrs = data.draw(st.one_of(
        st.lists(st.floats(0.6 * stoich, 1.4 * stoich).map(lambda x: f"{x:.3f}"), min_size=1, max_size=2, unique=True)
        .map(",".join), cli_numbers))
    pcs = data.draw(st.one_of(st.lists(st.sampled_from(["20 bar", "50 bar", "300 psi", "2 MPa", "1 atm"]),
                                       min_size=1, max_size=2, unique=True).map(",".join), cli_pressures))
    args = ["sweep", "--oxidizer", ox, "--fuel", fu, "--mixture-ratio", mrs, "--chamber-pressure", pcs,
            "--workers", data.draw(st.sampled_from(["1", "1", "1", "0", "x", "-1", "1.5"])),
            "--composition-top", data.draw(st.sampled_from(["0", "3", "-1", "x"]))]
    if data.draw(st.booleans()):
        args += ["--area-ratio", data.draw(st.one_of(st.sampled_from(["10", "5,40", "1", "0.5,10", "10,10"]),
                                                     cli_numbers))]
    else:
        args += ["--exit-pressure", data.draw(st.sampled_from(["1 atm", "0.5 bar,1 bar", "1", "100 bar"]))]
    if data.draw(st.booleans()):
        args += ["--altitude", data.draw(st.sampled_from(["0 km,10 km", "90 km", "5 km"]))]
    args += ["--flow", data.draw(st.one_of(st.sampled_from(["shifting", "shifting,frozen", "frozen,frozen"]),
                                            flows.map(_text)))]
    r = _invoke(args)
    if check_cli(r, "sweep"):
        rows = list(csv.DictReader(io.StringIO(r.stdout)))
        sizes = [len(args[args.index(o) + 1].split(",")) for o in
                 ("--mixture-ratio", "--chamber-pressure", "--flow")]
        exit_opt = "--area-ratio" if "--area-ratio" in args else "--exit-pressure"
        sizes.append(len(args[args.index(exit_opt) + 1].split(",")))
        if "--altitude" in args:
            sizes.append(len(args[args.index("--altitude") + 1].split(",")))
        assert len(rows) == math.prod(sizes)  # one row per grid point, none lost
        for row in rows:
            assert row["status"] in ("ok", "failed")
            assert (row["status"] == "failed") == bool(row["reason"])
            if row["status"] == "ok":
                assert float(row["isp_vacuum"]) > 0


@settings(max_examples=8, **FUZZ)
@given(data=st.data())
def test_cli_compare(data):
    pairs = data.draw(st.lists(st.sampled_from(["LOX/LH2", "GOX/GH2", "LOX/LCH4", "LOX-LH2", "LOX/", "x/y",
                                                "LH2/LOX"]), min_size=1, max_size=2))
    args = ["compare"] + [a for p in pairs for a in ("--pair", p)]
    args += ["--chamber-pressure", data.draw(st.sampled_from(["50 bar", "50", "0 bar", "x"])),
             "--area-ratio", data.draw(st.sampled_from(["20", "1", "nan", "x"])),
             "--objective", data.draw(st.sampled_from(["isp_vacuum", "density_isp", "thrust"]))]
    r = _invoke(args + ["--json"])
    if check_cli(r, "compare"):
        out = json.loads(r.stdout)
        assert all(p["isp_vacuum"] > 0 for p in out["pairs"])


masses = st.one_of(st.floats(1e-3, 1e6).map(lambda x: f"{x:.4g} kg"),
                   st.sampled_from(["10 t", "0 kg", "-1 kg", "5", "2 lb", "3 m", "nan kg", "1e300 kg"]))
stage_values = {
    "isp": st.sampled_from(["300 s", "0 s", "300", "5 min", "-3 s", "inf s"]),
    "exhaust_velocity": st.sampled_from(["3 km/s", "3000", "0 m/s"]),
    "dry": masses, "propellant": masses, "mass": masses,
    "propellant_fraction": st.sampled_from(["0.85", "85 %", "1", "0", "nan", "x"]),
    "structural_ratio": st.sampled_from(["0.1", "10 %", "1.5", "-0.1"]),
    "thrust": st.sampled_from(["100 kN", "100", "0 N"]), "name": SAFE_GARBAGE,
    "drry": st.just("1 t"), "": st.just("1 t"),
}


@settings(max_examples=60, **FUZZ)
@given(data=st.data())
def test_cli_deltav(data):
    stages = []
    for _ in range(data.draw(st.integers(1, 2))):
        keys = data.draw(st.one_of(
            st.sampled_from([["isp", "dry", "propellant"], ["exhaust_velocity", "mass", "propellant_fraction"],
                             ["isp", "propellant", "structural_ratio"]]),
            st.lists(st.sampled_from(sorted(stage_values)), max_size=4)))
        stages.append(", ".join(f"{k}={data.draw(stage_values[k])}" for k in keys))
    args = ["deltav", "--payload", data.draw(masses)] + [a for s in stages for a in ("--stage", s)]
    if data.draw(st.booleans()):
        args += ["--target", data.draw(st.sampled_from(["3 km/s", "30 km/s", "3", "0 m/s", "x"]))]
    r = _invoke(args + ["--json"])
    if check_cli(r, "deltav"):
        out = json.loads(r.stdout)
        assert math.isfinite(out["total_delta_v"]) and out["total_delta_v"] >= 0


@pytest.mark.parametrize("args", [
    ["point", "--oxidizer", "LOX", "--fuel", "LH2", "--mixture-ratio", "6", "--chamber-pressure", "50 bar",
     "--area-ratio", "1e300"],                                                        # huge area ratio
    ["point", "--oxidizer", "LOX", "--fuel", "LH2", "--mixture-ratio", "6", "--chamber-pressure", "50 bar",
     "--area-ratio", "10", "--ambient-pressure", "50 bar)"],                          # stray bracket
    ["sweep", "--oxidizer", "LOX", "--fuel", "LH2", "--mixture-ratio", "6", "--chamber-pressure", "50 bar)",
     "--area-ratio", "10", "--workers", "1"],                                         # stray bracket
    ["point", "--oxidizer", "LOX", "--fuel", "LH2", "--mixture-ratio", "6", "--chamber-pressure", "50 bar",
     "--area-ratio", "10", "--contraction-ratio", "1e300"],                           # huge contraction ratio
    ["deltav", "--payload", "0 kg", "--stage", "isp=300 s, dry=1e-300 kg, propellant=1e300 kg"],  # mass overflow
])
def test_cli_former_tracebacks(args):  # regression: each of these once ended in a traceback
    check_cli(_invoke(args), args[0])


# ------------------------------------------------------------------ (c) the study loader
study_mod = pytest.importorskip("perfchain.study.schema")

BASE_STUDY = {
    "study.title": '"fuzz"',
    "engine.name": '"E1"', "engine.oxidizer": '"LOX"', "engine.fuel": '"LCH4"',
    "engine.mixture_ratio": "[3.0, 3.4]", "engine.chamber_pressure": '"50 bar"', "engine.area_ratio": "40",
    "engine.flow": '"shifting"',
    "vehicle.name": '"V1"', "vehicle.payload": '"100 kg"',
    "stage.engine": '"E1"', "stage.propellant": '"2 t"', "stage.structural_ratio": "0.1",
}
toml_values = st.one_of(
    st.sampled_from(['"20 bar"', '"20"', "20", '"x"', "true", "nan", "inf", "-1", "0", "[]", "[1, 2]",
                     '["20 bar", "x"]', "{a = 1}", "1979-05-27", '"0.1"', '"10 %"', '"300 s"', '"E2"',
                     '"LOXX"', '"shifting,frozen"', "1e400", '""']),
    st.floats(allow_nan=False, allow_infinity=False).map(repr),
    SAFE_GARBAGE.map(lambda s: json.dumps(s)))


def _render(values: dict, extra_key: str | None) -> str:
    sections = {"study": "[study]", "engine": "[[engine]]", "vehicle": "[[vehicle]]", "stage": "[[vehicle.stage]]"}
    out = []
    for sec, head in sections.items():
        out.append(head)
        for k, v in values.items():
            if k.split(".")[0] == sec and v is not None:
                out.append(f"{k.split('.', 1)[1]} = {v}")
        if extra_key and extra_key.startswith(sec + "."):
            out.append(f"{extra_key.split('.', 1)[1]} = 1")
    return "\n".join(out) + "\n"


@settings(max_examples=80, **FUZZ)
@given(data=st.data())
def test_study_loader_generated_files(data):
    values = dict(BASE_STUDY)
    for key in data.draw(st.lists(st.sampled_from(sorted(BASE_STUDY)), max_size=3, unique=True)):
        values[key] = data.draw(st.one_of(toml_values, st.none()))  # None: the key left out
    extra = data.draw(st.one_of(st.none(), st.sampled_from(["engine.feul", "engine.chamber_presure",
                                                           "stage.dryy", "study.titel", "vehicle.payloads"])))
    text = _render(values, extra)
    if data.draw(st.integers(0, 9)) == 0:  # now and then, a damaged file
        cut = data.draw(st.integers(0, len(text)))
        text = text[:cut] + data.draw(st.sampled_from(["", "[", "=", '"', "\x00", "[[engine]]\n"])) + text[cut:]
    try:
        study = study_mod.parse_study(text)
    except PerfchainError as exc:
        check_error(exc)
        return
    assert study.engine or study.vehicle


@pytest.mark.parametrize("value", ["true", "false"])  # regression
def test_study_boolean_is_not_a_mixture_ratio(value):
    # a TOML boolean silently becomes O/F 1.0 (or 0.0) instead of being refused
    values = dict(BASE_STUDY, **{"engine.mixture_ratio": value})
    with pytest.raises(PerfchainError):
        study_mod.parse_study(_render(values, None))


@settings(max_examples=15, **FUZZ)
@given(blob=st.one_of(st.binary(max_size=200), SAFE_GARBAGE.map(str.encode),
                      st.sampled_from([b"[study]\n", b"\xff\xfe", b"[study]\ntitle = 'x'\n"])))
def test_cli_run_on_generated_files(blob, tmp_path_factory):
    folder = tmp_path_factory.mktemp("run")
    path = folder / "s.toml"
    path.write_bytes(blob)
    r = _invoke(["run", str(path), "--out", str(folder / "out"), "--no-plots"])
    assert r.exit_code == 2  # none of these files is a complete study
    check_cli(r, "run")


def test_api_absurd_ambient_pressure():  # regression: once gave ambient Isp -inf and a crash
    # 1e306 Pa ambient times area ratio 1000 overflows the ambient thrust term to -inf
    call(oxidizer="GOX", fuel="GH2", mixture_ratio=6.0, chamber_pressure="50 bar", area_ratio=1000.0,
         ambient_pressure="1e300 MPa")
