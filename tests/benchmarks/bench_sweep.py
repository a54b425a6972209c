"""Benchmark of design sweeps and workspace maps: one `stiff check` against the batched path.

Run from the repository root::

    .venv/bin/python tests/benchmarks/bench_sweep.py [--case cases/five_bar_leg.toml]
        [--walls 2,3,4,5] [--infill 20,40] [--steps 4] [--workers 2]

It prints, for the case:

* the time of one `stiff check` (one variant in one pose, every load case and check);
* a sweep of ``*.walls`` x ``*.infill`` on ``--workers`` processes: variants a second;
* a workspace map of ``--steps`` x ``--steps`` poses on ``--workers`` processes: poses a second;
* the extrapolated time of the issue's target run, 1,000 variants x 50 poses x 4 load cases,
  on this path (every variant-pose is one full check, which runs all of the case's load cases,
  more than 4), and how far that is from the 20 s target;
* where one check spends its time (cProfile, cumulative seconds of each stage);
* the batched engine's compliance alone: 50 poses of one variant stacked into one call;
* the batched path (``stiff.batched``): one variant checked in 50 poses at once (every load
  case and check), a sweep of the same variants in 50 poses each on ``--workers`` processes,
  and the target run extrapolated from it.

BLAS threads: sweeps and maps limit numpy's BLAS to one thread themselves (``stiff.pool``);
the script also starts numpy on one thread unless the environment says otherwise, so that the
single check it times is measured the same way. Run with ``OPENBLAS_NUM_THREADS=2`` to see
one check with the default threads (0.87 s against 0.26 s with one, measured on 2 cores).

Not a test: pytest collects ``test_*.py`` only.
"""

from __future__ import annotations

# The BLAS thread pools read these when numpy is first imported.
import os

for _var in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS",
             "BLIS_NUM_THREADS", "VECLIB_MAXIMUM_THREADS", "NUMEXPR_NUM_THREADS"):
    os.environ.setdefault(_var, "1")

import argparse  # noqa: E402
import cProfile  # noqa: E402
import math  # noqa: E402
import pstats  # noqa: E402
import time  # noqa: E402
from pathlib import Path  # noqa: E402

from stiff.batched import case_geometry, check_variant  # noqa: E402
from stiff.build import Sections, build  # noqa: E402
from stiff.case import load_case  # noqa: E402
from stiff.check import run_check  # noqa: E402
from stiff.fe import compliance, node_dofs, stack  # noqa: E402
from stiff.kinematics import solve_pose  # noqa: E402
from stiff.linkage import linkage  # noqa: E402
from stiff.sweep import run_sweep  # noqa: E402
from stiff.sweep_spec import parse_specs  # noqa: E402
from stiff.workspace import grid_angles, pose_case, workspace_map  # noqa: E402

TARGET_S = 20.0
#: The issue's target run checks 4 load cases a pose; these are the five-bar's impact cases.
FOUR = ("stance", "landing", "slip fore", "slip aft")
TARGET_RUNS = 1000 * 50  # variants x poses; each run covers its load cases
STAGES = {
    "build (sections, frame model)": "build.py:178(build)",
    "foot stiffness": "stiffness.py",
    "landing estimate": "loads.py:220(landing)",
    "load-case solves": "solve_load_cases",
    "checks (strength, buckling, lugs, ...)": "checks/__init__.py:27(run_checks)",
    "play and modes": "play_modes.py:39(play_and_modes)",
}


def _stage_times(profile: cProfile.Profile) -> dict[str, float]:
    stats = pstats.Stats(profile)
    table = stats.stats  # type: ignore[attr-defined]
    out = {}
    for label, key in STAGES.items():
        best = 0.0
        for (file, line, func), (_cc, _nc, _tt, ct, _callers) in table.items():
            name = f"{file}:{line}({func})"
            if key in name and (key != "stiffness.py" or func == "foot_stiffness"):
                best = max(best, ct)
        out[label] = best
    return out


def main() -> None:
    """Run the benchmark and print the figures."""
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--case", type=Path, default=Path("cases/five_bar_leg.toml"))
    parser.add_argument("--walls", default="2,3,4,5")
    parser.add_argument("--infill", default="20,40")
    parser.add_argument("--steps", type=int, default=4)
    parser.add_argument("--workers", type=int, default=2)
    parser.add_argument("--target-run", action="store_true",
                        help="also run the target run itself (1,000 variants, about a minute)")
    args = parser.parse_args()

    case = load_case(args.case)
    run_check(case)  # warm up imports and caches
    t0 = time.perf_counter()
    for _ in range(3):
        run_check(case)
    one = (time.perf_counter() - t0) / 3
    print(f"case: {case.title}; BLAS threads: {os.environ['OPENBLAS_NUM_THREADS']}")
    print(f"one stiff check (1 variant, 1 pose, all load cases): {one * 1e3:.0f} ms")

    variables = parse_specs(case, [f"*.walls={args.walls}", f"*.infill={args.infill}"])
    t0 = time.perf_counter()
    rows = run_sweep(case, variables, workers=args.workers)
    sweep_s = time.perf_counter() - t0
    sweep_rate = len(rows) / sweep_s
    print(f"sweep: {len(rows)} variants on {args.workers} workers in {sweep_s:.2f} s = "
          f"{sweep_rate:.2f} variants/s")

    t0 = time.perf_counter()
    result = workspace_map(case, args.steps, workers=args.workers)
    map_s = time.perf_counter() - t0
    map_rate = len(result.rows) / map_s
    print(f"map: {len(result.rows)} poses on {args.workers} workers in {map_s:.2f} s = "
          f"{map_rate:.2f} poses/s ({len(result.unreachable)} unreachable)")

    rate = max(sweep_rate, map_rate)
    full = TARGET_RUNS / rate
    print(f"target run 1,000 variants x 50 poses x 4 load cases = {TARGET_RUNS} checks: "
          f"~{full:.0f} s ({full / 3600:.1f} h) at {rate:.2f} checks/s, "
          f"{full / TARGET_S:.0f}x the {TARGET_S:g} s target")

    profile = cProfile.Profile()
    profile.enable()
    run_check(case)
    profile.disable()
    total = sum(v for v in [pstats.Stats(profile).total_tt])  # type: ignore[attr-defined]
    print(f"where one check's time goes (cProfile, total {total:.2f} s, cumulative per stage):")
    for label, seconds in _stage_times(profile).items():
        print(f"  {label}: {seconds:.3f} s ({100 * seconds / total:.0f} %)")

    link = linkage(case)
    _, _, grid = grid_angles(case, math.ceil(math.sqrt(50)))
    builds = []
    t0 = time.perf_counter()
    for angles in grid[:50]:
        pc = pose_case(case, angles)
        builds.append(build(pc, solve_pose(link, list(angles))))
    build_s = time.perf_counter() - t0
    batch = stack([b.model for b in builds])
    dofs = node_dofs(builds[0].model, builds[0].foot, "ux uy uz")
    t0 = time.perf_counter()
    compliance(batch, dofs)
    comp_s = time.perf_counter() - t0
    n = len(builds)
    print(f"batched engine, {n} poses of one variant: pose solve + build "
          f"{build_s / n * 1e3:.1f} ms "
          f"a pose (serial), foot compliance of the stack {comp_s * 1e3:.0f} ms "
          f"({comp_s / n * 1e3:.2f} ms a pose); stiffness alone for the target run would be "
          f"~{TARGET_RUNS * (build_s + comp_s) / n / args.workers:.0f} s on {args.workers} "
          "cores")


#: The target run: 1,000 variants of the five-bar demo (walls x infill x pattern for every
#: printed part, and both links' tube sizes), each in its own pose and a 7 x 7 map's 49.
TARGET_SPECS = ("*.walls=2,3,4,5", "*.infill=20,35,50,65,80", "*.pattern=gyroid,grid",
                "link_a.size=5x3,6x4,8x6,10x8,12x10", "link_b.size=5x3,6x4,8x6,10x8,12x10")


def target_run(case_path: Path, workers: int) -> None:
    """The issue's target run itself: 1,000 variants x 50 poses x 4 load cases, from a cold
    start (the 80 distinct printed sections and the 50 poses are part of the time)."""
    case = load_case(case_path)
    _, _, grid = grid_angles(case, 7)
    variables = parse_specs(case, list(TARGET_SPECS))
    t0 = time.perf_counter()
    rows = run_sweep(case, variables, workers=workers, poses=grid, load_cases=FOUR)
    took = time.perf_counter() - t0
    refused = sum(1 for r in rows if r.error)
    print(f"target run: {len(rows)} variants x {len(grid) + 1} poses x {len(FOUR)} load cases "
          f"on {workers} workers in {took:.1f} s ({refused} variants refused): "
          f"{took / TARGET_S:.1f}x the {TARGET_S:g} s target")


def batched(case_path: Path, walls: str, infill: str, workers: int) -> None:
    """Time the batched path: one variant in 50 poses, and a sweep in 50 poses a variant."""
    case = load_case(case_path)
    _, _, grid = grid_angles(case, 7)  # 49 grid poses + the case's own = 50
    t0 = time.perf_counter()
    geometry = case_geometry(case, grid)
    geo_s = time.perf_counter() - t0
    sections = Sections()
    check_variant(case, geometry, sections=sections)  # the printed sections, once
    t0 = time.perf_counter()
    check_variant(case, geometry, sections=sections)
    one = time.perf_counter() - t0
    n = len(geometry.poses)
    print(f"batched path: poses solved once {geo_s:.2f} s ({n} poses); one variant in {n} "
          f"poses {one:.3f} s = {one / n * 1e3:.1f} ms a variant-pose, every load case")
    variables = parse_specs(case, [f"*.walls={walls}", f"*.infill={infill}"])
    # each sweep computes its variants' printed sections itself (in each worker), as a user's
    # sweep does
    for label, only in (("every load case", None), ("4 load cases " + ", ".join(FOUR), FOUR)):
        t0 = time.perf_counter()
        rows = run_sweep(case, variables, workers=workers, poses=grid, load_cases=only)
        sweep_s = time.perf_counter() - t0
        rate = len(rows) / sweep_s
        full = 1000 / rate
        print(f"batched sweep, {label}: {len(rows)} variants x {n} poses on {workers} workers "
              f"in {sweep_s:.2f} s = {rate:.2f} variants/s; target run 1,000 variants x 50 "
              f"poses ~{full:.0f} s, {full / TARGET_S:.1f}x the {TARGET_S:g} s target")


if __name__ == "__main__":
    main()
    _args = argparse.ArgumentParser(add_help=False)
    _args.add_argument("--case", type=Path, default=Path("cases/five_bar_leg.toml"))
    _args.add_argument("--walls", default="2,3,4,5")
    _args.add_argument("--infill", default="20,40")
    _args.add_argument("--workers", type=int, default=2)
    _args.add_argument("--target-run", action="store_true")
    _known, _ = _args.parse_known_args()
    batched(_known.case, _known.walls, _known.infill, _known.workers)
    if _known.target_run:
        target_run(_known.case, _known.workers)
