"""Uncertainty blocks in study files: schema, tables, report figures, and one-line errors."""

import pandas as pd
import pytest

from perfchain.errors import InputError
from perfchain.study.runner import run_study
from perfchain.study.schema import parse_study

STUDY = '''
[study]
title = "Uncertainty check (invented engine)"

[[engine]]
name = "Wren"
propellant = "H2O2-90"
chamber_pressure = "10 bar"
area_ratio = 40
ambient_pressure = "0 Pa"
thrust = "400 N"

[engine.efficiency]
cstar_efficiency = 0.96

[engine.uncertainty]
samples = 12
vary = { chamber_pressure = "+/-3%", cstar_efficiency = "0.94..0.97" }

[[vehicle]]
name = "Finch"
payload = "50 kg"

[[vehicle.stage]]
engine = "Wren"
propellant = "200 kg"
structural_ratio = 0.15

[vehicle.uncertainty]
samples = 256
vary = { "stage1.isp" = "+/-1%", "stage1.structural_ratio" = "0.13..0.17" }
'''


@pytest.fixture(scope="module")
def out(tmp_path_factory):
    out = tmp_path_factory.mktemp("unc") / "out"
    run_study(parse_study(STUDY), out, study_text=STUDY, progress=None)
    return out


def test_study_writes_samples_summary_and_figures(out):
    tables = out / "tables"
    summary = pd.read_parquet(tables / "uncertainty.parquet")
    assert {"engine", "vehicle", "output", "mean", "std", "p5", "p50", "p95", "failed"} <= set(summary.columns)
    wren = summary[summary.engine == "Wren"].set_index("output")
    assert wren.loc["delivered.isp_vacuum", "p5"] < wren.loc["delivered.isp_vacuum", "p95"]
    samples = pd.read_parquet(tables / "engine-wren-samples.parquet")
    assert len(samples) == 12 and {"chamber_pressure", "delivered_isp_vacuum", "failure"} <= set(samples.columns)
    shares = pd.read_parquet(tables / "sensitivity.parquet")
    finch = shares[(shares.vehicle == "Finch") & (shares.output == "total_delta_v")]
    assert finch.share.sum() == pytest.approx(1.0, abs=0.05)   # additive inputs: first-order shares sum to 1
    html = (out / "report.html").read_text()
    assert "Uncertainty and sensitivity" in html and "tornado of total_delta_v" in html
    assert (out / "plots" / "engine-wren-tornado.png").exists()
    assert (out / "plots" / "vehicle-finch-uncertainty.svg").exists()


@pytest.mark.parametrize("table, message", [
    ('[engine.uncertainty]\nvary = { cstar_efficiency = "0.95..1.05" }',
     "engine[1].uncertainty.cstar_efficiency: got '0.95..1.05'; allowed: a distribution whose samples stay inside "
     "a factor in (0, 1]"),
    ('[engine.uncertainty]\nvary = { area_ratio = "+/-2%" }',
     "engine[1].uncertainty.area_ratio: got 'varied'; allowed: an input this point is given"),
])
def test_bad_study_distributions_are_one_line(table, message):
    text = STUDY.split("[engine.uncertainty]")[0].replace("area_ratio = 40", "exit_pressure = \"0.01 bar\"") + table
    from perfchain.study.runner import compute_study

    with pytest.raises(InputError) as err:
        compute_study(parse_study(text))
    assert message in str(err.value) and "\n" not in str(err.value)
