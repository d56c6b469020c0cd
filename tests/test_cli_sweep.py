"""``perfchain sweep`` / ``compare`` on the command line: resume after a kill, and every bad input."""

import json
import os
import signal
import subprocess
import sys
import time

import pytest
from click.testing import CliRunner

from perfchain.cli.main import main
from perfchain.units import to_si

# Gas-only LOX/RP-1, 60 chunks of two solves each (one grid point, both flows), so a kill
# lands mid-run.
ARGS = ["sweep", "--oxidizer", "LOX", "--fuel", "RP-1",
        "--mixture-ratio", "2.0,2.1,2.2,2.3,2.4,2.5,2.6,2.7,2.8,2.9",
        "--chamber-pressure", "20 bar,50 bar,90 bar", "--area-ratio", "8,25", "--flow", "shifting,frozen",
        "--workers", "1", "--chunk-solves", "2"]
RUN = [sys.executable, "-c", "from perfchain.cli.main import main; main()"]


def invoke(*args):
    return CliRunner().invoke(main, list(args))


def _start_and_stop_after_first_chunk(out, sig):
    parts = out.parent / (out.name + ".parts")
    proc = subprocess.Popen(RUN + ARGS + ["--out", str(out)], stderr=subprocess.PIPE, text=True)
    deadline = time.monotonic() + 120
    while not (parts.is_dir() and any(p.suffix == ".json" for p in parts.iterdir())):
        assert proc.poll() is None and time.monotonic() < deadline, "sweep ended before a chunk landed"
        time.sleep(0.002)
    proc.send_signal(sig)
    _, err = proc.communicate(timeout=60)
    return proc.returncode, err, parts


def test_resume_after_sigkill_gives_the_identical_file(tmp_path):
    # The uninterrupted table first, in this process.
    whole = tmp_path / "whole.parquet"
    assert invoke(*ARGS, "--out", str(whole)).exit_code == 0
    assert not (tmp_path / "whole.parquet.parts").exists()
    out = tmp_path / "cut.parquet"
    code, _, parts = _start_and_stop_after_first_chunk(out, signal.SIGKILL)
    assert code == -signal.SIGKILL and not out.exists()
    landed = sorted(parts.iterdir())
    assert 1 <= len(landed) < 60
    # a bad rerun stops with one line and loses nothing already computed
    bad = invoke(*ARGS, "--out", str(out), "--flow", "shifting,shifting")
    assert bad.exit_code == 2 and sorted(parts.iterdir()) == landed
    done = invoke(*ARGS, "--out", str(out))
    assert done.exit_code == 0, done.output
    assert out.read_bytes() == whole.read_bytes()
    assert not parts.exists()


def test_ctrl_c_stops_with_one_line_and_keeps_chunks(tmp_path):
    code, err, parts = _start_and_stop_after_first_chunk(tmp_path / "t.csv", signal.SIGINT)
    assert code == 130
    assert err.strip().splitlines() == ["error: aborted"]
    assert any(parts.iterdir()) and not (tmp_path / "t.csv").exists()


def test_stdout_csv_and_compare_json():
    r = invoke("sweep", "--oxidizer", "LOX", "--fuel", "RP-1", "--mixture-ratio", "2.4",
               "--chamber-pressure", "1000 psi", "--exit-pressure", "1 atm", "--composition-top", "0")
    assert r.exit_code == 0, r.output
    head, row = r.stdout.splitlines()
    rec = dict(zip(head.split(","), row.split(",")))
    # Sutton & Biblarz, Rocket Propulsion Elements, Table 5-5 (from memory): ~300 s at sea level
    assert rec["status"] == "ok" and abs(float(rec["isp_ambient"]) / 300 - 1) < 0.015
    assert "chamber_composition" not in rec and float(rec["chamber_pressure"]) == to_si("1000 psi", "pressure", "p")
    c = invoke("compare", "--pair", "LOX/RP-1", "--pair", "N2O4/N2H4", "--chamber-pressure", "1000 psi",
               "--exit-pressure", "1 atm", "--objective", "isp_ambient", "--json")
    assert c.exit_code == 0, c.output
    pairs = {p["pair"]: p for p in json.loads(c.stdout)["pairs"]}
    # same handbook table: best O/F about 2.3-2.6 and 1.2-1.4 (from memory)
    assert 2.3 <= pairs["LOX/RP-1"]["mixture_ratio"] <= 2.6
    assert 1.2 <= pairs["N2O4/N2H4"]["mixture_ratio"] <= 1.45
    table = invoke("compare", "--pair", "LOX/RP-1", "--chamber-pressure", "70 bar", "--area-ratio", "20")
    assert table.exit_code == 0 and "LOX/RP-1" in table.stdout


BASE = ["sweep", "--oxidizer", "LOX", "--fuel", "RP-1", "--mixture-ratio", "2.4",
        "--chamber-pressure", "20 bar", "--area-ratio", "10"]


def _with(option, value):
    args = list(BASE)
    if option in args:
        args[args.index(option) + 1] = value
    else:
        args += [option, value]
    return args


MANY = ",".join(str(1 + i / 100) for i in range(201))
EPS = ",".join(str(2 + i) for i in range(100))


@pytest.mark.parametrize("args, field", [
    (_with("--mixture-ratio", ""), "mixture_ratio"),
    (_with("--mixture-ratio", "2.4,"), "mixture_ratio"),
    (_with("--mixture-ratio", "2.4,abc"), "mixture_ratio"),
    (_with("--mixture-ratio", "2.4,2.40"), "mixture_ratio"),
    (_with("--chamber-pressure", "20 bar,2 MPa"), "chamber_pressure"),
    (_with("--chamber-pressure", "20,30"), "chamber_pressure"),
    (_with("--area-ratio", "10,0.5"), "area_ratio"),
    (_with("--exit-pressure", "1 atm"), "exit"),
    (_with("--altitude", "10 km") + ["--ambient-pressure", "1 atm"], "ambient"),
    (_with("--altitude", "100 km"), "altitude"),
    (_with("--flow", "shifting,sideways"), "flow"),
    (_with("--fuel", "kerosine-X"), "fuel"),
    (_with("--mixture-ratio", MANY)[:-2] + ["--area-ratio", EPS], "grid"),
    (_with("--out", "/nonexistent-folder/t.csv"), "out"),
    (_with("--out", "t.xlsx"), "out"),
    (_with("--workers", "0"), "workers"),
    (_with("--composition-top", "-1"), "composition_top"),
    (_with("--chunk-solves", "0"), "chunk_solves"),
    (_with("--chunk-solves", "many"), "chunk_solves"),
    (["compare", "--pair", "LOX-RP-1", "--chamber-pressure", "70 bar", "--area-ratio", "20"], "pair"),
    (["compare", "--pair", "LOX/RP-1", "--chamber-pressure", "70 bar", "--area-ratio", "20",
      "--objective", "thrust"], "objective"),
    (["compare", "--pair", "LOX/RP-1", "--chamber-pressure", "70", "--area-ratio", "20"], "chamber_pressure"),
])
def test_bad_input_is_one_line_exit_2(args, field, tmp_path):
    r = CliRunner().invoke(main, args)
    assert r.exit_code == 2, r.output
    lines = r.output.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith(f"error: {field}:"), r.output
    assert "Traceback" not in r.output


def test_unwritable_output_paths(tmp_path):
    folder = tmp_path / "a-folder.csv"   # a folder where the file should go
    folder.mkdir()
    r = CliRunner().invoke(main, _with("--out", str(folder)))
    assert r.exit_code == 2 and r.output.startswith("error: out:") and len(r.output.splitlines()) == 1
    if os.geteuid() != 0:   # root may write into read-only folders
        ro = tmp_path / "ro"
        ro.mkdir(mode=0o500)
        r = CliRunner().invoke(main, _with("--out", str(ro / "t.csv")))
        assert r.exit_code == 2 and r.output.startswith("error: out:")
