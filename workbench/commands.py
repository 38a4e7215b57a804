"""Subcommands of `gdof`, registered by name: (help, configure(parser), run(args) -> exit code).

Adding a subcommand is adding one entry here and one small module; cli.py never changes.
"""

from __future__ import annotations

from . import bundle_cmd, casebook_cmd, check_cmd, network_cmd, report_cmd

REGISTRY: dict = {
    "check": ("check every claim of a case file and print verdicts with exact counterexamples",
              check_cmd.configure, check_cmd.run),
    "casebook": ("run every case file and compare each verdict with the declared one (regression run)",
                 casebook_cmd.configure, casebook_cmd.run),
    "network": ("print a case-file start with the cut-set bounds of a network description",
                network_cmd.configure, network_cmd.run),
    "report": ("prove each claim region by region and print the regimes, thresholds and counterexamples",
               report_cmd.configure, report_cmd.run),
    "bundle": ("write a folder with the report (Markdown, LaTeX, JSON), plots and counterexamples",
               bundle_cmd.configure, bundle_cmd.run),
}
