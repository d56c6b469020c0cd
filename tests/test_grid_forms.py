"""Lists with one unit and ranges in words: the same grid as the explicit form, everywhere.

The CLI, the study file and the Python API all read grids through perfchain.inputs, so each
form is checked once against the explicit list, then through each edge. No physics here:
the expected grids are the explicit lists the forms stand for (closed form).
"""

import pytest
from click.testing import CliRunner

import perfchain as pc
from perfchain.cli.main import main
from perfchain.errors import InputError
from perfchain.inputs import grid, grid_texts
from perfchain.study.schema import parse_study

SAME = [
    ("chamber_pressure", "30, 60, 100 bar", "30 bar, 60 bar, 100 bar"),
    ("chamber_pressure", "30 to 100 bar step 10", ",".join(f"{p} bar" for p in range(30, 101, 10))),
    ("chamber_pressure", "30 bar to 100 bar step 10 bar", ",".join(f"{p} bar" for p in range(30, 101, 10))),
    ("chamber_pressure", "300 to 500 step 100 psi", "300 psi, 400 psi, 500 psi"),
    ("chamber_pressure", "20 to 40 step 10, 70 bar", "20 bar, 30 bar, 40 bar, 70 bar"),
    ("chamber_pressure", "20:40:10, 70 bar", "20 bar, 30 bar, 40 bar, 70 bar"),
    ("mixture_ratio", "2.6 to 4.0 step 0.2", "2.6, 2.8, 3.0, 3.2, 3.4, 3.6, 3.8, 4.0"),
    ("mixture_ratio", "2.6 TO 3.0 STEP 0.1", "2.6, 2.7, 2.8, 2.9, 3.0"),
    ("area_ratio", "10, 20 to 40 step 10", "10, 20, 30, 40"),
    ("ambient_pressure", "0, 0.5, 1 atm", "0 atm, 0.5 atm, 1 atm"),
    ("altitude", "0 to 20 km step 5", "0 km, 5 km, 10 km, 15 km, 20 km"),
]


@pytest.mark.parametrize("field, short, explicit", SAME)
def test_forms_give_the_explicit_grid(field, short, explicit):
    # bit for bit: decimal steps are exact (1.6 + 0.1 k is 1.7, not 1.7000000000000002)
    assert grid(field, short).tolist() == grid(field, explicit).tolist()
    assert grid(field, ",".join(grid_texts(field, short))).tolist() == grid(field, explicit).tolist()


@pytest.mark.parametrize("field, given, allowed", [
    ("chamber_pressure", "30 bar, 60, 100 bar", "a unit on every value, or one unit after the last"),
    ("chamber_pressure", "30, 60 psi, 100 bar", "a unit on every value, or one unit after the last"),
    ("chamber_pressure", "30 to 100 step 10", "with a unit"),
    ("chamber_pressure", "30 bar to 100 psi step 10", "one unit for all three parts"),
    ("mixture_ratio", "2.6 to 4.0 step 0.3", "a step that lands on the stop"),
    ("mixture_ratio", "4.0 to 2.6 step 0.2", "start <= stop"),
    ("mixture_ratio", "2.6 to 4.0 step 0", "a step above 0"),
    ("mixture_ratio", "2.6 to 4.0", "START to STOP step STEP"),
    ("mixture_ratio", "2.6 to x step 0.2", "START to STOP step STEP"),
    ("area_ratio", "0.5 to 10 step 0.5", "above 1"),
])
def test_bad_forms_are_one_line(field, given, allowed):
    with pytest.raises(InputError) as info:
        grid(field, given)
    text = str(info.value)
    assert text.startswith(f"{field}: got ") and allowed in text and "\n" not in text, text


def test_python_sweep_takes_the_forms():
    a = pc.sweep("LOX", "RP-1", mixture_ratio="2.2 to 2.6 step 0.2", chamber_pressure="30, 60 bar", area_ratio=40)
    b = pc.sweep("LOX", "RP-1", mixture_ratio=[2.2, 2.4, 2.6], chamber_pressure=["30 bar", "60 bar"], area_ratio=40)
    assert a.mixture_ratio.tolist() == b.mixture_ratio.tolist()
    assert a.chamber_pressure.tolist() == b.chamber_pressure.tolist() == [3e6, 6e6] * 3
    assert a.isp_vacuum.tolist() == b.isp_vacuum.tolist()


def _sweep_cli(*args):
    result = CliRunner().invoke(main, ["sweep", "--oxidizer", "LOX", "--fuel", "RP-1", "--area-ratio", "40",
                                       "--workers", "1", *args])
    return result


def test_cli_sweep_takes_the_forms():
    a = _sweep_cli("--mixture-ratio", "2.2 to 2.6 step 0.2", "--chamber-pressure", "30, 60 bar")
    b = _sweep_cli("--mixture-ratio", "2.2,2.4,2.6", "--chamber-pressure", "30 bar,60 bar")
    assert a.exit_code == 0 and b.exit_code == 0, a.output + b.output
    assert a.stdout == b.stdout


def test_cli_bad_form_exits_2_in_one_line():
    r = _sweep_cli("--mixture-ratio", "2.2 to 2.6 step 0.3", "--chamber-pressure", "30 bar")
    assert r.exit_code == 2 and "Traceback" not in r.output
    assert r.stderr.strip().splitlines() == [r.stderr.strip()]
    assert r.stderr.startswith("error: mixture_ratio: got '2.2 to 2.6 step 0.3'; allowed: a step that lands")


STUDY = """[study]
title = "forms"
[[engine]]
name = "Invented-1"
oxidizer = "LOX"
fuel = "RP-1"
mixture_ratio = {mr}
chamber_pressure = {pc}
area_ratio = {ar}
ambient_pressure = {pa}
"""


def test_study_file_takes_the_forms():
    short = parse_study(STUDY.format(mr='"2.2 to 2.6 step 0.2"', pc='"30, 60, 100 bar"', ar='"10:30:10"',
                                     pa='"0, 1 atm"'))
    explicit = parse_study(STUDY.format(mr="[2.2, 2.4, 2.6]", pc='["30 bar", "60 bar", "100 bar"]',
                                        ar="[10, 20, 30]", pa='["0 atm", "1 atm"]'))
    assert short.engine[0] == explicit.engine[0]


@pytest.mark.parametrize("mr, pc_, where", [
    ('"2.2 to 2.6 step 0.3"', '"30 bar"', "engine[1].mixture_ratio: got '2.2 to 2.6 step 0.3'"),
    ("2.6", '"30 bar, 60, 100 bar"', "engine[1].chamber_pressure: got '30 bar, 60, 100 bar'"),
    ('"2.6"', '"30 bar"', "engine[1].mixture_ratio[1]: got '2.6'; allowed: a number"),   # one value stays strict
    ('"2.6 to 3.0"', '"30 bar"', "engine[1].mixture_ratio: got '2.6 to 3.0'; allowed: a range"),
])
def test_study_file_bad_forms(mr, pc_, where):
    with pytest.raises(InputError) as info:
        parse_study(STUDY.format(mr=mr, pc=pc_, ar="40", pa='"0 Pa"'))
    assert str(info.value).startswith(where), str(info.value)
