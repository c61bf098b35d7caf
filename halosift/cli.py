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


def _add_condition_options(p: argparse.ArgumentParser) -> None:
    p.add_argument(
        "--temp",
        type=float,
        metavar="°C",
        help="temperature in °C for the reagents given (defaults: cl2 25, br2 125)",
    )
    p.add_argument("--threshold", type=float, metavar="PCT", help="bromination share that counts as selective (default 90)")


def build_parser() -> argparse.ArgumentParser:
    """The argument parser for all subcommands."""
    parser = _Parser(prog="halosift", description="Predict free-radical halogenation outcomes for hydrocarbons.")
    sub = parser.add_subparsers(dest="command", parser_class=_Parser)

    ex = sub.add_parser("explain", help="every monohalide of one SMILES, with percentages")
    ex.add_argument("smiles")
    ex.add_argument("--reagent", action="append", choices=["cl2", "br2"], help="repeatable; default both")
    _add_condition_options(ex)
    ex.add_argument("--json", action="store_true", help="print one JSON object")
    return parser


def _conditions(args: argparse.Namespace, reagents: Sequence[str]):
    from engine import Conditions

    kwargs: dict[str, float] = {}
    if args.temp is not None:
        for r in reagents:
            kwargs[f"{r}_temp_c"] = args.temp
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
        print(f"halosift: {exc}", file=sys.stderr)
        return EXIT_USAGE
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


def main(argv: Sequence[str] | None = None) -> int:
    """Entry point of the console script."""
    parser = build_parser()
    args = parser.parse_args(argv)
    if args.command is None:
        parser.print_help()
        return EXIT_OK
    handlers = {"explain": _explain}
    try:
        return handlers[args.command](args)
    except KeyboardInterrupt:
        print("halosift: interrupted", file=sys.stderr)
        return 130


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
