"""``perfchain run`` / ``new-study`` through the CLI group: outputs, units, and one-line errors with exit 2."""

import json

import pandas as pd
import pyarrow.parquet as pq
import pytest
from click.testing import CliRunner

from perfchain.cli.main import main
from perfchain.study.schema import load_study

TINY = """
[study]
title = "Tiny invented study"
[[engine]]
name = "Wisp"
oxidizer = "N2O4"
fuel = "MMH"
mixture_ratio = [1.6, 2.2]
chamber_pressure = "10 bar"
area_ratio = 40
ambient_pressure = "0 Pa"
efficiency = { cstar_efficiency = 0.95 }
[[vehicle]]
name = "Wisp stage"
payload = "50 kg"
[[vehicle.stage]]
engine = "Wisp"
dry = "30 kg"
propellant = "200 kg"
[output]
formats = ["parquet", "csv"]
plots = false
"""


def invoke(*args):
    return CliRunner().invoke(main, [str(a) for a in args])


def one_line_error(result, start):
    assert result.exit_code == 2, result.output
    lines = [ln for ln in result.output.strip().splitlines() if not ln.startswith("perfchain: ")]  # progress
    assert len(lines) == 1 and lines[0].startswith("error: " + start), result.output
    assert "Traceback" not in result.output


@pytest.fixture(scope="module")
def runs(tmp_path_factory):
    base = tmp_path_factory.mktemp("cli")
    study = base / "tiny.toml"
    study.write_text(TINY)
    si, us = base / "si", base / "us"
    return study, invoke("run", study, "--out", si), si, invoke("run", study, "--out", us, "--units", "us"), us


def test_run_writes_tables_copy_and_report(runs):
    study, result, out, _, _ = runs
    assert result.exit_code == 0, result.output
    for name in ("report.html", "study.toml", "provenance.json", "tables/engine-wisp-grid.parquet",
                 "tables/engine-wisp-grid.csv", "tables/vehicles.csv", "tables/design-points.parquet"):
        assert (out / name).is_file(), name
    # the copy is the study itself under a provenance comment, and still a valid study
    copy = (out / "study.toml").read_text()
    assert copy.startswith("# Copy of the study") and copy.endswith(TINY)
    assert load_study(out / "study.toml") == load_study(study)
    meta = json.loads((out / "provenance.json").read_text())
    assert {"perfchain", "cantera", "thermo_data", "date", "study_sha256"} <= set(meta)


def test_us_units_convert_exactly(runs):
    _, _, si, result, us = runs
    assert result.exit_code == 0, result.output
    a = pd.read_csv(si / "tables/engine-wisp-grid.csv")
    b = pd.read_csv(us / "tables/engine-wisp-grid.csv")
    # 1 psi = 6894.757293168 Pa, 1 bar = 1e5 Pa, 1 K = 1.8 degR, 1 ft = 0.3048 m (NIST SP 811, 2008)
    assert (a.chamber_pressure * 1e5 / 6894.757293168 - b.chamber_pressure).abs().max() < 1e-9
    assert (a.chamber_temperature * 1.8 - b.chamber_temperature).abs().max() < 1e-9
    assert (a.cstar / 0.3048 - b.cstar).abs().max() < 1e-9
    assert (a.isp_vacuum == b.isp_vacuum).all()  # seconds either way
    units = json.loads(pq.read_schema(us / "tables/engine-wisp-grid.parquet").metadata[b"perfchain"])["units"]
    assert units["chamber_pressure"] == "psia" and units["chamber_temperature"] == "degR"
    v = pd.read_csv(us / "tables/vehicle-stages.csv")
    assert abs(v.dry_mass[0] - 30 / 0.45359237) < 1e-9  # 1 lb = 0.45359237 kg exactly (NIST SP 811)


def test_existing_folder_is_refused_unless_overwrite(runs):
    study, _, out, _, _ = runs
    one_line_error(invoke("run", study, "--out", out), "--out:")
    (out / "tables" / "engine-wisp-grid.csv").unlink()
    result = invoke("run", study, "--out", out, "--overwrite", "--no-plots")
    assert result.exit_code == 0 and (out / "tables" / "engine-wisp-grid.csv").is_file()


def test_failure_leaves_no_report(tmp_path):
    study = tmp_path / "s.toml"
    study.write_text(TINY.replace('payload = "50 kg"', 'payload = "50 kg"\ntarget = "20 km/s"'))
    out = tmp_path / "out"
    out.mkdir()
    (out / "report.html").write_text("an old report")
    result = invoke("run", study, "--out", out, "--overwrite")
    one_line_error(result, "vehicle[1].target: got '20 km/s'")
    assert not (out / "report.html").exists()


@pytest.mark.parametrize("text, start", [
    (TINY + "x = = 1\n", "study: got '"),
    (TINY.replace("oxidizer =", "oxidiser ="), "engine[1].oxidiser:"),
    (TINY.replace('fuel = "MMH"\n', ""), "engine[1].fuel:"),
    (TINY.replace('"10 bar"', '"10"'), "engine[1].chamber_pressure"),
    (TINY.replace('"30 kg"', '"30 m"'), "vehicle[1].stage[1].dry"),
    (TINY.replace('engine = "Wisp"', 'engine = "Whisp"'), "vehicle[1].stage[1].engine: got 'Whisp'"),
    (TINY.replace('fuel = "MMH"', 'fuel = "MMHH"'), "engine[1].fuel: got 'MMHH'"),
])
def test_bad_studies_are_one_line_exit_2(tmp_path, text, start):
    study = tmp_path / "bad.toml"
    study.write_text(text)
    out = tmp_path / "out"
    result = invoke("run", study, "--out", out)
    one_line_error(result, start)
    if "= = 1" in text:
        assert "line 23, column 5" in result.output  # the line after TINY's 22 lines
    assert not (out / "report.html").exists()


def test_missing_study_file(tmp_path):
    one_line_error(invoke("run", tmp_path / "nope.toml", "--out", tmp_path / "o"), "study:")


def test_new_study_writes_a_loadable_starter(tmp_path):
    path = tmp_path / "starter.toml"
    result = invoke("new-study", path)
    assert result.exit_code == 0 and path.is_file()
    study = load_study(path)
    assert study.engine and study.comparison and study.vehicle
    assert "#" in path.read_text()  # commented
    one_line_error(invoke("new-study", path), "path:")
    assert invoke("new-study").output == path.read_text()
