"""Side by side on the torquer case of issue 13: axicore's hp route (`axicore moment`) against NGSolve.

Run through tools/compare/run.sh (it makes the private virtual environment and builds the release
binary). Prints one table and writes it as CSV; every number comes from this run.

  library: ngsolve_torquer.solve over a grid of setups (p, grading levels, grading factor, base
           mesh), each timed in this one process after a warm-up run, best of --runs; per accuracy
           target the fastest setup whose true error meets it.
  axicore: the release binary, `moment HP_CASE --tolerance T --json`, wall time of the whole
           process (start-up and case parsing included), timed alternately with the library's
           chosen setup for T (run i of one, then run i of the other, so both see the same load),
           best of --runs each; the table shows these paired times.
  second order: `solve CASE --tolerance T --json` for --solve-targets only (whole process, best of
           --runs), the h-refinement route the comparison used before the hp route existed.
  reference: the library's converged p-sequence on deeply graded meshes (p up to 14), checked on a
           second base mesh, a second far radius and more exterior modes, and against axicore's hp
           route at the tightest target.
"""

import argparse
import csv
import json
import math
import os
import platform
import subprocess
import sys
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import ngsolve_torquer as lib  # noqa: E402

TARGETS = [1e-3, 1e-4, 1e-5, 1e-6, 1e-7, 1e-8]


def log(msg):
    print(msg, file=sys.stderr, flush=True)


def reference(quick):
    """The library's converged value and the spread of the checks around it."""
    seq = [10, 12] if quick else [10, 12, 14]
    main = []
    for p in seq:
        m = lib.solve(p=p, levels=12, factor=0.2, base="coarse")["moment"]
        main.append((p, m))
        log(f"reference: p {p}, 12 levels, factor 0.2, coarse base: {m:.15f}")
    ref = main[-1][1]
    p_top = seq[-1]
    checks = {
        "previous p": main[-2][1],
        "medium base mesh": lib.solve(p=p_top, levels=12, factor=0.2, base="medium")["moment"],
        "far radius 70 mm, modes to 21": lib.solve(p=p_top, levels=12, factor=0.2, radius=70.0, n_odd=21)["moment"],
        "exterior modes to 31": lib.solve(p=p_top, levels=12, factor=0.2, n_odd=31)["moment"],
        "grading factor 0.125": lib.solve(p=p_top, levels=14, factor=0.125)["moment"],
    }
    vol = lib.solve(p=p_top, levels=12, factor=0.2, volume_check=True)
    checks["volume route (winding + core magnetization)"] = vol["moment_volume"]
    for name, m in checks.items():
        log(f"reference check, {name}: {m:.15f} ({m / ref - 1:+.1e})")
    spread = max(abs(m / ref - 1) for m in checks.values())
    return ref, spread, main, checks


def axicore_run(binary, args):
    """One whole `axicore` process: wall time, exit code, parsed JSON."""
    t0 = time.perf_counter()
    proc = subprocess.run([binary, *args, "--json", "--quiet"], capture_output=True, text=True)
    wall = time.perf_counter() - t0
    if proc.returncode not in (0, 4):
        raise SystemExit(f"axicore {' '.join(args)} failed (exit {proc.returncode}): {proc.stderr.strip()}")
    return wall, proc.returncode, json.loads(proc.stdout)


def hp_args(case, tol):
    return ["moment", case, "--tolerance", f"{tol:g}"]


def solve_side(binary, case, targets, runs):
    """The second-order h-refinement route, `solve --tolerance`, best of `runs` whole processes."""
    rows = {}
    for tol in targets:
        best, kept = math.inf, None
        for _ in range(runs):
            wall, code, data = axicore_run(binary, ["solve", case, "--tolerance", f"{tol:g}"])
            if wall < best:
                best, kept = wall, (code, data)
        code, data = kept
        rows[tol] = dict(time=best, exit=code, data=data)
        log(
            f"axicore solve --tolerance {tol:g}: {best:.3f} s (best of {runs}), exit {code}, "
            f"{data['unknowns']} unknowns, moment {data['dipole_moment_Am2']:.12f}, "
            f"estimate {data['estimated_relative_error']}, stopped by {data['refinement_stopped_by']}"
        )
    return rows


def library_grid(quick):
    ps = [2, 3, 4, 5, 6, 7, 8]
    levels = [0, 2, 4, 6, 8]
    factors = [0.125, 0.2] if quick else [0.125, 0.15, 0.2]
    bases = ["coarse"] if quick else ["coarse", "medium"]
    return [
        dict(p=p, levels=lv, factor=fa, base=b) for b in bases for fa in factors for p in ps for lv in levels
    ]


def library_threads(runs):
    """The library's task manager (2 threads) or one thread, whichever is faster here (measured)."""
    probes = [dict(p=5, levels=4, factor=0.2), dict(p=8, levels=6, factor=0.2)]
    cost = {}
    for threads in (True, False):
        cost[threads] = sum(lib.timed(dict(s, threads=threads), runs)[0] for s in probes)
    choice = cost[True] <= cost[False]
    log(f"library threads: task manager {cost[True]:.3f} s, one thread {cost[False]:.3f} s on the probes")
    return choice, cost


def library_side(ref, runs, quick):
    lib.solve(p=4, levels=4, factor=0.2)  # warm-up: imports, code paths, quadrature tables
    threads, cost = library_threads(runs)
    results = []
    for setup in library_grid(quick):
        setup = dict(setup, threads=threads)
        t, out = lib.timed(setup, runs)
        err = out["moment"] / ref - 1
        results.append(dict(setup, time=t, ndof=out["ndof"], condensed=out["condensed"], error=err))
        log(
            f"library p {setup['p']} levels {setup['levels']} factor {setup['factor']} {setup['base']}: "
            f"{t:.3f} s, {out['ndof']} unknowns, error {err:+.2e}"
        )
    return results, threads, cost


def machine():
    model = "unknown"
    try:
        with open("/proc/cpuinfo") as fh:
            for line in fh:
                if line.startswith("model name"):
                    model = line.split(":", 1)[1].strip()
                    break
    except OSError:
        pass
    return f"{os.cpu_count()} cores, {model}, Python {platform.python_version()}, NGSolve {lib.ngs.__version__}"


def side_by_side(binary, case, theirs, runs, threads):
    """Per target: axicore's hp route and the library's fastest setup that meets the target in the
    grid, timed alternately (run i of one, then run i of the other) so both see the same load;
    best of `runs` each. The grid time of the chosen setup is kept beside it."""
    rows = {}
    for tol in TARGETS:
        meeting = [r for r in theirs if abs(r["error"]) <= tol]
        pick = min(meeting, key=lambda r: r["time"]) if meeting else None
        best_a, kept, best_l = math.inf, None, math.inf
        load_seen = []
        for _ in range(runs):
            load_seen.append(os.getloadavg()[0])
            wall, code, data = axicore_run(binary, hp_args(case, tol))
            if wall < best_a:
                best_a, kept = wall, (code, data)
            if pick:
                setup = {k: pick[k] for k in ("p", "levels", "factor", "base")}
                best_l = min(best_l, lib.timed(dict(setup, threads=threads), 1)[0])
        code, data = kept
        rows[tol] = dict(time=best_a, exit=code, data=data, pick=pick, lib_time=best_l, load=max(load_seen))
        log(
            f"axicore moment --tolerance {tol:g}: {best_a:.3f} s (best of {runs}; internal "
            f"{data['seconds']:.3f} s), exit {code}, p {data['degree']}, {data['equations']} equations, "
            f"moment {data['dipole_moment_Am2']:.13f}, estimate {data['estimate_rel']}"
            + (
                f"; library p {pick['p']} levels {pick['levels']} factor {pick['factor']}: {best_l:.3f} s "
                f"(grid {pick['time']:.3f} s)"
                if pick
                else "; no library setup of the grid meets it"
            )
        )
    return rows


def loads():
    return ", ".join(f"{x:.2f}" for x in os.getloadavg())


def fmt_err(e):
    return f"{e:+.1e}"


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--axicore", required=True)
    ap.add_argument("--hp-case", required=True, help="case file for `axicore moment` (the hp route)")
    ap.add_argument("--case", required=True, help="case file for `axicore solve --tolerance` (second order)")
    ap.add_argument("--csv", required=True)
    ap.add_argument("--runs", type=int, default=3)
    ap.add_argument("--quick", action="store_true", help="smaller grid and reference sequence (a check of the script)")
    ap.add_argument("--targets", default=",".join(f"{t:g}" for t in TARGETS), help="accuracy targets, comma-separated")
    ap.add_argument(
        "--solve-targets",
        default="1e-3,1e-4,1e-5",
        help="targets also run through `solve --tolerance` (second order; 14 s at 1e-6 and the node cap "
        "at 1e-7 here, so the default stops at 1e-5); empty for none",
    )
    args = ap.parse_args()
    lib.ngs.ngsglobals.msg_level = 0
    TARGETS[:] = [float(t) for t in args.targets.split(",")]
    solve_targets = [float(t) for t in args.solve_targets.split(",") if t.strip()]

    log(f"machine: {machine()}")
    load_0 = loads()
    ref, spread, seq, checks = reference(args.quick)
    theirs, threads, cost = library_side(ref, args.runs, args.quick)
    load_g = loads()
    pairs = side_by_side(args.axicore, args.hp_case, theirs, args.runs, threads)
    load_p = loads()
    second = solve_side(args.axicore, args.case, solve_targets, args.runs)
    load_s = loads()

    header = [
        "target",
        "axicore_hp_time_s",
        "axicore_hp_internal_s",
        "axicore_hp_reached",
        "axicore_hp_degree",
        "axicore_hp_equations",
        "axicore_hp_unknowns",
        "axicore_hp_true_error",
        "axicore_hp_estimate",
        "library_p",
        "library_levels",
        "library_factor",
        "library_base_mesh",
        "library_time_s",
        "library_grid_time_s",
        "library_unknowns",
        "library_condensed_unknowns",
        "library_true_error",
        "time_ratio_axicore_hp_over_library",
        "load_1min_max",
        "axicore_solve_time_s",
        "axicore_solve_unknowns",
        "axicore_solve_true_error",
        "axicore_solve_estimate",
    ]
    rows = []
    for tol in TARGETS:
        a = pairs[tol]
        d = a["data"]
        last = d["steps"][-1]
        true_a = d["dipole_moment_Am2"] / ref - 1
        est = d["estimate_rel"]
        row = [
            f"{tol:g}",
            f"{a['time']:.3f}",
            f"{d['seconds']:.3f}",
            "yes" if d["reached"] else "no",
            d["degree"],
            d["equations"],
            last["unknowns"],
            f"{true_a:.2e}",
            f"{est:.2e}" if est is not None else "",
        ]
        b = a["pick"]
        if b:
            row += [
                b["p"],
                b["levels"],
                b["factor"],
                b["base"],
                f"{a['lib_time']:.3f}",
                f"{b['time']:.3f}",
                b["ndof"],
                b["condensed"],
                f"{b['error']:.2e}",
                f"{a['time'] / a['lib_time']:.2f}",
            ]
        else:
            row += ["", "", "", "", "", "", "", "", "not reached by the grid", ""]
        row.append(f"{a['load']:.2f}")
        if tol in second:
            sd = second[tol]["data"]
            row += [
                f"{second[tol]['time']:.3f}",
                sd["unknowns"],
                f"{sd['dipole_moment_Am2'] / ref - 1:.2e}",
                f"{sd['estimated_relative_error']:.2e}",
            ]
        else:
            row += ["", "", "", ""]
        rows.append(row)

    os.makedirs(os.path.dirname(os.path.abspath(args.csv)), exist_ok=True)
    with open(args.csv, "w", newline="") as fh:
        w = csv.writer(fh)
        w.writerow(header)
        w.writerows(rows)
    grid_csv = os.path.splitext(args.csv)[0] + "-library-grid.csv"
    with open(grid_csv, "w", newline="") as fh:
        w = csv.writer(fh)
        w.writerow(["p", "levels", "factor", "base_mesh", "time_s", "unknowns", "condensed_unknowns", "true_error"])
        for r in theirs:
            w.writerow(
                [r["p"], r["levels"], r["factor"], r["base"], f"{r['time']:.4f}", r["ndof"], r["condensed"], f"{r['error']:.3e}"]
            )

    tight = pairs[min(TARGETS)]["data"]
    print(f"machine: {machine()}")
    print(f"reference dipole moment: {ref:.13f} A·m² (library, p = {seq[-1][0]}, 12 graded levels)")
    print(f"  spread of the checks: {spread:.1e} ({', '.join(f'{k} {v / ref - 1:+.1e}' for k, v in checks.items())})")
    print(
        f"  axicore's hp route at {min(TARGETS):g}: {tight['dipole_moment_Am2']:.13f} "
        f"({tight['dipole_moment_Am2'] / ref - 1:+.1e} from the reference, its estimate {tight['estimate_rel']})"
    )
    print(
        f"  library threads: {'task manager, 2 threads' if threads else 'one thread'} "
        f"(probes: task manager {cost[True]:.3f} s, one thread {cost[False]:.3f} s)"
    )
    print(
        f"  load average (1, 5, 15 min): at the start {load_0}, after the library grid {load_g}, "
        f"after the side-by-side runs {load_p}, after the second-order runs {load_s}"
    )
    print()
    print(
        "| target | axicore hp time | p | equations (unknowns) | true error | estimate "
        "| library setup | time paired (in the grid) | unknowns (condensed) | true error | time ratio (axicore / library) "
        "| 1-min load | second-order `solve`: time, unknowns, true error |"
    )
    print("|---|---|---|---|---|---|---|---|---|---|---|---|---|")
    for r in rows:
        missed = "" if r[3] == "yes" else " (not reached)"
        lib_cols = (
            f"p = {r[9]}, {r[10]} levels × {r[11]}, {r[12]} base | {r[13]} s ({r[14]} s) | {r[15]} ({r[16]}) | {r[17]} | {r[18]}×"
            if r[9] != ""
            else f"— | — | — | {r[17]} | —"
        )
        sec = f"{r[20]} s, {r[21]}, {r[22]}" if r[20] else "not run"
        print(
            f"| {r[0]} | {r[1]} s{missed} | {r[4]} | {r[5]} ({r[6]}) | {r[7]} | {r[8]} | {lib_cols} | {r[19]} | {sec} |"
        )
    print(f"\nCSV: {args.csv} (the whole library grid: {grid_csv})")


if __name__ == "__main__":
    main()
