"""The ``calorun`` command.

    calorun [FILE]                         open the desktop app (the demo project when no file)
    calorun --screenshot OUT.png [FILE]    render the main window offscreen and exit
    calorun solve PROJECT.json [--json [--uncertainty]] [--csv DIR] [--units SI|US] [--alternative NAME ...]
    calorun report PROJECT.json -o summary.pdf [--alternative NAME ...] [--units SI|US] [--uncertainty]
    calorun schema                         print the project file's JSON Schema
    calorun find PROJECT.json --vary PARAMETER --target KIND=VALUE ... [--alternative NAME] [--save-as OUT.json]
    calorun sweep PROJECT.json --vary PARAMETER [--from X --to Y --points N] [--target ...] [-o table.csv]
    calorun batch LINELIST --template T.json -o OUTDIR [--columns MAP.json] [--workers N] [--scheduler ADDRESS]
    calorun --help                         all of the above; ``calorun COMMAND --help`` for one

``solve``, ``schema``, ``find``, ``sweep`` and ``batch`` never import Qt (``batch`` only to write its PDF).
Exit codes (:data:`EXIT_CODES_HELP`): 0 every alternative solved (and the report written), 1 an alternative
could not be solved — ``report`` still writes the PDF, which says which and why — or an output could not be
written, 2 an invalid project or command line. ``find`` (:data:`FIND_EXIT_CODES_HELP`): 1 when no value meets
every target; ``sweep`` (:data:`SWEEP_EXIT_CODES_HELP`): 1 when no variant could be solved; ``batch``
(:data:`BATCH_EXIT_CODES_HELP`): 1 when a line fails or could not be designed (every output is still written),
130 when stopped by Ctrl-C. Messages go to stderr in plain words, never a traceback.
"""

from __future__ import annotations

import argparse
import contextlib
import io
import json
import sys
import textwrap

EXIT_OK = 0
EXIT_SOLVER = 1
EXIT_INVALID = 2
EXIT_INTERRUPTED = 130  # batch stopped by Ctrl-C (the shell's code for SIGINT); the lines done are kept

EXIT_CODES_HELP = (
    "exit codes: 0 every alternative solved (and the report written); 1 an alternative could not be "
    "solved (`report` still writes the PDF, which says which and why) or an output could not be written; "
    "2 an invalid project file or command line. Messages go to stderr."
)

FIND_EXIT_CODES_HELP = (
    "exit codes: 0 a value meets every target (and --save-as written); 1 no value in the range meets every "
    "target (the reason is printed in plain words) or an output could not be written; 2 an invalid project file "
    "or command line (the message names the option and the value). Messages go to stderr."
)
SWEEP_EXIT_CODES_HELP = (
    "exit codes: 0 the sweep ran (variants that could not be solved are marked in the table) and its outputs "
    "were written; 1 no variant could be solved, the variant picked could not be solved, or an output could not "
    "be written; 2 an invalid project file or command line (the message names the option and the value). "
    "Messages go to stderr."
)
BATCH_EXIT_CODES_HELP = (
    "exit codes: 0 every line was designed and none fails (warnings allowed); 1 a line fails or could not be "
    "designed (a bad row, a line the solver refused: the results list and the summary PDF say which and why; "
    "every other line still ran and every output was written) or an output could not be written; 2 an unusable "
    "line list, template, columns file, output folder or option (the message names it and the value); 130 "
    "stopped by Ctrl-C (the lines designed so far are kept: the same command continues). Messages go to stderr."
)
PARAMETER_HELP = (
    "what to vary: heater_output, insulation_thickness, mass_flow, volume_flow, bore, inlet_temperature, "
    "steam_pressure, medium_temperature or segment_length; after a colon the segments by number, range or name "
    "(heater_output:2-3, insulation_thickness:all, segment_length:Road crossing); none: every segment where it applies"
)
TARGET_HELP = (
    "a target to meet, KIND=VALUE (give several): outlet_min, outlet_max, bulk_min (bulk temperature everywhere "
    "at least), inner_wall_max, surface_max (outer surface at most), heat_loss_per_m_max, pressure_drop_max, "
    "worst_case_bulk_min, hold_time_min; e.g. surface_max=50C, bulk_min=55C, pressure_drop_max=0.5bar, "
    "heat_loss_per_m_max=20W/m, hold_time_min=8h"
)
VALUE_HELP = (
    "A bare number is read in the parameter's display unit (SI: heater output W/m of heater, insulation "
    "thickness mm, mass flow kg/h, volume flow m³/h, inlet or medium temperature °C, steam pressure bar(a), "
    "segment length m; --units US: W/ft, in, lb/h, gpm, °F, psia, ft); a number with a unit is read in that "
    "unit (20W/m, 40mm, 1.2kg/s, 3bar(g), 140C); a bore is an NPS size (2, 1-1/2, NPS 3)."
)

SUBCOMMANDS = ("solve", "report", "schema", "find", "sweep", "batch")
_HELP_FLAGS = ("-h", "--help")


def main(argv: list[str] | None = None) -> int:
    argv = list(sys.argv[1:] if argv is None else argv)
    if argv and argv[0] in SUBCOMMANDS:
        try:
            return _headless(argv)
        except BrokenPipeError:  # output piped into `head` and the like: stop quietly
            import os

            os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
            return EXIT_OK
    if any(a in _HELP_FLAGS for a in argv):
        print(full_help())
        return EXIT_OK
    return _gui(argv)


def build_parser() -> argparse.ArgumentParser:
    """The command line's commands and their options (the desktop app's own are in ``_gui``)."""
    parser = argparse.ArgumentParser(
        prog="calorun",
        usage="calorun [FILE] [options]        open the desktop app\n"
              "       calorun COMMAND [options]",
        description="Design process heating and cooling lines.",
        epilog="Without a command, calorun opens the desktop app on FILE (the demo project when no file is "
               "given). `calorun COMMAND --help` shows the options of one command. " + EXIT_CODES_HELP,
    )
    sub = parser.add_subparsers(dest="command", required=True, title="commands", metavar="COMMAND")

    p_solve = sub.add_parser("solve", help="solve a project; print key figures, the verdict and the checks",
                             epilog=EXIT_CODES_HELP)
    p_solve.add_argument("project", metavar="PROJECT.json")
    p_solve.add_argument("--json", action="store_true", help="print machine-readable results (SI)")
    p_solve.add_argument("--csv", metavar="DIR", help="write the profiles of each alternative as CSV into DIR")
    p_solve.add_argument("--units", choices=("SI", "US"), default="SI", help="units of the table and CSV (default SI)")
    p_solve.add_argument("--alternative", action="append", metavar="NAME", help="solve only these alternatives")
    p_solve.add_argument("--uncertainty", action="store_true",
                         help="with --json: add uncertainty bands (each method re-solved at the edges of its "
                              "published accuracy; ± per key figure, per method, bands along the line)")

    p_report = sub.add_parser("report", help="write the summary report (PDF)", epilog=EXIT_CODES_HELP)
    p_report.add_argument("project", metavar="PROJECT.json")
    p_report.add_argument("-o", "--output", required=True, metavar="summary.pdf")
    p_report.add_argument("--units", choices=("SI", "US"), default="SI", help="units of the report (default SI)")
    p_report.add_argument("--alternative", action="append", metavar="NAME", help="report only these alternatives")
    p_report.add_argument("--uncertainty", action="store_true",
                          help="compute uncertainty bands however long the line (by default a very long line gets "
                               "none, and the report says so: they re-solve it about a dozen times)")
    p_find = sub.add_parser(
        "find", prog="calorun find", help="Target Finder: the smallest value of one parameter that meets every target",
        description="Find the smallest value of one parameter (the smallest standard size for insulation and bore) "
                    "at which the alternative meets every target; print it, the binding target, the margins and "
                    "the Key Figures there, or why no value does. " + VALUE_HELP,
        epilog=FIND_EXIT_CODES_HELP)
    p_find.add_argument("project", metavar="PROJECT.json")
    p_find.add_argument("--alternative", metavar="NAME", help="the alternative to start from (default: the baseline)")
    p_find.add_argument("--vary", required=True, metavar="PARAMETER[:SEGMENTS]", help=PARAMETER_HELP)
    p_find.add_argument("--target", action="append", required=True, metavar="KIND=VALUE", help=TARGET_HELP)
    p_find.add_argument("--from", dest="lower", metavar="X", help="lowest value to search (default: a sensible range "
                        "for the parameter; for sizes, the smallest on the list)")
    p_find.add_argument("--to", dest="upper", metavar="Y", help="highest value to search")
    p_find.add_argument("--values", metavar="V,V,...", help="search only these values (comma-separated)")
    p_find.add_argument("--units", choices=("SI", "US"), default="SI", help="units of the output and of bare numbers "
                        "(default SI)")
    p_find.add_argument("--json", action="store_true", help="print machine-readable results (SI)")
    p_find.add_argument("--save-as", metavar="OUT.json", help="write the project with the answer added as a new "
                        "alternative that records how it was found (the report says so)")

    p_sweep = sub.add_parser(
        "sweep", prog="calorun sweep",
        help="Sweep: solve one parameter over a range (or two as a grid) and tabulate the key figures",
        description="Solve the alternative at many values of one parameter (or a grid of two) and print the chosen "
                    "key figures at each, which rows meet every target, and the band where all are met. " + VALUE_HELP,
        epilog=SWEEP_EXIT_CODES_HELP)
    p_sweep.add_argument("project", metavar="PROJECT.json")
    p_sweep.add_argument("--alternative", metavar="NAME", help="the alternative to start from (default: the baseline)")
    p_sweep.add_argument("--vary", required=True, metavar="PARAMETER[:SEGMENTS]", help=PARAMETER_HELP)
    p_sweep.add_argument("--from", dest="lower", metavar="X", help="first value (default: a sensible range for the "
                         "parameter; for sizes, every size on the list)")
    p_sweep.add_argument("--to", dest="upper", metavar="Y", help="last value")
    p_sweep.add_argument("--points", type=_count, default=21, metavar="N", help="values from --from to --to, evenly "
                         "spaced (default 21)")
    p_sweep.add_argument("--values", metavar="V,V,...", help="sweep these values instead (comma-separated)")
    p_sweep.add_argument("--vary2", metavar="PARAMETER[:SEGMENTS]", help="a second parameter, swept as a grid with the first")
    p_sweep.add_argument("--from2", metavar="X", help="first value of the second parameter")
    p_sweep.add_argument("--to2", metavar="Y", help="last value of the second parameter")
    p_sweep.add_argument("--points2", type=_count, default=5, metavar="N", help="values of the second parameter (default 5)")
    p_sweep.add_argument("--values2", metavar="V,V,...", help="values of the second parameter (comma-separated)")
    p_sweep.add_argument("--figure", action="append", metavar="KEY", help="a key figure to show, by its key (give "
                         "several; default outlet, min bulk, max inner-wall and max outer-surface temperature); "
                         "`calorun solve --json` lists the keys")
    p_sweep.add_argument("--target", action="append", metavar="KIND=VALUE", help=TARGET_HELP)
    p_sweep.add_argument("-o", "--output", metavar="table.csv", help="write the table as CSV (units in the header)")
    p_sweep.add_argument("--units", choices=("SI", "US"), default="SI", help="units of the output and of bare numbers "
                         "(default SI)")
    p_sweep.add_argument("--json", action="store_true", help="print machine-readable results (SI)")
    p_sweep.add_argument("--pick", metavar="VALUE", help="with --save-as: the swept value to make a new alternative of")
    p_sweep.add_argument("--pick2", metavar="VALUE", help="with --save-as on a grid: the second parameter's value")
    p_sweep.add_argument("--save-as", metavar="OUT.json", help="write the project with the picked variant added as a "
                         "new alternative that records the sweep (the report draws it)")

    p_batch = sub.add_parser(
        "batch", prog="calorun batch", help="Line List: design every line of a line list (CSV or XLSX) at once",
        description="Design every line of a line list: each row becomes a project on the template and is designed "
                    "(heater output, insulation where asked, checks, hold time) in parallel on this machine's cores "
                    "or on a Dask cluster. Writes OUTDIR/results.csv and results.xlsx (one row per line, in list "
                    "order), OUTDIR/summary.pdf and OUTDIR/lines/<tag>.json (a project per line, opens in the app). "
                    "A rerun skips the lines already designed with the same row and template.",
        epilog=BATCH_EXIT_CODES_HELP)
    p_batch.add_argument("line_list", metavar="LINELIST", help="the line list: .csv or .xlsx, one row per line")
    p_batch.add_argument("--template", required=True, metavar="T.json",
                         help="a project file that supplies what the list does not (pipe material, insulation, "
                              "heater kind, design margin, design cases, default fluid and flow)")
    p_batch.add_argument("-o", "--output", required=True, metavar="OUTDIR", help="folder for the results")
    p_batch.add_argument("--columns", metavar="MAP.json", help="a JSON object {\"their header\": \"our column\"} "
                         "for a list whose headers differ from ours")
    p_batch.add_argument("--workers", type=_workers, default=None, metavar="N",
                         help="worker processes on this machine (default: one per processor core)")
    p_batch.add_argument("--scheduler", metavar="ADDRESS", help="run on a running Dask distributed cluster at "
                         "this scheduler address (e.g. tcp://10.0.0.5:8786); needs the optional install "
                         "pip install \"calorun[cluster]\"")
    p_batch.add_argument("--pages", choices=("table", "per-line"), default="table",
                         help="the summary PDF after its portfolio page: one table of every line (default) or "
                              "one compact page per line")
    p_batch.add_argument("--units", choices=("SI", "US"), default="SI", help="units of the results (default SI)")
    p_batch.add_argument("--no-progress", action="store_true", help="no progress bar on stderr")

    for p in (p_solve, p_report, p_find, p_sweep, p_batch):
        _add_max_file_mb(p)

    sub.add_parser("schema", help="print the project file's JSON Schema")
    return parser


def full_help() -> str:
    """One help text for every use of ``calorun``: the commands, then the desktop app's options."""
    app_help = io.StringIO()
    with contextlib.redirect_stdout(app_help):
        try:
            _gui(["--help"])  # argparse prints the desktop app's options and exits before any Qt import
        except SystemExit:
            pass
    text = build_parser().format_help().rstrip()
    if app_help.getvalue().strip():
        text += "\n\ndesktop app (no COMMAND):\n" + textwrap.indent(app_help.getvalue().rstrip(), "  ")
    return text


def _megabytes(text: str) -> float:
    try:
        mb = float(text)
    except ValueError:
        mb = float("nan")
    if not (mb > 0 and mb != float("inf")):
        raise argparse.ArgumentTypeError(f"must be a number of megabytes above 0, got {text!r}")
    return mb


def _count(text: str) -> int:
    from solver.model import MAX_SWEEP_POINTS

    try:
        n = int(text)
    except ValueError:
        n = 0
    if not 2 <= n <= MAX_SWEEP_POINTS:
        raise argparse.ArgumentTypeError(f"must be a whole number from 2 to {MAX_SWEEP_POINTS:,}, got {text!r}")
    return n


def _workers(text: str) -> int:
    try:
        n = int(text)
    except ValueError:
        n = 0
    if not 1 <= n <= 1024:
        raise argparse.ArgumentTypeError(f"must be a whole number from 1 to 1,024, got {text!r}")
    return n


def _add_max_file_mb(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("--max-file-mb", type=_megabytes, default=None, metavar="MB",
                        help="open project files up to this size in MB (default 32, or the environment variable "
                             "CALORUN_MAX_FILE_MB)")


# --------------------------------------------------------------------------- GUI


def _gui(argv: list[str]) -> int:
    parser = argparse.ArgumentParser(prog="calorun", description="Design process heating and cooling lines.")
    parser.add_argument("file", nargs="?", help="project file to open (default: the bundled demo project)")
    parser.add_argument("--screenshot", metavar="OUT.png",
                        help="render the main window at 1600×1000 and exit (writes no settings, no Recent files entry)")
    _add_max_file_mb(parser)
    parser.add_argument("--units", choices=("SI", "US"), default=None,
                        help="display units for this run (default: the remembered ones; SI for --screenshot)")
    args = parser.parse_args(argv)
    if args.screenshot:
        import os

        os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
    if args.max_file_mb is not None:  # every file this run opens (the main window reads the variable)
        import os

        from solver.project_io import MAX_FILE_MB_VARIABLE

        os.environ[MAX_FILE_MB_VARIABLE] = repr(args.max_file_mb)
    from app.main_window import run

    return run(args.file, screenshot=args.screenshot, unit_system=args.units)


# --------------------------------------------------------------------------- headless


def _headless(argv: list[str]) -> int:
    args = build_parser().parse_args(argv)

    if args.command == "batch":
        return _batch(args)

    if args.command == "schema":
        from solver.model import Project

        print(json.dumps(Project.model_json_schema(), indent=2, ensure_ascii=False))
        return EXIT_OK

    from solver.errors import CalorunError, ProjectFileError
    from solver.project_io import load_project

    try:
        project = load_project(args.project, max_bytes=None if args.max_file_mb is None else int(args.max_file_mb * 1e6))
    except ProjectFileError as exc:
        summary, lines = project_problems(exc, args.units)
        print(f"calorun: {args.project}: {summary}", file=sys.stderr)
        for line in lines:
            print(f"  {line}", file=sys.stderr)
        return EXIT_INVALID

    if args.command in ("find", "sweep"):
        return _find(args, project) if args.command == "find" else _sweep(args, project)

    names = [a.name for a in project.alternatives]
    chosen = args.alternative or names
    unknown = [n for n in chosen if n not in names]
    if unknown:
        print(f"calorun: --alternative: no alternative named {unknown[0]!r}; the project has {names}", file=sys.stderr)
        return EXIT_INVALID

    from app.texts import shorten

    if args.command == "report":
        from app.report import BANDS_MAX_CELLS, unsolved, write_report

        outcomes: list = []
        try:
            out = write_report(project, args.output, unit_system=args.units, alternatives=chosen,
                               bands_max_cells=None if args.uncertainty else BANDS_MAX_CELLS,
                               outcomes_out=outcomes)
        except CalorunError as exc:
            print(f"calorun: {args.project}: {exc}", file=sys.stderr)
            return EXIT_SOLVER
        except OSError as exc:
            print(f"calorun: cannot write {args.output}: {exc}", file=sys.stderr)
            return EXIT_SOLVER
        except (ArithmeticError, ValueError) as exc:  # a numerical failure the solver did not word: no traceback
            print(f"calorun: {args.project}: the report could not be made: {type(exc).__name__}: {exc}", file=sys.stderr)
            return EXIT_SOLVER
        print(f"Report written: {out}")
        failed = unsolved(outcomes)
        for o in failed:
            print(f"calorun: {args.project}: alternative {shorten(o.alternative.name)!r} could not be solved: "
                  f"{shorten(o.error or '', 2000)}", file=sys.stderr)
        if failed:
            print(f"calorun: the report says which alternatives could not be solved and why "
                  f"({len(failed)} of {len(outcomes)})", file=sys.stderr)
            return EXIT_SOLVER
        return EXIT_OK

    from solver import solve
    from solver.results import CAUTIONS, CAUTIONS_BANNER

    results = []
    entries = []  # JSON entries in project order; a failed alternative carries its error
    failed = False
    for alt in project.alternatives:
        if alt.name not in chosen:
            continue
        try:
            r = solve(alt, design=project.design_cases)
            entry = r.to_dict()
            entry["design"] = r.design.to_dict()  # reads the Hold Time: a numerical fault there is caught too
        except (CalorunError, ArithmeticError, ValueError) as exc:  # the last two: a numerical failure not worded
            if isinstance(exc, CalorunError):
                message = str(exc)
            else:
                from app.texts import unexpected_failure

                message = unexpected_failure(exc)
            print(f"calorun: {args.project}: alternative {shorten(alt.name)!r} could not be solved: {message}",
                  file=sys.stderr)
            failed = True
            entries.append({"name": alt.name, "error": message})
            continue
        results.append(r)
        entries.append(entry)
        if args.uncertainty and args.json:
            from solver.uncertainty import line_bands

            entries[-1]["uncertainty"] = line_bands(alt, r).to_dict()
    if args.json:
        print(json.dumps({"project": project.name, "alternatives": entries, "cautions": list(CAUTIONS)}, indent=1))
    else:
        for r in results:
            print(key_figures_table(r, args.units, targets=project.targets))
            design = design_table(r, args.units)
            if design:
                print(design)
            print()
    if args.csv and results:
        from app.export import write_all_csv

        try:
            paths = write_all_csv(results, args.csv, unit_system=args.units)
        except OSError as exc:
            print(f"calorun: cannot write CSV into {args.csv}: {exc}", file=sys.stderr)
            return EXIT_SOLVER
        if not args.json:
            for path in paths:
                print(f"Profiles written: {path}")
    if not args.json and results:
        print(f"Cautions: {CAUTIONS_BANNER}")
    return EXIT_SOLVER if failed else EXIT_OK


# --------------------------------------------------------------------------- batch (line list)


def _batch(args) -> int:
    """``calorun batch``: design a line list (app.line_batch); a summary on stdout, what went wrong on stderr."""
    from app.line_batch import BatchRefused, run_batch
    from app.texts import shorten
    from solver.errors import ProjectFileError
    from solver.project_io import load_project

    try:
        template = load_project(args.template,
                                max_bytes=None if args.max_file_mb is None else int(args.max_file_mb * 1e6))
    except ProjectFileError as exc:
        summary, lines = project_problems(exc, args.units)
        print(f"calorun: --template: {args.template}: {summary}", file=sys.stderr)
        for line in lines:
            print(f"  {line}", file=sys.stderr)
        return EXIT_INVALID
    try:
        done = run_batch(args.line_list, template, args.output, columns=args.columns, workers=args.workers,
                         scheduler=args.scheduler, progress=not args.no_progress, system=args.units, pages=args.pages)
    except BatchRefused as exc:
        print(f"calorun: {exc}", file=sys.stderr)
        return EXIT_INVALID
    except OSError as exc:
        print(f"calorun: cannot write into {args.output}: {exc}", file=sys.stderr)
        return EXIT_SOLVER
    except KeyboardInterrupt:
        print(f"\ncalorun: stopped; the lines designed so far are kept in {args.output}: the same command "
              "continues where it stopped", file=sys.stderr)
        return EXIT_INTERRUPTED
    counts = ", ".join(f"{n} {verdict}" for verdict, n in done.counts.items() if n)
    print(f"{done.total} lines ({counts}): {done.designed} designed on {done.workers} in {done.elapsed_s:.1f} s"
          + (f", {done.reused} kept from an earlier run (same row and template)" if done.reused else ""))
    print(f"Results written: {done.results_csv}")
    print(f"Results written: {done.results_xlsx}")
    if done.summary_pdf is not None:
        print(f"Summary written: {done.summary_pdf}")
    else:
        print(f"calorun: no summary PDF: {done.pdf_note}", file=sys.stderr)
    print(f"Line projects: {done.out_dir / 'lines'}")
    shown = 20
    for row, tag, verdict, message in done.failing[:shown]:
        who = f"{shorten(tag)!r} (row {row})" if tag else f"row {row}"
        print(f"calorun: {who}: {verdict}: {shorten(message, 300)}", file=sys.stderr)
    if len(done.failing) > shown:
        print(f"calorun: … and {len(done.failing) - shown} more; the results list and the summary say which and why",
              file=sys.stderr)
    return EXIT_SOLVER if done.failing else EXIT_OK


# --------------------------------------------------------------------------- find and sweep


class _Refused(Exception):
    """A bad option value; the message names the option and the value (exit code 2)."""


def _search_alternative(project, name):
    if name is None:
        return project.baseline_alternative()
    for alt in project.alternatives:
        if alt.name == name:
            return alt
    raise _Refused(f"--alternative: no alternative named {name!r}; the project has {[a.name for a in project.alternatives]}")


def _parameter_option(text: str, alt, option: str):
    from solver.errors import InputError
    from solver.variants import parse_parameter

    try:
        return parse_parameter(text, alt)
    except InputError as exc:
        raise _Refused(f"{option}: {exc.reason}, got {text!r}") from None


def _target_options(texts) -> list:
    from solver.errors import CalorunError, InputError
    from solver.target_finder import parse_target

    targets = []
    for text in texts or ():
        try:
            targets.append(parse_target(text))
        except (CalorunError, ValueError) as exc:
            reason = exc.reason if isinstance(exc, InputError) else str(exc)
            raise _Refused(f"--target: cannot read {text!r}: {reason}") from None
    return targets


def _value_option(text: str, parameter, system: str, option: str):
    """A typed value in SI: a bare number in the parameter's display unit, a number with its unit, or a
    bore's NPS size (its table key, e.g. "1-1/2")."""
    import re

    from app.units import UnitParseError, parse
    from solver.errors import InputError

    if parameter.kind == "bore":
        from solver.catalogue import normalise_nps

        try:
            return normalise_nps(re.sub(r"^\s*nps\s*", "", text, flags=re.IGNORECASE).strip(), field=option)
        except InputError as exc:
            raise _Refused(f"{option}: {text!r} is not a nominal pipe size ({exc.reason})") from None
    try:
        return parse(text, parameter.quantity, system, field=option)
    except UnitParseError as exc:
        raise _Refused(str(exc)) from None


def _values_option(text: str, parameter, system: str, option: str) -> list:
    """Comma-separated values, in ascending order (sizes in the order of their list), each once."""
    values = [_value_option(part.strip(), parameter, system, option) for part in text.split(",") if part.strip()]
    if not values:
        raise _Refused(f"{option}: give at least one value, got {text!r}")
    if parameter.kind == "bore":
        from solver.catalogue import nps_sizes

        order = {nps: i for i, nps in enumerate(nps_sizes())}
        return sorted(set(values), key=lambda v: order.get(v, 0))
    return sorted(set(values))


def _range_options(parameter, alt, system: str, lower, upper, suffix: str = ""):
    """(low, high) in SI from --from/--to (each default the parameter's own range), checked low < high."""
    low, high = parameter.default_range(alt)
    if lower is not None:
        low = _value_option(lower, parameter, system, f"--from{suffix}")
    if upper is not None:
        high = _value_option(upper, parameter, system, f"--to{suffix}")
    if not low < high:
        from app.reporting.search import value_text

        raise _Refused(f"--from{suffix}/--to{suffix}: the first value must be below the last, got "
                       f"{value_text(parameter, low, system)} to {value_text(parameter, high, system)}")
    return low, high


def _sweep_values(parameter, alt, system: str, values, lower, upper, points: int, suffix: str = "") -> list:
    """The values a sweep solves: those given; for sizes, those on the list (between --from and --to when
    given); else ``points`` evenly spaced from --from to --to."""
    import numpy as np

    if values:
        return _values_option(values, parameter, system, f"--values{suffix}")
    if parameter.discrete:
        sizes = parameter.standard_values(alt)
        if parameter.kind == "bore":
            first = sizes.index(_value_option(lower, parameter, system, f"--from{suffix}")) if lower else 0
            last = sizes.index(_value_option(upper, parameter, system, f"--to{suffix}")) if upper else len(sizes) - 1
            chosen = sizes[first:last + 1]
        else:
            low, high = _range_options(parameter, alt, system, lower, upper, suffix)
            chosen = [v for v in sizes if low * (1 - 1e-9) <= v <= high * (1 + 1e-9)]
        if not chosen:
            raise _Refused(f"--from{suffix}/--to{suffix}: no standard size lies between {lower} and {upper}")
        return chosen
    low, high = _range_options(parameter, alt, system, lower, upper, suffix)
    return [float(v) for v in np.linspace(low, high, points)]


def _searched_words(parameter, values, system: str) -> str:
    from app.reporting.search import value_text

    if parameter.discrete:
        return (f"{len(values)} standard sizes from {value_text(parameter, values[0], system)} to "
                f"{value_text(parameter, values[-1], system)}")
    if len(values) == 1:
        return value_text(parameter, values[0], system)
    return (f"{len(values):,} values from {value_text(parameter, values[0], system)} to "
            f"{value_text(parameter, values[-1], system)}")


def _finite_or_none(figures):
    import math

    if not figures:
        return figures
    return {k: (v if not isinstance(v, float) or math.isfinite(v) else None) for k, v in figures.items()}


def _with_new_alternative(project, alt):
    """The project with ``alt`` added, named so no name repeats; validated again (the model's limits)."""
    from app.reporting.search import unique_name
    from solver.model import Project

    name = unique_name([a.name for a in project.alternatives], alt.name)
    data = project.model_dump()
    data["alternatives"].append({**alt.model_dump(), "name": name})
    return Project.model_validate(data), name


def _save_search(args, project, alt, record) -> tuple[int, str]:
    """Write the project with ``alt`` (carrying ``record``) added as a new alternative to --save-as; the exit
    code and the name it was given (made unique)."""
    from pydantic import ValidationError

    from solver.project_io import save_project
    from solver.safe_write import WriteRefused

    from solver.model import TEXT_MAX_CHARS

    how = "Found by the Target Finder" if record.tool == "Target Finder" else "Picked from a Sweep"
    words = (f"{how}, starting from “{record.base_alternative}”: {record.parameter_text or 'the parameter'} set to "
             f"{record.value_text}." + (f" The alternative it started from: {alt.description}" if alt.description else ""))
    try:
        new_project, name = _with_new_alternative(
            project, alt.model_copy(update={"origin": record, "description": words[:TEXT_MAX_CHARS]}))
    except ValidationError as exc:
        print(f"calorun: --save-as: the new alternative cannot be added: {exc.errors()[0].get('msg', exc)}",
              file=sys.stderr)
        return EXIT_SOLVER, ""
    try:
        save_project(new_project, args.save_as)
    except (WriteRefused, OSError) as exc:
        print(f"calorun: cannot write {args.save_as}: {exc}", file=sys.stderr)
        return EXIT_SOLVER, ""
    if not args.json:
        print(f"New alternative {name!r} (with how it was found) written to {args.save_as}")
    return EXIT_OK, name


def _wrapped(label: str, text: str, width: int = 12) -> list[str]:
    lines = textwrap.wrap(text, 100 - width - 4) or [""]
    return [f"  {label.ljust(width)}{lines[0]}", *(f"  {' ' * width}{line}" for line in lines[1:])]


def _find(args, project) -> int:
    """``calorun find``: the Target Finder on one alternative; exit 1 when no value meets the targets."""
    from app import units
    from app.reporting.search import margin_text, target_words, value_text
    from solver.errors import CalorunError, InputError
    from solver.model import SearchRecord
    from solver.results import CAUTIONS, CAUTIONS_BANNER

    system = args.units
    try:
        alt = _search_alternative(project, args.alternative)
        parameter = _parameter_option(args.vary, alt, "--vary")
        targets = _target_options(args.target)
        lower = _value_option(args.lower, parameter, system, "--from") if args.lower is not None else None
        upper = _value_option(args.upper, parameter, system, "--to") if args.upper is not None else None
        values = _values_option(args.values, parameter, system, "--values") if args.values else None
        if lower is not None and upper is not None and not parameter.discrete and not lower < upper:
            raise _Refused(f"--from/--to: the first value must be below the last, got {args.lower!r} to {args.upper!r}")
        if parameter.kind == "bore" and (lower is not None or upper is not None):  # sizes are texts: trim the list
            values = _sweep_values(parameter, alt, system, args.values, args.lower, args.upper, 2)
            lower = upper = None
    except _Refused as exc:
        print(f"calorun: {exc}", file=sys.stderr)
        return EXIT_INVALID

    from solver.target_finder import find

    design = project.design_cases  # find solves the design cases only for the targets that need them
    try:
        found = find(alt, parameter, targets, lower=lower, upper=upper, design=design, values=values,
                     system=system, formatter=units.search_words)
    except InputError as exc:
        print(f"calorun: {args.project}: {exc}", file=sys.stderr)
        return EXIT_INVALID
    except CalorunError as exc:
        print(f"calorun: {args.project}: the search stopped: {exc}", file=sys.stderr)
        return EXIT_SOLVER

    from solver.target_finder import figures_of

    figures = figures_of(found.result) if found.result is not None else found.key_figures  # design figures too
    margins = {target_words(t, system): (t.margin(figures) if figures else None) for t in targets}
    binding = target_words(found.binding, system) if found.binding is not None else ""
    shown = value_text(parameter, found.value, system) if found.feasible and found.value is not None else ""
    out: dict = {}  # the JSON answer (with --json)
    if args.json:
        out = {
            "project": project.name, "alternative": alt.name, "parameter": parameter.to_dict(),
            "parameter_text": parameter.label(alt), "searched": found.searched,
            "targets": [{**t.to_dict(), "text": target_words(t, system)} for t in targets],
            "feasible": bool(found.feasible), "value": found.value if found.feasible else None, "value_text": shown,
            "binding": binding or None, "margins": _finite_or_none(margins), "key_figures": _finite_or_none(figures),
            "explanation": found.explanation, "evaluations": found.evaluations,
            "saved_as": None, "cautions": list(CAUTIONS),
        }
    else:
        print(f"Target Finder — alternative {alt.name!r}")
        for line in (_wrapped("Varied", parameter.label(alt)) + _wrapped("Searched", found.searched)
                     + _wrapped("Targets", "; ".join(margins))):
            print(line)
    if not found.feasible:
        if args.json:
            print(json.dumps(out, indent=1))
        else:
            print("  No value meets every target.")
            for line in _wrapped("Why", found.explanation):
                print(line)
        print(f"calorun: no value of {parameter.label(alt)} meets every target"
              + (f" (nothing written to {args.save_as})" if args.save_as else ""), file=sys.stderr)
        return EXIT_SOLVER

    if not args.json:
        for line in (_wrapped("Found", f"{shown}  ({found.evaluations} solves)") + _wrapped("Binding", binding or "—")):
            print(line)
        for i, (text, margin) in enumerate(margins.items()):
            label = "Margins" if i == 0 else ""
            print(f"  {label.ljust(12)}{margin_text(_target_by_text(targets, text, system), margin, system).ljust(10)}"
                  f"  {text}")
        for line in _wrapped("", found.explanation):
            print(line)
        print()
        if found.result is not None:
            print(key_figures_table(found.result, system, targets=project.targets))
            print()
    code = EXIT_OK
    if args.save_as:
        record = SearchRecord.model_validate(found.record())
        code = _save_and_close(args, project, found.alternative, record, out, code)
    return _close(args, out, code)


def _target_by_text(targets, text: str, system: str):
    from app.reporting.search import target_words

    return next((t for t in targets if target_words(t, system) == text), None)


def _sweep(args, project) -> int:
    """``calorun sweep``: one parameter over a range (two as a grid); a table, CSV or JSON; a pick saved."""
    from app.reporting.search import (
        DEFAULT_FIGURES,
        feasible_words,
        meets_all,
        sweep_record,
        target_figure,
        target_words,
        value_text,
    )
    from solver.model import MAX_SWEEP_POINTS
    from solver.results import CAUTIONS, CAUTIONS_BANNER, KEY_FIGURE_BY_KEY
    from solver.target_finder import DESIGN_FIGURE_LABELS, figures_of

    from app.texts import shorten

    system = args.units
    try:
        alt = _search_alternative(project, args.alternative)
        parameter = _parameter_option(args.vary, alt, "--vary")
        parameter2 = _parameter_option(args.vary2, alt, "--vary2") if args.vary2 else None
        if parameter2 is None and any(v is not None for v in (args.from2, args.to2, args.values2, args.pick2)):
            raise _Refused("--from2/--to2/--values2/--pick2: give the second parameter with --vary2 first")
        targets = _target_options(args.target)
        figures = list(dict.fromkeys(args.figure or DEFAULT_FIGURES))
        for key in figures:
            if key not in KEY_FIGURE_BY_KEY and key not in DESIGN_FIGURE_LABELS:
                raise _Refused(f"--figure: no key figure {key!r}; the keys are "
                               f"{', '.join([*KEY_FIGURE_BY_KEY, *DESIGN_FIGURE_LABELS])}")
        values = _sweep_values(parameter, alt, system, args.values, args.lower, args.upper, args.points)
        values2 = (_sweep_values(parameter2, alt, system, args.values2, args.from2, args.to2, args.points2, "2")
                   if parameter2 is not None else None)
        total = len(values) * (len(values2) if values2 else 1)
        if total > MAX_SWEEP_POINTS:
            raise _Refused(f"--points/--points2: at most {MAX_SWEEP_POINTS:,} variants in one sweep, got {total:,}")
        if (args.pick is not None or args.pick2 is not None) and not args.save_as:
            raise _Refused("--pick: give --save-as OUT.json too (the picked variant becomes a new alternative there)")
        if args.save_as and args.pick is None:
            raise _Refused("--save-as: give --pick VALUE too (the swept value to make a new alternative of)")
        if args.save_as and parameter2 is not None and args.pick2 is None:
            raise _Refused("--save-as: a grid sweep needs --pick2 VALUE too")
        pick = _value_option(args.pick, parameter, system, "--pick") if args.pick is not None else None
        pick2 = _value_option(args.pick2, parameter2, system, "--pick2") if args.pick2 is not None else None
    except _Refused as exc:
        print(f"calorun: {exc}", file=sys.stderr)
        return EXIT_INVALID

    from solver.errors import CalorunError
    from solver.sweep import sweep, sweep_csv

    needs_design = any(t.needs_design for t in targets) or any(k in DESIGN_FIGURE_LABELS for k in figures)
    design = project.design_cases if needs_design else None  # the design cases cost several solves per variant
    show_progress = sys.stderr.isatty() and not args.json
    variants: list = []
    try:
        for chunk in sweep(alt, parameter, values, parameter2=parameter2, values2=values2, design=design):
            variants.extend(chunk)
            if show_progress:
                print(f"\rSolving: {len(variants):,} of {total:,} variants", end="", file=sys.stderr, flush=True)
    except CalorunError as exc:
        print(f"calorun: {args.project}: the sweep stopped: {exc}", file=sys.stderr)
        return EXIT_SOLVER
    finally:
        if show_progress:
            print("\r" + " " * 48 + "\r", end="", file=sys.stderr, flush=True)

    solved = [v for v in variants if v.outcome.ok]
    met = [meets_all(targets, figures_of(v)) if targets else None for v in variants]
    shown_keys = list(dict.fromkeys([*figures, *(target_figure(t) for t in targets if target_figure(t))]))

    def words(p, x):
        return value_text(p, x, system)

    bands = []
    if targets:
        if parameter2 is None:
            bands.append(feasible_words([v.value for v in variants], met, lambda x: words(parameter, x)))
        else:
            for w in values2:
                rows = [(v.value, m) for v, m in zip(variants, met) if v.value2 == w]
                bands.append(f"with {words(parameter2, w)}: "
                             + feasible_words([r[0] for r in rows], [r[1] for r in rows], lambda x: words(parameter, x)))

    code = EXIT_OK
    if args.output:
        from solver.safe_write import WriteRefused, atomic_write_text

        try:
            from app.units import unit

            atomic_write_text(args.output, sweep_csv(variants, parameter, figures, system=system, parameter2=parameter2,
                                                     unit_of=unit))
        except (WriteRefused, OSError) as exc:
            print(f"calorun: cannot write {args.output}: {exc}", file=sys.stderr)
            code = EXIT_SOLVER
    out: dict = {}  # the JSON answer (with --json)
    if args.json:
        out = {
            "project": project.name, "alternative": alt.name,
            "parameter": parameter.to_dict(), "parameter_text": parameter.label(alt),
            "parameter2": parameter2.to_dict() if parameter2 is not None else None,
            "parameter2_text": parameter2.label(alt) if parameter2 is not None else None,
            "targets": [{**t.to_dict(), "text": target_words(t, system)} for t in targets],
            "figures": shown_keys,
            "points": [{"value": v.value, "value2": v.value2,
                        "key_figures": _finite_or_none({k: (figures_of(v) or {}).get(k) for k in shown_keys})
                        if v.outcome.ok else None,
                        "meets_targets": m, "error": None if v.outcome.ok else str(v.outcome.error)}
                       for v, m in zip(variants, met)],
            "feasible": bands, "saved_as": None, "cautions": list(CAUTIONS),
        }
    else:
        print(f"Sweep — alternative {alt.name!r}")
        for line in _wrapped("Varied", parameter.label(alt) + (f"; {parameter2.label(alt)}" if parameter2 else "")):
            print(line)
        searched = _searched_words(parameter, values, system)
        if parameter2 is not None:
            searched += f" × {_searched_words(parameter2, values2, system)}"
        for line in _wrapped("Searched", searched):
            print(line)
        if targets:
            for line in _wrapped("Targets", "; ".join(target_words(t, system) for t in targets)):
                print(line)
        if not args.output:
            print(_sweep_table(variants, met, parameter, parameter2, figures, system, bool(targets)))
        else:
            print(f"Table written: {args.output} ({len(variants):,} rows)")
        for band in bands:
            for line in _wrapped("Feasible", band[:1].upper() + band[1:] + "."):
                print(line)
        failed = len(variants) - len(solved)
        if failed:
            first = next(v for v in variants if not v.outcome.ok)
            print(f"  {failed:,} of {len(variants):,} variants could not be solved; the first "
                  f"({words(parameter, first.value)}): {shorten(str(first.outcome.error), 300)}")
    if not solved:
        print(f"calorun: {args.project}: no variant of the sweep could be solved", file=sys.stderr)
        if args.json:
            print(json.dumps(out, indent=1))
        return EXIT_SOLVER

    if args.save_as:
        from app.reporting.search import _same

        picked = next((v for v in variants if _same(v.value, pick) and (parameter2 is None or _same(v.value2, pick2))),
                      None)
        if picked is None:
            offered = ", ".join(words(parameter, v) for v in values[:12]) + (", …" if len(values) > 12 else "")
            print(f"calorun: --pick: the sweep has no variant at {args.pick!r}"
                  + (f" and {args.pick2!r}" if parameter2 is not None else "") + f"; its values are {offered}",
                  file=sys.stderr)
            return EXIT_INVALID
        if not picked.outcome.ok or picked.alternative is None:
            print(f"calorun: --pick: the variant at {args.pick!r} could not be solved: {picked.outcome.error}",
                  file=sys.stderr)
            return EXIT_SOLVER
        searched = _searched_words(parameter, values, system)
        if parameter2 is not None:
            searched += f" × {parameter2.label(alt)}: {_searched_words(parameter2, values2, system)}"
        record = sweep_record(alt, parameter, variants, targets=targets, pick=picked.value, pick2=picked.value2,
                              figures=figures, searched=searched, system=system, parameter2=parameter2)
        from solver.target_finder import answer_name

        name = answer_name(alt, parameter, picked.value)  # named after what changed, as the finder names
        if parameter2 is not None:
            name = f"{name}, {answer_name(alt, parameter2, picked.value2).rpartition(' — ')[2]}"
        new_alt = picked.alternative.model_copy(update={"name": name[:200]})
        code = _save_and_close(args, project, new_alt, record, out, code)
    return _close(args, out, code)


def _save_and_close(args, project, alt, record, out: dict, code: int) -> int:
    """Write ``alt`` (with its search record) into ``--save-as``; the exit code after it."""
    saved, name = _save_search(args, project, alt, record)
    if args.json and saved == EXIT_OK:
        out["saved_as"] = {"path": args.save_as, "alternative": name}
    return code if saved == EXIT_OK else saved


def _close(args, out: dict, code: int) -> int:
    """The end of a search's output: the JSON, or the cautions under the words."""
    from solver.results import CAUTIONS_BANNER

    if args.json:
        print(json.dumps(out, indent=1))
    else:
        print(f"Cautions: {CAUTIONS_BANNER}")
    return code


#: Short column heads of the sweep table for the figures most swept (the label otherwise).
_SHORT_HEADS = {
    "outlet_temperature_K": "Outlet", "min_bulk_temperature_K": "Min bulk",
    "max_inner_wall_temperature_K": "Max inner wall", "max_outer_surface_temperature_K": "Max surface",
    "pressure_drop_Pa": "Pressure drop", "max_heat_loss_per_length_W_per_m": "Max loss per m",
    "heat_input_W": "Heat input", "heat_loss_W": "Heat loss", "duty_W": "Heat to fluid",
    "worst_case_min_bulk_temperature_K": "Worst-case bulk", "hold_time_s": "Hold time",
}


def _sweep_table(variants, met, parameter, parameter2, figures, system: str, with_targets: bool) -> str:
    """The sweep as a text table: the value(s), the chosen figures (one unit per column, under its head),
    and whether the row meets every target."""
    from app.reporting.search import number_text
    from app.units import display_unit_for, format_value, label
    from solver.sweep import figure_label
    from solver.target_finder import figures_of

    specs = [(key, *figure_label(key)) for key in figures]
    values = [figures_of(v) if v.outcome.ok else None for v in variants]
    column_units = [display_unit_for([f.get(key) for f in values if f], quantity, system) if quantity != "time"
                    else None for key, _, quantity in specs]
    heads = [(_kind_words(parameter), f"[{label(parameter.quantity, system)}]" if parameter.quantity else "[NPS]")]
    if parameter2 is not None:
        heads.append((_kind_words(parameter2),
                      f"[{label(parameter2.quantity, system)}]" if parameter2.quantity else "[NPS]"))
    heads += [(_SHORT_HEADS.get(key, name), f"[{u.label}]" if u is not None and u.label else "")
              for (key, name, _), u in zip(specs, column_units)]
    if with_targets:
        heads.append(("Targets", ""))

    def bare(p, x):
        return str(x) if p.kind == "bore" else number_text(x, p.quantity, system)

    def cell(value, quantity, u):
        if quantity == "time":
            from app.design_figures import duration_text

            return duration_text(value) if value is not None else "—"
        return format_value(value, quantity, system, display_unit=u, with_unit=False)

    rows = []
    for v, figs, ok in zip(variants, values, met):
        row = [bare(parameter, v.value)]
        if parameter2 is not None:
            row.append(bare(parameter2, v.value2))
        if figs is not None:
            row += [cell(figs.get(key), quantity, u) for (key, _, quantity), u in zip(specs, column_units)]
            if with_targets:
                row.append("\u2713 all met" if ok else "\u2717 missed")
        else:
            row += ["not solved"] + [""] * (len(specs) - 1)
            if with_targets:
                row.append("—")
        rows.append(row)
    table = [[h[0] for h in heads], [h[1] for h in heads], *rows]
    widths = [max(len(r[i]) for r in table) for i in range(len(heads))]
    lines = []
    for r in table:
        cells = [c.ljust(w) if with_targets and i == len(r) - 1 else c.rjust(w)
                 for i, (c, w) in enumerate(zip(r, widths))]
        lines.append("  " + "  ".join(cells).rstrip())
    return "\n".join(lines)


def _kind_words(parameter) -> str:
    from solver.variants import PARAMETER_KINDS

    return PARAMETER_KINDS.get(parameter.kind, parameter.kind)


def project_problems(exc, system: str = "SI") -> tuple[str, list[str]]:
    """A summary and each problem of an unreadable project: its file path, then what is wrong.

    ``"alternatives[0].segments[2].length_m — Length must be more than 0 m; you entered −5 m"``, in
    the user's words and ``system``'s units. The validation error the file loader turned into
    ``exc`` is its context; without one (not JSON, a newer version) the loader's own lines are used.
    """
    from pydantic import ValidationError

    cause = exc.__cause__ or exc.__context__
    if isinstance(cause, ValidationError):
        from app.messages import plural, problems

        found = problems(cause, system)
        lines = [f"{path} — {message}" if path else message for path, message in found]
        return f"Invalid project: {plural(len(found), 'problem')}", lines
    return exc.summary, [f"{path}: {message}" if path else message for path, message in exc.problems]


def key_figures_table(result, system: str = "SI", targets=None) -> str:
    """The key figures of one result as a text table in ``system``, its verdict and its checks.

    Rows are :data:`solver.results.KEY_FIGURES` with their labels, in the one number format of
    :mod:`app.units`; the checks come worst first, in flow order (``check_sort_key``).
    """
    from app.comparison import design_verdict
    from app.messages import plural
    from app.texts import key_figure_label_and_value
    from app.units import check_message, format_value
    from solver.results import KEY_FIGURES, check_sort_key

    figures = result.key_figures()
    rows = []
    for spec in KEY_FIGURES:
        label, value = key_figure_label_and_value(spec, figures, system, indent="  ")
        if spec.inlet_key and value != "—":
            value += f"  (inlet {format_value(figures.get(spec.inlet_key), spec.quantity, system)})"
        rows.append((label, value))
    width = max(len(k) for k, _ in rows)
    lines = [f"== {result.name} — {result.fluid_label} ==", *(f"  {k.ljust(width)}  {v}" for k, v in rows)]
    lines.append(f"  {'Verdict'.ljust(width)}  {design_verdict(targets, result).text()}")
    counts = result.check_counts()
    words = {"danger": ("danger", ""), "warning": ("warning", ""), "info": ("info", "info")}
    summary = ", ".join(plural(n, *words.get(sev, (sev, ""))) for sev, n in counts.items() if n)
    lines.append(f"  Checks: {summary}" if summary else "  Checks: none")
    for c in sorted(result.checks, key=check_sort_key):
        where = []
        if c.segment is not None:
            name = result.segments[c.segment].name if 0 <= c.segment < len(result.segments) else ""
            where.append(f"segment {c.segment + 1}" + (f" '{name}'" if name else ""))
        if c.x_m is not None:
            where.append(f"x = {format_value(c.x_m, 'length', system)}")
        at = f" ({', '.join(where)})" if where else ""
        lines.append(f"    {c.severity.upper():7s} {check_message(c, system)}{at} [{c.code}]")
    return "\n".join(lines)


def design_table(result, system: str = "SI") -> str:
    """The design cases of one result (``result.design``) as a short text table, one row per segment.

    Per segment: heat loss per metre operating (heat sinks included) and worst case (the pipe held at the
    maintain temperature, without sinks or margin), the heat sinks, the heater and what it delivered
    operating, the tracing need with its verdict, the time after a power failure to the maintain
    temperature and to freezing, and the hot case's highest wall temperature. '' without design cases.
    """
    from app.design_figures import duration_text, formatter
    from app.units import format_value, label

    d = result.design
    if d is None:
        return ""
    cases = d.cases
    t = lambda v: format_value(v, "temperature", system)  # noqa: E731
    q = lambda v: format_value(v, "power_per_length", system, digits=3, with_unit=False)  # noqa: E731
    tc = lambda v: format_value(v, "temperature", system, with_unit=False)  # noqa: E731
    Q, T = label("power_per_length", system), label("temperature", system)
    worst = (f"air {t(cases.worst_air_temperature_K)}, wind {format_value(cases.worst_wind_speed_m_per_s, 'velocity', system, digits=3)}"
             + (", no flow" if d.worst_no_flow else ", flowing"))
    lines = [f"  Design cases: worst case {worst}; hot case still air {t(cases.hot_air_temperature_K)}, no flow, "
             "heaters full on (the site's meteorological data and the owner's specification decide them)"]
    if d.maintain_temperature_K is not None:
        lines.append(f"  Maintain {t(d.maintain_temperature_K)} ({d.maintain_basis})"
                     + (f"; freezing point {t(d.freezing_point_K)}" if d.freezing_point_K is not None else ""))
    if d.worst_case_error:
        lines.append(f"  Worst case (flowing) has no solution: {d.worst_case_error}")
    hold = d.hold_time
    by_index = {h.index: h for h in hold.segments} if hold is not None else {}
    words = formatter(system)
    header = ("#", "Segment", f"Loss op. [{Q}]", f"Loss worst [{Q}]", f"Sinks [{Q}]", "Heater", f"Delivers [{Q}]",
              "Tracing need (worst case, margin included)", "Power off: to limit", "to freezing", f"Hot wall [{T}]")
    rows = []
    for s in d.segments:
        span = result.segments[s.index] if s.index < len(result.segments) else None
        h = by_index.get(s.index)
        kind = s.heater_kind.replace("_", "-") if s.heater_kind != "none" else "none"
        rows.append((
            str(s.index + 1), s.name[:24],
            q(span.heat_loss_W_per_m) if span is not None else "—",
            q(s.heat_loss_W_per_m), q(s.heat_sinks_W_per_m), kind,
            q(span.heater_output_W_per_m) if span is not None and s.heater_kind != "none" else "—",
            d.tracing_words(s.index, words),
            duration_text(h.to_limit_off_s) if h is not None else "—",
            duration_text(h.to_freezing_off_s) if h is not None else "—",
            tc(s.hot_wall_temperature_K),
        ))
    widths = [max(len(r[i]) for r in [header, *rows]) for i in range(len(header))]
    for r in [header, *rows]:
        lines.append("  " + "  ".join(c.ljust(w) for c, w in zip(r, widths)).rstrip())
    lines.append("  Loss op.: operating, heat sinks included; loss worst and sinks: worst case at the maintain "
                 "temperature, before the margin; the need adds the margin. Hot wall: the pipe under the heater; "
                 "the heater's own sheath runs hotter (the maker's data and the hazardous-area standard decide).")
    if hold is not None:
        lines.extend(f"  Hold Time: {w}" for w in hold.warnings)
    return "\n".join(lines)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
