"""Pictures of a design sweep and a workspace map. Each function draws on an optional
matplotlib ``ax`` and returns it; the caller saves or shows."""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import Literal

import matplotlib

matplotlib.use("Agg")  # no screen: pictures are written to files

import numpy as np
from matplotlib.axes import Axes

from stiff.report.plots import BAD, INK, SOFT, _axes
from stiff.sweep import VariantRow, pareto_front
from stiff.workspace import PoseRow, WorkspaceMap

MapMetric = Literal["vertical", "lateral", "min_factor", "singularity"]
MAP_LABELS: dict[MapMetric, str] = {
    "vertical": "vertical compliance C_yy [mm/N]",
    "lateral": "lateral compliance C_zz [mm/N]",
    "min_factor": "minimum safety factor, stance and landing [-]",
    "singularity": "singularity measure [-] (0 singular)",
}


def pareto_plot(rows: Sequence[VariantRow], ax: Axes | None = None,
                recommended: int | None = None) -> Axes:
    """Mass [g] against vertical compliance [mm/N] of every variant, coloured by minimum
    safety factor, the Pareto front joined and ringed, the recommended variant starred."""
    ax = _axes(ax)
    ok = [r for r in rows if not r.error]
    if not ok:
        ax.text(0.5, 0.5, "no variant could be checked", ha="center", transform=ax.transAxes)
        return ax
    mass = np.array([r.mass_g for r in ok])
    comp = np.array([r.vertical_mm_per_N for r in ok])
    factor = np.array([r.min_factor if math.isfinite(r.min_factor) else np.nan for r in ok])
    points = ax.scatter(mass, comp, c=factor, cmap="viridis", s=28, zorder=2)
    ax.figure.colorbar(points, ax=ax, label="minimum safety factor [-]")
    front = set(pareto_front(ok))
    on = sorted((r for r in ok if r.index in front), key=lambda r: r.mass_g)
    ax.plot([r.mass_g for r in on], [r.vertical_mm_per_N for r in on], color=INK, lw=1.0,
            zorder=1, label="Pareto front")
    ax.scatter([r.mass_g for r in on], [r.vertical_mm_per_N for r in on], s=70,
               facecolors="none", edgecolors=INK, zorder=3)
    missed = [r for r in ok if not r.all_met]
    if missed:
        ax.scatter([r.mass_g for r in missed], [r.vertical_mm_per_N for r in missed], marker="x",
                   color=BAD, s=18, zorder=4, label="misses a check or target")
    if recommended is not None:
        rec = next((r for r in ok if r.index == recommended), None)
        if rec is not None:
            ax.scatter([rec.mass_g], [rec.vertical_mm_per_N], marker="*", s=220, color=BAD,
                       edgecolors=INK, zorder=5, label=f"recommended (variant {rec.index})")
    ax.set_xlabel("mass of the members [g]")
    ax.set_ylabel("vertical foot compliance C_yy [mm/N]")
    ax.set_title("Design sweep: mass against compliance")
    ax.legend(loc="best", fontsize=8)
    ax.grid(True, color=SOFT, lw=0.3)
    return ax


def _metric(row: PoseRow, metric: MapMetric) -> float:
    if metric == "vertical":
        return row.vertical_mm_per_N
    if metric == "lateral":
        return row.lateral_mm_per_N
    return row.min_factor if metric == "min_factor" else row.singularity


def map_plot(result: WorkspaceMap, metric: MapMetric, ax: Axes | None = None) -> Axes:
    """The reachable foot positions [mm] coloured by ``metric``; near-singular poses ringed in
    red. Unreachable poses have no foot position; their count is in the title."""
    ax = _axes(ax)
    reach = [r for r in result.rows if r.reachable]
    if reach:
        values = np.array([_metric(r, metric) for r in reach])
        values = np.where(np.isfinite(values), values, np.nan)
        points = ax.scatter([r.foot_x_mm for r in reach], [r.foot_y_mm for r in reach],
                            c=values, cmap="viridis_r" if metric in ("vertical", "lateral")
                            else "viridis", s=40, zorder=2)
        ax.figure.colorbar(points, ax=ax, label=MAP_LABELS[metric])
        near = [r for r in reach if r.near_singular]
        if near:
            ax.scatter([r.foot_x_mm for r in near], [r.foot_y_mm for r in near], s=110,
                       facecolors="none", edgecolors=BAD, zorder=3, label="near singular")
            ax.legend(loc="best", fontsize=8)
    ax.set_aspect("equal", adjustable="datalim")
    ax.set_xlabel("foot x [mm]")
    ax.set_ylabel("foot y [mm]")
    lost = len(result.rows) - len(reach)
    ax.set_title(f"Workspace: {MAP_LABELS[metric].split(' [')[0]}"
                 + (f" ({lost} of {len(result.rows)} poses unreachable)" if lost else ""),
                 fontsize=9)
    ax.grid(True, color=SOFT, lw=0.3)
    return ax


def angle_plot(result: WorkspaceMap, actuators: Sequence[str], metric: MapMetric = "min_factor",
               ax: Axes | None = None) -> Axes:
    """The map over the actuator angles [°]: for two mapped actuators the angle grid coloured
    by ``metric``, for one the metric against the angle; unreachable or jammed poses marked
    with a red cross, near-singular poses ringed. ``actuators`` names every actuator of the
    case, in the order of the rows' angles."""
    ax = _axes(ax)
    cols = [list(actuators).index(n) for n in result.mapped]
    reach = [r for r in result.rows if r.reachable]
    lost = [r for r in result.rows if not r.reachable]
    near = [r for r in reach if r.near_singular]

    def deg(rows: Sequence[PoseRow], k: int) -> list[float]:
        return [math.degrees(r.angles_rad[cols[k]]) for r in rows]

    values = [_metric(r, metric) for r in reach]
    if len(cols) == 2:
        if reach:
            points = ax.scatter(deg(reach, 0), deg(reach, 1), c=values, cmap="viridis", s=60,
                                marker="s", zorder=2)
            ax.figure.colorbar(points, ax=ax, label=MAP_LABELS[metric])
        if near:
            ax.scatter(deg(near, 0), deg(near, 1), s=130, facecolors="none", edgecolors=BAD,
                       zorder=3, label="near singular")
        if lost:
            ax.scatter(deg(lost, 0), deg(lost, 1), marker="x", color=BAD, s=50, zorder=4,
                       label="unreachable or jams")
        ax.set_ylabel(f"{result.mapped[1]} angle [°]")
    else:
        ax.plot(deg(reach, 0), values, "o-", color=INK, zorder=2)
        if near:
            ax.scatter(deg(near, 0), [_metric(r, metric) for r in near], s=130,
                       facecolors="none", edgecolors=BAD, zorder=3, label="near singular")
        for i, r in enumerate(lost):
            ax.axvline(math.degrees(r.angles_rad[cols[0]]), color=BAD, lw=0.8, ls="--",
                       label="unreachable or jams" if i == 0 else None)
        ax.set_ylabel(MAP_LABELS[metric])
    ax.set_xlabel(f"{result.mapped[0]} angle [°]")
    ax.set_title(f"Actuator angles: {MAP_LABELS[metric].split(' [')[0]}", fontsize=9)
    if near or lost:
        ax.legend(loc="best", fontsize=8)
    ax.grid(True, color=SOFT, lw=0.3)
    return ax
