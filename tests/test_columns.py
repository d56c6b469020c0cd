"""One unit per output column: declared once (perfchain.study.columns), read by every writer.

A study and a sweep are run; every numeric column they write must have a declared kind, and
the units in the CSV sidecar, the Parquet metadata and the DataFrame attrs restored by
pandas.read_parquet must agree. The declarations are checked against the result records'
own field documentation (the docstrings of Performance and Station).
"""

import json
import math
import re
from dataclasses import fields

import pandas as pd
import pyarrow.parquet as pq
import pytest

from perfchain.constants import G0
from perfchain.nozzle.stations import Station
from perfchain.performance.loss_model import LOSS_FACTORS
from perfchain.performance.result import OPTIONAL_BLOCKS, Performance
from perfchain.study import columns as C
from perfchain.study.runner import run_study
from perfchain.study.schema import parse_study
from perfchain.study.sweep import make_grid, sweep, sweep_to_file

STUDY = """
[study]
title = "Column units (invented engine Wren-1)"
[[engine]]
name = "Wren-1"
oxidizer = "N2O4"
fuel = "MMH"
mixture_ratio = [1.6, 2.0]
chamber_pressure = ["10 bar"]
area_ratio = [60]
ambient_pressure = ["0 Pa"]
objective = "density_isp"
contraction_ratio = 3.0
thrust = "400 N"
efficiency = { cstar_efficiency = 0.96, conical_half_angle = "15 deg", boundary_layer = 0.99 }
[[comparison]]
name = "pairs"
pairs = ["N2O4/MMH", "LOX/RP-1"]
chamber_pressure = "10 bar"
area_ratio = 60
ambient_pressure = "0 Pa"
efficiency = { cstar_efficiency = 0.96 }
[[vehicle]]
name = "Kite (invented)"
payload = "50 kg"
target = "1 km/s"
[[vehicle.stage]]
engine = "Wren-1"
propellant = "300 kg"
structural_ratio = 0.15
thrust = "400 N"
[vehicle.fixed_tank]
engines = ["Wren-1"]
tank_volume = "0.25 m**3"
fixed_dry_mass = "40 kg"
tank_mass_per_volume = "15 kg/m**3"
[output]
formats = ["parquet", "csv"]
plots = false
"""

UNIT_KINDS = set(C._KINDS)


def numeric(series) -> bool:
    return pd.api.types.is_numeric_dtype(series) and not pd.api.types.is_bool_dtype(series)


@pytest.fixture(scope="module")
def study_runs(tmp_path_factory):
    """The same study written in SI and in US units."""
    out = {}
    for units in ("si", "us"):
        folder = tmp_path_factory.mktemp(units)
        run_study(parse_study(STUDY), folder, study_text=STUDY, units=units, progress=None)
        out[units] = folder / "tables"
    return out


def test_every_numeric_study_column_has_a_declared_kind(study_runs):
    stems = sorted(p.stem for p in study_runs["si"].glob("*.parquet"))
    assert {"design-points", "optima", "comparisons", "vehicles", "vehicle-stages", "fixed-tank",
            "fixed-tank-optima", "engine-wren-1-grid"} <= set(stems)
    for stem in stems:
        df = pd.read_parquet(study_runs["si"] / f"{stem}.parquet")
        for col in df.columns:
            kind = C.declared_kind(col)
            assert kind is not None, f"{stem}.{col} has no declared kind"
            if numeric(df[col]):
                assert kind in UNIT_KINDS | {C.DIMENSIONLESS, C.OBJECTIVE}, f"{stem}.{col}: {kind}"


def test_study_csv_meta_and_parquet_agree(study_runs):
    for units, folder in study_runs.items():
        for path in folder.glob("*.parquet"):
            side = json.loads((folder / f"{path.stem}.csv.meta.json").read_text())["units"]
            in_schema = json.loads(pq.read_schema(path).metadata[b"perfchain"])["units"]
            restored = pd.read_parquet(path).attrs
            assert side == in_schema == restored["units"], (units, path.stem)
            assert restored["perfchain"]["units"] == units
            assert list(pd.read_csv(folder / f"{path.stem}.csv").columns) == list(side)


def test_the_columns_once_without_a_unit_have_theirs(study_runs):
    meta = json.loads((study_runs["si"] / "design-points.csv.meta.json").read_text())["units"]
    assert meta["losses_isp_vacuum_loss_cstar_efficiency"] == "s"
    assert meta["losses_isp_vacuum_loss_boundary_layer"] == "s"
    assert meta["losses_factors_cstar_efficiency"] == ""       # a pure number
    assert meta["sizing_throat_diameter"] == "mm" and meta["sizing_mass_flow"] == "kg/s"
    best = json.loads((study_runs["us"] / "fixed-tank-optima.csv.meta.json").read_text())["units"]
    assert best["isp_at_delta_v_optimum"] == "s" and best["delta_v_max"] == "ft/s"


def test_isp_stays_in_seconds_in_us_units(study_runs):
    # Isp = c / g0 is a time in every unit system (definition; g0 = 9.80665 m/s^2 by CGPM 1901)
    si = pd.read_csv(study_runs["si"] / "fixed-tank-optima.csv")
    us = pd.read_csv(study_runs["us"] / "fixed-tank-optima.csv")
    assert us.isp_at_delta_v_optimum.tolist() == si.isp_at_delta_v_optimum.tolist()
    assert us.delta_v_max[0] == pytest.approx(si.delta_v_max[0] / 0.3048, rel=1e-12)  # ft = 0.3048 m
    assert 200 < si.isp_at_delta_v_optimum[0] < 400 and si.isp_max[0] * G0 > 2000


def test_objective_value_takes_the_unit_of_its_objective(study_runs):
    si = pd.read_parquet(study_runs["si"] / "optima.parquet")
    us = pd.read_parquet(study_runs["us"] / "optima.parquet")
    assert set(si.objective) == {"density_isp", "isp_vacuum"}
    assert us.attrs["units"]["objective_value"] == "lbm s/ft^3 or s"
    for (_, a), (_, b) in zip(si.iterrows(), us.iterrows()):
        # 1 lbm/ft^3 = 16.018463 kg/m^3 (NIST SP 811, 2008, appendix B.8)
        scale = 1 / 16.018463373960138 if a.objective == "density_isp" else 1.0
        assert b.objective_value == pytest.approx(a.objective_value * scale, rel=1e-12)
        # density-Isp = bulk density x vacuum Isp (definition, as in the optimum module)
        want = a.bulk_density * a.isp_vacuum if a.objective == "density_isp" else a.isp_vacuum
        assert a.objective_value == pytest.approx(want, rel=1e-12)


def test_sweep_units_agree_in_every_form(tmp_path):
    grid = dict(mixture_ratio="1.6,2.0", chamber_pressure="10 bar", area_ratio="60",
                altitude="0 km,20 km", flow="shifting,frozen")
    df = sweep("N2O4", "MMH", **grid)
    for col in df.columns:
        kind = C.declared_kind(col)
        assert kind is not None, col
        if numeric(df[col]):
            assert kind in UNIT_KINDS | {C.DIMENSIONLESS}, col
    g = make_grid("N2O4", "MMH", **grid)
    csv = sweep_to_file(tmp_path / "t.csv", g)
    parquet = sweep_to_file(tmp_path / "t.parquet", g)
    side = json.loads((tmp_path / "t.csv.meta.json").read_text())
    back = pd.read_parquet(parquet)
    assert side["units"] == back.attrs["units"] == df.attrs["units"]
    assert json.loads(pq.read_schema(parquet).metadata[b"perfchain"])["units"] == side["units"]
    assert back.attrs["perfchain"]["inputs"] == side["inputs"] == json.loads(json.dumps(df.attrs["perfchain"]["inputs"]))
    assert list(pd.read_csv(csv).columns) == list(side["units"])
    assert side["units"]["chamber_cp"] == "J/(kg K)" and side["units"]["altitude"] == "m"


def test_every_result_field_is_declared():
    station = {f.name for f in fields(Station)} - {"name"}
    assert set(C.STATION_KINDS) == station
    for f in fields(Performance):
        assert (f.name in C.RESULT_KINDS) != (f.name in C.BLOCK_KINDS) or "Station" in str(f.type), f.name
    assert set(C.BLOCK_KINDS) | {"altitude", "ammonia_dissociation", "notes"} == set(OPTIONAL_BLOCKS)
    for name in LOSS_FACTORS:
        assert C.declared_kind(f"losses_isp_vacuum_loss_{name}") == "time"
        assert C.declared_kind(f"losses_factors_{name}") == C.DIMENSIONLESS


def documented_units(cls) -> dict:
    """Field -> unit from a record's docstring (``name [unit]``, a unit for a run of names)."""
    text = cls.__doc__.split("Examples", 1)[0]
    names = {f.name for f in fields(cls)}
    out, pending = {}, []
    for tok in re.findall(r"\[[^\]]*\]|\([^()]*\)|``[^`]*``|[A-Za-z_][A-Za-z0-9_]*|:", text):
        if tok.startswith("``"):
            continue        # a literal, not a field name
        if tok == ":" or tok.startswith("("):   # a type, or a remark that closes a name without unit
            pending = []
        elif tok.startswith("["):
            out.update({n: tok[1:-1] for n in pending if n in names})
            pending = []
        else:
            pending.append(tok)
    return out


@pytest.mark.parametrize("cls, column", [(Performance, "{}"), (Station, "exit_{}")])
def test_declared_units_match_the_records_documentation(cls, column):
    doc = documented_units(cls)
    assert len(doc) >= 12   # the parser found the documented fields
    for name, unit in doc.items():
        assert C.si_unit(column.format(name)) == ("1" if unit == "-" else unit), name


def test_unit_factors_against_their_definitions():
    # NIST SP 811 (2008), appendix B: 1 psi = 6894.757 Pa, 1 ft = 0.3048 m, 1 lbf = 4.448222 N,
    # 1 lbm = 0.45359237 kg, 1 in = 0.0254 m, 1 Btu_IT/lbm = 2326 J/kg
    assert C.factor("pressure", "us") == pytest.approx(1 / 6894.757293168, rel=1e-12)
    assert C.factor("force", "us") == pytest.approx(1 / 4.4482216152605, rel=1e-12)
    assert C.factor("mass", "us") == pytest.approx(1 / 0.45359237, rel=1e-12)
    assert C.factor("diameter", "us") == pytest.approx(1 / 0.0254, rel=1e-12)
    assert C.factor("enthalpy", "us") == pytest.approx(1 / 2326.0, rel=1e-6)
    assert C.factor("diameter", "si") == pytest.approx(1000.0) and math.isclose(C.factor("time", "us"), 1.0)
