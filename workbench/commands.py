"""Subcommands of `gdof`, registered by name: (help, configure(parser), run(args) -> exit code).

Adding a subcommand is adding one entry here and one small module; cli.py never changes.
"""

from __future__ import annotations

from . import casebook_cmd, check_cmd

REGISTRY: dict = {
    "check": ("check every claim of a case file and print verdicts with exact counterexamples",
              check_cmd.configure, check_cmd.run),
    "casebook": ("run every case file and compare each verdict with the declared one (regression run)",
                 casebook_cmd.configure, casebook_cmd.run),
}
