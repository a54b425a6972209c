"""Benchmark of the frame engine: one planar leg in stiff, anastruct and PyNite, then a batch.

Run from the repository root::

    .venv/bin/python tests/benchmarks/bench_engine.py [--repeat 50] [--poses 10000]

The leg (x-y plane, y up, mm): a hip held by a pin with a rotational spring, a thigh tube of
three members down to a pinned knee, a shank tube of three members down to the foot, a foot
pad, two printed brackets and a pin-ended push rod between them that holds the knee: ten
members. The same model is built and solved in each library; the script prints the median
time of one build + solve, the ratios, the foot deflection from each (anastruct's knee is its
element hinge, which zeroes rather than condenses the end moment, so its foot moves less), and
then the throughput of stiff on a batch of perturbed poses in one call.

Targets (issue 2): one build + solve ≥ 20× faster than anastruct and ≥ 100× faster than
PyNite; ≥ 20,000 model solves a second in a batch, on one core.

Not a test: pytest collects ``test_*.py`` only.
"""

from __future__ import annotations

# One core: the BLAS thread pools read these when numpy is first imported.
import os

for _var in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS",
             "BLIS_NUM_THREADS", "VECLIB_MAXIMUM_THREADS", "NUMEXPR_NUM_THREADS"):
    os.environ[_var] = "1"

import argparse  # noqa: E402
import math  # noqa: E402
import statistics  # noqa: E402
import time  # noqa: E402
from collections.abc import Callable  # noqa: E402

import numpy as np  # noqa: E402

from stiff.fe import Beams, FrameModel, solve_static  # noqa: E402

# --- the leg ----------------------------------------------------------------------------------

NODES = ("hip", "thigh 1", "thigh 2", "knee", "shank 1", "shank 2", "foot", "toe",
         "thigh bracket", "shank bracket")
HIP, T1, T2, KNEE, S1, S2, FOOT, TOE, BT, BS = range(10)
MEMBERS = ((HIP, T1), (T1, T2), (T2, KNEE),  # thigh tube
           (KNEE, S1), (S1, S2), (S2, FOOT),  # shank tube, pinned at the knee
           (FOOT, TOE),  # foot pad
           (T1, BT), (S1, BS),  # printed brackets
           (BT, BS))  # push rod, pin-ended
THIGH, SHANK = 220.0, 240.0  # mm
KNEE_MEMBER, ROD = 3, 9

# Sections [MPa, mm², mm⁴]: carbon tube 10 x 8, printed PLA bracket 12 x 6, 3 mm steel rod.
TUBE = {"E": 70_000.0, "G": 5_000.0, "A": math.pi * (10**2 - 8**2) / 4,
        "I": math.pi * (10**4 - 8**4) / 64, "J": math.pi * (10**4 - 8**4) / 32}
BRACKET = {"E": 3_000.0, "G": 1_100.0, "A": 72.0, "I": 12.0 * 6.0**3 / 12, "J": 600.0}
RODSEC = {"E": 200_000.0, "G": 80_000.0, "A": math.pi * 1.5**2, "I": math.pi * 3**4 / 64,
          "J": math.pi * 3**4 / 32}
SECTIONS = [TUBE] * 6 + [BRACKET] * 3 + [RODSEC]
K_HIP = 2.0e5  # N·mm/rad, the hip servo's stiffness
FOOT_LOAD = (15.0, 120.0)  # N, ground reaction on the foot: forward and up


def leg_xy(hip_deg: float, knee_deg: float) -> np.ndarray:
    """(10, 2) node positions of the leg with the thigh at ``hip_deg`` from straight down
    (forward +) and the shank bent back by ``knee_deg``."""
    down = -math.pi / 2
    a = down + math.radians(hip_deg)
    b = a - math.radians(knee_deg)
    t = np.array([math.cos(a), math.sin(a)])
    s = np.array([math.cos(b), math.sin(b)])
    n_t, n_s = np.array([-t[1], t[0]]), np.array([-s[1], s[0]])
    knee = THIGH * t
    xy = np.zeros((10, 2))
    xy[T1], xy[T2], xy[KNEE] = THIGH * t / 3, 2 * THIGH * t / 3, knee
    xy[S1], xy[S2], xy[FOOT] = knee + SHANK * s / 3, knee + 2 * SHANK * s / 3, knee + SHANK * s
    xy[TOE] = xy[FOOT] + np.array([40.0, 0.0])
    xy[BT] = xy[T1] - 30.0 * n_t  # brackets stand off behind the tubes
    xy[BS] = xy[S1] - 25.0 * n_s
    return xy


def leg_xy_batch(hip_deg: np.ndarray, knee_deg: np.ndarray) -> np.ndarray:
    """(B, 10, 2) node positions for arrays of angles (vectorised ``leg_xy``)."""
    a = -math.pi / 2 + np.radians(hip_deg)
    b = a - np.radians(knee_deg)
    t = np.stack([np.cos(a), np.sin(a)], axis=-1)
    s = np.stack([np.cos(b), np.sin(b)], axis=-1)
    n_t = np.stack([-t[:, 1], t[:, 0]], axis=-1)
    n_s = np.stack([-s[:, 1], s[:, 0]], axis=-1)
    knee = THIGH * t
    xy = np.zeros((len(a), 10, 2))
    xy[:, T1], xy[:, T2], xy[:, KNEE] = THIGH * t / 3, 2 * THIGH * t / 3, knee
    xy[:, S1], xy[:, S2] = knee + SHANK * s / 3, knee + 2 * SHANK * s / 3
    xy[:, FOOT] = knee + SHANK * s
    xy[:, TOE] = xy[:, FOOT] + np.array([40.0, 0.0])
    xy[:, BT] = xy[:, T1] - 30.0 * n_t
    xy[:, BS] = xy[:, S1] - 25.0 * n_s
    return xy


# --- stiff ------------------------------------------------------------------------------------

_RELEASES = np.zeros((10, 12), bool)
_RELEASES[KNEE_MEMBER, 5] = True  # knee pin: rz at the shank's knee end
_RELEASES[ROD, [4, 5, 9, 10, 11]] = True  # rod: bending at both ends, torsion at one
_FIXED = np.zeros((10, 6), bool)
_FIXED[:, [2, 3, 4]] = True  # planar: out-of-plane DOFs held everywhere
_FIXED[HIP, :2] = True  # hip pin
_GROUND = np.zeros((10, 6))
_GROUND[HIP, 5] = K_HIP  # hip servo
_PROPS = {key: np.array([s[key] for s in SECTIONS]) for key in ("E", "G", "A", "I", "J")}


def stiff_build_solve(xy: np.ndarray) -> float:
    """Build and solve the leg in stiff; returns the foot's uy [mm]."""
    xyz = np.concatenate([xy, np.zeros((*xy.shape[:-1], 1))], axis=-1)
    p = _PROPS
    model = FrameModel.make(
        xyz, node_names=NODES,
        beams=Beams.make(MEMBERS, E=p["E"], G=p["G"], A=p["A"], Iy=p["I"], Iz=p["I"], J=p["J"],
                         releases=_RELEASES),
        fixed=_FIXED, ground=_GROUND)
    loads = np.zeros((1, 10, 6))
    loads[0, FOOT, :2] = FOOT_LOAD
    sol = solve_static(model, loads)
    return float(sol.displacements[..., 0, FOOT, 1].reshape(-1)[0])


def stiff_batch(xy: np.ndarray) -> np.ndarray:
    """Build and solve a batch of poses (B, 10, 2) in one call; returns the feet's uy."""
    xyz = np.concatenate([xy, np.zeros((*xy.shape[:-1], 1))], axis=-1)
    p = _PROPS
    model = FrameModel.make(
        xyz, node_names=NODES,
        beams=Beams.make(MEMBERS, E=p["E"], G=p["G"], A=p["A"], Iy=p["I"], Iz=p["I"], J=p["J"],
                         releases=_RELEASES),
        fixed=_FIXED, ground=_GROUND)
    loads = np.zeros((1, 10, 6))
    loads[0, FOOT, :2] = FOOT_LOAD
    out: np.ndarray = solve_static(model, loads).displacements[:, 0, FOOT, 1]
    return out


# --- anastruct --------------------------------------------------------------------------------


def anastruct_build_solve(xy: np.ndarray) -> float:
    """Build and solve the leg in anastruct; returns the foot's uy [mm].

    The rod is a truss element; the knee is an element hinge (``spring={1: 0}``), the only
    pin anastruct has between two members.
    """
    from anastruct import SystemElements

    ss = SystemElements()
    ids = []
    for j, (a, b) in enumerate(MEMBERS):
        loc = [xy[a].tolist(), xy[b].tolist()]
        s = SECTIONS[j]
        if j == ROD:
            ids.append(ss.add_truss_element(loc, EA=s["E"] * s["A"]))
        elif j == KNEE_MEMBER:
            ids.append(ss.add_element(loc, EA=s["E"] * s["A"], EI=s["E"] * s["I"],
                                      spring={1: 0}))
        else:
            ids.append(ss.add_element(loc, EA=s["E"] * s["A"], EI=s["E"] * s["I"]))
    hip = ss.find_node_id(xy[HIP].tolist())
    foot = ss.find_node_id(xy[FOOT].tolist())
    ss.add_support_hinged(hip)
    ss.add_support_spring(hip, 3, K_HIP, roll=True)
    ss.point_load(foot, Fx=FOOT_LOAD[0], Fy=FOOT_LOAD[1])  # Fy = +P acts along +y
    ss.solve()
    return float(ss.get_node_displacements(foot)["uy"])


# --- PyNite -----------------------------------------------------------------------------------


def pynite_build_solve(xy: np.ndarray) -> float:
    """Build and solve the leg in PyNite; returns the foot's uy [mm].

    PyNite's own member axes for a member in the X-Y plane have local z along global Z, so
    in-plane bending uses Iz without a rotation.
    """
    from Pynite import FEModel3D

    model = FEModel3D()
    for name, (x, y) in zip(NODES, xy, strict=True):
        model.add_node(name, float(x), float(y), 0.0)
        model.def_support(name, False, False, True, True, True, False)
    for j, (a, b) in enumerate(MEMBERS):
        s = SECTIONS[j]
        model.add_material(f"mat{j}", s["E"], s["G"], s["E"] / (2 * s["G"]) - 1, 0.0)
        model.add_section(f"sec{j}", s["A"], s["I"], s["I"], s["J"])
        model.add_member(f"M{j}", NODES[a], NODES[b], f"mat{j}", f"sec{j}")
    model.def_releases(f"M{KNEE_MEMBER}", Rzi=True)
    model.def_releases(f"M{ROD}", Ryi=True, Rzi=True, Rxj=True, Ryj=True, Rzj=True)
    model.def_support("hip", True, True, True, True, True, False)
    model.def_support_spring("hip", "RZ", K_HIP)
    model.add_node_load("foot", "FX", FOOT_LOAD[0])
    model.add_node_load("foot", "FY", FOOT_LOAD[1])
    model.analyze_linear(log=False, check_statics=False)
    return float(model.nodes["foot"].DY["Combo 1"])


# --- timing -----------------------------------------------------------------------------------


def median_time(fn: Callable[[np.ndarray], float], xy: np.ndarray, repeat: int) -> float:
    """Median wall time [s] of ``fn(xy)`` over ``repeat`` runs after one warm-up run."""
    fn(xy)
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        fn(xy)
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--repeat", type=int, default=50, help="runs per library")
    parser.add_argument("--poses", type=int, default=10_000, help="poses in the batch")
    args = parser.parse_args()

    xy = leg_xy(20.0, 40.0)
    feet = {name: fn(xy) for name, fn in (("stiff", stiff_build_solve),
                                           ("PyNite", pynite_build_solve),
                                           ("anastruct", anastruct_build_solve))}
    print("foot uy [mm]: " + ", ".join(f"{k} {v:.6f}" for k, v in feet.items()))
    print(f"  stiff vs PyNite: rel {abs(feet['stiff'] / feet['PyNite'] - 1):.1e}; "
          f"anastruct's zeroed knee hinge: rel {abs(feet['anastruct'] / feet['stiff'] - 1):.1e}")

    t = {"stiff": median_time(stiff_build_solve, xy, args.repeat),
         "anastruct": median_time(anastruct_build_solve, xy, max(args.repeat // 2, 5)),
         "PyNite": median_time(pynite_build_solve, xy, max(args.repeat // 5, 5))}
    print("median build + solve, one leg:")
    for name, value in t.items():
        print(f"  {name:10s} {value * 1e3:9.3f} ms")
    print(f"  anastruct / stiff = {t['anastruct'] / t['stiff']:6.1f}   (target ≥ 20)")
    print(f"  PyNite / stiff    = {t['PyNite'] / t['stiff']:6.1f}   (target ≥ 100)")

    rng = np.random.default_rng(0)
    hip = 20.0 + rng.uniform(-25.0, 25.0, args.poses)
    knee = 40.0 + rng.uniform(-30.0, 30.0, args.poses)
    poses = leg_xy_batch(hip, knee)
    stiff_batch(poses[:256])  # warm-up
    start = time.perf_counter()
    batch_feet = stiff_batch(poses)
    elapsed = time.perf_counter() - start
    check = stiff_build_solve(leg_xy(float(hip[7]), float(knee[7])))
    print(f"batch of {args.poses} poses, one call: {elapsed:.3f} s, "
          f"{args.poses / elapsed:,.0f} solves/s (target ≥ 20,000)")
    print(f"  pose 7 batched vs alone: rel {abs(batch_feet[7] / check - 1):.1e}")


if __name__ == "__main__":
    main()
