"""Sweeps: rows equal single points, failed points keep their rows, pool/Dask/checkpoint give one table."""

import json
import math

import pytest

from perfchain.constants import G0
from perfchain.errors import InputError
from perfchain.performance.chain import performance
from perfchain.study.files import load_chunk, write_chunk
from perfchain.study.chunk_columns import chunk_frame
from perfchain.study.provenance import code_fingerprint
from perfchain.study.sweep import column_unit, flatten_result, make_grid, sweep, sweep_to_file

# Gas-only LOX/RP-1 (no condensed products at these states): small and fast.
GRID = dict(mixture_ratio="2.2,2.8", chamber_pressure="30 bar,90 bar", area_ratio="8,30",
            ambient_pressure="1 atm,0.3 atm", flow="shifting,frozen")
AMBIENT = ("ambient_pressure", "cf_ambient", "isp_ambient", "exhaust_velocity_ambient")


@pytest.fixture(scope="module")
def table():
    return sweep("LOX", "RP-1", **GRID)


def _same(a, b):
    if a is None or b is None:
        return (a is None or (isinstance(a, float) and math.isnan(a))) and \
               (b is None or (isinstance(b, float) and math.isnan(b)))
    return a == b


def test_rows_equal_single_points(table):
    # Each row is the point the single-point chain gives for the same inputs: every column
    # identical, except the ambient thrust terms, which the sweep takes from the thrust
    # equation F/mdot = u_e + (p_e - p_a) A_e/mdot (Sutton & Biblarz, Rocket Propulsion
    # Elements, eq. 2-14; from memory) without a new solve: equal to 1e-12.
    assert len(table) == 2 * 2 * 2 * 2 * 2
    assert (table.status == "ok").all()
    for _, row in table.iterrows():
        ref = flatten_result(performance("LOX", "RP-1", mixture_ratio=row.mixture_ratio,
                                         chamber_pressure=row.chamber_pressure, area_ratio=row.area_ratio,
                                         ambient_pressure=row.ambient_pressure, flow=row.flow).to_dict())
        for key, value in ref.items():
            if key in AMBIENT:
                assert row[key] == pytest.approx(value, rel=1e-12), key
            else:
                assert _same(row[key], value), (key, row[key], value)


def test_grid_order_and_thrust_equation(table):
    # Row order: mixture ratio, chamber pressure, area ratio, ambient pressure, flow (last fastest).
    first = table.iloc[:4]
    assert list(first.flow) == ["shifting", "frozen", "shifting", "frozen"]
    assert list(first.ambient_pressure) == [101325.0, 101325.0, 0.3 * 101325.0, 0.3 * 101325.0]
    # Isp_vac - Isp_amb = p_a eps c* / (p_c g0) (thrust equation, as above; exact closed form)
    # where the nozzle flows full; a separated one carries the cut-nozzle estimate instead
    # (u_sep + (p_sep - p_a) A_sep/mdot, perfchain.performance.ambient).
    full = table[table.flows_full.astype(bool)]
    gap = full.isp_vacuum - full.isp_ambient
    closed = full.ambient_pressure * full.area_ratio * full.cstar / (full.chamber_pressure * G0)
    assert len(full) and (abs(gap - closed) <= 1e-9 * full.isp_vacuum).all()
    cut = table[~table.flows_full.astype(bool)]
    assert (cut.ambient_model == "separated-cut (summerfield k=0.4)").all()
    hand = (cut.separation_velocity + (cut.separation_pressure - cut.ambient_pressure)
            * cut.separation_area_ratio * cut.cstar / cut.chamber_pressure) / G0
    assert (abs(hand - cut.isp_ambient) <= 1e-9 * cut.isp_vacuum).all()


def test_failed_points_keep_their_rows():
    # p_e >= p_c has no expansion (a nozzle only lowers pressure): that point fails, the rest go on.
    df = sweep("LOX", "RP-1", mixture_ratio="2.5", chamber_pressure="10 bar,50 bar",
               exit_pressure="1 atm,20 bar", ambient_pressure="1 atm")
    assert list(df.status) == ["ok", "failed", "ok", "ok"]
    bad = df.iloc[1]
    assert "exit_pressure" in bad.reason and "\n" not in bad.reason
    assert bad.chamber_pressure == 1e6 and bad.exit_pressure == 2e6 and math.isnan(bad.isp_vacuum)
    # the ok point expanded to 1 atm: p_e equals p_a, so ambient and vacuum Isp differ by p_e A_e/mdot
    assert df.iloc[0].exit_pressure == pytest.approx(101325.0, rel=1e-9)


def test_pool_dask_and_checkpoint_give_one_table(table, tmp_path):
    assert sweep("LOX", "RP-1", workers=2, **GRID).equals(table)
    again = sweep("LOX", "RP-1", checkpoint=tmp_path / "parts", chunk_solves=8, **GRID)
    assert again.equals(table)  # other chunking, same table
    files = sorted((tmp_path / "parts").iterdir())
    assert len(files) == 2  # 16 solves in chunks of 8
    # a rerun loads the chunks: prove it by rewriting one (a whole chunk, header and all) and
    # seeing the edit come back
    rows = load_chunk(files[0])
    rows[0]["cstar"] = 1.0
    write_chunk(files[0], rows, code_fingerprint())
    assert sweep("LOX", "RP-1", checkpoint=tmp_path / "parts", chunk_solves=8, **GRID).cstar.iloc[0] == 1.0


def test_dask_cluster_gives_the_same_table(table):
    distributed = pytest.importorskip("distributed")
    with distributed.LocalCluster(n_workers=2, processes=False, protocol="tcp", host="127.0.0.1",
                                  dashboard_address=None) as cluster:
        df = sweep("LOX", "RP-1", cluster=cluster.scheduler_address, **GRID)
    assert df.equals(table)


def test_files_carry_units_and_provenance(tmp_path):
    pytest.importorskip("pyarrow")
    import pandas as pd
    import pyarrow.parquet as pq

    grid = make_grid("LOX", "RP-1", mixture_ratio="2.4", chamber_pressure="40 bar", area_ratio="12",
                     altitude="0 m,20 km")
    pq_path = sweep_to_file(tmp_path / "t.parquet", grid)
    csv_path = sweep_to_file(tmp_path / "t.csv", grid)
    meta = json.loads(pq.read_schema(pq_path).metadata[b"perfchain"])
    assert meta == json.loads((tmp_path / "t.csv.meta.json").read_text())
    assert meta["units"]["chamber_pressure"] == "Pa" and meta["units"]["exit_temperature"] == "K"
    assert meta["inputs"]["altitude"] == [0.0, 20000.0] and "cantera" in meta
    a, b = pd.read_parquet(pq_path), pd.read_csv(csv_path)
    assert list(a.columns) == list(b.columns)
    # CSV keeps every float digit (shortest round-trip repr)
    assert (a.isp_vacuum == b.isp_vacuum).all()
    # 20 km: 5474.89 Pa at the 20 km' layer base (US Standard Atmosphere 1976); 20 km geometric
    # is only 19.94 km' geopotential, so a little higher pressure
    assert 5474.89 < a.ambient_pressure[1] < 5560
    assert not (tmp_path / "t.csv.parts").exists()


def test_xarray_when_installed(table):
    from perfchain.study.sweep import to_xarray

    ds = to_xarray(table)
    try:
        import xarray  # noqa: F401
    except ImportError:
        assert ds is None
        return
    assert ds.isp_vacuum.shape == (2, 2, 2, 2, 2)
    assert ds.isp_vacuum.attrs["units"] == "s" and ds.chamber_pressure.attrs["units"] == "Pa"


@pytest.mark.parametrize("kwargs, field", [
    (dict(mixture_ratio=""), "mixture_ratio"),
    (dict(mixture_ratio="2.2,,2.8"), "mixture_ratio"),
    (dict(mixture_ratio="2.2,x"), "mixture_ratio"),
    (dict(chamber_pressure="20 bar,2 MPa"), "chamber_pressure"),   # 2 MPa is 20 bar (SI prefixes)
    (dict(chamber_pressure="20"), "chamber_pressure"),
    (dict(area_ratio="0.5"), "area_ratio"),
    (dict(flow="shifting,sideways"), "flow"),
])
def test_bad_lists_name_the_field(kwargs, field):
    args = dict(mixture_ratio="2.4", chamber_pressure="20 bar", area_ratio="10") | kwargs
    with pytest.raises(InputError) as err:
        make_grid("LOX", "RP-1", **args)
    assert str(err.value).startswith(field + ":")


def test_grid_size_limit():
    big = ",".join(str(1 + i / 100) for i in range(201))
    eps = ",".join(str(2 + i) for i in range(100))
    with pytest.raises(InputError, match="^grid:"):
        make_grid("LOX", "RP-1", mixture_ratio=big, chamber_pressure="20 bar", area_ratio=eps)
    assert make_grid("LOX", "RP-1", mixture_ratio=big, chamber_pressure="20 bar", area_ratio=eps,
                     confirm=True).size == 20100


def test_units_of_columns():
    # SI units as the point command's JSON keys use them
    assert [column_unit(c) for c in ("throat_pressure", "cstar", "bulk_density", "exit_entropy",
                                     "area_ratio", "flow", "equivalence_ratio")] == \
        ["Pa", "m/s", "kg/m^3", "J/(kg K)", "1", "", "1"]


def test_cluster_workers_running_other_code_are_refused():
    # Regression: a Dask worker running other perfchain code (another version or checkout)
    # silently contributed rows computed differently; such workers must be refused.
    from perfchain.errors import InputError
    from perfchain.study.execution import check_cluster_code
    from perfchain.study.sweep import code_fingerprint

    class FakeClient:
        def __init__(self, fp):
            self.fp = fp

        def run(self, fn, on_error="raise"):
            # one worker answers, one just died (its error comes back as a value)
            return {"tcp://127.0.0.1:1": self.fp, "tcp://127.0.0.1:2": OSError("connection reset")}

    check_cluster_code(FakeClient(code_fingerprint()), "tcp://127.0.0.1:8786")  # same code: fine
    with pytest.raises(InputError, match="cluster.*fingerprint"):
        check_cluster_code(FakeClient("0" * 16), "tcp://127.0.0.1:8786")
    # and each chunk checks the code of the worker it lands on
    from perfchain.study.chunks import cluster_chunk

    assert cluster_chunk((len, "abc", code_fingerprint())) == 3
    with pytest.raises(InputError, match="cluster.*fingerprint"):
        cluster_chunk((len, "abc", "0" * 16))


@pytest.mark.parametrize("flow", ["shifting", "frozen"])
def test_batch_rows_are_the_flattened_results(flow):
    # The sweep builds its rows straight from the batch solver's arrays; they must be the
    # rows of the Performance results, key for key (in order), type for type and bit for bit:
    # full-flowing and separated nozzles (cut at 0.4 p_a, Summerfield criterion), an exit
    # pressure above the chamber's (an error in its place) and hydrazine, whose note sends it
    # through the general flattening.
    from perfchain.performance.batched import expansion_batch
    from perfchain.performance.flat import flat_performance
    from perfchain.propellants.formulation import make_formulation
    from perfchain.propellants.mixture import make_propellant

    lox = make_propellant("LOX", "RP-1", 2.4)
    hyd = make_formulation("N2H4")
    for key, points in (("area_ratio", [(lox, 20e5, 100.0), (lox, 90e5, 8.0), (hyd, 10e5, 40.0)]),
                        ("exit_pressure", [(lox, 20e5, 1e3), (lox, 20e5, 30e5)])):
        exps = expansion_batch(points, exit_key=key, flow=flow)
        for pa in (0.0, 101325.0):
            for top in (5, 0):
                got = exps.rows(pa, None, top)
                for r, res in zip(got, exps.at_ambient(pa)):
                    if isinstance(res, Exception):
                        assert type(r) is type(res) and str(r) == str(res)
                        continue
                    ref = flat_performance(res, top)
                    assert list(r) == list(ref)
                    assert all(type(r[k]) is type(ref[k]) and (r[k] == ref[k] or r[k] != r[k]) for k in ref), \
                        [k for k in ref if r[k] != ref[k]]
        assert any(not r["flows_full"] for r in exps.rows(101325.0) if isinstance(r, dict))


@pytest.mark.parametrize("grid", [
    dict(oxidizer="LOX", fuel="RP-1", mixture_ratio="2.2,2.8", chamber_pressure="20 bar,90 bar",
         area_ratio="8,100", ambient_pressure="1 atm,0 bar,0.3 atm", flow="shifting,frozen"),
    dict(oxidizer="LOX", fuel="LH2", mixture_ratio="5", chamber_pressure="50 bar",
         exit_pressure="1 atm,0.05 bar", altitude="0 km,20 km", flow="frozen-throat"),
    dict(oxidizer="LOX", fuel="LCH4", mixture_ratio="3.2", chamber_pressure="30 bar", area_ratio="60",
         ambient_pressure="1 atm,0.5 atm", separation="schmucker"),
])
@pytest.mark.parametrize("top", [5, 0])
def test_chunk_columns_are_the_rows_frame(grid, top, monkeypatch):
    # A common chunk's table is built column by column from the batch solver's arrays
    # (study/chunk_columns.py); it must be the frame of the chunk's rows (columns in the table's
    # order): the same columns in the same order, dtypes, element types and bits, separated rows
    # (cut estimate) and rows derived for other ambient pressures included.
    from dataclasses import asdict

    import pandas as pd

    from perfchain.study import chunks
    from perfchain.study.tables import rows_frame

    g = make_grid(**grid)
    task = (asdict(g), next(chunks.chunk_triples(g)), top)
    got, ref = _column_path(monkeypatch, task), rows_frame(g, chunks.compute_chunk(task))
    assert got is not None
    pd.testing.assert_frame_equal(got, ref, check_exact=True)
    for c in got.columns:
        assert [(type(v), repr(v)) for v in got[c]] == [(type(v), repr(v)) for v in ref[c]], c
    if g.ambient_pressure[0] > 0 and g.flow == ("shifting", "frozen"):
        assert not ref.flows_full.all() and ref.flows_full.any()


def _column_path(monkeypatch, task):
    """compute_frame(task) when it took the column path, else None."""
    from perfchain.study import chunks

    seen = []
    monkeypatch.setattr(chunks, "chunk_frame", lambda *a: seen.append(chunk_frame(*a)) or seen[-1])
    frame = chunks.compute_frame(task)
    return frame if seen[0] is not None else None


def test_uncommon_chunks_go_the_row_way(monkeypatch):
    # A failed point (exit pressure above the chamber's) or hydrazine's note: no column path.
    from dataclasses import asdict

    from perfchain.study.chunks import chunk_triples

    for g in (make_grid("LOX", "RP-1", mixture_ratio="2.4", chamber_pressure="50 bar", exit_pressure="1 atm,100 bar"),
              make_grid(propellant="N2H4", chamber_pressure="10 bar", area_ratio="50")):
        assert _column_path(monkeypatch, (asdict(g), next(chunk_triples(g)), 5)) is None


def test_condensed_compositions_in_rows_are_the_stations():
    # The composition columns of batch rows pick each station's largest mole fractions from the
    # solver's arrays (gas and condensed species together); they must be the text of the
    # Station's own composition (sorted from its dict), as in flat_performance: an aluminized
    # composite, whose alumina is among the five largest species at every station (the fourth or fifth).
    from perfchain.performance.batched import expansion_batch
    from perfchain.performance.flat import flat_performance
    from perfchain.propellants.formulation import make_formulation

    alu = make_formulation({"AP": 0.68, "Al": 0.18, "HTPB": 0.14})
    exps = expansion_batch([(alu, 70e5, 10.0), (alu, 70e5, 40.0)])
    for top in (5, 3):
        rows = exps.rows(0.0, None, top)
        assert all(("AL2O3" in r["exit_composition"] and "AL2O3" in r["chamber_composition"]) == (top == 5)
                   for r in rows)
        for r, res in zip(rows, exps.at_ambient(0.0)):
            ref = flat_performance(res, top)
            assert [r[k] for k in ref if k.endswith("_composition")] == \
                   [ref[k] for k in ref if k.endswith("_composition")]
