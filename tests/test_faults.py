"""Faults during long work (issue 7): kills, lost workers, reruns, half-written files.

tests/test_cli_sweep.py already kills a sweep right after its first chunk lands; here the
kill comes at a seeded random moment (mid-chunk, between chunks or during the final write),
a Dask worker process dies mid-sweep, output bytes are compared across runs and worker
counts, and the final write is checked to go through a temporary file and a rename.
"""

from __future__ import annotations

import csv
import io
import os
import random
import signal
import subprocess
import sys
import threading
import time
from pathlib import Path

import pytest
from click.testing import CliRunner

from perfchain.study import sweep as sweep_mod
from perfchain.cli.main import main

# Gas-only LOX/LCH4: eighteen chunks of six solves each (three grid points, both flows).
MR = ["2.8", "3.0", "3.2", "3.4", "3.6", "3.8"]
ARGS = ["sweep", "--oxidizer", "LOX", "--fuel", "LCH4", "--mixture-ratio", ",".join(MR),
        "--chamber-pressure", "20 bar,40 bar,60 bar", "--area-ratio", "8,15,30", "--altitude", "0 km,10 km",
        "--flow", "shifting,frozen", "--chunk-solves", "6"]
POINTS = len(MR) * 3 * 3 * 2 * 2
RUN = [sys.executable, "-c", "from perfchain.cli.main import main; main()"]


def invoke(*args):
    return CliRunner().invoke(main, list(args))


def keys(data: bytes):
    """The grid coordinates of every row of a CSV table."""
    rows = list(csv.DictReader(io.StringIO(data.decode())))
    return [(r["mixture_ratio"], r["chamber_pressure"], r["area_ratio"], r.get("altitude"), r["flow"]) for r in rows]


@pytest.fixture(scope="module")
def whole(tmp_path_factory):
    """The uninterrupted table (CSV and its sidecar), one worker."""
    out = tmp_path_factory.mktemp("whole") / "t.csv"
    r = invoke(*ARGS, "--workers", "1", "--out", str(out))
    assert r.exit_code == 0, r.output
    data = out.read_bytes()
    k = keys(data)
    assert len(k) == POINTS == len(set(k))
    return data, Path(str(out) + ".meta.json").read_bytes()


@pytest.mark.parametrize("seed", [7, 11, 23])
def test_sigkill_at_a_random_moment_then_resume(seed, tmp_path, whole):
    out = tmp_path / "t.csv"
    parts = tmp_path / "t.csv.parts"
    proc = subprocess.Popen(RUN + ARGS + ["--workers", "1", "--out", str(out)],
                            stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    rng = random.Random(seed)
    wait_for = rng.randint(1, 2)  # of eighteen chunks: a seeded random moment, always mid-run
    deadline = time.monotonic() + 120
    while not (parts.is_dir() and sum(p.suffix == ".json" for p in parts.iterdir()) >= wait_for):
        assert proc.poll() is None and time.monotonic() < deadline, "sweep ended before the kill"
        time.sleep(0.002)
    time.sleep(rng.uniform(0.0, 0.03))  # and somewhere inside the next chunk
    assert proc.poll() is None, "the sweep finished before the kill; the test proves nothing"
    proc.kill()
    proc.wait(timeout=60)
    # whatever the moment: no output file, or the complete one (never a partial table)
    assert not out.exists() or out.read_bytes() == whole[0]
    r = invoke(*ARGS, "--workers", "1", "--out", str(out))
    assert r.exit_code == 0, r.output
    assert out.read_bytes() == whole[0]          # byte-identical: no row lost, none duplicated
    assert Path(str(out) + ".meta.json").read_bytes() == whole[1]
    assert not parts.exists()


def test_same_bytes_across_runs_and_worker_counts(tmp_path, whole):
    for fmt in ("csv", "json", "parquet"):
        files = []
        for run, workers in enumerate(["1", "1", "2"]):
            out = tmp_path / f"r{run}.{fmt}"
            r = invoke(*ARGS, "--workers", workers, "--out", str(out))
            assert r.exit_code == 0, r.output
            files.append(out.read_bytes())
        assert files[0] == files[1] == files[2], fmt
        if fmt == "csv":
            assert files[0] == whole[0]


def test_final_write_goes_through_a_temp_file_and_a_rename(tmp_path, monkeypatch):
    grid = sweep_mod.make_grid("LOX", "LCH4", mixture_ratio="3.2", chamber_pressure="20 bar",
                               area_ratio="8")
    out = tmp_path / "t.csv"
    seen = []
    real_replace = os.replace

    def spy(src, dst):
        src, dst = Path(src), Path(dst)
        if dst == out:
            # at the rename: the target does not exist yet, the temp file holds the whole table
            seen.append((src.parent == dst.parent, src.name.startswith(".t.csv."), dst.exists(),
                         src.read_bytes().count(b"\n")))
        return real_replace(src, dst)

    monkeypatch.setattr(os, "replace", spy)
    sweep_mod.sweep_to_file(out, grid, workers=1)
    assert seen == [(True, True, False, 2)]  # same folder, hidden temp name, header + 1 row


def test_writer_dying_mid_write_leaves_no_file(tmp_path, monkeypatch):
    grid = sweep_mod.make_grid("LOX", "LCH4", mixture_ratio="3.0,3.4", chamber_pressure="20 bar",
                               area_ratio="8")
    out = tmp_path / "t.csv"
    real = sweep_mod.write_csv

    def dies_half_way(fh, cols, chunks):
        real(fh, cols, chunks[:1])     # the header and the first chunk reach the temp file ...
        fh.flush()
        raise RuntimeError("disk gone")  # ... then the writer dies

    monkeypatch.setattr(sweep_mod, "write_csv", dies_half_way)
    with pytest.raises(RuntimeError):
        sweep_mod.sweep_to_file(out, grid, workers=1, solves=1)
    assert not out.exists()
    assert not [p for p in tmp_path.iterdir() if p.name.endswith(".tmp")]  # temp file removed
    parts = tmp_path / "t.csv.parts"
    assert len(list(parts.iterdir())) == 2  # finished chunks kept for the rerun
    monkeypatch.setattr(sweep_mod, "write_csv", real)
    sweep_mod.sweep_to_file(out, grid, workers=1, solves=1)
    assert len(keys(out.read_bytes())) == 2 and not parts.exists()


def test_dask_worker_killed_mid_sweep(tmp_path):
    distributed = pytest.importorskip("distributed")
    from perfchain.study.sweep import sweep

    grid = dict(mixture_ratio=",".join(MR + ["4.0", "2.6"]), chamber_pressure="20 bar,60 bar",
                area_ratio="8,30", altitude="0 km,10 km", flow="shifting,frozen")
    local = sweep("LOX", "LCH4", **grid)
    parts = tmp_path / "parts"
    with distributed.LocalCluster(n_workers=2, processes=True, threads_per_worker=1, host="127.0.0.1",
                                  dashboard_address=None, silence_logs=50) as cluster, \
            distributed.Client(cluster) as client:
        pids = list(client.run(os.getpid).values())
        assert len(pids) == 2
        done: dict = {}

        def work():
            try:
                done["df"] = sweep("LOX", "LCH4", cluster=client, checkpoint=parts, **grid)
            except BaseException as exc:  # handed to the test thread
                done["error"] = exc

        t = threading.Thread(target=work)
        t.start()
        deadline = time.monotonic() + 120
        while not (parts.is_dir() and any(parts.iterdir())):
            assert t.is_alive() and time.monotonic() < deadline, done
            time.sleep(0.01)
        landed = len(list(parts.iterdir()))
        os.kill(pids[0], signal.SIGKILL)  # one worker process dies mid-sweep
        t.join(timeout=300)
        assert not t.is_alive() and "error" not in done, done
    assert landed < len(MR) + 2, "the sweep had finished before the kill; the test proves nothing"
    assert done["df"].equals(local)


def _gone(pid) -> bool:
    import psutil

    try:
        return psutil.Process(pid).status() == psutil.STATUS_ZOMBIE   # dead, waiting to be reaped
    except psutil.NoSuchProcess:
        return True


@pytest.mark.parametrize("sig", [signal.SIGKILL, signal.SIGTERM])
def test_killing_a_two_worker_sweep_leaves_no_process(sig, tmp_path):
    # Before: both pool workers lived on forever (~146 MB each, blocked on a pipe) after kill -9 or
    # kill (SIGTERM, what schedulers and `timeout` send) of the sweep.
    psutil = pytest.importorskip("psutil")
    out = tmp_path / "t.csv"
    parts = tmp_path / "t.csv.parts"
    proc = subprocess.Popen(RUN + ARGS[:-2] + ["--chunk-solves", "2", "--workers", "2", "--out", str(out)],
                            stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    deadline = time.monotonic() + 120
    children = []
    while not (len(children) >= 2 and parts.is_dir() and any(p.suffix == ".json" for p in parts.iterdir())):
        assert proc.poll() is None and time.monotonic() < deadline, "the sweep ended before the kill"
        children = psutil.Process(proc.pid).children(recursive=True)
        time.sleep(0.01)
    pids = [c.pid for c in children]
    proc.send_signal(sig)
    proc.wait(timeout=60)
    deadline = time.monotonic() + 30          # a bound for the test to fail by, not a speed check
    while not all(_gone(p) for p in pids) and time.monotonic() < deadline:
        time.sleep(0.1)
    assert all(_gone(p) for p in pids), [psutil.Process(p).cmdline() for p in pids if not _gone(p)]
