"""The ``rheoline`` command line.

Commands::

    rheoline run FILE [--out DIR] [--json [--pretty]] [--force] [--sort COLUMN] [--reach FLOW]
                                                       solve a scenario file, print the table
    rheoline check FILE                                validate a scenario file, solve nothing
    rheoline fluids                                    the fluid library and its sources
    rheoline parts [--kind KIND]                       the part catalogue and its sources
    rheoline fields                                    every scenario-file field, unit and range
    rheoline demo [--out DIR] [--json] [--force] ...   the built-in demo (invented cart review)
    rheoline examples [NAME]                           list the shipped example files, or print one
    rheoline validate [--out DIR]                      compare the models with packaged measurements

Exit status: 0 on success, 2 on bad input (one line on stderr, no traceback), 1 on an
internal fault, 3 when ``validate`` finds a model outside its stated accuracy.  Every
printed result carries :data:`rheoline.CAUTION`.
"""

from __future__ import annotations

import argparse
import contextlib
import gc
import json
import sys
import textwrap
import warnings

from rheoline.cli_tables import (
    BadUsage,
    chosen,
    columns_option,
    fitting,
    frame_text,
    printable,
    width_option,
)
from rheoline.errors import RheolineError
from rheoline.scenario.interrupts import PackInterrupted, interrupt_guard
from rheoline.units import FLOW_UNITS

__all__ = ["main", "build_parser"]

EXIT_OK, EXIT_FAULT, EXIT_BAD_INPUT = 0, 1, 2
EXIT_ACCURACY = 3  # validate: a model outside its stated accuracy


class _Parser(argparse.ArgumentParser):
    def error(self, message):  # one line, no usage dump
        raise BadUsage(f"{message} (see '{self.prog} --help')")


def _caution():
    from rheoline import CAUTION

    return CAUTION


def build_parser() -> argparse.ArgumentParser:
    """The argument parser (also used to document the commands)."""
    from rheoline import __version__

    p = _Parser(
        prog="rheoline",
        description="Flow, pressure and shear estimates for infusion lines and vascular access.",
        epilog=_caution(),
    )
    p.add_argument("--version", action="version", version=f"rheoline {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)

    run = _command(
        sub,
        "run",
        help="solve a scenario file and print the comparison table",
        description="Solve every scenario (and sweep point) of FILE, print the "
        "comparison table, and write a review pack with --out.",
    )
    run.add_argument("file", metavar="FILE", help="scenario file (.toml or .json)")
    _output_options(run)
    run.set_defaults(func=_cmd_run)

    check = _command(
        sub,
        "check",
        help="validate a scenario file without solving",
        description="Read and validate FILE (units, ranges, names, sweep "
        "sizes); print a summary or the first problem.",
    )
    check.add_argument("file", metavar="FILE", help="scenario file (.toml or .json)")
    check.set_defaults(func=_cmd_check)

    fluids = _command(
        sub,
        "fluids",
        help="list the fluid library with sources",
        description="List the named fluids a scenario may use, with their property sources.",
    )
    fluids.set_defaults(func=_cmd_fluids)

    parts = _command(
        sub,
        "parts",
        help="list the part catalogue with sources",
        description="List the part types a scenario may use and the "
        "catalogue of nominal sizes, with their sources.",
    )
    parts.add_argument("--kind", help="show one catalogue only (e.g. catheter, needle)")
    parts.set_defaults(func=_cmd_parts)

    flds = _command(
        sub,
        "fields",
        help="list every scenario-file field with units and ranges",
        description="List the keys a scenario file may use, the unit of a "
        "bare number, the allowed range and whether it sweeps.",
    )
    flds.set_defaults(func=_cmd_fields)

    demo = _command(
        sub,
        "demo",
        help="run the built-in demo scenario set",
        description="Run the built-in demo: an invented bench team compares "
        "rapid-transfusion lines. Writes a pack with --out.",
    )
    _output_options(demo)
    demo.set_defaults(func=_cmd_demo)

    ex = _command(
        sub,
        "examples",
        help="list the shipped example files, or print one",
        description="Without NAME, list the example scenario files; with NAME, "
        "print that file (save it and edit it as a start).",
    )
    ex.add_argument("name", nargs="?", metavar="NAME", help="an example's name")
    ex.set_defaults(func=_cmd_examples)

    val = _command(
        sub,
        "validate",
        help="compare the models with packaged measurements and write a report",
        description="Predict every packaged measurement (blood, plasma, infusion fluids, "
        "flows), print each stated accuracy target and write the report to DIR.",
    )
    val.add_argument(
        "--out",
        default="rheoline-validation",
        metavar="DIR",
        help="folder for the report (default: rheoline-validation)",
    )
    val.set_defaults(func=_cmd_validate)
    return p


def _command(sub, name, **kwargs):
    """A sub-command whose --help ends with the caution."""
    return sub.add_parser(name, epilog=_caution(), **kwargs)


def _output_options(cmd):
    cmd.add_argument("--out", metavar="DIR", help="write a review pack into this new folder")
    cmd.add_argument(
        "--json",
        action="store_true",
        help="print a JSON array (one object per scenario or sweep point), compact",
    )
    cmd.add_argument(
        "--pretty",
        action="store_true",
        help="with --json: indent the JSON for reading (larger and slower to write)",
    )
    cmd.add_argument(
        "--force",
        action="store_true",
        help="replace an earlier review pack at --out (never a folder of other files)",
    )
    cmd.add_argument(
        "--sort",
        metavar="COLUMN",
        help="sort the printed table by a column, highest first (e.g. 'flow [mL/min]')",
    )
    cmd.add_argument(
        "--reach",
        metavar="FLOW",
        help="also name, per scenario, the smallest-bore case reaching FLOW (e.g. '100 mL/min')",
    )
    cmd.add_argument(
        "--flow-unit",
        choices=list(FLOW_UNITS),
        default="mL/min",
        help="the unit of the printed flows (default mL/min)",
    )
    cmd.add_argument(
        "--columns",
        metavar="LIST",
        help="the printed columns, comma-separated (a unique start of a name is enough, e.g. "
        "'flow,regime,flags'), or 'all'; by default those that fit the terminal. Every column "
        "is in --json and in the review pack",
    )
    cmd.add_argument(
        "--width",
        type=int,
        metavar="N",
        help="the printed table's width in characters (default: the terminal's, else 100)",
    )


# --------------------------------------------------------------------------- commands
def _load(path):
    from rheoline.scenario.compare import check_scenarios
    from rheoline.scenario.files import load_scenarios

    sset = load_scenarios(path)
    check_scenarios(sset)
    return sset


def _cmd_check(args, out):
    sset = _load(args.file)
    swept = sum(1 for s in sset.scenarios if s.axes)
    out.write(
        f"ok: {sset.source}: {len(sset.scenarios)} scenario(s), {sset.n_points} case(s) "
        f"to solve ({swept} with sweeps)\n"
    )
    for s in sset.scenarios:
        axes = ", ".join(f"{p} x{len(a)}" for p, a in s.axes) or "no sweep"
        what = f"{s.mode} mode, {len(s.parts)} part(s)"
        if s.topology is not None:  # a branched line
            t = s.topology
            what = f"network of {len(t.nodes)} nodes and {len(t.branches)} branches"
            what += f", {s.n_parts} part(s)"
        out.write(f"  - {printable(s.name)}: {what}, {axes}\n")
    out.write(_caution() + "\n")
    return EXIT_OK


@contextlib.contextmanager
def _cycle_collector_paused():
    """Pause Python's cyclic garbage collector for one command's pass over its data.

    A run at the file limit holds some two million small objects (rows, cells, records) to
    its end and makes almost no reference cycles (reference counting frees the rest), so
    every full collection walks them all for nothing: 0.5 s of CPU, some 18 % of a
    20,000-point ``--json`` run, measured in this project (issue 14).  Collection resumes
    (as it was) when the command ends.
    """
    was_on = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was_on:
            gc.enable()


def _cmd_run(args, out, sset=None):
    with _cycle_collector_paused():
        return _run(args, out, sset)


def _run(args, out, sset):
    from rheoline.scenario.export import check_target

    if sset is None:
        sset = _load(args.file)
    if args.out:
        from pathlib import Path

        try:
            check_target(Path(args.out), args.force)  # refuse before solving anything
        except OSError as exc:  # OutputError: a file in the way of the folder
            raise _write_error("the pack", args.out, exc) from None
    reach = None
    if args.reach:
        from rheoline.units import ML_PER_MIN, parse_quantity

        reach = parse_quantity(args.reach, "flow", default_unit=args.flow_unit, field="--reach")
        reach /= ML_PER_MIN
    run = _solve(sset)
    if args.sort:
        import dataclasses

        from rheoline.scenario.compare import rank

        run = dataclasses.replace(run, table=rank(run.table, by=args.sort))  # a run is frozen
    if args.json:
        if args.pretty:
            out.write(json.dumps(run.records(), indent=2, allow_nan=False) + "\n")
        else:  # the text of json.dumps(run.records()), put together by columns, in pieces
            for piece in run.records_json_pieces():
                out.write(piece)
            out.write("\n")
        print(_caution(), file=sys.stderr)
    else:
        out.write(
            format_run(
                run, reach, args.flow_unit, columns_option(args.columns), width_option(args.width)
            )
            + "\n"
        )
    if args.out:
        from rheoline.scenario.export import write_pack

        try:
            folder = write_pack(run, args.out, force=args.force)
        except OSError as exc:
            raise _write_error("the pack", args.out, exc) from None
        msg = f"review pack written to {folder}/"
        print(msg, file=sys.stderr if args.json else out)
    return EXIT_OK


def _write_error(what, out_dir, exc):
    """A one-line error for ``what`` (the pack, the report) that cannot be written to
    ``--out``, from the error's ``reason`` (an OutputError's, or the system's ``strerror``),
    never from its message."""
    reason = getattr(exc, "reason", None) or exc.strerror or type(exc).__name__
    return RheolineError(
        f"cannot write {what} to {out_dir}: {reason}", field="--out", value=str(out_dir)
    )


def _cmd_demo(args, out):
    from rheoline.scenario.files import example_path

    args.file = str(example_path("rapid-transfusion-cart"))
    return _cmd_run(args, out)


def _cmd_examples(args, out):
    from rheoline.scenario.files import example_names, example_path

    if args.name:
        # a TOML comment, so that the printed file still loads when saved
        out.write(f"# {_caution()}\n" + example_path(args.name).read_text(encoding="utf-8"))
        return EXIT_OK
    out.write("Example scenario files (print one with 'rheoline examples NAME'):\n")
    for name in example_names():
        first = example_path(name).read_text(encoding="utf-8").splitlines()[0].lstrip("# ")
        out.write(f"  {name:28s} {first}\n")
    out.write(_caution() + "\n")
    return EXIT_OK


def _cmd_fluids(args, out):
    from rheoline.scenario.compare import fluid_table

    out.write(frame_text(fluid_table()) + "\n" + _caution() + "\n")
    return EXIT_OK


def _cmd_fields(args, out):
    from rheoline.scenario.files import fields_table

    out.write(frame_text(fields_table()) + "\n" + _caution() + "\n")
    return EXIT_OK


def _cmd_parts(args, out):
    from rheoline.scenario.compare import parts_table

    out.write(frame_text(parts_table(kind=args.kind)) + "\n" + _caution() + "\n")
    return EXIT_OK


def _cmd_validate(args, out):
    from rheoline.validation import run_validation
    from rheoline.validation.report import summary_text, write_report

    result = run_validation()
    try:
        written = write_report(result, args.out)
    except OSError as exc:
        raise _write_error("the report", args.out, exc) from None
    out.write(summary_text(result, written) + "\n")
    return EXIT_OK if result.passed else EXIT_ACCURACY


# --------------------------------------------------------------------------- helpers
def _solve(sset):
    from rheoline.scenario.compare import run_scenarios

    progress = None
    if sys.stdout.isatty() and sys.stderr.isatty():
        progress = _tqdm_progress
    return run_scenarios(sset, progress=progress)


def _tqdm_progress(total):
    """A tqdm bar that appears only when the run takes more than two seconds."""
    from tqdm import tqdm

    return tqdm(total=total, delay=2.0, unit="case", leave=False, file=sys.stderr)


def format_run(run, reach=None, flow_unit="mL/min", columns=None, width=None) -> str:
    """The comparison table as printed by ``rheoline run``, with the caution above and below.

    Flows are in ``flow_unit``.  ``columns``: None for the columns that fit ``width``
    characters (text wraps within its cells), ``"all"`` for every column, or a list of names
    (a unique start of each).  With ``reach`` [mL/min], a line per scenario names its
    smallest-bore case reaching it.
    """
    from rheoline.units import per_ml_min, significant

    lines = [f"CAUTION: {_caution()}", ""]
    title = run.scenario_set.title
    if title:
        lines += [printable(title), ""]
    frame, left_out, caps = run.summary(flow_unit), [], None
    if columns is None and width is not None:
        frame, left_out, caps = fitting(frame, width)
    elif columns not in (None, "all"):
        frame = chosen(frame, columns)
    lines.append(frame_text(frame, None if columns == "all" else width, caps))
    if left_out:
        lines += textwrap.wrap(
            f"(not printed, to fit {width} characters: {', '.join(left_out)}; choose with "
            "--columns, or --columns all; every column is in --json and in the review pack)",
            width,
        )
    if reach is not None:
        from rheoline.scenario.compare import smallest_reaching

        per = per_ml_min(flow_unit)
        lines += ["", f"Smallest bore reaching {significant(reach * per)} {flow_unit}:"]
        for name in dict.fromkeys(run.table["scenario"]):
            best = smallest_reaching(run.table, reach, scenario=name)
            if best.empty:
                lines.append(f"  - {printable(name)}: no case reaches it")
            else:
                row = best.iloc[0]
                lines.append(
                    f"  - {printable(name)}: {printable(row['case'])} "
                    f"({significant(row['smallest bore [mm]'])} mm bore, "
                    f"{significant(row['flow [mL/min]'] * per)} {flow_unit})"
                )
    if run.warnings:
        lines += ["", "Notes:"] + [
            wrapped
            for w in run.warnings
            for wrapped in textwrap.wrap(
                printable(w), width or 100, initial_indent="  - ", subsequent_indent="    "
            )
        ]
    lines += ["", f"CAUTION: {_caution()}"]
    return "\n".join(lines)


def _one_line(exc) -> str:
    return " ".join(str(exc).split())


def main(argv=None) -> int:
    """Run the command line; return the exit status (0 ok, 2 bad input, 1 internal fault)."""
    parser = build_parser()
    out = sys.stdout
    try:
        args = parser.parse_args(argv)
        if not getattr(args, "func", None):
            parser.print_help(out)
            return EXIT_BAD_INPUT
        if getattr(args, "out", None) is not None and not args.out.strip():
            raise BadUsage("--out is empty; give the name of a new folder, e.g. --out pack")
        with warnings.catch_warnings(), interrupt_guard():
            warnings.simplefilter("ignore")  # results carry their flags; no warning text
            return args.func(args, out)
    except BadUsage as exc:
        print(f"rheoline: error: {_one_line(exc)}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except RheolineError as exc:
        print(f"rheoline: error: {_one_line(exc)}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except KeyboardInterrupt:
        print("rheoline: interrupted", file=sys.stderr)
        return 130
    except PackInterrupted as exc:  # SIGTERM or SIGHUP before any pack was in place
        print(f"rheoline: stopped by signal {exc.signum}", file=sys.stderr)
        return 128 + int(exc.signum)
    except BrokenPipeError:
        return EXIT_OK
    except Exception as exc:  # noqa: BLE001 - the last line of defence: no traceback
        print(
            f"rheoline: internal error ({type(exc).__name__}: {_one_line(exc)}); "
            "please report it with the scenario file",
            file=sys.stderr,
        )
        return EXIT_FAULT


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
