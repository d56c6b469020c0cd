"""Reliability figures for issue 7: fuzz campaign, edge-case sweep, kill-and-resume.

    python benchmarks/bench_reliability.py                 # defaults: 10,000 inputs, 5 kills
    python benchmarks/bench_reliability.py --quick         # a short look: 1,000 inputs, 1 kill, no Dask

Prints, one per line:

* fuzz: inputs tried, results, one-line errors, uncaught exceptions (API) and tracebacks (CLI),
  with the exception types seen; most inputs are invalid (they fail fast), a fraction
  (``--valid-fraction``) are valid operating points that run the whole chain (some with an
  ambient pressure near or above the chamber's, or nozzles that separate);
* wrong ok rows: results and rows marked ok (API results, ``point --json`` objects, ``sweep``
  CSV rows, edge-sweep rows) with a non-finite or non-positive Isp, c*, Cf or chamber
  temperature, or an ambient pressure at or above the chamber pressure;
* edge-case sweep: points, ok, infeasible points flagged (status "failed" with a reason),
  rows lost or duplicated, and "ok" rows that fail a sanity bound (silent wrong answers);
* kills: a CSV sweep subprocess SIGKILLed at a seeded random moment after its first chunk,
  rerun; kills survived and tables byte-identical to an uninterrupted run; optionally one
  Dask worker process killed mid-sweep.

No assertions on time; elapsed times are printed for information.
"""

from __future__ import annotations

import argparse
import collections
import csv
import io
import json
import math
import os
import random
import re
import subprocess
import sys
import tempfile
import threading
import time
import warnings
from pathlib import Path

from click.testing import CliRunner

from perfchain.cli.main import main
from perfchain.errors import PerfchainError
from perfchain.performance.chain import performance

NAMES = ["LOX", "LH2", "LCH4", "RP-1", "ethanol", "N2O4", "MMH", "UDMH", "N2H4", "H2O2", "H2O2-98", "N2O",
         "NH3", "GOX", "GH2", "GCH4", "air", "water", "argon", "ethanol-75", "H2O2-90", "NTO", "kerosene"]
CHEAP = [("LOX", "LH2", 7.94), ("GOX", "GH2", 7.94), ("LOX", "LCH4", 3.99), ("N2O4", "MMH", 2.5)]
UNITS = ["bar", "psi", "MPa", "kPa", "Pa", "atm", "torr", "K", "m", "kg", "deg", "furlong", "", "%"]
JUNK = "abcdefghijklmnopqrstuvwxyzABCXYZ0123456789 .,-+*/^()[]{}=#%'\"\\_\t\n\x00é"


# ------------------------------------------------------------------ generators
def junk(rng, n=8):
    return "".join(rng.choice(JUNK) for _ in range(rng.randint(0, n)))


def bad_number(rng):
    return rng.choice([0.0, -1.0, math.nan, math.inf, -math.inf, 1e300, 5e-324, "2.5", "abc", "", None, True,
                       [2.5], rng.uniform(-1e6, 1e6)])


def pressure_text(rng, valid):
    if valid:
        bar = rng.uniform(2.0, 150.0)
        unit, factor = rng.choice([("bar", 1.0), ("psi", 14.503773773), ("MPa", 0.1), ("atm", 0.98692327)])
        return f"{bar * factor:.6g} {unit}"
    return rng.choice([
        lambda: f"{rng.choice([-1, 0, 1e300, 1e-300, 20, math.nan])}{rng.choice(['', ' '])}{rng.choice(UNITS)}",
        lambda: f"{rng.uniform(1, 100):.3g} bar{junk(rng, 4)}",
        lambda: junk(rng),
        lambda: str(rng.uniform(1, 100)),
        lambda: rng.choice([None, True, 3, ["20 bar"]]),
    ])()


def api_input(rng, valid):
    ox, fu, st = rng.choice(CHEAP)
    kw = dict(oxidizer=ox, fuel=fu, mixture_ratio=rng.uniform(0.5 * st, 1.5 * st),
              chamber_pressure=pressure_text(rng, True), flow=rng.choice(["shifting", "frozen", "frozen-throat"]))
    if rng.random() < 0.5:
        kw["area_ratio"] = rng.uniform(1.5, 300.0)
    else:
        kw["exit_pressure"] = rng.choice(["1 atm", "0.5 bar", "5 psi"])
    if rng.random() < 0.4:   # vacuum, sea level, or near/above the chamber: separation and infeasible points
        kw["ambient_pressure"] = rng.choice(["0 Pa", "1 atm", "0.2 bar", "3 bar", "30 bar", "200 bar"])
    if valid:
        return kw
    for field in rng.sample(["oxidizer", "fuel", "mixture_ratio", "chamber_pressure", "exit", "flow", "ambient"],
                            rng.randint(1, 2)):
        if field in ("oxidizer", "fuel"):
            name = rng.choice(NAMES)
            kw[field] = rng.choice([name, name + "X", name[:-1], name.lower(), junk(rng), None, 3])
        elif field == "mixture_ratio":
            kw[field] = bad_number(rng)
        elif field == "chamber_pressure":
            kw[field] = pressure_text(rng, False)
        elif field == "exit":
            kw.pop("exit_pressure", None)
            kw["area_ratio"] = rng.choice([bad_number(rng), rng.uniform(1.5, 1e4), 10 ** rng.uniform(4, 300)])
        elif field == "flow":
            kw[field] = rng.choice([junk(rng), None, "Frozen", "equilibrium"])
        else:
            kw["ambient_pressure"] = pressure_text(rng, False)
    return kw


def cli_input(rng, valid):
    cmd = rng.choice(["point", "point", "deltav", "sweep"])
    if cmd == "deltav":
        stage = rng.choice(["isp=300 s, dry=1 t, propellant=9 t", "exhaust_velocity=3 km/s, mass=10 t, "
                            "propellant_fraction=0.9", "isp=340 s, propellant=6 t, structural_ratio=0.1"])
        args = ["deltav", "--payload", "1 t", "--stage", stage]
        if not valid:
            k = rng.randrange(3)
            if k == 0:
                args[2] = pressure_text(rng, False) if rng.random() < 0.5 else junk(rng)
            elif k == 1:
                args[4] = stage.replace(rng.choice(["1 t", "9 t", "0.9", "300 s", "3 km/s", "0.1", "6 t"]),
                                        rng.choice(["", "x", "-1 kg", "1e300 kg", "1e-300 kg", "5", "nan"]))
            else:
                args += ["--target", rng.choice(["3 km/s", "99 km/s", "3", junk(rng), "1e-300 m/s"])]
        return args + ["--json"]
    kw = api_input(rng, valid)
    text = lambda v: v if isinstance(v, str) else repr(v)  # noqa: E731
    args = [cmd, "--oxidizer", text(kw["oxidizer"]), "--fuel", text(kw["fuel"]),
            "--mixture-ratio", text(kw["mixture_ratio"]), "--chamber-pressure", text(kw["chamber_pressure"]),
            "--flow", text(kw["flow"])]
    if "area_ratio" in kw:
        args += ["--area-ratio", text(kw["area_ratio"])]
    if "exit_pressure" in kw:
        args += ["--exit-pressure", text(kw["exit_pressure"])]
    if "ambient_pressure" in kw:
        args += ["--ambient-pressure", text(kw["ambient_pressure"])]
    if cmd == "sweep":
        args += ["--workers", "1", "--composition-top", "0"]
    elif rng.random() < 0.5:
        args.append("--json")
    return args


WRONG_FIELDS = ("isp_vacuum", "isp_ambient", "cstar", "cf_vacuum", "cf_ambient", "chamber_temperature")


def wrong_ok(row: dict) -> bool:
    """An ok row no engineer may use: a non-finite or non-positive Isp, c*, Cf or Tc, or ambient >= chamber."""
    for k in WRONG_FIELDS:
        v = row.get(k)
        try:
            v = float(v)
        except (TypeError, ValueError):
            return True
        if not (math.isfinite(v) and v > 0):
            return True
    try:
        return not float(row["ambient_pressure"]) < float(row["chamber_pressure"])
    except (KeyError, TypeError, ValueError):
        return True


def result_row(r) -> dict:
    """The fields :func:`wrong_ok` checks, from a Performance."""
    return {"isp_vacuum": r.isp_vacuum, "isp_ambient": r.isp_ambient, "cstar": r.cstar, "cf_vacuum": r.cf_vacuum,
            "cf_ambient": r.cf_ambient, "chamber_temperature": r.chamber.temperature,
            "ambient_pressure": r.ambient_pressure, "chamber_pressure": r.chamber_pressure}


def cli_rows(args, stdout: str) -> list:
    """The ok rows a successful CLI call printed: a ``point --json`` object, or ``sweep`` CSV rows."""
    if args[0] == "point" and "--json" in args:
        d = json.loads(stdout)
        return [dict(d, chamber_temperature=d["chamber"]["temperature"])]
    if args[0] == "sweep":
        return [r for r in csv.DictReader(io.StringIO(stdout)) if r["status"] == "ok"]
    return []


def sane(r) -> bool:
    vals = [r.chamber.temperature, r.isp_vacuum, r.isp_ambient, r.cf_ambient, r.cstar, r.exit.temperature,
            r.exit.pressure]
    return (all(math.isfinite(v) for v in vals) and 200 <= r.chamber.temperature <= 6000
            and 0 < r.isp_vacuum < 700 and r.exit.pressure < r.chamber.pressure)


# ------------------------------------------------------------------ campaigns
def fuzz(n, valid_fraction, seed):
    rng = random.Random(seed)
    runner = CliRunner()
    count = collections.Counter()
    kinds = collections.Counter()
    t0 = time.perf_counter()
    for i in range(n):
        valid = rng.random() < valid_fraction
        if rng.random() < 0.6:
            kw = api_input(rng, valid)
            count["api"] += 1
            try:
                r = performance(**kw)
            except PerfchainError as exc:
                count["api one-line error" if "\n" not in str(exc) else "api multi-line error"] += 1
                continue
            except Exception as exc:  # noqa: BLE001 - this is what we count
                count["api uncaught"] += 1
                kinds[f"api {type(exc).__name__}"] += 1
                continue
            count["api result" if sane(r) else "api insane result"] += 1
            count["ok rows checked"] += 1
            count["wrong ok rows"] += wrong_ok(result_row(r))
        else:
            args = cli_input(rng, valid)
            count["cli"] += 1
            res = runner.invoke(main, args)
            lines = res.stderr.strip().splitlines()
            if res.exit_code == 0:
                count["cli exit 0"] += 1
                rows = cli_rows(args, res.stdout)
                count["ok rows checked"] += len(rows)
                count["wrong ok rows"] += sum(wrong_ok(r) for r in rows)
            elif res.exit_code == 2 and len(lines) == 1 and lines[0].startswith("error: "):
                count["cli exit 2 one line"] += 1
            else:
                count["cli traceback/other"] += 1
                exc = res.exception
                kinds[f"cli {args[0]} {type(exc).__name__ if exc else res.exit_code}"] += 1
    return count, kinds, time.perf_counter() - t0


SWEEP_PAIRS = [("LOX", "LH2"), ("LOX", "RP-1"), ("LOX", "LCH4"), ("N2O4", "MMH"), ("N2O", "ethanol"),
               ("H2O2-98", "RP-1")]
SWEEP_MULTIPLES = (0.25, 0.5, 1.0, 2.0, 3.5)   # x stoichiometric: graphite-forming to very oxidizer-rich


def edge_sweep(workers):
    from perfchain.propellants.mixture import make_propellant
    from perfchain.study.sweep import sweep

    totals = collections.Counter()
    reasons = collections.Counter()
    t0 = time.perf_counter()
    for ox, fu in SWEEP_PAIRS:
        st = make_propellant(ox, fu, 1.0).stoichiometric_mixture_ratio
        mrs = [round(m * st, 4) for m in SWEEP_MULTIPLES]
        pcs, eps, flows = ["0.1 bar", "10 bar", "300 bar"], [1.5, 40.0, 300.0], ["shifting", "frozen"]
        amb = ["0 Pa", "1 atm"]
        expected = len(mrs) * len(pcs) * len(eps) * len(flows) * len(amb)
        df = sweep(ox, fu, mixture_ratio=mrs, chamber_pressure=pcs, area_ratio=eps, flow=flows,
                   ambient_pressure=amb, workers=workers, composition_top=0)
        key = df[["mixture_ratio", "chamber_pressure", "area_ratio", "ambient_pressure", "flow"]]
        totals["points"] += expected
        totals["rows"] += len(df)
        totals["duplicated"] += int(key.duplicated().sum())
        ok = df[df.status == "ok"]
        failed = df[df.status == "failed"]
        totals["ok"] += len(ok)
        totals["flagged"] += len(failed)
        totals["flagged without reason"] += int((failed.reason.fillna("") == "").sum())
        bad = ((ok.chamber_temperature < 200) | (ok.chamber_temperature > 6000) | (ok.isp_vacuum <= 0)
               | (ok.isp_vacuum >= 700) | (ok.exit_temperature < 200) | ~(ok.exit_pressure < ok.chamber_pressure)
               | ok.isp_vacuum.isna())
        totals["ok rows failing a sanity bound"] += int(bad.sum())
        totals["wrong ok rows"] += sum(wrong_ok(r) for r in ok.to_dict("records"))
        for r in failed.reason:
            reasons[re.sub(r"-?\d[\d.e+-]*", "#", str(r).split(" (at ")[0])[:80]] += 1
    totals["rows lost"] = totals["points"] - totals["rows"] + totals["duplicated"]
    return totals, reasons, time.perf_counter() - t0


KILL_ARGS = ["sweep", "--oxidizer", "LOX", "--fuel", "LCH4", "--mixture-ratio", "2.6,2.8,3.0,3.2,3.4,3.6,3.8,4.0",
             "--chamber-pressure", "20 bar,60 bar", "--area-ratio", "8,30", "--altitude", "0 km,10 km",
             "--flow", "shifting,frozen", "--workers", "1"]
RUN = [sys.executable, "-c", "from perfchain.cli.main import main; main()"]


def kills(k, seed):
    rng = random.Random(seed)
    survived = identical = mid_run = 0
    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        whole = tmp / "whole.csv"
        subprocess.run(RUN + KILL_ARGS + ["--out", str(whole)], check=True, stderr=subprocess.DEVNULL)
        ref = whole.read_bytes()
        for i in range(k):
            out = tmp / f"cut{i}.csv"
            parts = Path(str(out) + ".parts")
            proc = subprocess.Popen(RUN + KILL_ARGS + ["--out", str(out)], stderr=subprocess.DEVNULL)
            while proc.poll() is None and not (parts.is_dir() and any(parts.iterdir())):
                time.sleep(0.005)
            time.sleep(rng.uniform(0.0, 0.3))
            mid_run += proc.poll() is None
            proc.kill()
            proc.wait()
            rerun = subprocess.run(RUN + KILL_ARGS + ["--out", str(out)], stderr=subprocess.DEVNULL)
            survived += rerun.returncode == 0
            identical += out.exists() and out.read_bytes() == ref
    return survived, identical, mid_run


def dask_kill():
    import signal

    import distributed

    from perfchain.study.sweep import sweep

    grid = dict(mixture_ratio="2.6,2.8,3.0,3.2,3.4,3.6,3.8,4.0", chamber_pressure="20 bar,60 bar",
                area_ratio="8,30", altitude="0 km,10 km", flow="shifting,frozen")
    local = sweep("LOX", "LCH4", **grid)
    with tempfile.TemporaryDirectory() as tmp, \
            distributed.LocalCluster(n_workers=2, processes=True, threads_per_worker=1, host="127.0.0.1",
                                     dashboard_address=None, silence_logs=50) as cluster, \
            distributed.Client(cluster) as client:
        parts = Path(tmp) / "parts"
        pids = list(client.run(os.getpid).values())
        box = {}
        t = threading.Thread(target=lambda: box.update(df=sweep("LOX", "LCH4", cluster=client,
                                                                checkpoint=parts, **grid)))
        t.start()
        while t.is_alive() and not (parts.is_dir() and any(parts.iterdir())):
            time.sleep(0.01)
        os.kill(pids[0], signal.SIGKILL)
        t.join()
        # the same sweep on the cluster without a kill: if the perfchain files on disk changed
        # since this process imported them, the workers run the new code and only this matches
        calm = sweep("LOX", "LCH4", cluster=client, **grid)
    done = "df" in box
    return done, done and box["df"].equals(local), done and box["df"].equals(calm)


def main_():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--inputs", type=int, default=10_000, help="fuzz inputs (default 10,000)")
    ap.add_argument("--valid-fraction", type=float, default=0.05, help="share of valid operating points")
    ap.add_argument("--kills", type=int, default=5, help="SIGKILL-and-resume repetitions (default 5)")
    ap.add_argument("--workers", type=int, default=min(2, os.cpu_count() or 1), help="edge sweep workers")
    ap.add_argument("--seed", type=int, default=2024)
    ap.add_argument("--no-dask", action="store_true", help="skip the Dask worker kill")
    ap.add_argument("--quick", action="store_true", help="1,000 inputs, 1 kill, no Dask (a short look)")
    a = ap.parse_args()
    if a.quick:
        a.inputs, a.kills, a.no_dask = min(a.inputs, 1000), min(a.kills, 1), True
    warnings.simplefilter("ignore")

    count, kinds, dt = fuzz(a.inputs, a.valid_fraction, a.seed)
    uncaught = count["api uncaught"] + count["cli traceback/other"]
    print(f"fuzz inputs tried: {a.inputs} (API {count['api']}, CLI {count['cli']}), {dt:.1f} s")
    print(f"fuzz uncaught exceptions: {uncaught} (API {count['api uncaught']}, CLI tracebacks "
          f"{count['cli traceback/other']})")
    print(f"fuzz API: {count['api result']} sane results, {count['api insane result']} insane results, "
          f"{count['api one-line error']} one-line errors, {count['api multi-line error']} multi-line errors")
    print(f"fuzz CLI: {count['cli exit 0']} exit 0, {count['cli exit 2 one line']} exit 2 with one line")
    for kind, n in kinds.most_common(8):
        print(f"fuzz uncaught type: {kind}: {n}")
    print(f"fuzz wrong ok rows: {count['wrong ok rows']} of {count['ok rows checked']} ok results and rows checked")
    clean = count["api one-line error"] + count["cli exit 2 one line"]
    print(f"summary: fuzz cases tried {a.inputs} / clean one-line errors {clean} / tracebacks {uncaught} / "
          f"wrong ok rows {count['wrong ok rows']}")

    totals, reasons, dt = edge_sweep(a.workers)
    print(f"edge sweep points: {totals['points']} over {len(SWEEP_PAIRS)} pairs, {dt:.1f} s")
    print(f"edge sweep ok: {totals['ok']}")
    print(f"edge sweep infeasible points flagged: {totals['flagged']} "
          f"({totals['flagged without reason']} without a reason)")
    print(f"edge sweep rows lost: {totals['rows lost']} (duplicated: {totals['duplicated']})")
    print(f"edge sweep ok rows failing a sanity bound: {totals['ok rows failing a sanity bound']}")
    print(f"edge sweep wrong ok rows: {totals['wrong ok rows']} of {totals['ok']} ok rows")
    for reason, n in reasons.most_common(6):
        print(f"edge sweep flag reason: {reason}: {n}")

    t0 = time.perf_counter()
    survived, identical, mid = kills(a.kills, a.seed)
    print(f"kills survived: {survived}/{a.kills} (killed mid-run: {mid}), {time.perf_counter() - t0:.1f} s")
    print(f"tables identical after resume: {identical}/{a.kills}")
    if not a.no_dask:
        done, same, same_calm = dask_kill()
        print(f"dask worker killed mid-sweep: completed {int(done)}/1, table identical to the local one "
              f"{int(same)}/1, to an unkilled cluster run {int(same_calm)}/1")


if __name__ == "__main__":
    main_()
