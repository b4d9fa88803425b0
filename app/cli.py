"""The ``calorun`` command.

    calorun [FILE]                         open the desktop app (the demo project when no file)
    calorun --screenshot OUT.png [FILE]    render the main window offscreen and exit
    calorun solve PROJECT.json [--json] [--csv DIR] [--units SI|US] [--alternative NAME ...]
    calorun report PROJECT.json -o summary.pdf [--alternative NAME ...] [--units SI|US]
    calorun schema                         print the project file's JSON Schema

``solve`` and ``schema`` never import Qt. Exit codes: 0 solved, 1 a solver
failure (plain message on stderr), 2 an invalid project or command line.
"""

from __future__ import annotations

import argparse
import json
import sys

EXIT_OK = 0
EXIT_SOLVER = 1
EXIT_INVALID = 2

SUBCOMMANDS = ("solve", "report", "schema")


def main(argv: list[str] | None = None) -> int:
    argv = list(sys.argv[1:] if argv is None else argv)
    if argv and argv[0] in SUBCOMMANDS:
        try:
            return _headless(argv)
        except BrokenPipeError:  # output piped into `head` and the like: stop quietly
            import os

            os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
            return EXIT_OK
    return _gui(argv)


# --------------------------------------------------------------------------- GUI


def _gui(argv: list[str]) -> int:
    parser = argparse.ArgumentParser(prog="calorun", description="Design process heating and cooling lines.")
    parser.add_argument("file", nargs="?", help="project file to open (default: the bundled demo project)")
    parser.add_argument("--screenshot", metavar="OUT.png", help="render the main window at 1600×1000 and exit")
    args = parser.parse_args(argv)
    if args.screenshot:
        import os

        os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
    from app.main_window import run

    return run(args.file, screenshot=args.screenshot)


# --------------------------------------------------------------------------- headless


def _headless(argv: list[str]) -> int:
    parser = argparse.ArgumentParser(prog="calorun")
    sub = parser.add_subparsers(dest="command", required=True)

    p_solve = sub.add_parser("solve", help="solve a project and print key figures")
    p_solve.add_argument("project")
    p_solve.add_argument("--json", action="store_true", help="print machine-readable results (SI)")
    p_solve.add_argument("--csv", metavar="DIR", help="write the profiles of each alternative as CSV into DIR")
    p_solve.add_argument("--units", choices=("SI", "US"), default="SI", help="units of the table and CSV (default SI)")
    p_solve.add_argument("--alternative", action="append", metavar="NAME", help="solve only these alternatives")

    p_report = sub.add_parser("report", help="write the summary report (PDF)")
    p_report.add_argument("project")
    p_report.add_argument("-o", "--output", required=True, metavar="summary.pdf")
    p_report.add_argument("--units", choices=("SI", "US"), default="SI")
    p_report.add_argument("--alternative", action="append", metavar="NAME")

    sub.add_parser("schema", help="print the project file's JSON Schema")
    args = parser.parse_args(argv)

    if args.command == "schema":
        from solver.model import Project

        print(json.dumps(Project.model_json_schema(), indent=2, ensure_ascii=False))
        return EXIT_OK

    from solver.errors import CalorunError, ProjectFileError
    from solver.project_io import load_project

    try:
        project = load_project(args.project)
    except ProjectFileError as exc:
        print(f"calorun: {args.project}: {exc.summary}", file=sys.stderr)
        for path, msg in exc.problems:
            print(f"  {path}: {msg}" if path else f"  {msg}", file=sys.stderr)
        return EXIT_INVALID

    names = [a.name for a in project.alternatives]
    chosen = args.alternative or names
    unknown = [n for n in chosen if n not in names]
    if unknown:
        print(f"calorun: --alternative: no alternative named {unknown[0]!r}; the project has {names}", file=sys.stderr)
        return EXIT_INVALID

    if args.command == "report":
        try:
            from app.report import write_report

            out = write_report(project, args.output, unit_system=args.units, alternatives=chosen)
        except CalorunError as exc:
            print(f"calorun: {exc}", file=sys.stderr)
            return EXIT_SOLVER
        except OSError as exc:
            print(f"calorun: cannot write {args.output}: {exc}", file=sys.stderr)
            return EXIT_SOLVER
        print(f"Report written: {out}")
        return EXIT_OK

    from solver import solve

    results = []
    entries = []  # JSON entries in project order; a failed alternative carries its error
    failed = False
    for alt in project.alternatives:
        if alt.name not in chosen:
            continue
        try:
            r = solve(alt)
        except CalorunError as exc:
            print(f"calorun: {args.project}: {exc}", file=sys.stderr)
            failed = True
            entries.append({"name": alt.name, "error": str(exc)})
            continue
        results.append(r)
        entries.append(r.to_dict())
    if args.json:
        print(json.dumps({"project": project.name, "alternatives": entries}, indent=1))
    else:
        for r in results:
            print(key_figures_table(r, args.units))
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
    return EXIT_SOLVER if failed else EXIT_OK


def key_figures_table(result, system: str = "SI") -> str:
    """A readable table of the key figures of one result, with units."""
    from app.units import check_message, format_value as fv

    rows = [
        ("Fluid", result.fluid_label),
        ("Mass flow", fv(result.mass_flow_kg_per_s, "mass_flow", system)),
        ("Inlet temperature", fv(result.inlet_temperature_K, "temperature", system)),
        ("Outlet temperature", fv(result.outlet_temperature_K, "temperature", system)),
        ("Inlet pressure", fv(result.inlet_pressure_Pa, "pressure", system)),
        ("Outlet pressure", fv(result.outlet_pressure_Pa, "pressure", system)),
        ("Pressure drop", fv(result.pressure_drop_Pa, "pressure_difference", system)),
        ("  friction", fv(result.pressure_drop.friction_Pa, "pressure_difference", system)),
        ("  fittings", fv(result.pressure_drop.fittings_Pa, "pressure_difference", system)),
        ("  elevation", fv(result.pressure_drop.elevation_Pa, "pressure_difference", system)),
        ("  acceleration", fv(result.pressure_drop.acceleration_Pa, "pressure_difference", system)),
        ("Duty to fluid", fv(result.duty_W, "power", system)),
        ("Heat input", fv(result.heat_input_W, "power", system)),
        ("  tracing", fv(result.heat_input_tracing_W, "power", system)),
        ("  jackets and heated walls", fv(result.heat_input_media_W, "power", system)),
        (("Heat loss to surroundings", fv(result.heat_loss_W, "power", system)) if result.heat_loss_W >= 0 else
         ("Heat gained from surroundings", fv(-result.heat_loss_W, "power", system))),
        ("Energy-balance residual", f"{result.energy_balance_residual_W:.2e} W"),
        ("Max inner-wall temperature",
         f"{fv(result.max_inner_wall_temperature_K, 'temperature', system)} at {fv(result.max_inner_wall_position_m, 'length', system)}"),
        ("Min inner-wall temperature",
         f"{fv(result.min_inner_wall_temperature_K, 'temperature', system)} at {fv(result.min_inner_wall_position_m, 'length', system)}"),
        ("Max outer-surface temperature (in air)",
         f"{fv(result.max_outer_surface_temperature_K, 'temperature', system)}"
         + (f" at {fv(result.max_outer_surface_position_m, 'length', system)}"
            if result.max_outer_surface_position_m == result.max_outer_surface_position_m else "")),
        ("Min outer-surface temperature (in air)",
         f"{fv(result.min_outer_surface_temperature_K, 'temperature', system)}"
         + (f" at {fv(result.min_outer_surface_position_m, 'length', system)}"
            if result.min_outer_surface_position_m == result.min_outer_surface_position_m else "")),
        ("Velocity", f"{fv(result.velocity_range_m_per_s[0], 'velocity', system, with_unit=False)} – "
                     f"{fv(result.velocity_range_m_per_s[1], 'velocity', system)}"),
        ("Reynolds number", f"{result.reynolds_range[0]:,.0f} – {result.reynolds_range[1]:,.0f}"),
        ("Hydraulic power (flow × Δp)", fv(result.pump_power_W, "power", system)),
        ("Residence time", f"{result.residence_time_s:,.1f} s"),
    ]
    width = max(len(k) for k, _ in rows)
    lines = [f"== {result.name} ==", *(f"  {k.ljust(width)}  {v}" for k, v in rows)]
    if result.checks:
        lines.append("  Checks:")
        for c in result.checks:
            where = f" [segment {c.segment + 1}" if c.segment is not None else " ["
            where += f", x = {fv(c.x_m, 'length', system)}]" if c.x_m is not None else "]"
            lines.append(f"    {c.severity.upper():7s} {c.code}: {check_message(c, system)}{where}")
    else:
        lines.append("  Checks: none")
    return "\n".join(lines)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
