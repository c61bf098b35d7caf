"""The `halosift` command: explain one SMILES, screen a library, report on it in HTML, or browse it in the app."""

from __future__ import annotations

import argparse
import json
import os
import signal
import sys
import textwrap
import threading
import warnings
from collections.abc import Iterator, Sequence
from contextlib import contextmanager
from dataclasses import asdict
from typing import TextIO

from halosift._caution import CAUTION
from halosift._version import __version__

EXIT_OK = 0
EXIT_USAGE = 2

STDIO = "-"
"""The file name that means standard input (a library to read) or standard output (``-o -``)."""

#: Formats a library on standard input may be given as (``--in-format``); engine.io.INPUT_FORMATS, checked by a test.
IN_FORMATS = ("csv", "tsv", "parquet", "smi", "sdf")
#: Formats ``-o -`` writes (``--out-format``); engine.io.OUTPUT_FORMATS, checked by a test.
OUT_FORMATS = ("csv", "tsv", "parquet", "sdf")
#: Output formats that are bytes, not text: never written to a terminal.
BINARY_FORMATS = ("parquet",)
#: Shells ``halosift completion`` writes a script for.
SHELLS = ("bash", "zsh", "fish")


class _Parser(argparse.ArgumentParser):
    """argparse that reports errors in one line and exits 2."""

    def error(self, message: str) -> None:  # pragma: no cover - exercised via main()
        self.exit(EXIT_USAGE, f"halosift: {message}\n")


def _temp_arg(text: str) -> tuple[str | None, float]:
    """'40' (all reagents meant) or 'br2=100'."""
    name, sep, value = text.partition("=")
    if not sep:
        name, value = "", text
    name = name.strip().lower()
    if name:
        from halosift.engine.reagents import RADICAL_OF  # the engine's reagent names (only when --temp is given)

        if name not in RADICAL_OF:
            uses = [f"{r}=°C" for r in RADICAL_OF]
            raise argparse.ArgumentTypeError(
                f"unknown reagent {name!r} in --temp (use {', '.join(uses[:-1])} or {uses[-1]})"
            )
    try:
        return (name or None), float(value)
    except ValueError:
        raise argparse.ArgumentTypeError(f"--temp needs a number of °C, got {value!r}") from None


def _add_condition_options(p: argparse.ArgumentParser, what: str) -> None:
    p.add_argument(
        "--temp",
        type=_temp_arg,
        action="append",
        metavar="[REAGENT=]°C",
        help=f"temperature in °C: a bare number applies to {what}; or cl2=°C / br2=°C / so2cl2=°C / nbs=°C "
        "(repeatable; defaults cl2 25, br2 125, so2cl2 70, nbs 77)",
    )
    p.add_argument("--threshold", type=float, metavar="PCT",
                   help="share of the major monohalide (percent) at which a reagent's outcome is clean rather than "
                   "mixture, for every reagent (default 90)")


def _solvent_arg(text: str) -> tuple[str, float]:
    """'none', or 'benzene=8' / 'cs2=12' (mol/L)."""
    name, sep, value = text.partition("=")
    name = name.strip().lower()
    if name == "none" and not sep:
        return "none", 0.0
    if not sep:
        raise argparse.ArgumentTypeError(f"--solvent needs a concentration, e.g. {name}=4 (mol/L), or none")
    try:
        return name, float(value)
    except ValueError:
        raise argparse.ArgumentTypeError(f"--solvent needs a number of mol/L, got {value!r}") from None


def _add_solvent_option(p: argparse.ArgumentParser) -> None:
    p.add_argument(
        "--solvent",
        type=_solvent_arg,
        metavar="NAME=MOLAR",
        help="Cl2 solvent: benzene=MOLAR or cs2=MOLAR (complexed Cl· is more selective; Russell 1958), "
        "or none (default)",
    )


def _add_phase_option(p: argparse.ArgumentParser) -> None:
    p.add_argument(
        "--phase",
        choices=["gas", "liquid", "solution"],
        help="Cl2 phase: liquid (the neat hydrocarbon, default), gas (vapour-phase kinetics) or solution "
        "(needs --solvent)",
    )


def _add_conditions(p: argparse.ArgumentParser, what: str = "Cl2 and Br2", note: str = "") -> None:
    """The condition options, one set for every command that weighs (explain, screen, report, browse)."""
    group = p.add_argument_group("conditions" + note)
    _add_condition_options(group, what)
    _add_solvent_option(group)
    _add_phase_option(group)


def _ratio_arg(text: str) -> float:
    """'2:1' (substrate : halogen, as the planner shows it) or a bare number (the same quotient, '2')."""
    substrate, sep, halogen = text.partition(":")
    try:
        value = float(substrate) / float(halogen) if sep else float(text)
    except (ValueError, ZeroDivisionError):
        raise argparse.ArgumentTypeError(
            f"expected substrate:halogen (e.g. 2:1) or one number, got {text!r}"
        ) from None
    return value


def _reagent_arg(text: str) -> str:
    """Reagent names are checked later, so F2/I2 get their reasoned refusal rather than a usage error."""
    return text.strip().lower()


def build_parser() -> argparse.ArgumentParser:
    """The argument parser for all subcommands."""
    parser = _Parser(
        prog="halosift", description="Predict free-radical halogenation outcomes for hydrocarbons.",
        epilog="Without a command, opens the app on the bundled sample catalogue (on a terminal only).\n\n"
               + textwrap.fill(CAUTION, 78),
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    parser.add_argument("--version", action="version", version=f"halosift {__version__}")
    sub = parser.add_subparsers(dest="command", parser_class=_Parser)

    ex = sub.add_parser("explain", help="every monohalide of one SMILES, with percentages")
    ex.add_argument("smiles")
    ex.add_argument(
        "--reagent", action="append", type=_reagent_arg, metavar="REAGENT",
        help="cl2, br2, so2cl2 or nbs (repeatable; default cl2 and br2; so2cl2 runs at 70 °C, nbs at 77 °C unless "
        "--temp REAGENT=°C; nbs lists allylic/benzylic bromides, allylic shift included); "
        "f2 and i2 are explained, not predicted",
    )
    _add_conditions(ex, "the reagents given")
    ex.add_argument("--ratio", type=_ratio_arg, metavar="S:X",
                    help="polyhalogenation planner: substrate : halogen charged, mol/mol, as S:X (2:1) or one number (2); "
                    "all halogen consumed (default 1:1)")
    ex.add_argument("--conversion", type=float, metavar="PCT",
                    help="also give the polyhalide share at this substrate conversion (percent)")
    ex.add_argument("--max-poly", type=float, metavar="PCT",
                    help="polyhalide cap (percent of halogenated product): the planner gives the conversion to stop "
                    "at and the substrate excess to use (default 10)")
    ex.add_argument("--json", action="store_true", help="print one JSON object")

    sc = sub.add_parser("screen", help="screen a library file; one output row per input row")
    sc.add_argument("input", help="CSV, TSV, Parquet, SMI or SDF (optionally .gz); - reads standard input")
    sc.add_argument("-o", "--output", required=True,
                    help="CSV, TSV, Parquet or SDF (by extension); - writes standard output (see --out-format)")
    _add_in_format_option(sc)
    sc.add_argument("--out-format", choices=OUT_FORMATS,
                    help="format for -o - (default csv); Parquet is never written to a terminal")
    _add_conditions(sc)
    _add_library_options(sc)
    _add_run_options(sc)
    sc.add_argument("--dask", metavar="ADDRESS",
                    help="perceive on a Dask cluster: its scheduler address (tcp://host:8786), or local:N for N "
                    "worker processes here (needs pip install 'halosift[dask]')")
    sc.add_argument("--quiet", action="store_true", help="no progress bar and no summary")

    rp = sub.add_parser("report", help="write a printable HTML report: summary charts and one drawn entry per substrate")
    rp.add_argument("input", help="a library as for screen (a screen result re-reads as a library); - reads "
                    "standard input")
    rp.add_argument("-o", "--output", required=True, help="the report file (.html)")
    _add_in_format_option(rp)
    _add_conditions(rp)
    _add_library_options(rp)
    # Checked in _report, not by choices=: naming the verdicts here would import the engine for --help.
    rp.add_argument("--only", action="append", metavar="VERDICT",
                    help="report only rows with this verdict: by-symmetry, selective, mixture, ruled-out or inert "
                    "(repeatable; default: every row)")
    rp.add_argument("--ids", metavar="FILE", help="report only the rows whose ID is listed in FILE (one per line)")
    rp.add_argument("--max-pages", type=int, default=200, metavar="N",
                    help="at most N substrate entries (default 200), the best kept: entries are grouped by "
                    "verdict, best candidates first; the report says how many of each verdict were left out")
    _add_run_options(rp)
    rp.add_argument("--quiet", action="store_true", help="no progress bar and no summary")

    co = sub.add_parser("completion", help="print a shell completion script (bash, zsh or fish)",
                        description="Print a completion script for SHELL. bash: eval \"$(halosift completion bash)\" "
                        "in ~/.bashrc; zsh: the same line in ~/.zshrc; fish: halosift completion fish > "
                        "~/.config/fish/completions/halosift.fish")
    co.add_argument("shell", choices=SHELLS)

    br = sub.add_parser("browse", help="open a library in the terminal app")
    br.add_argument("input", nargs="?", help="library file (default: the bundled sample catalogue)")
    _add_conditions(br, note=" (the app starts with them; they win over the conditions saved in the session)")
    _add_library_options(br)
    br.add_argument(
        "--no-images", action="store_true",
        help="never draw structures inline, even where the terminal can (also: HALOSIFT_IMAGES=off)",
    )
    br.add_argument(
        "--fresh", action="store_true",
        help="start without this library's saved session (marks, sort, filters, view, conditions) and replace it",
    )
    return parser


def _add_in_format_option(p: argparse.ArgumentParser) -> None:
    """--in-format, for a library read from standard input."""
    p.add_argument("--in-format", choices=IN_FORMATS,
                   help="format of a library on standard input (input -); default: guessed from its first bytes")


def _add_run_options(p: argparse.ArgumentParser) -> None:
    """Options of the commands that perceive a library and write a file."""
    p.add_argument("--workers", type=int, metavar="N", help="worker processes (default: all cores)")
    p.add_argument("--no-cache", action="store_true", help="perceive everything afresh; do not read or write the cache")
    p.add_argument("--force", action="store_true", help="replace an existing output file")


def _add_library_options(p: argparse.ArgumentParser) -> None:
    p.add_argument("--smiles-column", metavar="NAME", help="column holding SMILES (default: found by name)")
    p.add_argument("--id-column", metavar="NAME", help="column holding identifiers (default: found by name)")


def _conditions(args: argparse.Namespace, reagents: Sequence[str]):
    """engine.Conditions from the condition options, validated as it is made (ValueError: one line)."""
    from halosift.engine import Conditions

    return Conditions(**_condition_fields(args, reagents))


def _condition_fields(args: argparse.Namespace, reagents: Sequence[str]) -> dict[str, float | str]:
    """Only the engine.Conditions fields the options set explicitly (a bare --temp sets each of ``reagents``)."""
    kwargs: dict[str, float | str] = {}
    for name, value in args.temp or ():
        for r in ([name] if name else reagents):
            kwargs[f"{r}_temp_c"] = value
    if args.threshold is not None:
        kwargs["threshold_pct"] = args.threshold
    if args.solvent is not None:
        kwargs["cl2_solvent"], kwargs["cl2_solvent_molar"] = args.solvent
    if args.phase is not None:
        kwargs["cl2_phase"] = args.phase
    return kwargs


def _explain(args: argparse.Namespace) -> int:
    from halosift.engine import CAUTION, explain
    from halosift.engine.reagents import UnsupportedReagent, check_reagent
    from halosift.formatting import explanation_table

    try:
        reagents = tuple(dict.fromkeys(check_reagent(r) for r in (args.reagent or ("cl2", "br2"))))
    except UnsupportedReagent as exc:
        if args.json:
            refusal = exc.refusal
            print(json.dumps({"input": args.smiles, "status": "not predicted", "reagent": refusal.reagent,
                              "reason": refusal.reason, "sources": list(refusal.sources)}, ensure_ascii=False, indent=2))
        return _fail(str(exc))
    except ValueError as exc:
        return _fail(str(exc))
    try:
        cond = _conditions(args, reagents)
    except ValueError as exc:
        return _fail(str(exc))
    result = explain(args.smiles, cond)
    warnings = [w for w in cond.warnings(reagents)]
    try:
        plans = _poly_plans(args, result, reagents)
    except ValueError as exc:
        return _fail(str(exc))
    if args.json:
        d = result.to_dict(reagents)
        if result.status == "ok":
            d["warnings"] = warnings
            if plans:
                from halosift.engine.polyhalogenation import MODEL_NOTE

                d["polyhalogenation"] = {
                    p.reagent: {k: (None if v == float("inf") else v) for k, v in asdict(p).items()} for p in plans
                }
                d["polyhalogenation_model"] = MODEL_NOTE
            d["caution"] = CAUTION
        print(json.dumps(d, ensure_ascii=False, indent=2))
    elif result.status != "ok":
        print(f"halosift: rejected {_short(args.smiles)!r}: {result.reason}", file=sys.stderr)
    else:
        print(explanation_table(result, reagents, warnings, plans))
    return EXIT_OK if result.status == "ok" else EXIT_USAGE


def _poly_plans(args: argparse.Namespace, result, reagents: Sequence[str]) -> list:
    """Polyhalogenation plans per site reagent (cl2, br2, so2cl2; not nbs); ValueError on bad values."""
    from halosift.engine.polyhalogenation import DEFAULT_MAX_POLY_PCT, DEFAULT_RATIO, plan
    from halosift.engine.reagents import EXPLAIN_REAGENTS

    cap = DEFAULT_MAX_POLY_PCT if args.max_poly is None else args.max_poly
    ratio = DEFAULT_RATIO if args.ratio is None else args.ratio
    # Check the numbers even when nothing will be planned, so a typo never passes silently.
    plan("cl2", [1], [100.0], ratio=ratio, conversion_pct=args.conversion, max_poly_pct=cap)
    if result.status != "ok" or result.verdict == "inert":
        return []  # nothing to halogenate, nothing to plan
    h = [p.h_count for p in result.products]
    # A reagent ruled out (addition, ring opening, …) does not substitute: its polyhalide plan would mislead.
    return [
        plan(r, h, [p.pct[r] for p in result.products], ratio=ratio, conversion_pct=args.conversion, max_poly_pct=cap)
        for r in reagents if r in EXPLAIN_REAGENTS and result.outcome(r).outcome != "ruled-out"
    ]


def _screen(args: argparse.Namespace) -> int:
    import time

    from halosift.engine import Cancelled, LibraryError
    from halosift.engine.io import check_output, write_table
    from halosift.engine.io.writers import write_stream
    from halosift.engine.provenance import export_metadata
    from halosift.progress import summary_lines

    started = time.monotonic()
    to_stdout = args.output == STDIO
    try:
        cond = _run_conditions(args)
        out_format = _stdout_format(args) if to_stdout else None
    except ValueError as exc:
        return _fail(str(exc))
    from halosift.engine.distributed import DaskError, parse_target

    try:
        if args.dask is not None:
            parse_target(args.dask)  # a malformed address fails before any file is read
        if out_format is None:
            _check_out_format(args)
            check_output(args.output, force=args.force, protect=_protected(args))
        with _input_file(args) as input_path:
            library = _load(args, input_path, quiet=args.quiet)
            result = library.evaluate(cond)
            meta = export_metadata(cond, source=_source_name(args))
            if out_format is not None:
                write_stream(result, sys.stdout.buffer, out_format, metadata=meta)
                written = "standard output"
            else:
                written = str(write_table(result, args.output, metadata=meta, force=args.force,
                                          protect=_protected(args)))
    except (LibraryError, DaskError) as exc:
        return _fail(str(exc))
    except Cancelled:
        return _fail("cancelled")
    if out_format in ("csv", "tsv"):
        # No sidecar on a stream: the caution goes with the data in the only other place there is.
        print("halosift: note: standard output has no .about.txt sidecar (conditions, sources); "
              "-o FILE keeps one beside the data", file=sys.stderr)
        print(meta["caution"], file=sys.stderr)
    if not args.quiet:
        for line in summary_lines(result, time.monotonic() - started):
            print(line, file=sys.stderr)
        for warning in cond.warnings():
            print(f"warning: {warning}", file=sys.stderr)
        print(f"wrote {written}", file=sys.stderr)
    return EXIT_OK


def _stdout_format(args: argparse.Namespace) -> str:
    """The format ``-o -`` writes; ValueError (one line) for bytes bound for a terminal."""
    fmt = args.out_format or "csv"
    if fmt in BINARY_FORMATS and sys.stdout.isatty():
        raise ValueError(f"refusing to write {fmt} (binary) to a terminal; redirect standard output "
                         f"(> result.{fmt}) or use --out-format csv")
    return fmt


def _check_out_format(args: argparse.Namespace) -> None:
    """--out-format is for -o -; with a file name it must agree with the extension (LibraryError)."""
    from halosift.engine.io import LibraryError, output_format

    if args.out_format is not None and output_format(args.output) != args.out_format:
        raise LibraryError(f"--out-format {args.out_format} is for -o -; {args.output} is "
                           f"{output_format(args.output)} by its extension")


def _protected(args: argparse.Namespace) -> list[str]:
    """Files an output must never replace: the input, unless it is standard input."""
    return [] if args.input == STDIO else [args.input]


def _source_name(args: argparse.Namespace) -> str:
    """The input as exports and the report name it."""
    return "standard input" if args.input == STDIO else str(args.input)


@contextmanager
def _input_file(args: argparse.Namespace) -> Iterator[str]:
    """The library's path; for ``-``, standard input copied to a temporary file named for its format.

    The readers check a file up front and then stream it (two passes), which a pipe
    cannot give, so standard input is copied once. Errors that would name the
    temporary file name standard input instead.
    """
    from halosift.engine.io import LibraryError

    if args.input != STDIO:
        if args.in_format is not None:
            raise LibraryError(f"--in-format is for input -; {args.input} is read by its extension")
        yield args.input
        return
    import shutil
    import tempfile

    from halosift.engine.io.formats import SNIFF_BYTES, sniff_format

    if sys.stdin is None or sys.stdin.isatty():
        raise LibraryError("input - reads standard input, which is a terminal here; pipe a library in "
                           "(e.g. < library.csv)")
    with tempfile.TemporaryDirectory(prefix="halosift-stdin-") as folder:
        spool = os.path.join(folder, "stdin")
        with open(spool, "wb") as out:
            shutil.copyfileobj(sys.stdin.buffer, out)
        with open(spool, "rb") as back:
            head = back.read(SNIFF_BYTES)
        if not head.strip():
            raise LibraryError("standard input is empty")
        fmt, gzipped = (args.in_format, head.startswith(b"\x1f\x8b")) if args.in_format else sniff_format(head)
        if gzipped and fmt == "parquet":
            raise LibraryError("gzipped Parquet is not read: Parquet is compressed internally")
        path = os.path.join(folder, f"stdin.{fmt}" + (".gz" if gzipped else ""))
        os.replace(spool, path)
        try:
            yield path
        except LibraryError as exc:
            raise LibraryError(str(exc).replace(path, "standard input")) from None


def _report(args: argparse.Namespace) -> int:
    from pathlib import Path

    from halosift.engine import Cancelled, LibraryError
    from halosift.engine.outcomes import VERDICTS
    from halosift.report import check_report_output, read_ids, render_report, select_rows, write_report

    unknown = [v for v in args.only or () if v not in VERDICTS]
    if unknown:
        return _fail(f"--only takes a verdict ({', '.join(VERDICTS)}), not {unknown[0]!r}")
    try:
        cond = _run_conditions(args)
        if args.max_pages < 0:
            raise ValueError("--max-pages must be 0 or more")
    except ValueError as exc:
        return _fail(str(exc))
    try:
        # Cheap checks first: a bad output path or ID list should not wait for perception.
        check_report_output(args.output, force=args.force, protect=_protected(args))
        ids = read_ids(args.ids) if args.ids else None
        with _input_file(args) as input_path:
            library = _load(args, input_path, quiet=args.quiet)
            result = library.evaluate(cond)
            id_values = library.input[library.id_column] if library.id_column is not None else None
            ids_source = Path(args.ids).name if args.ids else ""
            chosen = select_rows(result, id_values, only=args.only or (), ids=ids, ids_source=ids_source)
            report = render_report(
                library, cond, rows=chosen.rows, selection=chosen.description, source=_source_name(args),
                max_pages=args.max_pages, missing_ids=chosen.missing_ids,
            )
            written = write_report(report.html, args.output, force=args.force, protect=_protected(args))
    except LibraryError as exc:
        return _fail(str(exc))
    except Cancelled:
        return _fail("cancelled")
    if args.quiet:
        return EXIT_OK
    for warning in cond.warnings():
        print(f"warning: {warning}", file=sys.stderr)
    if chosen.missing_ids:
        some = "1 ID" if len(chosen.missing_ids) == 1 else f"{len(chosen.missing_ids):,} IDs"
        print(f"warning: {some} from {args.ids} not in the library", file=sys.stderr)
    left = (f"; {report.n_left_out:,} more beyond --max-pages, one line each in the appendix"
            if report.n_left_out else "")
    print(f"wrote {written} ({report.n_sections:,} substrate entries{left}; summary of {report.n_rows:,} rows)",
          file=sys.stderr)
    return EXIT_OK


def _run_conditions(args: argparse.Namespace):
    """Conditions for both screen reagents, with the run options checked (ValueError: one line)."""
    if args.workers is not None and args.workers < 1:
        raise ValueError("--workers must be at least 1")
    cond = _conditions(args, ("cl2", "br2"))
    _note_worker_cap(args.workers)
    return cond


def _note_worker_cap(requested: int | None) -> None:
    """One line on stderr when --workers asks for more processes than there are usable cores."""
    from halosift.engine.cores import capped_workers

    if requested is not None and capped_workers(requested) < requested:
        print(f"halosift: note: --workers {requested} capped at {capped_workers(requested)}, "
              "the cores this process may use", file=sys.stderr)


def _load(args: argparse.Namespace, path: str, *, quiet: bool):
    """The library at ``path`` (the command line's, or standard input's copy), perceived with a progress bar."""
    from halosift.engine import load_library
    from halosift.progress import ProgressLine

    bar = ProgressLine(enabled=not quiet)
    try:
        return load_library(
            path, smiles_column=args.smiles_column, id_column=args.id_column, workers=args.workers,
            use_cache=not args.no_cache, progress=bar, caller_helps=True,  # no interface to keep free here
            dask=getattr(args, "dask", None),
        )
    finally:
        bar.close()


def _browse(args: argparse.Namespace) -> int:
    # Checked here, in one line, before the app takes over the terminal.
    try:
        explicit = _condition_fields(args, ("cl2", "br2"))
        _conditions(args, ("cl2", "br2"))
    except ValueError as exc:
        return _fail(str(exc))
    from halosift.tui.app import run

    return run(args.input, smiles_column=args.smiles_column, id_column=args.id_column, images=not args.no_images,
               fresh=args.fresh, conditions=explicit)


def _short(text: str, limit: int = 60) -> str:
    """Echo long input abbreviated, so the error stays one readable line."""
    return text if len(text) <= limit else text[: limit - 1] + "…"


def _fail(message: str) -> int:
    print(f"halosift: {message}", file=sys.stderr)
    return EXIT_USAGE


class _Stopped(KeyboardInterrupt):
    """SIGTERM or SIGHUP, raised in the main thread so clean-up runs exactly as for Ctrl-C."""

    def __init__(self, signum: int) -> None:
        super().__init__(signum)
        self.signum = signum


#: Signals a batch run treats as Ctrl-C: a kill, a closed terminal or dropped SSH session, Ctrl-C itself.
_STOP_SIGNALS = tuple(getattr(signal, name) for name in ("SIGINT", "SIGTERM", "SIGHUP") if hasattr(signal, name))


@contextmanager
def _stop_on_signals() -> Iterator[None]:
    """Turn the stop signals into KeyboardInterrupt for the duration, so temp files go and workers stop.

    Where the system allows, the signals are blocked in every thread and taken
    by one watcher thread (sigtimedwait), which then wakes the main thread with
    SIGUSR1 to raise there: RDKit swaps in its own SIGINT handler while it
    embeds a molecule, and a signal landing there would be swallowed and
    cancel the embedding, which changes the stereo answer. The wake-up
    interrupts a blocking call (a sleep, a read from a pipe) as a signal would.
    A signal already ignored (nohup, a script's background job) stays ignored.
    A second signal during clean-up ends the process at once, the usual escape
    from a clean-up that hangs.
    """
    if threading.current_thread() is not threading.main_thread():
        yield  # only the main thread may set handlers; a caller's thread keeps its own
        return
    seen: list[int] = []

    def handler(signum: int, frame: object) -> None:
        if seen:
            os._exit(128 + signum)
        seen.append(signum)
        raise KeyboardInterrupt() if signum == signal.SIGINT else _Stopped(signum)

    previous = {}
    for signum in _STOP_SIGNALS:
        current = signal.getsignal(signum)
        if current is not signal.SIG_IGN:
            previous[signum] = current
            signal.signal(signum, handler)
    watched = set(previous)
    wake = getattr(signal, "SIGUSR1", None)
    can_watch = all(hasattr(signal, f) for f in ("pthread_sigmask", "sigtimedwait", "pthread_kill"))
    if not (watched and can_watch and wake is not None and signal.getsignal(wake) is signal.SIG_DFL):
        try:
            yield
        finally:
            for signum, old in previous.items():
                signal.signal(signum, old if old is not None else signal.SIG_DFL)
        return

    caught: list[int] = []
    main_thread = threading.main_thread().ident
    assert main_thread is not None

    acknowledged = threading.Event()

    def woken(signum: int, frame: object) -> None:
        if caught and not acknowledged.is_set():  # repeats of the wake-up are ignored
            acknowledged.set()
            handler(caught[0], frame)

    signal.signal(wake, woken)
    old_mask = signal.pthread_sigmask(signal.SIG_BLOCK, watched)  # threads started from now on inherit it
    stop = threading.Event()

    def watch() -> None:
        while not stop.is_set():
            info = signal.sigtimedwait(watched, 0.2)
            if info is None:
                continue
            if caught:
                os._exit(128 + info.si_signo)  # second signal: no more clean-up
            caught.append(info.si_signo)
            # A wake-up landing just before the main thread enters a blocking call (a sleep) is
            # only seen when the call returns, so repeat it until the main thread has taken it.
            signal.pthread_kill(main_thread, wake)
            while not acknowledged.wait(0.05) and not stop.is_set():
                signal.pthread_kill(main_thread, wake)

    watcher = threading.Thread(target=watch, name="halosift-signals", daemon=True)
    watcher.start()
    try:
        yield
    finally:
        stop.set()
        watcher.join(2.0)
        signal.pthread_sigmask(signal.SIG_SETMASK, old_mask)  # a signal still pending arrives now
        signal.signal(wake, signal.SIG_DFL)
        for signum, old in previous.items():
            signal.signal(signum, old if old is not None else signal.SIG_DFL)


@contextmanager
def _cache_notes() -> Iterator[None]:
    """Show the cache's warnings as one ``halosift: note:`` line each, not Python's two-line warning."""
    with warnings.catch_warnings():
        python_show = warnings.showwarning

        def show(message: Warning | str, category: type[Warning], filename: str, lineno: int,
                 file: TextIO | None = None, line: str | None = None) -> None:
            from halosift.engine.cache import CacheWarning

            if issubclass(category, CacheWarning):
                print(f"halosift: note: {message}", file=sys.stderr)
            else:
                python_show(message, category, filename, lineno, file, line)

        warnings.showwarning = show
        yield


def _on_terminal() -> bool:
    """True when both standard input and standard output are terminals (the app needs both)."""
    try:
        return sys.stdin is not None and sys.stdout is not None and sys.stdin.isatty() and sys.stdout.isatty()
    except (AttributeError, ValueError):  # replaced or closed streams
        return False


def main(argv: Sequence[str] | None = None) -> int:
    """Entry point of the console script."""
    parser = build_parser()
    args = parser.parse_args(argv)
    if args.command is None:
        if not _on_terminal():
            # A script or pipe that runs the bare command would otherwise get a full-screen app it cannot see.
            print("halosift: no terminal on standard input and output, so the app does not open", file=sys.stderr)
            print("halosift: run e.g. 'halosift screen LIBRARY -o result.csv', or 'halosift --help' for every command",
                  file=sys.stderr)
            return EXIT_USAGE
        # No command: the app on the bundled sample catalogue.
        args = parser.parse_args(["browse"])
    if args.command == "completion":
        from halosift.completion import completion_script

        print(completion_script(parser, args.shell), end="")
        return EXIT_OK
    handlers = {"explain": _explain, "screen": _screen, "report": _report}
    try:
        if args.command == "browse":
            return _browse(args)  # the app owns its keys and the terminal
        with _stop_on_signals(), _cache_notes():
            return handlers[args.command](args)
    except BrokenPipeError:
        # The reader of standard output went away (| head): stop quietly, as other tools do.
        try:
            os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        except (OSError, ValueError):
            pass
        return 128 + 13  # as if killed by SIGPIPE
    except _Stopped as exc:
        print(f"halosift: stopped by {signal.Signals(exc.signum).name}", file=sys.stderr)
        return 128 + exc.signum
    except KeyboardInterrupt:
        print("halosift: interrupted", file=sys.stderr)
        return 130


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
