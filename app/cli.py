"""The ``calorun`` command.

    calorun [FILE]                         open the desktop app (the demo project when no file)
    calorun --screenshot OUT.png [FILE]    render the main window offscreen and exit
    calorun solve PROJECT.json [--json [--uncertainty]] [--csv DIR] [--units SI|US] [--alternative NAME ...]
    calorun report PROJECT.json -o summary.pdf [--alternative NAME ...] [--units SI|US] [--uncertainty]
    calorun schema                         print the project file's JSON Schema
    calorun --help                         all of the above; ``calorun COMMAND --help`` for one

``solve`` and ``schema`` never import Qt. Exit codes (:data:`EXIT_CODES_HELP`): 0 every alternative
solved (and the report written), 1 an alternative could not be solved — ``report`` still writes the
PDF, which says which and why — or an output could not be written, 2 an invalid project or command
line. Messages go to stderr in plain words, never a traceback.
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

EXIT_CODES_HELP = (
    "exit codes: 0 every alternative solved (and the report written); 1 an alternative could not be "
    "solved (`report` still writes the PDF, which says which and why) or an output could not be written; "
    "2 an invalid project file or command line. Messages go to stderr."
)

SUBCOMMANDS = ("solve", "report", "schema")
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
    for p in (p_solve, p_report):
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
