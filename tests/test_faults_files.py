"""Faults of files (issue 12): full disks, two runs at once, damaged chunks, stale temporary files,
--overwrite leftovers and a study run into its own folder.

Each was a traceback, a silent loss or a file left half-written; each must now be one line
naming the file or field (exit 2 from the CLI) with nothing of the failed run left behind,
or a resume that computes a damaged chunk again.
"""

from __future__ import annotations

import errno
import os
import subprocess
import sys
import time
from pathlib import Path

import pytest

from perfchain.errors import InputError
from perfchain.study import sweep as sweep_mod
from perfchain.study.files import load_chunk

from test_cli_study import TINY, invoke, one_line_error

RUN = [sys.executable, "-c", "from perfchain.cli.main import main; main()"]
# Gas-only LOX/LCH4, one solve per chunk: 8 chunks, 16 rows.
GRID = dict(mixture_ratio="3.0,3.4", chamber_pressure="20 bar,40 bar", area_ratio="8,15", altitude="0 km,10 km")
ARGS = ["sweep", "--oxidizer", "LOX", "--fuel", "LCH4", "--mixture-ratio", GRID["mixture_ratio"],
        "--chamber-pressure", GRID["chamber_pressure"], "--area-ratio", GRID["area_ratio"],
        "--altitude", GRID["altitude"], "--chunk-solves", "1", "--workers", "1"]


def one_line(result, start):
    """The one error line (exit 2, no traceback) that starts with ``error: start``."""
    one_line_error(result, start)
    return [ln for ln in result.output.strip().splitlines() if ln.startswith("error: ")][0]


def study_named(name):
    return TINY.replace('"Wisp"', f'"{name}"')   # the engine and the stage that uses it


def grid():
    return sweep_mod.make_grid("LOX", "LCH4", **GRID)


@pytest.fixture(scope="module")
def whole(tmp_path_factory):
    out = tmp_path_factory.mktemp("whole") / "t.csv"
    assert invoke(*ARGS, "--out", out).exit_code == 0
    return out.read_bytes()


def leftovers(folder: Path):
    return sorted(p.name for p in folder.rglob("*") if p.name.endswith(".tmp") or ".perfchain-run-" in str(p))


# ------------------------------------------------------------------ a full disk
def test_disk_full_during_sweep_is_one_line_and_leaves_no_table(tmp_path, monkeypatch, whole):
    def full(*_):
        raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))

    monkeypatch.setattr(sweep_mod, "write_csv", full)
    out = tmp_path / "t.csv"
    line = one_line(invoke(*ARGS, "--out", out), "out:")
    assert str(out) in line and "No space left on device" in line
    assert not out.exists() and not Path(f"{out}.meta.json").exists() and not leftovers(tmp_path)
    assert len(list(Path(f"{out}.parts").glob("*.json"))) == 8      # the computed chunks stay ...
    monkeypatch.undo()
    assert invoke(*ARGS, "--out", out).exit_code == 0               # ... for the rerun
    assert out.read_bytes() == whole


def test_disk_full_during_run_keeps_nothing_of_the_run(tmp_path, monkeypatch):
    import pyarrow.parquet as pq

    study = tmp_path / "s.toml"
    study.write_text(TINY)
    out = tmp_path / "out"
    real = pq.write_table
    calls = []

    def fills_up(table, where, **kw):
        calls.append(1)
        if len(calls) == 2:      # the second table finds the disk full
            raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))
        return real(table, where, **kw)

    monkeypatch.setattr(pq, "write_table", fills_up)
    line = one_line(invoke("run", study, "--out", out), "--out:")
    assert "No space left on device" in line and ".parquet" in line
    assert sorted(p.name for p in out.iterdir()) == []              # no table, report or staging folder


# ------------------------------------------------------------------ the same sweep twice at once
def test_same_sweep_twice_at_once_second_stops_with_one_line(tmp_path, whole):
    out = tmp_path / "t.csv"
    parts = Path(f"{out}.parts")
    first = subprocess.Popen(RUN + ARGS + ["--out", str(out)], stderr=subprocess.PIPE, text=True)
    deadline = time.monotonic() + 120
    while not (parts.is_dir() and any(p.suffix == ".json" for p in parts.iterdir())):
        assert first.poll() is None and time.monotonic() < deadline, "first sweep ended before the second began"
        time.sleep(0.002)
    second = invoke(*ARGS, "--out", out)
    running = first.poll() is None
    _, err = first.communicate(timeout=300)
    assert running, "the first sweep had finished; the test proves nothing"
    line = one_line(second, "out:")
    assert "another run holds it" in line
    assert first.returncode == 0, err
    assert out.read_bytes() == whole and not parts.exists()


# ------------------------------------------------------------------ damaged checkpoint chunks
@pytest.mark.parametrize("damage, said", [(lambda b: b[: len(b) // 2], "cut short"),
                                          (lambda b: b"[]", "no header"),
                                          (lambda b: b.replace(b'"ok"', b'"OK"', 1), "SHA-256 differs")])
def test_damaged_chunk_is_computed_again(tmp_path, capsys, damage, said, whole):
    out = tmp_path / "t.csv"
    sweep_mod.sweep_to_file(out, grid(), solves=1, keep_parts=True)
    chunks = sorted(Path(f"{out}.parts").glob("*.json"))
    assert len(chunks) == 8
    chunks[3].write_bytes(damage(chunks[3].read_bytes()))
    out.unlink()
    capsys.readouterr()
    sweep_mod.sweep_to_file(out, grid(), solves=1)
    assert out.read_bytes() == whole          # all 16 rows, none lost to the damaged chunk
    err = capsys.readouterr().err
    assert chunks[3].name in err and said in err and "computing it again" in err


def test_loading_a_damaged_chunk_names_the_file(tmp_path):
    out = tmp_path / "t.csv"
    sweep_mod.sweep_to_file(out, grid(), solves=1, keep_parts=True)
    chunk = sorted(Path(f"{out}.parts").glob("*.json"))[0]
    chunk.write_bytes(chunk.read_bytes()[:-10])
    with pytest.raises(InputError) as exc:
        load_chunk(chunk)
    assert exc.value.field == "checkpoint" and exc.value.value == str(chunk) and "cut short" in exc.value.allowed


# ------------------------------------------------------------------ temporary files of a killed run
def test_stale_temporary_files_are_removed_on_the_next_run(tmp_path, whole):
    out = tmp_path / "t.csv"
    parts = Path(f"{out}.parts")
    parts.mkdir()
    stale = [tmp_path / ".t.csv.ab12cd34.tmp", tmp_path / ".t.csv.perfchain-zz_9yy8x.tmp",
             tmp_path / ".t.csv.meta.json.perfchain-0a1b2c3d.tmp", parts / ".0123456789abcdef-00002.json.k3j4h5g6.tmp"]
    mine = tmp_path / ".other.csv.ab12cd34.tmp"       # another table's temp file: not ours to remove
    for p in stale + [mine]:
        p.write_bytes(b"half a table")
    assert invoke(*ARGS, "--out", out).exit_code == 0
    assert out.read_bytes() == whole
    assert not any(p.exists() for p in stale) and mine.exists() and not parts.exists()


# ------------------------------------------------------------------ study folders
def test_overwrite_removes_the_previous_runs_own_files_only(tmp_path):
    out = tmp_path / "out"
    a, b = tmp_path / "a.toml", tmp_path / "b.toml"
    a.write_text(study_named("Alpha"))
    b.write_text(study_named("Beta"))
    assert invoke("run", a, "--out", out).exit_code == 0
    (out / "notes.txt").write_text("the user's own file")
    (out / "tables" / "mine.csv").write_text("x\n1\n")
    r = invoke("run", b, "--out", out, "--overwrite")
    assert r.exit_code == 0, r.output
    tables = sorted(p.name for p in (out / "tables").iterdir())
    assert not [t for t in tables if "alpha" in t] and "engine-beta-grid.csv" in tables
    assert "mine.csv" in tables and (out / "notes.txt").read_text() == "the user's own file"
    assert not leftovers(out)


@pytest.mark.parametrize("name", ["study.toml", "report.html", "tables/engine-wisp-grid.csv"])
def test_run_never_writes_over_its_own_study_file(tmp_path, name):
    out = tmp_path / "out"
    study = out / name
    study.parent.mkdir(parents=True)
    study.write_text(TINY)
    before = study.read_bytes()
    line = one_line(invoke("run", study, "--out", out, "--overwrite"), "--out:")
    assert "its own study file" in line
    assert study.read_bytes() == before


def test_a_study_elsewhere_in_the_folder_is_kept(tmp_path):
    out = tmp_path / "out"
    out.mkdir()
    study = out / "my-study.toml"
    study.write_text(TINY)
    assert invoke("run", study, "--out", out, "--overwrite").exit_code == 0
    assert study.read_text() == TINY and (out / "report.html").is_file()


def test_two_runs_into_one_folder_at_once(tmp_path):
    import threading

    from perfchain.study.files import folder_lock

    study, out = tmp_path / "s.toml", tmp_path / "out"
    study.write_text(TINY)
    out.mkdir()
    held, done = threading.Event(), threading.Event()

    def other_run():              # stands for a run in progress: it holds the folder's lock
        with folder_lock(out, "--out"):
            held.set()
            done.wait(60)

    t = threading.Thread(target=other_run)
    t.start()
    held.wait(60)
    try:
        line = one_line(invoke("run", study, "--out", out, "--overwrite"), "--out:")
    finally:
        done.set()
        t.join()
    assert "another run holds it" in line and not any(out.iterdir())
