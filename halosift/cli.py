"""The `halosift` command: explain one SMILES, screen a library, report on it in HTML, or browse it in the app."""

from __future__ import annotations

import argparse
import json
import os
import signal
import sys
import threading
import warnings
from collections.abc import Iterator, Sequence
from contextlib import contextmanager
from dataclasses import asdict
from typing import TextIO

EXIT_OK = 0
EXIT_USAGE = 2


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
    if name and name not in ("cl2", "br2", "so2cl2", "nbs"):
        raise argparse.ArgumentTypeError(
            f"unknown reagent {name!r} in --temp (use cl2=°C, br2=°C, so2cl2=°C or nbs=°C)"
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
        help=f"temperature in °C: a bare number applies to {what}; or cl2=°C / br2=°C / nbs=°C "
        "(repeatable; defaults cl2 25, br2 125, nbs 77)",
    )
    p.add_argument("--threshold", type=float, metavar="PCT", help="bromination share that counts as selective (default 90)")


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
        "(needs --solvent, where offered)",
    )


def _reagent_arg(text: str) -> str:
    """Reagent names are checked later, so F2/I2 get their reasoned refusal rather than a usage error."""
    return text.strip().lower()


def build_parser() -> argparse.ArgumentParser:
    """The argument parser for all subcommands."""
    parser = _Parser(prog="halosift", description="Predict free-radical halogenation outcomes for hydrocarbons.")
    sub = parser.add_subparsers(dest="command", parser_class=_Parser)

    ex = sub.add_parser("explain", help="every monohalide of one SMILES, with percentages")
    ex.add_argument("smiles")
    ex.add_argument(
        "--reagent", action="append", type=_reagent_arg, metavar="REAGENT",
        help="cl2, br2, so2cl2 or nbs (repeatable; default cl2 and br2; so2cl2 runs at 70 °C, nbs at 77 °C unless "
        "--temp REAGENT=°C; nbs lists allylic/benzylic bromides, allylic shift included); "
        "f2 and i2 are explained, not predicted",
    )
    _add_condition_options(ex, "the reagents given")
    _add_solvent_option(ex)
    _add_phase_option(ex)
    ex.add_argument("--ratio", type=float, metavar="S:X",
                    help="polyhalogenation planner: substrate : halogen charged, mol/mol, all halogen consumed "
                    "(default 1)")
    ex.add_argument("--conversion", type=float, metavar="PCT",
                    help="also give the polyhalide share at this substrate conversion (percent)")
    ex.add_argument("--max-poly", type=float, metavar="PCT",
                    help="polyhalide cap (percent of halogenated product): the planner gives the conversion to stop "
                    "at and the substrate excess to use (default 10)")
    ex.add_argument("--json", action="store_true", help="print one JSON object")

    sc = sub.add_parser("screen", help="screen a library file; one output row per input row")
    sc.add_argument("input", help="CSV, TSV, Parquet, SMI or SDF (optionally .gz)")
    sc.add_argument("-o", "--output", required=True, help="CSV, TSV, Parquet or SDF (by extension)")
    _add_condition_options(sc, "both reagents")
    _add_solvent_option(sc)
    _add_phase_option(sc)
    _add_library_options(sc)
    _add_run_options(sc)
    sc.add_argument("--dask", metavar="ADDRESS",
                    help="perceive on a Dask cluster: its scheduler address (tcp://host:8786), or local:N for N "
                    "worker processes here (needs pip install 'halosift[dask]')")
    sc.add_argument("--quiet", action="store_true", help="no progress bar and no summary")

    rp = sub.add_parser("report", help="write a printable HTML report: summary charts and one drawn entry per substrate")
    rp.add_argument("input", help="a library as for screen (a screen result re-reads as a library)")
    rp.add_argument("-o", "--output", required=True, help="the report file (.html)")
    _add_condition_options(rp, "both reagents")
    _add_phase_option(rp)
    _add_library_options(rp)
    # Checked in _report, not by choices=: naming the verdicts here would import the engine for --help.
    rp.add_argument("--only", action="append", metavar="VERDICT",
                    help="report only rows with this verdict: by-symmetry, selective, mixture, ruled-out or inert "
                    "(repeatable; default: every row)")
    rp.add_argument("--ids", metavar="FILE", help="report only the rows whose ID is listed in FILE (one per line)")
    rp.add_argument("--max-pages", type=int, default=200, metavar="N",
                    help="at most N substrate entries (default 200); the report says how many were left out")
    _add_run_options(rp)

    br = sub.add_parser("browse", help="open a library in the terminal app")
    br.add_argument("input", nargs="?", help="library file (default: the bundled sample catalogue)")
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


def _add_run_options(p: argparse.ArgumentParser) -> None:
    """Options of the commands that perceive a library and write a file."""
    p.add_argument("--workers", type=int, metavar="N", help="worker processes (default: all cores)")
    p.add_argument("--no-cache", action="store_true", help="perceive everything afresh; do not read or write the cache")
    p.add_argument("--force", action="store_true", help="replace an existing output file")


def _add_library_options(p: argparse.ArgumentParser) -> None:
    p.add_argument("--smiles-column", metavar="NAME", help="column holding SMILES (default: found by name)")
    p.add_argument("--id-column", metavar="NAME", help="column holding identifiers (default: found by name)")


def _conditions(args: argparse.Namespace, reagents: Sequence[str]):
    from halosift.engine import Conditions

    kwargs: dict[str, float | str] = {}
    for name, value in args.temp or ():
        for r in ([name] if name else reagents):
            kwargs[f"{r}_temp_c"] = value
    if args.threshold is not None:
        kwargs["threshold_pct"] = args.threshold
    solvent = getattr(args, "solvent", None)  # only explain and screen offer --solvent
    if solvent is not None:
        kwargs["cl2_solvent"], kwargs["cl2_solvent_molar"] = solvent
    if getattr(args, "phase", None) is not None:
        kwargs["cl2_phase"] = args.phase
    cond = Conditions(**kwargs)
    cond.validate()
    return cond


def _explain(args: argparse.Namespace) -> int:
    from halosift.engine import CAUTION, explain
    from halosift.formatting import explanation_table

    from halosift.engine.reagents import UnsupportedReagent, check_reagent

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
    from halosift.engine.provenance import export_metadata
    from halosift.progress import summary_lines

    started = time.monotonic()
    try:
        cond = _run_conditions(args)
    except ValueError as exc:
        return _fail(str(exc))
    from halosift.engine.distributed import DaskError, parse_target

    try:
        if args.dask is not None:
            parse_target(args.dask)  # a malformed address fails before any file is read
        check_output(args.output, force=args.force, protect=[args.input])
        library = _load(args, quiet=args.quiet)
        result = library.evaluate(cond)
        meta = export_metadata(cond, source=str(args.input))
        written = write_table(result, args.output, metadata=meta, force=args.force, protect=[args.input])
    except (LibraryError, DaskError) as exc:
        return _fail(str(exc))
    except Cancelled:
        return _fail("cancelled")
    if not args.quiet:
        for line in summary_lines(result, time.monotonic() - started):
            print(line, file=sys.stderr)
        for warning in cond.warnings():
            print(f"warning: {warning}", file=sys.stderr)
        print(f"wrote {written}", file=sys.stderr)
    return EXIT_OK


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
        check_report_output(args.output, force=args.force, protect=[args.input])
        ids = read_ids(args.ids) if args.ids else None
        library = _load(args, quiet=False)
        result = library.evaluate(cond)
        id_values = library.input[library.id_column] if library.id_column is not None else None
        ids_source = Path(args.ids).name if args.ids else ""
        chosen = select_rows(result, id_values, only=args.only or (), ids=ids, ids_source=ids_source)
        report = render_report(
            library, cond, rows=chosen.rows, selection=chosen.description, source=str(args.input),
            max_pages=args.max_pages, missing_ids=chosen.missing_ids,
        )
        written = write_report(report.html, args.output, force=args.force, protect=[args.input])
    except LibraryError as exc:
        return _fail(str(exc))
    except Cancelled:
        return _fail("cancelled")
    for warning in cond.warnings():
        print(f"warning: {warning}", file=sys.stderr)
    if chosen.missing_ids:
        some = "1 ID" if len(chosen.missing_ids) == 1 else f"{len(chosen.missing_ids):,} IDs"
        print(f"warning: {some} from {args.ids} not in the library", file=sys.stderr)
    left = f"; {report.n_left_out:,} more left out by --max-pages" if report.n_left_out else ""
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


def _load(args: argparse.Namespace, *, quiet: bool):
    """The library named on the command line, perceived with a progress bar on a terminal."""
    from halosift.engine import load_library
    from halosift.progress import ProgressLine

    bar = ProgressLine(enabled=not quiet)
    try:
        return load_library(
            args.input, smiles_column=args.smiles_column, id_column=args.id_column, workers=args.workers,
            use_cache=not args.no_cache, progress=bar, caller_helps=True,  # no interface to keep free here
            dask=getattr(args, "dask", None),
        )
    finally:
        bar.close()


def _browse(args: argparse.Namespace) -> int:
    from halosift.tui.app import run

    return run(args.input, smiles_column=args.smiles_column, id_column=args.id_column, images=not args.no_images,
               fresh=args.fresh)


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

    def woken(signum: int, frame: object) -> None:
        if caught:
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


def main(argv: Sequence[str] | None = None) -> int:
    """Entry point of the console script."""
    parser = build_parser()
    args = parser.parse_args(argv)
    if args.command is None:
        # No command: the app on the bundled sample catalogue.
        args = parser.parse_args(["browse"])
    handlers = {"explain": _explain, "screen": _screen, "report": _report}
    try:
        if args.command == "browse":
            return _browse(args)  # the app owns its keys and the terminal
        with _stop_on_signals(), _cache_notes():
            return handlers[args.command](args)
    except _Stopped as exc:
        print(f"halosift: stopped by {signal.Signals(exc.signum).name}", file=sys.stderr)
        return 128 + exc.signum
    except KeyboardInterrupt:
        print("halosift: interrupted", file=sys.stderr)
        return 130


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
