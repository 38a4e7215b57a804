"""What deciding one case claim gives: an Outcome made of Parts (sub-claims and what decided them).

Why a module of its own: workbench.decide (scalar claims) and workbench.rate_decide (claims about
rate regions) both build Outcomes, and the commands read them, without importing each other.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from verifier.claims.one_shot import Verdict
from verifier.core.verdicts import PROVED, REFUTED


@dataclass
class Part:
    """One sub-claim and what decided it: a one-shot Verdict or a RegimeProof (with `.status`)."""

    label: str
    claim: object
    result: object = None            # Verdict | RegimeProof | None (empty sub-region)
    empty: bool = False

    @property
    def status(self) -> str:
        return PROVED if self.empty else self.result.status

    @property
    def counterexample(self):
        r = self.result
        if r is None:
            return None
        if isinstance(r, Verdict):
            return r.counterexample
        return r.counterexamples[0] if r.counterexamples else None


@dataclass
class Outcome:
    case_claim: object
    status: str
    parts: list = field(default_factory=list)        # [Part] with a non-empty sub-region
    uncovered: list = field(default_factory=list)    # [(bound name, point)]
    notes: list = field(default_factory=list)        # why unknown, loud disagreements
    obligations: tuple = ()
    seconds: float = 0.0
    rate_witness: object = None                      # a rate-region claim's refuting pair (exponents, rates)
    rate_regimes: list = field(default_factory=list)  # regimes of its H-form regions (report only)

    @property
    def verdicts(self) -> list:
        """[(label, Verdict)] of the one-shot method (check); RegimeProofs are in `parts`."""
        return [(p.label, p.result) for p in self.parts if isinstance(p.result, Verdict)]

    @property
    def first_failure(self) -> tuple[str, object] | None:
        for p in self.parts:
            if p.status == REFUTED:
                return p.label, p.result
        return None

    @property
    def detail(self) -> str:
        return "; ".join(self.notes)
