"""The `gdof` command.  Subcommands are thin: each reads input, calls the engine, prints.

Exit status (documented in README): 0 every claim proved, 1 some claim refuted, 2 bad input,
3 some claim unknown (and none refuted), 4 an internal error (a bug: please report it).
Every expected failure is one line on stderr; a traceback only with --debug.
"""

from __future__ import annotations

import argparse
import sys

from verifier.errors import GdofError

from .exit_codes import EXIT_INPUT, EXIT_INTERNAL


class _Parser(argparse.ArgumentParser):
    """argparse, but a usage mistake is one line and exit 2 like every other bad input."""

    def error(self, message):
        raise GdofError(f"{self.prog}: {message} (see --help)")


def _common(p: argparse.ArgumentParser) -> None:
    p.add_argument("--solver", choices=("z3", "cvc5"), default="z3", help="SMT backend (default z3)")
    p.add_argument("--cross-check", action="store_true",
                   help="ask both z3 and cvc5; a disagreement is reported and the verdict is unknown")
    p.add_argument("--timeout", type=float, default=30.0, help="seconds per solver query (default 30)")


def build_parser() -> argparse.ArgumentParser:
    parser = _Parser(prog="gdof", description="Prove or refute GDoF claims region by region, exactly.")
    parser.add_argument("--debug", action="store_true", help="show tracebacks of internal errors")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    from . import commands
    for name, (helptext, configure, run) in commands.REGISTRY.items():
        p = sub.add_parser(name, help=helptext, description=helptext)
        if getattr(configure, "solver_options", True):
            _common(p)
        configure(p)
        p.set_defaults(run=run)
    return parser


def main(argv=None) -> int:
    argv = sys.argv[1:] if argv is None else argv
    debug = "--debug" in argv
    try:
        args = build_parser().parse_args(argv)
        if not getattr(args, "run", None):
            build_parser().print_help()
            return EXIT_INPUT
        return args.run(args)
    except GdofError as err:
        print(f"gdof: error: {err}", file=sys.stderr)
        return EXIT_INPUT
    except BrokenPipeError:  # output piped into `head`: not an error of ours
        return 0
    except KeyboardInterrupt:
        print("gdof: interrupted", file=sys.stderr)
        return 130
    except RecursionError:
        print("gdof: error: input nested too deeply", file=sys.stderr)
        return EXIT_INPUT
    except Exception as exc:  # a bug in the tool: say so in one line, never pretend a verdict
        if debug:
            raise
        print(f"gdof: internal error: {type(exc).__name__}: {exc} (rerun with --debug)", file=sys.stderr)
        return EXIT_INTERNAL


if __name__ == "__main__":
    sys.exit(main())
