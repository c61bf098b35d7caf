"""The `halosift` command: explain one SMILES, screen a library, or browse it in the app."""

from __future__ import annotations

import argparse
import json
import sys
from collections.abc import Sequence

from halosift.formatting import explanation_table

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
    if name and name not in ("cl2", "br2"):
        raise argparse.ArgumentTypeError(f"unknown reagent {name!r} in --temp (use cl2=°C or br2=°C)")
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
        help=f"temperature in °C: a bare number applies to {what}; or cl2=°C / br2=°C "
        "(repeatable; defaults cl2 25, br2 125)",
    )
    p.add_argument("--threshold", type=float, metavar="PCT", help="bromination share that counts as selective (default 90)")


def build_parser() -> argparse.ArgumentParser:
    """The argument parser for all subcommands."""
    parser = _Parser(prog="halosift", description="Predict free-radical halogenation outcomes for hydrocarbons.")
    sub = parser.add_subparsers(dest="command", parser_class=_Parser)

    ex = sub.add_parser("explain", help="every monohalide of one SMILES, with percentages")
    ex.add_argument("smiles")
    ex.add_argument("--reagent", action="append", choices=["cl2", "br2"], help="repeatable; default both")
    _add_condition_options(ex, "the reagents given")
    ex.add_argument("--json", action="store_true", help="print one JSON object")

    sc = sub.add_parser("screen", help="screen a library file; one output row per input row")
    sc.add_argument("input", help="CSV, TSV, Parquet, SMI or SDF (optionally .gz)")
    sc.add_argument("-o", "--output", required=True, help="CSV, TSV, Parquet or SDF (by extension)")
    _add_condition_options(sc, "both reagents")
    _add_library_options(sc)
    sc.add_argument("--workers", type=int, metavar="N", help="worker processes (default: all cores)")
    sc.add_argument("--no-cache", action="store_true", help="perceive everything afresh; do not read or write the cache")
    sc.add_argument("--force", action="store_true", help="replace an existing output file")
    sc.add_argument("--quiet", action="store_true", help="no progress bar and no summary")

    br = sub.add_parser("browse", help="open a library in the terminal app")
    br.add_argument("input", nargs="?", help="library file (default: the bundled sample catalogue)")
    _add_library_options(br)
    return parser


def _add_library_options(p: argparse.ArgumentParser) -> None:
    p.add_argument("--smiles-column", metavar="NAME", help="column holding SMILES (default: found by name)")
    p.add_argument("--id-column", metavar="NAME", help="column holding identifiers (default: found by name)")


def _conditions(args: argparse.Namespace, reagents: Sequence[str]):
    from engine import Conditions

    kwargs: dict[str, float] = {}
    for name, value in args.temp or ():
        for r in ([name] if name else reagents):
            kwargs[f"{r}_temp_c"] = value
    if args.threshold is not None:
        kwargs["threshold_pct"] = args.threshold
    cond = Conditions(**kwargs)
    cond.validate()
    return cond


def _explain(args: argparse.Namespace) -> int:
    from engine import CAUTION, explain

    reagents = tuple(args.reagent or ("cl2", "br2"))
    reagents = tuple(dict.fromkeys(reagents))
    try:
        cond = _conditions(args, reagents)
    except ValueError as exc:
        return _fail(str(exc))
    result = explain(args.smiles, cond)
    warnings = [w for w in cond.warnings(reagents)]
    if args.json:
        d = result.to_dict(reagents)
        if result.status == "ok":
            d["warnings"] = warnings
            d["caution"] = CAUTION
        print(json.dumps(d, ensure_ascii=False, indent=2))
    elif result.status != "ok":
        print(f"halosift: rejected {args.smiles!r}: {result.reason}", file=sys.stderr)
    else:
        print(explanation_table(result, reagents, warnings))
    return EXIT_OK if result.status == "ok" else EXIT_USAGE


def _screen(args: argparse.Namespace) -> int:
    import time

    from engine import Cancelled, LibraryError, load_library
    from engine.io import check_output, write_table
    from engine.provenance import export_metadata
    from halosift.progress import ProgressLine, summary_lines

    started = time.monotonic()
    try:
        cond = _conditions(args, ("cl2", "br2"))
        if args.workers is not None and args.workers < 1:
            raise ValueError("--workers must be at least 1")
    except ValueError as exc:
        return _fail(str(exc))
    try:
        check_output(args.output, force=args.force, protect=[args.input])
        bar = ProgressLine(enabled=not args.quiet)
        try:
            library = load_library(
                args.input, smiles_column=args.smiles_column, id_column=args.id_column, workers=args.workers,
                use_cache=not args.no_cache, progress=bar,
            )
        finally:
            bar.close()
        result = library.evaluate(cond)
        meta = export_metadata(cond, source=str(args.input))
        written = write_table(result, args.output, metadata=meta, force=args.force, protect=[args.input])
    except LibraryError as exc:
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


def _browse(args: argparse.Namespace) -> int:
    from tui.app import run

    return run(args.input, smiles_column=args.smiles_column, id_column=args.id_column)


def _fail(message: str) -> int:
    print(f"halosift: {message}", file=sys.stderr)
    return EXIT_USAGE


def main(argv: Sequence[str] | None = None) -> int:
    """Entry point of the console script."""
    parser = build_parser()
    args = parser.parse_args(argv)
    if args.command is None:
        # No command: the app on the bundled sample catalogue.
        args = parser.parse_args(["browse"])
    handlers = {"explain": _explain, "screen": _screen, "browse": _browse}
    try:
        return handlers[args.command](args)
    except KeyboardInterrupt:
        print("halosift: interrupted", file=sys.stderr)
        return 130


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
