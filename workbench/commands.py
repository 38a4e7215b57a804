"""Subcommands of `gdof`, registered by name: (help, module).  Each module has configure(parser)
and run(args) -> exit code (and may set configure.solver_options = False).

Why modules by name: a command imports only what it needs (`gdof check` must not load the plotting
library that `gdof bundle` uses), so startup stays short.  Adding a subcommand is adding one entry
here and one small module; cli.py never changes.
"""

from __future__ import annotations

import importlib

REGISTRY: dict[str, tuple[str, str]] = {
    "check": ("check every claim of a case file and print verdicts with exact counterexamples",
              "workbench.check_cmd"),
    "casebook": ("run every case file and compare each verdict with the declared one (regression run)",
                 "workbench.casebook_cmd"),
    "network": ("print a case-file start with the cut-set bounds of a network description",
                "workbench.network_cmd"),
    "report": ("prove each claim region by region and print the regimes, thresholds and counterexamples",
               "workbench.report_cmd"),
    "bundle": ("write a folder with the report (Markdown, LaTeX, JSON), plots and counterexamples",
               "workbench.bundle_cmd"),
}


def module(name: str):
    """The subcommand's module, imported on first use."""
    return importlib.import_module(REGISTRY[name][1])
