"""The ``stiff`` command line: parse, call the library, print, map errors to exit codes."""

from __future__ import annotations

import json
import sys
import typing
import unicodedata
from dataclasses import replace
from pathlib import Path

import click
import matplotlib.pyplot as plt

from stiff import CASES_DIR, __version__
from stiff.case import load_case
from stiff.case_model import Case
from stiff.check import run_check
from stiff.errors import (
    EXIT_BAD_INPUT,
    EXIT_CHECK_FAILED,
    EXIT_OK,
    EXIT_UNSOLVABLE,
    CaseError,
    StiffError,
)
from stiff.materials import MaterialLibrary, load_library
from stiff.printed_sections import PrintSettings, printed_rectangle, printed_round
from stiff.printing import BUILD_DIRECTIONS, INFILL_PATTERNS, check_build_direction, check_pattern
from stiff.report.document import write_report
from stiff.report.results_json import results_dict, write_results
from stiff.report.summary import summary_lines
from stiff.report.sweep_plots import MAP_LABELS, angle_plot, map_plot, pareto_plot
from stiff.report.sweep_text import SweepOutcome, map_lines, outcome_lines, sweep_outcome
from stiff.report_text import material_detail, materials_list, section_comparison
from stiff.sweep import DEFAULT_RATE_MM3_PER_S, Prefer, run_sweep, write_csv
from stiff.sweep_spec import parse_load_cases, parse_specs, variant_count
from stiff.workspace import grid_angles, target_map, workspace_map, write_map_csv


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="stiff")
def cli() -> None:
    """Stiffness, wobble and strength of tube-and-printed-joint linkages, before you print.

    Exit codes: 0 all checks met, 1 a check or target not met, 2 bad input,
    3 the model cannot be solved (a mechanism or an unreachable pose).
    """


def one_line(text: str) -> str:
    """``text`` on one line: line breaks and other control characters written as escapes.

    Messages quote what the user wrote (a name, a key), which may hold a line break.
    """
    return "".join(ch if ch == "\t" or unicodedata.category(ch) not in _BREAKING
                   else ascii(ch)[1:-1] for ch in text)


_BREAKING = ("Cc", "Zl", "Zp")  # control characters, line and paragraph separators


def main() -> None:
    """Console entry point: run the group and turn a StiffError into one line and an exit code."""
    try:
        code = cli.main(standalone_mode=False)
    except StiffError as err:
        click.echo(f"stiff: error: {one_line(str(err))}", err=True)
        sys.exit(err.exit_code)
    except click.exceptions.Abort:
        click.echo("stiff: aborted", err=True)
        sys.exit(1)
    except click.ClickException as err:
        err.show()
        sys.exit(err.exit_code)
    sys.exit(code if isinstance(code, int) else 0)


# ---------------------------------------------------------------------------------------------
# Materials and sections


class _InputError(click.ClickException):
    """A bad-input StiffError raised inside a command, shown as one line; exit code 2."""

    exit_code = EXIT_BAD_INPUT

    def __init__(self, err: StiffError) -> None:
        super().__init__(one_line(str(err)))

    def show(self, file: typing.IO[typing.Any] | None = None) -> None:
        click.echo(f"stiff: error: {self.message}", err=True)


class _UnsolvableError(_InputError):
    """The model cannot be solved (a mechanism, an unreachable pose); exit code 3."""

    exit_code = EXIT_UNSOLVABLE


def _command_error(err: StiffError) -> _InputError:
    """The click exception that shows ``err`` as one line with its exit code."""
    return _UnsolvableError(err) if err.exit_code == EXIT_UNSOLVABLE else _InputError(err)


def _library(user: tuple[Path, ...]) -> MaterialLibrary:
    library = load_library()
    for path in user:
        library = library.with_file(path)
    return library


_USER = click.option(
    "--user",
    "user",
    multiple=True,
    type=click.Path(exists=True, dir_okay=False, path_type=Path),
    help="A CSV file of your own materials (same columns as a built-in table); repeatable.",
)


@cli.command()
@click.argument("name", required=False)
@_USER
def materials(name: str | None, user: tuple[Path, ...]) -> None:
    """List the materials with their sources, or show the material NAME in full."""
    try:
        library = _library(user)
        text = materials_list(library) if name is None else material_detail(library.get(name))
    except StiffError as err:
        raise _InputError(err) from err
    click.echo(text)


#: A click command function, as option decorators take and give it back.
F = typing.TypeVar("F", bound=typing.Callable[..., typing.Any])


def _size(flag: str, default: float, text: str) -> typing.Callable[[F], F]:
    """A positive size option of `stiff section` [mm]."""
    return click.option(flag, type=click.FloatRange(min=0.0, min_open=True), default=default,
                        show_default=True, help=text)


def _count(flag: str, default: int, text: str) -> typing.Callable[[F], F]:
    """A whole-number option of `stiff section` (walls, skins), 0 or more."""
    return click.option(flag, type=click.IntRange(min=0), default=default, show_default=True,
                        help=text)


@cli.command()
@click.argument("material")
@click.option(
    "--shape",
    type=click.Choice(["rectangle", "round"]),
    default="rectangle",
    show_default=True,
    help="Outline of the section.",
)
@_size("--depth-mm", 12.0, "Rectangle: size in the linkage plane (along y) [mm].")
@_size("--width-mm", 6.0, "Rectangle: size out of the plane, along the pins [mm].")
@_size("--diameter-mm", 10.0, "Round: diameter [mm].")
@_count("--walls", 3, "Number of perimeter walls.")
@_size("--line-width-mm", 0.45, "Width of one extruded line [mm].")
@_count("--skins", 4, "Number of solid top and bottom layers.")
@_size("--layer-height-mm", 0.2, "Layer height [mm].")
@click.option(
    "--infill-percent",
    type=click.FloatRange(min=0.0, max=100.0, min_open=True),
    default=20.0,
    show_default=True,
    help="Infill density [%].",
)
@click.option(
    "--pattern",
    type=click.Choice(INFILL_PATTERNS),
    default="grid_45",
    show_default=True,
    help="Infill pattern: grid (lines along and across the member), grid_45 (lines at "
    "±45° to it), triangles, honeycomb, gyroid.",
)
@click.option(
    "--build",
    type=click.Choice(BUILD_DIRECTIONS),
    default="flat",
    show_default=True,
    help="Build direction: flat (layers in the linkage plane), on_edge (layers on "
    "edge along the member), upright (layers across the member).",
)
@_USER
def section(
    material: str,
    shape: str,
    depth_mm: float,
    width_mm: float,
    diameter_mm: float,
    walls: int,
    line_width_mm: float,
    skins: int,
    layer_height_mm: float,
    infill_percent: float,
    pattern: str,
    build: str,
    user: tuple[Path, ...],
) -> None:
    """Stiffness and mass of a printed section of MATERIAL, beside the same section solid."""
    try:
        record = _library(user).printed_material(material)
        settings = PrintSettings(
            walls,
            line_width_mm,
            skins,
            layer_height_mm,
            infill_percent / 100.0,
            check_pattern(pattern),
            check_build_direction(build),
        )
        solid_settings = replace(settings, infill=1.0)
        if shape == "round":
            printed = printed_round(record, diameter_mm, settings)
            solid = printed_round(record, diameter_mm, solid_settings)
        else:
            printed = printed_rectangle(record, width_mm, depth_mm, settings)
            solid = printed_rectangle(record, width_mm, depth_mm, solid_settings)
    except StiffError as err:
        raise _InputError(err) from err
    click.echo(section_comparison(printed, solid))


# ---------------------------------------------------------------------------------------------
# Check


def _check_case_path(path: Path) -> None:
    """A CaseError unless ``path`` is a file (a folder, a missing file, a name the system
    refuses)."""
    try:
        if path.is_dir():
            raise CaseError(path, "(file)", "is a folder, not a case file")
        if not path.is_file():
            raise CaseError(path, "(file)", "no such case file")
    except (OSError, ValueError) as err:
        raise CaseError(path, "(file)", f"cannot read: {getattr(err, 'strerror', None) or err}"
                        ) from None


_VARY_HELP = ("PART.SETTING=VALUES, e.g. crank_a.walls=2,3,4, link_a.size=6x4,8x6, "
              "'*.infill=20:60:20' (settings: walls, infill [%], pattern, build, width_mm, "
              "depth_mm, size), or KEY=VALUES for any number in the case file, e.g. "
              "loads.drop_height_mm=20:60:20. Repeatable: the sweep is every combination.")
_PREFER = click.option(
    "--prefer", type=click.Choice(["mass", "time"]), default="mass", show_default=True,
    help="Recommend the lightest or the fastest-to-print variant meeting every check and "
    "target.")
_RATE = click.option(
    "--rate-mm3-per-s", "rate", type=click.FloatRange(min=0.0, min_open=True),
    default=DEFAULT_RATE_MM3_PER_S, show_default=True,
    help="Volumetric print rate for the print-time estimate [mm³/s] (8: common practice for "
    "a 0.4 mm nozzle).")


def _sweep(case: Case, specs: tuple[str, ...], rate: float, prefer: str, out_dir: Path | None,
           hidden: bool, map_steps: int | None = None, load_cases: str | None = None
           ) -> SweepOutcome:
    """The sweep of ``specs`` over ``case``, with sweep.csv and sweep.png in ``out_dir``;
    with ``map_steps`` every variant is also checked over the map's grid of poses, with
    ``load_cases`` (comma-separated names) only in those load cases."""
    chosen: Prefer = "time" if prefer == "time" else "mass"
    variables = parse_specs(case, specs)
    only = parse_load_cases(case, load_cases) if load_cases is not None else None
    poses = grid_angles(case, map_steps)[2] if map_steps is not None else []
    with click.progressbar(length=variant_count(variables), label="variants",
                           file=sys.stderr, hidden=hidden or not sys.stderr.isatty()) as bar:
        rows = run_sweep(case, variables, rate, progress=bar.update, poses=poses,
                         load_cases=only)
    outcome = sweep_outcome(case, variables, rows, chosen)
    if out_dir is None:
        return outcome
    best = outcome.best
    csv_path = write_csv(out_dir / "sweep.csv", variables, rows)
    png = _save(pareto_plot(rows, recommended=None if best is None else best.index),
                out_dir / "sweep.png")
    return replace(outcome, csv_path=csv_path, png_path=png)


@cli.command()
@click.argument("case_file", required=False, type=click.Path(path_type=Path))
@click.option("--out", "out_dir", type=click.Path(path_type=Path),
              help="Folder to write results.json and the report into (made if missing).")
@click.option("--json", "as_json", is_flag=True, help="Print results.json to stdout instead.")
@click.option("--quiet", is_flag=True, help="Print only the verdict line.")
@click.option("--sweep", "specs", multiple=True, metavar="SPEC",
              help="Also sweep the case as `stiff sweep --vary SPEC` does, and add the sweep "
              "to the summary and the report (sweep.csv, sweep.png beside it). " + _VARY_HELP)
@_PREFER
@_RATE
@click.pass_context
def check(ctx: click.Context, case_file: Path | None, out_dir: Path | None, as_json: bool,
          quiet: bool, specs: tuple[str, ...], prefer: str, rate: float) -> None:
    """Solve CASE_FILE (default: the bundled five-bar leg demo) in its pose and report.

    Foot compliance and its principal directions, lateral compliance and twist, where the give
    comes from, and actuator torques under the stance load. Exit code 1 when a target in the
    case is not met (a sweep does not change the exit code: it is about the case as written).
    """
    path = case_file or CASES_DIR / "five_bar_leg.toml"
    swept = None
    try:
        _check_case_path(path)
        case = load_case(path)
        if specs:
            parse_specs(case, specs)  # a bad specification is refused before any solve
        with click.progressbar(length=3 if out_dir is not None else 1, label="checking",
                               file=sys.stderr,
                               hidden=quiet or as_json or not sys.stderr.isatty()) as bar:
            result = run_check(case)
            bar.update(1)
        if specs:
            swept = _sweep(case, specs, rate, prefer, out_dir, quiet or as_json)
        written = report = None
        if out_dir is not None:
            written = write_results(result, out_dir)
            report = write_report(result, out_dir, sweep=swept)
    except StiffError as err:
        raise _command_error(err) from err
    except OSError as err:
        raise _InputError(StiffError(f"cannot write into {out_dir}: {err.strerror}")) from None
    if as_json:
        click.echo(json.dumps(results_dict(result), indent=2, ensure_ascii=False))
    elif quiet:
        verdict = ("all checks and targets met" if result.all_met
                   else "a check or target is not met")
        click.echo(f"{result.case.title}: {verdict}")
    else:
        click.echo("\n".join(summary_lines(result)))
        if swept is not None:
            click.echo("")
            click.echo("\n".join(outcome_lines(swept)))
    if written is not None and not as_json:
        if swept is not None and swept.csv_path is not None:
            click.echo(f"variants: {swept.csv_path}")
        click.echo(f"results: {written}")
        click.echo(f"report: {report}")
    ctx.exit(EXIT_OK if result.all_met else EXIT_CHECK_FAILED)



# ---------------------------------------------------------------------------------------------
# Sweep and map


def _save(ax: typing.Any, path: Path) -> Path:
    """Save the figure of ``ax`` to ``path`` and close it."""
    fig = ax.figure
    fig.tight_layout()
    fig.savefig(path, dpi=120)
    plt.close(fig)
    return path


@cli.command()
@click.argument("case_file", type=click.Path(path_type=Path))
@click.option("--vary", "specs", multiple=True, required=True, metavar="SPEC", help=_VARY_HELP)
@click.option("--out", "out_dir", type=click.Path(path_type=Path), required=True,
              help="Folder to write sweep.csv and sweep.png into (made if missing).")
@_PREFER
@_RATE
@click.option("--map-steps", "map_steps", type=click.IntRange(min=2, max=21), default=None,
              help="Also check every variant in the poses of `stiff map --steps N` (N x N for "
              "two actuators); its factors are then the lowest over its own pose and those.")
@click.option("--load-cases", "load_cases", metavar="NAMES", default=None,
              help="Check only these load cases, comma-separated (e.g. 'stance,landing,slip "
              "fore,slip aft'); by default every load case of the case.")
@click.pass_context
def sweep(ctx: click.Context, case_file: Path, specs: tuple[str, ...], out_dir: Path,
          prefer: str, rate: float, map_steps: int | None, load_cases: str | None) -> None:
    """Check every combination of print settings, tube sizes and case values of CASE_FILE.

    Writes sweep.csv (one line per variant) and sweep.png (mass against compliance, Pareto
    front), and prints the recommended variant with its governing checks and the
    sensitivities. Exit code 1 when no variant meets every check and target. Compliance is
    the foot's in the case's own pose; with --map-steps the factors cover the map's poses too.
    """
    try:
        _check_case_path(case_file)
        outcome = _sweep(load_case(case_file), specs, rate, prefer, out_dir, False, map_steps,
                         load_cases)
    except StiffError as err:
        raise _command_error(err) from err
    except OSError as err:
        raise _InputError(StiffError(f"cannot write into {out_dir}: {err.strerror}")) from None
    click.echo("\n".join(outcome_lines(outcome)))
    if load_cases is not None:
        click.echo(f"load cases checked: {load_cases} (only these)")
    click.echo(f"variants: {outcome.csv_path}")
    click.echo(f"plot: {outcome.png_path}")
    ctx.exit(EXIT_OK if outcome.meets else EXIT_CHECK_FAILED)


@cli.command(name="map")
@click.argument("case_file", type=click.Path(path_type=Path))
@click.option("--out", "out_dir", type=click.Path(path_type=Path), required=True,
              help="Folder to write map.csv and the map pictures into (made if missing).")
@click.option("--steps", type=click.IntRange(min=2, max=101), default=7, show_default=True,
              help="Angles per actuator over its range (±30° about the pose without one); "
              "with --grid foot, also the foot targets along x and along y.")
@click.option("--grid", "grid", type=click.Choice(["angles", "foot"]), default="angles",
              show_default=True, help="Sample actuator angles, or foot targets (x, y) solved "
              "by the inverse kinematics (two actuators).")
@click.option("--x-mm", "x_mm", type=float, nargs=2, metavar="FROM TO",
              help="With --grid foot: the range of foot x [mm] (default: the x the angle grid "
              "reaches).")
@click.option("--y-mm", "y_mm", type=float, nargs=2, metavar="FROM TO",
              help="With --grid foot: the range of foot y [mm] (default: the y the angle grid "
              "reaches).")
def map_command(case_file: Path, out_dir: Path, steps: int, grid: str,
                x_mm: tuple[float, float] | None, y_mm: tuple[float, float] | None) -> None:
    """Map CASE_FILE over a grid of actuator angles or foot targets: compliance, strength,
    singularity.

    One actuator gives a line of poses, two a grid; further actuators stay at their pose.
    With --grid foot, a STEPS x STEPS grid of foot targets, each solved for its actuator
    angles. Writes map.csv, map_<quantity>.png (foot positions coloured by vertical, lateral,
    min_factor, singularity) and map_angles.png (minimum factor over the angles); unreachable
    and jammed poses and targets are recorded in the CSV with the reason and marked, never an
    error.
    """
    try:
        _check_case_path(case_file)
        case = load_case(case_file)
        if grid == "angles" and (x_mm or y_mm):
            raise _InputError(StiffError("--x-mm and --y-mm need --grid foot"))
        count = len(grid_angles(case, steps)[2]) * (2 if grid == "foot" else 1)
        with click.progressbar(length=count, label="targets, then poses" if grid == "foot"
                               else "poses", file=sys.stderr,
                               hidden=not sys.stderr.isatty()) as bar:
            if grid == "foot":
                result = target_map(case, steps, x_mm, y_mm, progress=bar.update)
            else:
                result = workspace_map(case, steps, progress=bar.update)
        out_dir.mkdir(parents=True, exist_ok=True)
        written = [write_map_csv(out_dir / "map.csv", case, result)]
        written += [_save(map_plot(result, metric), out_dir / f"map_{metric}.png")
                    for metric in MAP_LABELS]
        written.append(_save(angle_plot(result, [a.name for a in case.actuators]),
                             out_dir / "map_angles.png"))
    except StiffError as err:
        raise _command_error(err) from err
    except OSError as err:
        raise _InputError(StiffError(f"cannot write into {out_dir}: {err.strerror}")) from None
    click.echo("\n".join(map_lines(case, result)))
    click.echo(f"written: {', '.join(str(p) for p in written)}")
