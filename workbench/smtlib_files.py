"""The proof obligations of every claim as SMT-LIB v2.6 files, for a bundle.

Why: a "proved" should be re-checkable without this project.  Each obligation of a claim's plan
(workbench.decide: coverage of regime-wise bounds, the claim on each part) is a question "does a
point exist where the obligation fails?"; written in SMT-LIB, any solver that reads the open standard
can answer it.  `unsat` means the obligation holds.  The expected answer is the tool's own: unsat
for a proved obligation, sat for a refuted one, unknown when undecided.
"""

from __future__ import annotations

import re
from pathlib import Path

from verifier.solvers.smt import smtlib_text

EXPECTED = {"proved": "unsat", "refuted": "sat", "unknown": "unknown"}

README = """Proof obligations in SMT-LIB v2.6, one file per obligation: claimNN_obligationK.smt2 (NN: the
claim's position in report.md).  Each file asks whether a point exists where the obligation fails;
`unsat` means the obligation holds, so a claim is proved when every one of its files is unsat.
The header comments say what each file means and (:status) which answer gdof-workbench got.
Run any SMT solver on them, e.g. `z3 FILE` or `cvc5 FILE`.
Exponents are real variables; with a grid the variables are integer numerators.  GDoF statements are
asymptotic in SNR: these files check the claim exactly as encoded, nothing about finite SNR.
"""


def _comment(entry, ob) -> str:
    flat = lambda text: re.sub(r"\s+", " ", str(text))  # noqa: E731
    lines = [f"claim: {flat(entry.name)}", f"statement: {flat(entry.statement)}",
             f"obligation: {flat(ob.what)}", "unsat means the obligation holds",
             f"gdof-workbench's answer: {EXPECTED[ob.status]} ({ob.status})"]
    return "\n".join(lines)


def write_obligations(report, folder: Path) -> list[Path]:
    """obligations/claimNN_obligationK.smt2 for every obligation that has a query, plus a README."""
    written = []
    for n, entry in enumerate(report.claims, 1):
        for k, ob in enumerate(entry.obligations, 1):
            if ob.query is None:
                continue
            target = Path(folder) / "obligations" / f"claim{n:02d}_obligation{k}.smt2"
            target.parent.mkdir(exist_ok=True)
            target.write_text(smtlib_text(ob.query, _comment(entry, ob), EXPECTED[ob.status]),
                              encoding="utf-8")
            written.append(target)
    if written:
        (Path(folder) / "obligations" / "README.txt").write_text(README, encoding="utf-8")
    return written
