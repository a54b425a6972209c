"""The report: one self-contained HTML file (images embedded, no scripts, no network) and the
same content as Markdown with its images beside it, plus the materials table with sources.

Sections: cautions first, then what was asked, the figures, the governing checks, every check,
the load cases, the compliance breakdown, where every material value and default came from,
and the warnings.
"""

from __future__ import annotations

import base64
import html
import io
import math
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

import matplotlib.pyplot as plt
from matplotlib.axes import Axes

from stiff.cautions import CAUTIONS
from stiff.check import CheckResult
from stiff.factors import FACTORS, RequiredFactors
from stiff.material_tables import COLUMNS, MaterialKind
from stiff.report import plots
from stiff.report.sweep_plots import pareto_plot
from stiff.report.sweep_text import SweepOutcome, headline, row_text, settings_text
from stiff.report.tables import write_csv
from stiff.units import rad_to_deg

FIGURES: tuple[tuple[str, str, Callable[[CheckResult, Axes | None], Axes]], ...] = (
    ("linkage", "The linkage in its pose, deflected under the static load case",
     lambda r, ax: plots.linkage(r, "plane", ax)),
    ("side", "Side view: the stack of parts and the out-of-plane wobble",
     lambda r, ax: plots.linkage(r, "side", ax)),
    ("breakdown", "Where the foot's give comes from", plots.compliance_breakdown),
    ("factors", "Safety factors, worst first, with the required factors marked",
     plots.safety_factors),
    ("landing", "Landing: foot force and stroke against time", plots.landing),
    ("actuators", "Actuator torque demand against stall", plots.actuator_demand),
    ("modes", "The lowest natural modes of the leg held at the body", plots.lowest_modes),
)


@dataclass(frozen=True)
class Figure:
    """A rendered figure: its name, caption and PNG bytes."""

    name: str
    caption: str
    png: bytes


def _png(ax: Axes, dpi: int) -> bytes:
    fig = ax.figure
    fig.tight_layout()  # type: ignore[union-attr]
    buffer = io.BytesIO()
    fig.savefig(buffer, format="png", dpi=dpi)  # type: ignore[union-attr]
    plt.close(fig)  # type: ignore[arg-type]
    return buffer.getvalue()


def render_figures(result: CheckResult, dpi: int = 110) -> list[Figure]:
    """Every figure of the report as PNG bytes."""
    return [Figure(name, caption, _png(draw(result, None), dpi))
            for name, caption, draw in FIGURES]


#: The name of the sweep's Pareto figure, shown in the sweep's section.
SWEEP_FIGURE = "sweep_pareto"


def sweep_figure(sweep: SweepOutcome, dpi: int = 110) -> Figure:
    """The sweep's Pareto plot (mass against compliance, the recommended variant starred)."""
    best = None if sweep.best is None else sweep.best.index
    return Figure(SWEEP_FIGURE, "Design sweep: mass against vertical compliance, coloured by "
                  "minimum safety factor; the Pareto front joined",
                  _png(pareto_plot(sweep.rows, recommended=best), dpi))


def material_rows(result: CheckResult) -> list[dict[str, object]]:
    """Every material value a case uses, with its source and confidence."""
    case = result.case
    lib = case.library
    used: dict[str, MaterialKind] = {}
    for part in case.parts:
        if part.tube_material:
            used[part.tube_material] = "tube" if part.tube_material in lib.names("tube") else \
                "metal"
        for s in part.sections:
            used[s.material] = "printed"
    for j in case.joints:
        if j.pin_material:
            used[j.pin_material] = "metal"
        if j.socket and j.socket.adhesive:
            used[j.socket.adhesive] = "adhesive"
    rows: list[dict[str, object]] = []
    for name, kind in used.items():
        record = lib.get(name, kind)
        for column in COLUMNS[kind]:
            if column.name in ("name", "source", "confidence"):
                continue
            value = record.value_of(column.name)
            if value is None:
                continue
            rows.append({"material": record.name, "kind": kind, "column": column.name,
                         "value": value, "confidence": record.confidence,
                         "measured": record.confidence == "measured",
                         "source": record.provenance_of(column.name)})
    return rows


def factor_rows(factors: RequiredFactors) -> list[dict[str, object]]:
    """The required factors used, defaults marked as such."""
    default = RequiredFactors()
    rows: list[dict[str, object]] = [{"failure": k, "required_factor": getattr(factors, k),
             "source": "default, common practice (REFERENCES §10)"
             if getattr(factors, k) == getattr(default, k) else "the case's [factors]/targets"}
            for k in FACTORS if k != "samples"]
    return rows


def _e(text: object) -> str:
    return html.escape(str(text))


def _num(x: float, digits: int = 3) -> str:
    return "∞" if math.isinf(x) else f"{x:.{digits}g}"


def _table(head: list[str], rows: list[list[str]], classes: list[str] | None = None) -> str:
    h = "".join(f"<th>{_e(c)}</th>" for c in head)
    body = []
    for k, row in enumerate(rows):
        cls = f' class="{classes[k]}"' if classes else ""
        body.append(f"<tr{cls}>" + "".join(f"<td>{c}</td>" for c in row) + "</tr>")
    return f"<table><thead><tr>{h}</tr></thead><tbody>{''.join(body)}</tbody></table>"


def _md_table(head: list[str], rows: list[list[str]]) -> str:
    def clean(c: str) -> str:
        return c.replace("|", "/").replace("\n", " ")
    lines = ["| " + " | ".join(head) + " |", "|" + "---|" * len(head)]
    lines += ["| " + " | ".join(clean(c) for c in row) + " |" for row in rows]
    return "\n".join(lines)


@dataclass(frozen=True)
class Section:
    """One part of the report: a title and its content as table rows or paragraphs."""

    title: str
    paragraphs: tuple[str, ...] = ()
    head: tuple[str, ...] = ()
    rows: tuple[tuple[str, ...], ...] = ()
    row_classes: tuple[str, ...] = ()
    links: tuple[tuple[str, str], ...] = ()  # (text, relative address)
    figure: str = ""  # the name of a figure shown in this section, not with the others


def sweep_sections(sweep: SweepOutcome, csv_name: str) -> list[Section]:
    """The sweep's part of the report: counts, the recommended (or closest) variant with the
    targets it misses and its governing checks, the sensitivities, and the CSV's link."""
    rows, best = sweep.rows, sweep.best
    paragraphs = [line + "." for line in headline(sweep.variables, rows)]
    if best is None:
        paragraphs.append("No variant could be checked.")
    elif sweep.meets:
        which = "lightest" if sweep.prefer == "mass" else "fastest to print"
        paragraphs.append(f"Recommended ({which} meeting everything): variant {best.index}, "
                          f"{settings_text(sweep.variables, best)}.")
    else:
        paragraphs.append("No variant meets every check and target. The closest (lowest worst "
                          f"utilisation, {best.worst_utilisation:.3g}) is variant {best.index}, "
                          f"{settings_text(sweep.variables, best)}; it misses: "
                          + "; ".join(best.not_met) + ".")
    if best is not None:
        paragraphs.append(f"Variant {best.index}: {row_text(best)}.")
    gov = sweep.check.governing if sweep.check is not None else ()
    links = (("every variant, one line each (CSV)", csv_name),) if csv_name else ()
    return [
        Section("Design sweep", tuple(paragraphs), head=(
            "status", "item", "mode", "load case", "factor", "required"),
            rows=tuple((c.status, c.item, c.mode, c.load_case, _num(c.safety_factor),
                        f"{c.required_factor:g}") for c in gov),
            row_classes=tuple(c.status.replace(" ", "-") for c in gov), links=links,
            figure=SWEEP_FIGURE),
        Section("Design sweep: which variable matters most", (
            "One at a time about the first value of each variable; the range (largest minus "
            "smallest) across its values.",), head=(
            "variable", "vertical compliance range [mm/N]", "minimum factor range [-]",
            "mass range [g]"), rows=tuple(
                (s.variable, _num(s.compliance_range_mm_per_N), _num(s.min_factor_range),
                 _num(s.mass_range_g)) for s in sweep.sensitivities)),
    ]


def sections(result: CheckResult, sweep: SweepOutcome | None = None,
             csv_name: str = "") -> list[Section]:
    """The report's text sections, shared by HTML and Markdown; a sweep's sections follow the
    governing checks, its CSV linked as ``csv_name`` when given."""
    case, st = result.case, result.stiffness
    angles = ", ".join(f"{a.name} {rad_to_deg(float(result.pose.angles_rad[i])):.1f}°"
                       for i, a in enumerate(case.actuators)) or "as drawn"
    verdict = ("Every check reaches its required factor." if result.all_met else
               "At least one check or target does not reach its required factor.")
    asked = Section("What was checked", (
        f"Case: {case.title}" + (f" ({case.file})" if case.file else "") + ".",
        f"Pose: {angles}; foot at ({result.foot_xy_mm[0]:.1f}, {result.foot_xy_mm[1]:.1f}) mm.",
        "Foot compliance, principal: " + "; ".join(
            f"{v:.4g} mm/N along ({d[0]:+.2f}, {d[1]:+.2f}, {d[2]:+.2f})"
            for v, d in zip(st.principal_mm_per_N, st.principal_directions, strict=True)) + ".",
        f"Lateral compliance {st.lateral_mm_per_N:.4g} mm/N.",
        verdict))
    gov = result.governing
    governing_rows = tuple(
        (c.status, c.item, c.mode, c.load_case, f"{_num(c.demand)} {c.unit}",
         f"{_num(c.capacity)} {c.unit}", _num(c.safety_factor), f"{c.required_factor:g}",
         c.suggestion) for c in gov)
    every = tuple((c.item, c.mode, c.load_case, f"{_num(c.demand)} {c.unit}",
                   f"{_num(c.capacity)} {c.unit}", _num(c.safety_factor),
                   f"{c.required_factor:g}", c.status, c.basis)
                  for c in sorted(result.checks, key=lambda c: (c.item, -c.utilisation)))
    cases = tuple(
        (lc.name, lc.case.description,
         "held" if lc.case.foot_held else ", ".join(f"{d:+.3f}" for d in lc.foot_deflection_mm),
         "; ".join(f"{a.name} {a.torque_Nmm / 1e3:+.3f} of {a.stall_torque_Nmm / 1e3:g}"
                   for a in lc.actuators))
        for lc in result.load_cases)
    shares = tuple((s.name, s.kind, f"{100 * s.share:.1f} %", load)
                   for load, group in (("vertical", st.vertical), ("lateral", st.lateral))
                   for s in group if s.share >= 0.001)
    mats = tuple((str(r["material"]), str(r["column"]), str(r["value"]),
                  str(r["confidence"]) + (" (your measurement)" if r["measured"] else ""),
                  str(r["source"])) for r in material_rows(result))
    factors = tuple((str(r["failure"]), str(r["required_factor"]), str(r["source"]))
                    for r in factor_rows(case.factors))
    basis = tuple((b,) for b in result.built.stiffness_basis) + tuple(
        (f"{a.name}: {a.stiffness_basis}",) for a in case.actuators)
    return [
        Section("Cautions", CAUTIONS),
        asked,
        Section("Governing checks, worst first", head=(
            "status", "item", "mode", "load case", "demand", "capacity", "factor", "required",
            "what would help"), rows=governing_rows, row_classes=tuple(
                c.status.replace(" ", "-") for c in gov)),
        *(sweep_sections(sweep, csv_name) if sweep is not None else ()),
        Section("Load cases", head=("load case", "where the forces come from",
                                    "foot deflection x, y, z [mm]", "actuator torque [N·m]"),
                rows=cases),
        Section("Where the give comes from", head=("element", "kind", "share", "unit load"),
                rows=shares),
        _dynamics(result),
        Section("Every check, with the basis of its capacity", head=(
            "item", "mode", "load case", "demand", "capacity", "factor", "required", "status",
            "basis"), rows=every),
        Section("Materials used, with sources", (
            "Every value below is what the calculation used; its confidence tag says how sure "
            "the source is (confirmed, derived, memory, practice, or your own measurement).",),
            head=("material", "value", "used", "confidence", "source"), rows=mats),
        Section("Required factors", head=("failure", "required factor", "source"),
                rows=factors),
        Section("Joint and actuator stiffness", head=("how it was obtained",), rows=basis),
        Section("Warnings", tuple(result.warnings) or ("none",)),
    ]


def _dynamics(result: CheckResult) -> Section:
    """Joint play at the foot and the lowest natural frequencies."""
    d = result.dynamics
    p, m = d.play, d.modes
    paragraphs = (
        f"Foot play from pin clearances, apart from the elastic deflection: "
        f"{p.in_plane_worst_mm:.3g} mm worst case in the plane (root-sum-square "
        f"{p.in_plane_rss_mm:.3g} mm), {p.out_of_plane_worst_mm:.3g} mm out of it (RSS "
        f"{p.out_of_plane_rss_mm:.3g} mm). Play does not grow with load: tighter bores and "
        "longer bearings cure it, not more walls.",
        "Lowest natural frequencies: " + "; ".join(
            f"{md.frequency_Hz:.3g} Hz ({md.kind})" for md in m.modes[:4]) +
        f". Moving mass {m.mass.moving_t * 1e6:.3g} g; effective mass at the foot "
        f"{m.foot_effective_mass_t * 1e6:.3g} g.",
    )
    rows = tuple((j.name, f"{j.clearance_mm:g}", f"{j.bearing_length_mm:.3g}",
                  f"{j.in_plane_mm:.3g}", f"{j.out_of_plane_mm:.3g}",
                  f"{100 * j.share_in_plane:.0f} % / {100 * j.share_out_of_plane:.0f} %")
                 for j in p.joints)
    return Section("Joint play and natural frequencies", paragraphs, head=(
        "joint", "radial clearance [mm]", "bearing length [mm]", "in-plane play [mm]",
        "out-of-plane play [mm]", "share in / out of plane"), rows=rows)


_STYLE = """
body { font-family: Georgia, 'DejaVu Serif', serif; max-width: 1100px; margin: 2em auto;
       color: #2f3b45; line-height: 1.4; padding: 0 1em; }
h1 { font-size: 1.6em; border-bottom: 3px solid #3c7a89; }
h2 { font-size: 1.15em; color: #3c7a89; margin-top: 2em; }
table { border-collapse: collapse; font-size: 0.78em; width: 100%; }
th, td { border-bottom: 1px solid #dde3e8; padding: 3px 6px; text-align: left;
         vertical-align: top; }
th { background: #eef2f4; }
tr.not-met td:first-child { color: #c0392b; font-weight: bold; }
tr.marginal td:first-child { color: #d68910; font-weight: bold; }
.cautions { background: #fff6e5; border-left: 5px solid #e0a43a; padding: 0.6em 1em; }
figure { display: inline-block; width: 48%; margin: 0.5%; vertical-align: top; }
figure img { width: 100%; } figcaption { font-size: 0.8em; color: #5a6a75; }
"""


def _html_figure(f: Figure) -> str:
    data = base64.b64encode(f.png).decode("ascii")
    return (f"<figure><img alt='{_e(f.caption)}' src='data:image/png;base64,{data}'>"
            f"<figcaption>{_e(f.caption)}</figcaption></figure>")


def html_report(result: CheckResult, figures: list[Figure],
                sweep: SweepOutcome | None = None, csv_name: str = "") -> str:
    """The whole report as one self-contained HTML page (a sweep's CSV linked beside it)."""
    parts = [f"<!DOCTYPE html><html lang='en'><head><meta charset='utf-8'>"
             f"<title>stiff report: {_e(result.case.title)}</title><style>{_STYLE}</style>"
             f"</head><body><h1>stiff report: {_e(result.case.title)}</h1>"]
    secs = sections(result, sweep, csv_name)
    placed = {sec.figure for sec in secs}
    for k, sec in enumerate(secs):
        parts.append(f"<h2>{_e(sec.title)}</h2>")
        if sec.title == "Cautions":
            items = "".join(f"<li>{_e(p)}</li>" for p in sec.paragraphs)
            parts.append(f"<div class='cautions'><ul>{items}</ul></div>")
        else:
            parts.extend(f"<p>{_e(p)}</p>" for p in sec.paragraphs)
        parts.extend(f"<p><a href='{_e(href)}'>{_e(text)}</a></p>" for text, href in sec.links)
        parts.extend(_html_figure(f) for f in figures if sec.figure and f.name == sec.figure)
        if sec.head:
            rows = [[_e(c) for c in row] for row in sec.rows]
            parts.append(_table(list(sec.head), rows, list(sec.row_classes) or None))
        if k == 1:
            parts.append("<h2>Figures</h2>")
            parts.extend(_html_figure(f) for f in figures if f.name not in placed)
    parts.append("</body></html>")
    return "\n".join(parts)


def markdown_report(result: CheckResult, figures: list[Figure], image_dir: str,
                    sweep: SweepOutcome | None = None, csv_name: str = "") -> str:
    """The same report as Markdown, its images in ``image_dir`` beside it."""
    out = [f"# stiff report: {result.case.title}", ""]
    secs = sections(result, sweep, csv_name)
    placed = {sec.figure for sec in secs}
    for k, sec in enumerate(secs):
        out += [f"## {sec.title}", ""]
        if sec.title == "Cautions":
            out += [f"- {p}" for p in sec.paragraphs] + [""]
        else:
            for p in sec.paragraphs:
                out += [p, ""]
        out += [f"[{text}]({href})" for text, href in sec.links] + ([""] if sec.links else [])
        out += [f"![{f.caption}]({image_dir}/{f.name}.png)" for f in figures
                if sec.figure and f.name == sec.figure] + ([""] if sec.figure else [])
        if sec.head:
            out += [_md_table(list(sec.head), [list(r) for r in sec.rows]), ""]
        if k == 1:
            out += ["## Figures", ""]
            out += [f"![{f.caption}]({image_dir}/{f.name}.png)" for f in figures
                    if f.name not in placed] + [""]
    return "\n".join(out)


def write_report(result: CheckResult, out_dir: Path, *,
                 sweep: SweepOutcome | None = None) -> Path:
    """report.html, report.md with figures/ beside it, and materials.csv in ``out_dir``.

    With ``sweep``, its sections and Pareto plot too, linking its CSV when it was written in
    ``out_dir`` (``sweep.csv_path``).
    """
    figures = render_figures(result)
    if sweep is not None:
        figures.append(sweep_figure(sweep))
    csv_name = ""
    if sweep is not None and sweep.csv_path is not None:
        csv_name = (sweep.csv_path.name if sweep.csv_path.parent == out_dir
                    else sweep.csv_path.as_posix())
    image_dir = out_dir / "figures"
    image_dir.mkdir(parents=True, exist_ok=True)
    for f in figures:
        (image_dir / f"{f.name}.png").write_bytes(f.png)
    (out_dir / "report.md").write_text(
        markdown_report(result, figures, "figures", sweep, csv_name), encoding="utf-8")
    write_csv(out_dir / "materials.csv", material_rows(result))
    path = out_dir / "report.html"
    path.write_text(html_report(result, figures, sweep, csv_name), encoding="utf-8")
    return path
