"""The report's pictures. Each function draws on an optional matplotlib ``ax`` and returns it;
the caller saves or shows. Colours: one muted palette of our own, red only for what fails."""

from __future__ import annotations

import math

import matplotlib

matplotlib.use("Agg")  # no screen: the report is written to files

import matplotlib.pyplot as plt
import numpy as np
from matplotlib.axes import Axes

from stiff.check import CheckResult
from stiff.loads import LoadCaseResult

INK = "#2f3b45"
SOFT = "#9aa7b1"
PART = "#3c7a89"
TUBE = "#454545"
JOINT = "#e0a43a"
BAD = "#c0392b"
FAIR = "#d68910"
GOOD = "#2e8b57"
STATUS_COLOUR = {"met": GOOD, "marginal": FAIR, "not met": BAD}


def _axes(ax: Axes | None, size: tuple[float, float] = (6.0, 4.5)) -> Axes:
    if ax is not None:
        return ax
    _, new = plt.subplots(figsize=size)
    out: Axes = new
    return out


def _static_case(result: CheckResult) -> LoadCaseResult:
    return result.load_cases[0]


def magnification(result: CheckResult, lc: LoadCaseResult) -> float:
    """A round magnification that makes the largest deflection about 8 % of the linkage."""
    xyz = result.built.model.xyz
    size = float(np.ptp(xyz[:, :2], axis=0).max())
    d = float(np.abs(lc.solution.displacements[0, :, :3]).max())
    if d <= 0:
        return 1.0
    raw = 0.08 * size / d
    return float(10 ** math.floor(math.log10(raw))) if raw >= 1 else 1.0


def linkage(result: CheckResult, view: str = "plane", ax: Axes | None = None) -> Axes:
    """The linkage in its pose with names, and its deformed shape under the static load case.

    ``view``: ``plane`` (x–y, the linkage plane) or ``side`` (x–z: the stack and the wobble).
    """
    ax = _axes(ax)
    built, model = result.built, result.built.model
    lc = _static_case(result)
    mag = magnification(result, lc)
    u = lc.solution.displacements[0, :, :3]
    i, j = (0, 1) if view == "plane" else (0, 2)
    xyz = model.xyz
    moved = xyz + mag * u
    for k, (a, b) in enumerate(model.beams.nodes):
        part = result.case.part(built.beam_part[k])
        colour = TUBE if part.kind == "tube" else PART
        width = 3.0 if part.kind == "tube" else 4.5
        ax.plot(xyz[[a, b], i], xyz[[a, b], j], color=SOFT, lw=width, alpha=0.45,
                solid_capstyle="round")
        ax.plot(moved[[a, b], i], moved[[a, b], j], color=colour, lw=width * 0.55,
                solid_capstyle="round")
        if view == "plane":
            mid = 0.5 * (xyz[a] + xyz[b])
            ax.annotate(part.name, (mid[i], mid[j]), fontsize=7, color=INK, alpha=0.8,
                        xytext=(3, 3), textcoords="offset points")
    for (owner, _), n in built.node_of.items():
        if owner == "body":
            ax.plot(xyz[n, i], xyz[n, j], marker="s", color=INK, ms=7)
    labelled: set[str] = set()
    for joint in result.case.joints:
        n = built.node_of[(joint.parts[-1], joint.node)]
        ax.plot(moved[n, i], moved[n, j], marker="o", color=JOINT, ms=5, mec=INK, mew=0.6)
        if view == "plane" and joint.name not in labelled:
            labelled.add(joint.name)
            ax.annotate(joint.name, (xyz[n, i], xyz[n, j]), fontsize=7, color="#8a5a00",
                        xytext=(-4, -10), textcoords="offset points")
    f = built.foot
    ax.plot(moved[f, i], moved[f, j], marker="v", color=BAD, ms=8)
    ax.set_aspect("equal", adjustable="datalim")
    ax.set_xlabel("x [mm]")
    ax.set_ylabel("y [mm]" if view == "plane" else "z [mm] (out of the plane)")
    title = "linkage plane" if view == "plane" else "side view: stack and wobble"
    ax.set_title(f"{title}; {lc.name}, deflection × {mag:g} (grey: unloaded)", fontsize=9)
    ax.grid(True, color="#e6e9ec", lw=0.6)
    return ax


def compliance_breakdown(result: CheckResult, ax: Axes | None = None) -> Axes:
    """Where the foot's give comes from, for a vertical and a lateral unit load."""
    ax = _axes(ax, (6.0, 4.0))
    st = result.stiffness
    names = []
    for s in (*st.vertical, *st.lateral):
        label = f"{s.name} ({s.kind})"
        if label not in names and s.share >= 0.01:
            names.append(label)
    vert = {f"{s.name} ({s.kind})": s.share for s in st.vertical}
    lat = {f"{s.name} ({s.kind})": s.share for s in st.lateral}
    y = np.arange(len(names))
    ax.barh(y - 0.2, [100 * vert.get(n, 0.0) for n in names], height=0.38, color=PART,
            label="vertical load")
    ax.barh(y + 0.2, [100 * lat.get(n, 0.0) for n in names], height=0.38, color=JOINT,
            label="lateral load")
    ax.set_yticks(y, names, fontsize=7)
    ax.invert_yaxis()
    ax.set_xlabel("share of the foot's deflection [%]")
    ax.set_title("where the give comes from", fontsize=9)
    ax.legend(fontsize=7, frameon=False)
    ax.grid(True, axis="x", color="#e6e9ec", lw=0.6)
    return ax


def safety_factors(result: CheckResult, ax: Axes | None = None, limit: int = 25) -> Axes:
    """The governing safety factor of each item, sorted, with its required factor marked."""
    rows = result.governing[:limit]
    ax = _axes(ax, (8.0, max(2.5, 0.28 * len(rows) + 1.0)))
    y = np.arange(len(rows))
    sf = [min(r.safety_factor, 50.0) for r in rows]
    ax.barh(y, sf, color=[STATUS_COLOUR[r.status] for r in rows], height=0.6)
    ax.scatter([r.required_factor for r in rows], y, marker="|", s=180, color=INK, zorder=3,
               label="required factor")
    ax.axvline(1.0, color=BAD, lw=0.8, ls="--")
    labels = [f"{r.item}: {r.mode}" for r in rows]
    ax.set_yticks(y, [t if len(t) <= 48 else t[:46] + "…" for t in labels], fontsize=6)
    ax.invert_yaxis()
    ax.set_xscale("log")
    ax.set_xlabel("safety factor (log scale; capped at 50)")
    ax.set_title("governing check of each item", fontsize=9)
    ax.legend(fontsize=7, frameon=False, loc="upper right")
    return ax


def landing(result: CheckResult, ax: Axes | None = None) -> Axes:
    """The landing's foot force and stroke against time."""
    ax = _axes(ax, (6.0, 3.5))
    land = result.landing
    if land is None:
        ax.text(0.5, 0.5, "no drop height in the case: no landing estimate",
                ha="center", va="center", transform=ax.transAxes, color=INK)
        ax.set_axis_off()
        return ax
    t = 1e3 * np.asarray(land.time_s)
    ax.plot(t, land.force_N, color=PART, lw=1.8, label="foot force")
    ax.axhline(land.energy_peak_N, color=SOFT, ls=":", lw=1.0, label="energy method, elastic")
    ax.set_xlabel("time from touchdown [ms]")
    ax.set_ylabel("foot force [N]")
    twin = ax.twinx()
    twin.plot(t, land.history_stroke_mm, color=JOINT, lw=1.2, ls="--", label="stroke")
    twin.set_ylabel("stroke [mm]")
    ax.set_title(f"landing: {land.drop_height_mm:g} mm drop, peak {land.peak_N:.3g} N "
                 f"({land.peak_over_weight:.2f} × weight)", fontsize=9)
    lines = ax.get_lines() + twin.get_lines()
    ax.legend(lines, [str(line.get_label()) for line in lines], fontsize=7, frameon=False)
    return ax


def actuator_demand(result: CheckResult, ax: Axes | None = None) -> Axes:
    """Each actuator's torque demand in every load case where the foot is free, against stall."""
    ax = _axes(ax, (6.0, 3.5))
    cases = [lc for lc in result.load_cases if not lc.case.foot_held]
    names = [a.name for a in result.case.actuators]
    if not names:
        ax.text(0.5, 0.5, "no actuators", ha="center", va="center", transform=ax.transAxes)
        ax.set_axis_off()
        return ax
    x = np.arange(len(cases))
    width = 0.8 / len(names)
    for k, name in enumerate(names):
        demand = [abs(next(a.torque_Nmm for a in lc.actuators if a.name == name)) / 1e3
                  for lc in cases]
        stall = result.case.actuator(name).stall_torque_Nmm / 1e3
        colours = [BAD if d > stall else PART for d in demand]
        ax.bar(x + (k - (len(names) - 1) / 2) * width, demand, width * 0.9, color=colours,
               edgecolor=INK, lw=0.4, label=name if k == 0 else None)
        ax.axhline(stall, color=INK, lw=0.8, ls="--")
        ax.annotate(f"{name} stall {stall:g} N·m", (len(cases) - 0.5, stall), fontsize=7,
                    ha="right", va="bottom", color=INK)
    ax.set_xticks(x, [lc.name for lc in cases], fontsize=7, rotation=20)
    ax.set_ylabel("torque demand [N·m]")
    ax.set_title("actuator torque against stall (red: back-driven)", fontsize=9)
    return ax


def lowest_modes(result: CheckResult, ax: Axes | None = None) -> Axes:
    """The lowest in-plane and out-of-plane mode shapes, side by side on one axes pair."""
    from stiff.modes import plot_mode

    modes = result.dynamics.modes.modes
    picked = [next((m for m in modes if m.kind == k), None) for k in ("in-plane", "out-of-plane")]
    shown = [m for m in picked if m is not None]
    if ax is None:
        _, axes = plt.subplots(1, max(len(shown), 1), figsize=(8.0, 4.0))
        axs = list(np.atleast_1d(axes))
    else:
        axs = [ax]
    for a, m in zip(axs, shown, strict=False):
        plot_mode(result.built, m, a)
        a.set_title(f"lowest {m.kind} mode: {m.frequency_Hz:.3g} Hz", fontsize=9)
    out: Axes = axs[0]
    return out
