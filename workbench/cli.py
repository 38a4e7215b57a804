"""The `gdof` command.  Subcommands are thin: each reads input, calls the engine, prints.

Exit status (documented in README): 0 every claim proved, 1 some claim refuted, 2 bad input,
3 some claim unknown (and none refuted), 4 an internal error (a bug: please report it).
Every expected failure is one line on stderr; a traceback only with --debug.
"""

from __future__ import annotations

import argparse
import errno
import math
import sys

from verifier.core.errors import GdofError

from .exit_codes import EXIT_INPUT, EXIT_INTERNAL


# the environment refusing output (full disk, quota, permissions, read-only mount): not a bug of ours
WRITE_ERRNOS = {errno.ENOSPC, errno.EDQUOT, errno.EACCES, errno.EPERM, errno.EROFS, errno.EFBIG}


class _Parser(argparse.ArgumentParser):
    """argparse, but a usage mistake is one line and exit 2 like every other bad input."""

    def error(self, message):
        raise GdofError(f"{self.prog}: {message} (see --help)")


MAX_WORKERS = 256   # a process each: more is a typo, and would fork that many processes


def seconds(text: str) -> float:
    """A positive, finite number of seconds (nan, inf, 0 and negative values are typos, not limits)."""
    try:
        value = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a number of seconds, found '{text}'") from None
    if not math.isfinite(value) or value <= 0:
        raise argparse.ArgumentTypeError(f"expected a finite number of seconds > 0, found '{text}'")
    return value


def _common(p: argparse.ArgumentParser) -> None:
    p.add_argument("--solver", choices=("z3", "cvc5"), default="z3", help="SMT backend (default z3)")
    p.add_argument("--cross-check", action="store_true",
                   help="ask both z3 and cvc5; a disagreement is reported and the verdict is unknown")
    p.add_argument("--timeout", type=seconds, default=30.0, help="seconds per solver query (default 30)")
    p.add_argument("--budget", type=seconds, default=600.0, metavar="SECONDS",
                   help="time allowed for each claim over all stages, solver queries included; running "
                        "out makes the claim unknown (exit 3), never proved (default 600)")


def _check_args(args) -> None:
    """Checks argparse cannot express; options a subcommand lacks are skipped."""
    workers = getattr(args, "workers", None)
    if workers is not None and not 1 <= workers <= MAX_WORKERS:
        raise GdofError(f"gdof {args.command}: argument --workers: expected 1 to {MAX_WORKERS}, "
                        f"found {workers} (see --help)")


def one_line(message) -> str:
    """Any message as one line: a newline in a file name must not split an error in two."""
    return "".join(ch if ch.isprintable() else repr(ch)[1:-1] for ch in str(message))


def _version() -> str:
    from importlib.metadata import PackageNotFoundError, version
    try:
        return version("gdof-workbench")
    except PackageNotFoundError:
        return "(not installed)"


def build_parser(argv=None) -> argparse.ArgumentParser:
    """The parser; only the subcommand named in `argv` (every one when argv is None) is imported
    and configured, so that a command loads only what it needs."""
    parser = _Parser(prog="gdof", description="Prove or refute GDoF claims region by region, exactly.")
    parser.add_argument("--debug", action="store_true", help="show tracebacks of internal errors")
    parser.add_argument("--version", action="version", version=f"gdof {_version()}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    from . import commands
    wanted = None if argv is None else next((a for a in argv if not a.startswith("-")), "")
    for name, (helptext, _) in commands.REGISTRY.items():
        p = sub.add_parser(name, help=helptext, description=helptext)
        if wanted is not None and name != wanted:
            continue
        mod = commands.module(name)
        if getattr(mod.configure, "solver_options", True):
            _common(p)
        mod.configure(p)
        p.set_defaults(run=mod.run)
    return parser


def main(argv=None) -> int:
    argv = sys.argv[1:] if argv is None else argv
    debug = "--debug" in argv
    try:
        args = build_parser(argv).parse_args(argv)
        if not getattr(args, "run", None):
            build_parser(argv).print_help()
            return EXIT_INPUT
        _check_args(args)
        code = args.run(args)
        sys.stdout.flush()   # a full disk under `> file` is reported here, not lost at exit
        return code
    except GdofError as err:
        print(f"gdof: error: {one_line(err)}", file=sys.stderr)
        return EXIT_INPUT
    except BrokenPipeError:  # output piped into `head`: not an error of ours
        return 0
    except KeyboardInterrupt:
        print("gdof: interrupted", file=sys.stderr)
        return 130
    except RecursionError:
        print("gdof: error: input nested too deeply", file=sys.stderr)
        return EXIT_INPUT
    except OSError as exc:
        if exc.errno not in WRITE_ERRNOS:
            if debug:
                raise
            print(one_line(f"gdof: internal error: {type(exc).__name__}: {exc} (rerun with --debug)"),
                  file=sys.stderr)
            return EXIT_INTERNAL
        where = f"'{exc.filename}': " if exc.filename else "writing the output: "
        print(one_line(f"gdof: error: {where}{exc.strerror or exc}"), file=sys.stderr)
        return EXIT_INPUT
    except Exception as exc:  # a bug in the tool: say so in one line, never pretend a verdict
        if debug:
            raise
        print(one_line(f"gdof: internal error: {type(exc).__name__}: {exc} (rerun with --debug)"),
              file=sys.stderr)
        return EXIT_INTERNAL


if __name__ == "__main__":
    sys.exit(main())
