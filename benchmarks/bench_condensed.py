"""Benchmark of condensed products on the batch solver: an aluminized-composite sweep, the
liquid-bipropellant fixed sweep beside it, and the plain multiphase path on the same points.

Run: ``python benchmarks/bench_condensed.py [--rounds 3] [--plain 6] [--baseline DIR]``. Prints
what it measured; asserts nothing about time. Times are CPU time of this process
(``time.process_time``: the machine is shared, wall time says more about the neighbours).

- Composite sweep: AP / Al / HTPB with HTPB 14 % and Al 14, 16, 18, 20 % (AP the rest) x 5
  chamber pressures (30-150 bar) x 30 area ratios (4-40): 600 points, shifting, solved by
  :func:`perfchain.performance.batched.performance_batch` in chunks of 256 (the unit a sweep
  hands the batch solver; row flattening not included). Many exits sit on the alumina melting
  plateau (2327 K).
- The same composite sweep in frozen and in frozen-throat flow (frozen exits reach the plateau
  at smaller area ratios: T held at 2327 K, the solid / liquid split set by the entropy), with
  how many rows each flow model hands back to the general path.
- Liquid fixed sweep: LOX / RP-1, 21 O/F x 4 chamber pressures x 3 area ratios through
  :func:`perfchain.study.sweep.sweep` (the whole table, rows included).
- Plain path: Cantera's own multiphase equilibrium (tests/plain_reference.py) on a few of the
  composite points, each expanded to the exit pressure the sweep found for it; the Isp compared
  is u_e / g0 with u_e = sqrt(2 (h_c - h_e)) on both sides.
- ``--baseline DIR``: the same sweeps measured in a child process on another checkout (a git
  worktree of an older commit, for before / after figures from one run).
"""

from __future__ import annotations

import argparse
import json
import os
import subprocess
import sys
import time

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tests"))

import numpy as np

from perfchain.constants import G0
from perfchain.performance.batched import performance_batch
from perfchain.propellants.formulation import make_formulation
from perfchain.study.sweep import sweep

AL = (0.14, 0.16, 0.18, 0.20)
PC = (30e5, 50e5, 70e5, 100e5, 150e5)
EPS = tuple(np.linspace(4.0, 40.0, 30))


def composite(al):
    return make_formulation({"AP": round(0.86 - al, 6), "Al": al, "HTPB": 0.14})


def cpu(fn):
    """(result, CPU seconds of this process)."""
    t = time.process_time()
    out = fn()
    return out, time.process_time() - t


def points(props):
    return [(props[a], pc, eps) for a in AL for pc in PC for eps in EPS]


FROZEN = ("frozen", "frozen-throat")


def run_composite(props, chunk=256, flow="shifting"):
    pts = points(props)
    out = []
    for k in range(0, len(pts), chunk):
        out += performance_batch(pts[k:k + chunk], exit_key="area_ratio", flow=flow)
    return out


def run_liquid():
    return sweep("LOX", "RP-1", mixture_ratio=",".join(f"{1.6 + 0.1 * i:.1f}" for i in range(21)),
                 chamber_pressure="20 bar,50 bar,100 bar,200 bar", area_ratio="10,40,100", progress=False)


def handed_back(props, flow="shifting", al=AL):
    """Rows of the composite sweep the batch solver hands back to the general path, and exits
    on a melting plateau."""
    from perfchain.performance.batched import _template
    from perfchain.thermo import batch

    tab = batch.tables_for(_template(frozenset(props[al[0]].elements)))
    handed, plateau = 0, 0
    for a in al:
        b = [[props[a].elements.get(e, 0.0) for e in tab.element_names]] * len(PC)
        src = np.repeat(np.arange(len(PC)), len(EPS))
        nz = batch.nozzle(tab, b, np.full(len(PC), props[a].enthalpy), np.array(PC), src,
                          area_ratio=np.tile(np.array(EPS), len(PC)), flow=flow)
        handed += int((~nz.ok).sum())
        ids = np.asarray(tab.formula_id)
        plateau += int(sum((nz.exit.act[:, ids == f].sum(1) > 1).sum() for f in set(ids.tolist())))
    return handed, plateau


#: propellants whose throats lie near a melting plateau (alumina 2327 K, magnesia 3105 K)
NEAR_PLATEAU = {"AP/Al/HTPB 60/18/22": {"AP": 0.60, "Al": 0.18, "HTPB": 0.22},
                "AP/Mg/HTPB 70/15/15": {"AP": 0.70, "Mg": 0.15, "HTPB": 0.15}}


def plateau_throat_hand_backs() -> dict:
    """Rows handed back, per propellant near a melting plateau and flow model: (handed, rows)."""
    out = {}
    for name, parts in NEAR_PLATEAU.items():
        prop = make_formulation(parts)
        for flow in ("shifting",) + FROZEN:
            out[f"{name}, {flow}"] = (handed_back({a: prop for a in AL[:1]}, flow, al=AL[:1])[0],
                                      len(PC) * len(EPS))
    return out


def measure(rounds: int) -> dict:
    """Start-up, then per round the fastest of 3 composite sweeps and of 3 liquid sweeps [CPU s]."""
    props = {a: composite(a) for a in AL}
    _, t0 = cpu(lambda: (run_composite(props), run_liquid()))
    res = run_composite(props)
    comp, liq = [], []
    for _ in range(rounds):
        comp.append(min(cpu(lambda: run_composite(props))[1] for _ in range(3)))
        n_liq = len(run_liquid())
        liq.append(min(cpu(run_liquid)[1] for _ in range(3)))
    handed, plateau = handed_back(props)
    frozen = {}
    for flow in FROZEN:
        res_f = run_composite(props, flow=flow)
        t_f = min(cpu(lambda: run_composite(props, flow=flow))[1] for _ in range(rounds))
        frozen[flow] = dict(zip(("handed_back", "plateau_exits"), handed_back(props, flow)),
                            errors=sum(isinstance(r, Exception) for r in res_f), ms=1e3 * t_f / len(res_f))
    return {"startup_s": t0, "n": len(res), "errors": sum(isinstance(r, Exception) for r in res),
            "handed_back": handed, "plateau_exits": plateau, "frozen": frozen,
            "plateau_throats": plateau_throat_hand_backs(),
            "composite_ms": [1e3 * t / len(res) for t in comp], "liquid_ms": [1e3 * t / n_liq for t in liq]}


def plain_check(n_plain: int):
    """Largest Isp difference [%] batch vs plain multiphase on n_plain sweep points, and the
    plain path's CPU time per point [ms] beside the batch's for the same points."""
    from plain_reference import plain_multiphase_point

    props = {a: composite(a) for a in AL}
    pts = points(props)
    res = run_composite(props)
    # half on the alumina melting plateau (exit at 2327 K), half spread over the grid
    flat = [k for k, r in enumerate(res) if not isinstance(r, Exception) and r.exit.temperature == 2327.0]
    picks = [flat[(len(flat) * j) // max(n_plain // 2, 1)] for j in range(n_plain // 2) if flat]
    picks = sorted(set(picks) | {(97 * k + 31) % len(pts) for k in range(n_plain - len(picks))})
    worst, t_plain, rows = 0.0, 0.0, []
    for k in picks:
        prop, pc, eps = pts[k]
        got = res[k]
        ref, t = cpu(lambda: plain_multiphase_point(prop, pc, got.exit.pressure))
        t_plain += t
        d = (got.exit.velocity / G0 / ref["isp_optimum"] - 1) * 100
        worst = max(worst, abs(d))
        rows.append((k, pc, eps, got.exit.temperature, ref["exit_temperature"], d))
    return worst, 1e3 * t_plain / len(picks), rows


def main():
    ap = argparse.ArgumentParser(description=__doc__)
    ap.add_argument("--rounds", type=int, default=3, help="rounds (default 3)")
    ap.add_argument("--plain", type=int, default=6, help="plain multiphase points (default 6; 0: none)")
    ap.add_argument("--baseline", default=None, help="checkout to measure the same sweeps on, before this one")
    ap.add_argument("--json", action="store_true", help="measure only, print JSON (used for --baseline)")
    args = ap.parse_args()
    if args.json:
        print(json.dumps(measure(args.rounds)))
        return
    cols = []
    if args.baseline:
        env = dict(os.environ, PYTHONPATH=os.path.abspath(args.baseline))
        out = subprocess.run([sys.executable, os.path.abspath(__file__), "--json", "--rounds", "1"], env=env,
                             capture_output=True, text=True, check=True).stdout
        rev = subprocess.run(["git", "-C", args.baseline, "rev-parse", "--short", "HEAD"], capture_output=True,
                             text=True).stdout.strip()
        cols.append((f"before ({rev or args.baseline})", json.loads(out.strip().splitlines()[-1])))
    cols.append(("this checkout", measure(args.rounds)))
    print("CPU time (time.process_time); fastest of 3 per round, every round shown")
    for name, m in cols:
        print(f"{name}:")
        print(f"  start-up (first sweeps of a fresh process, compiles and caches): {m['startup_s']:.1f} s")
        print(f"  aluminized composite: {m['n']} points, {m['n'] - m['errors']} ok, {m['plateau_exits']} exits "
              f"on a melting plateau, {m['handed_back']} handed back to the general path")
        print("  composite ms/point: " + ", ".join(f"{v:.3f}" for v in m["composite_ms"])
              + f"   (target <= 1 ms)   | liquid LOX/RP-1 fixed sweep ms/point: "
              + ", ".join(f"{v:.3f}" for v in m["liquid_ms"]) + "   (target <= 0.2 ms)")
        for flow, f in m.get("frozen", {}).items():
            print(f"  composite, {flow} flow: {m['n'] - f['errors']} ok, {f['plateau_exits']} exits on a melting "
                  f"plateau, {f['handed_back']} handed back to the general path, {f['ms']:.3f} ms/point "
                  "(fastest round, hand-backs solved on the general path included)")
        for key, (k, n) in m.get("plateau_throats", {}).items():
            print(f"  throat near a melting plateau, {key}: {k} of {n} rows handed back to the general path")
    if len(cols) == 2:
        b, a = cols[0][1], cols[1][1]
        print(f"speed-up on the composite sweep: {min(b['composite_ms']) / min(a['composite_ms']):.1f}x; "
              f"liquid: {min(b['liquid_ms']) / min(a['liquid_ms']):.2f}x")
    if args.plain:
        worst, ms, rows = plain_check(args.plain)
        print(f"plain multiphase path on {len(rows)} of the same points: {ms:.0f} ms/point "
              f"({ms / min(cols[-1][1]['composite_ms']):.0f}x the batch)")
        for k, pc, eps, te, tr, d in rows:
            print(f"  point {k}: pc {pc / 1e5:.0f} bar, area ratio {eps:.2f}: exit T {te:.2f} K (plain {tr:.2f} K), "
                  f"Isp difference {d:+.2e} %")
        print(f"largest Isp difference vs plain multiphase: {worst:.2e} % (target 0.02 %)")


if __name__ == "__main__":
    main()
