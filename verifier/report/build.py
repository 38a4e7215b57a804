"""One report object for what the region-wise prover found, read by every renderer.

Why one structure: the terminal table, Markdown, LaTeX, JSON and the plots must never disagree, so
each renderer is a pure function of the same `Report`, and nothing is recomputed while rendering.
A `Report` holds one `ClaimReport` per (sub)claim, built from a `RegimeProof` without further solver
work: per regime its constraints, interior point, affine formula and active named bounds of each side,
verdict and certificate status; thresholds; the failure set; the best counterexamples; redundant bounds;
maximum gaps; solver versions; and the caution that a verdict is about exponents only.

Engine level: no channel vocabulary here beyond the caution, whose wording callers may replace.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction
from typing import Mapping, Sequence

from verifier.claims.kinds import Claim
from verifier.claims.witness import Counterexample
from verifier.expressions.expr import Affine, format_number
from verifier.expressions.display import display_text
from verifier.expressions.region import Atom
from verifier.regimes.analysis import Gap, PartReport
from verifier.regimes.failure import FailureRegion
from verifier.regimes.polytope import Polytope
from verifier.regimes.proof import RegimeProof
from verifier.regimes.thresholds import Threshold

from verifier.core.verdicts import CAUTION  # one wording everywhere (re-exported here for renderers)


@dataclass(frozen=True)
class SideRow:
    """One compared expression on one regime: its affine formula and the named bounds attaining it."""

    label: str
    formula: Affine
    active: tuple[str, ...]


@dataclass(frozen=True)
class RegimeRow:
    """A regime as shown: convex pieces (usually one), an interior point, each side, the verdict."""

    index: int
    polytopes: tuple[Polytope, ...]
    point: Mapping[str, Fraction]
    dim: int
    sides: tuple[SideRow, ...]
    verdict: str
    certified: bool
    note: str = ""
    names: tuple[str, ...] = ()   # the claim's parameter order, in which the constraints read

    @property
    def constraints(self) -> str:
        texts = [constraint_text(p.polyhedron.atoms, self.names) for p in self.polytopes]
        return texts[0] if len(texts) == 1 else " or ".join(f"({t})" for t in texts)


@dataclass(frozen=True)
class ClaimReport:
    """Everything reported about one (sub)claim; `claim` is kept for plots, not serialised."""

    claim: Claim
    name: str
    label: str
    statement: str
    kind: str
    status: str
    method: str
    detail: str
    names: tuple[str, ...]
    labels: tuple[str, ...]
    regimes: tuple[RegimeRow, ...]
    thresholds: tuple[Threshold, ...]
    failure: FailureRegion | None
    counterexamples: tuple[Counterexample, ...]
    parts: tuple[PartReport, ...]
    gaps: tuple[Gap, ...]
    smt_solver: str
    smt_status: str
    agree: bool | None
    certified: bool
    cells: int
    seconds: float
    expect: str | None = None
    checked: bool | None = None    # certificates and coverage re-verified by the standalone checker
    proof: RegimeProof | None = field(default=None, compare=False, repr=False)  # for certificates; not serialised
    optimality: object = None      # verifier.regimes.optimality.OptimalityRegion (comparison claims) or None
    counterexample_regimes: tuple[tuple[int, ...], ...] = ()   # per counterexample: regimes holding it

    def regimes_of(self, k: int) -> tuple[RegimeRow, ...]:
        """The regime rows that hold the k-th counterexample (see _regimes_holding)."""
        wanted = self.counterexample_regimes[k] if k < len(self.counterexample_regimes) else ()
        return tuple(r for r in self.regimes if r.index in wanted)

    def to_sympy(self, side: int = 0):
        """One side as a sympy Piecewise over the regimes (for notebooks and further algebra)."""
        from verifier.text.sympy_bridge import piecewise_to_sympy
        return piecewise_to_sympy([(r.sides[side].formula, [p.polyhedron.atoms for p in r.polytopes])
                                   for r in self.regimes])

    @property
    def title(self) -> str:
        base = self.name or self.statement
        return f"{base} [{self.label}]" if self.label else base

    @property
    def redundant(self) -> tuple[PartReport, ...]:
        return tuple(p for p in self.parts if p.redundant)

    def side_label(self, side: int) -> str:
        return ("lhs", "rhs")[side] if side < 2 else str(side)


@dataclass(frozen=True)
class ClaimEntry:
    """One claim as the user stated it, with its one verdict and the region-wise reports of its parts.

    A claim about a scheme given regime by regime is decided as several parts (one per regime
    combination) plus coverage; `status` is the claim's verdict from verifier.core.verdicts, the same as
    `gdof check` prints; each section keeps its own part verdict.  `notes`: uncovered points, why
    the claim is unknown, loud disagreements."""

    name: str
    statement: str
    status: str
    sections: tuple[ClaimReport, ...]
    expect: str | None = None
    notes: tuple[str, ...] = ()
    obligations: tuple = field(default=(), compare=False, repr=False)   # verifier.core.verdicts.Obligation
    regions: tuple = ()   # verifier.rates.regimes RegionRegimes / RegionNotShown of a region claim
    rate_claim: object = field(default=None, compare=False, repr=False)     # verifier.rates RateClaim
    rate_witness: object = field(default=None, compare=False, repr=False)   # its RateWitness, if any
    claim: Claim | None = field(default=None, compare=False, repr=False)  # the claim as stated (LaTeX sets it as math)


@dataclass(frozen=True)
class Report:
    """A titled list of claims (each with its part reports), solver versions and the caution."""

    title: str
    source: str
    claims: tuple[ClaimEntry, ...]
    solver: str
    versions: Mapping[str, str] = field(default_factory=dict)
    caution: str = CAUTION

    @property
    def sections(self) -> tuple[ClaimReport, ...]:
        """Every part report, claim by claim."""
        return tuple(s for c in self.claims for s in c.sections)

    @property
    def status_counts(self) -> dict[str, int]:
        from verifier.core.verdicts import tally
        return tally(c.status for c in self.claims)


def _regime_row(regime, labels: Sequence[str], names: Sequence[str] = ()) -> RegimeRow:
    sides = tuple(SideRow(labels[s], regime.forms[s],
                          regime.active[s] if s < len(regime.active) else ())
                  for s in range(len(labels)))
    return RegimeRow(regime.index, regime.polytopes, dict(regime.point), regime.dim, sides,
                     regime.status, regime.certified, regime.detail, tuple(names))


def _regimes_holding(regimes: Sequence[RegimeRow], point: Mapping[str, Fraction]) -> tuple[int, ...]:
    """Numbers of the regimes whose pieces contain `point`, exactly: one for a point inside a regime,
    several on a boundary that regimes share, none when the point lies in no regime shown (a regime
    that names a parameter the point lacks is not one that holds it).  Read off at build time so that
    a counterexample can be matched with its row of the regime table without recomputing anything."""
    hits = []
    for r in regimes:
        try:
            if any(p.polyhedron.contains(point) for p in r.polytopes):
                hits.append(r.index)
        except KeyError:
            continue
    return tuple(hits)


def claim_report(proof: RegimeProof, label: str = "", expect: str | None = None) -> ClaimReport:
    """The report of one RegimeProof (no solver calls; everything is read off the proof)."""
    c = proof.claim
    smt = proof.smt
    regimes = tuple(_regime_row(r, proof.labels, proof.names) for r in proof.regimes)
    return ClaimReport(
        claim=c, name=c.name, label=label, statement=c.text(), kind=c.kind, status=proof.status,
        method=proof.method, detail=proof.detail, names=proof.names, labels=proof.labels,
        regimes=regimes,
        thresholds=proof.thresholds, failure=proof.failure, counterexamples=proof.counterexamples,
        parts=proof.parts, gaps=proof.gaps, smt_solver=smt.solver if smt else "",
        smt_status=smt.status if smt else "", agree=proof.agree, certified=proof.certified,
        cells=proof.cells, seconds=float(proof.timing.get("total", 0.0)), expect=expect,
        checked=proof.checked, proof=proof, optimality=proof.optimality,
        counterexample_regimes=tuple(_regimes_holding(regimes, x.point) for x in proof.counterexamples))


def build_report(proofs, title: str = "", source: str = "", solver: str = "z3",
                 caution: str = CAUTION, versions: Mapping[str, str] | None = None) -> Report:
    """A Report from ClaimEntry objects, or from a RegimeProof, a ClaimReport, or a sequence of them
    (or of (label, proof)); a bare proof or section is a claim of its own, with its own verdict."""
    if isinstance(proofs, (RegimeProof, ClaimReport, ClaimEntry)):
        proofs = [proofs]
    entries = []
    for item in proofs:
        if isinstance(item, tuple):
            item = claim_report(item[1], label=item[0])
        elif isinstance(item, RegimeProof):
            item = claim_report(item)
        if isinstance(item, ClaimReport):
            item = ClaimEntry(item.name, item.statement, item.status, (item,), item.expect, claim=item.claim)
        entries.append(item)
    if versions is None:
        from verifier.solvers.smt import versions as solver_versions
        versions = solver_versions()
    return Report(title, source, tuple(entries), solver, dict(versions), caution)


def constraint_text(atoms: Sequence[Atom], names: Sequence[str] = ()) -> str:
    """'1/2 <= alpha < 2/3, alpha < gamma' (exact numbers, verifier.expressions.display: normal forms,
    chains, the parameters in the order `names`); 'everywhere' when there is no atom.  Display only:
    region.constraint_text is the form that parses back to the same atoms in the same order."""
    return display_text(atoms, names)


# ---------------------------------------------------------------------------------------------
# small shared text helpers (exact numbers, points) used by the renderers
# ---------------------------------------------------------------------------------------------

def count(n: int, word: str, plural: str | None = None) -> str:
    """'1 regime', '2 regimes': numbers with the right form of the noun."""
    return f"{n} {word if n == 1 else (plural or word + 's')}"


def num(q) -> str:
    """An exact number as '3/4' (never a float)."""
    return format_number(Fraction(q))


def point_text(point: Mapping[str, Fraction]) -> str:
    return ", ".join(f"{k} = {num(v)}" for k, v in point.items())


def gap_text(g: Gap) -> str:
    if g.value is None:
        return f"sup({g.direction}) is unbounded" if g.point is not None or g.regime is not None \
            else f"sup({g.direction}): not computed"
    if g.attained:   # a maximum: the value is taken at the point
        return f"max({g.direction}) = {num(g.value)}" + (f" at {point_text(g.point)}" if g.point else "")
    near = f", approached near {point_text(g.point)}" if g.point else ""
    return f"sup({g.direction}) = {num(g.value)}{near} (not attained)"


def failure_share_text(f: FailureRegion) -> str:
    if f.share is None:
        return f"share of the region: {f.share_note}"
    return f"share of the region: {num(f.share)} ({f.share_note})"


def solver_text(report: Report) -> str:
    have = ", ".join(f"{k} {v}" for k, v in report.versions.items())
    return f"{report.solver} ({have})" if have else report.solver
