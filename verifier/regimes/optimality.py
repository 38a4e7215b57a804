"""The exact set of exponents where a claim holds (for `inner == outer`: where the scheme is optimal),
and its complement, as simplified unions of polyhedra ready to paste into a review.

Why exact: on each cell of the region-wise proof every compared expression is affine, so the claim
holds on the cell exactly on the polyhedron cell & {every obligation} (regime_spec.obligations; for
`==` that is cell & {L - R = 0}: the boundary where the two sides meet belongs to the holds set, with
exactly the strictness the obligations have) and fails exactly on the failure pieces that
verifier.regimes.failure already computes.  The cells partition the region, so the two unions partition it.

Why simplified, and how (every step keeps the set exactly):
1. normalise each constraint (normalised_atom): a constraint in one parameter gets coefficient 1
   (`alpha < 1/2`, which chains into `1/3 < alpha < 1/2`); a constraint in several gets coprime
   integer coefficients and constant (`gamma > 1 + alpha`, not `gamma/2 > 1/2 + alpha/2`;
   `2*gamma > 1 + alpha`, not `gamma > 1/2 + alpha/2`).  Positive scaling never changes a half-space.
2. drop redundant constraints (lp_shape.irredundant: exact Farkas certificates).
3. merge two pieces whenever their union is convex (union_if_convex): the candidate hull keeps the
   constraints of each piece that the other satisfies (relaxed when only the relaxed one holds); it
   contains both pieces by construction, and it is accepted only when the exact set difference
   hull \\ (P u Q) is empty, so an accepted merge is the union exactly.  Repeat until no pair merges.
4. present each piece relative to the claim's region K when K is one polyhedron (relative_to):
   a constraint implied by K and the piece's other constraints is dropped, so the printed piece P'
   satisfies P' & K = P; the text says "within K".
5. order: equalities first, then bounds on one parameter (lower before upper, so they chain), then
   the rest; pieces by their interior points.
Every printed piece is re-checked: its interior point (lp_shape.nice_point) is evaluated with the
claim's own exact evaluator (claims.violated_at) and must hold (or fail) as labelled.

Merging asks pairwise LP questions and set differences (exponential in the worst case): the number of
pieces is limited by MAX_PIECES, and every loop checks the claim's budget.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from math import gcd
from typing import Sequence

from verifier.claims.kinds import Claim, violated_at, witness_region
from verifier.core.budget import Budget
from verifier.expressions.expr import affine
from verifier.expressions.display import DISPLAY, display_parts, display_text
from verifier.expressions.region import Atom, Notation, Polyhedron
from verifier.geometry.lp import feasible
from verifier.geometry.shape import difference, implied, irredundant, nice_point
from verifier.regimes.spec import Spec, obligations

MAX_PIECES = 200   # raw pieces (cells that hold somewhere, failure pieces) before merging
MAX_MERGE_TESTS = 200   # pair tests when merging (each an exact set difference); beyond: left unmerged
MAX_WIDEN_PIECES = 16  # pieces of one set that widening still tries to shorten
STAGE = "optimality region"


@dataclass(frozen=True)
class OptimalityRegion:
    """Where the claim holds and where it fails, over `names` (the regime space; a slice claim's
    substituted names are eliminated), each a union of `pieces` (tuples of atoms, printed
    relative to `within` when that is set: the set is then within & piece)."""

    names: tuple[str, ...]
    within: tuple[Atom, ...] | None
    holds: tuple[tuple[Atom, ...], ...]
    fails: tuple[tuple[Atom, ...], ...]
    holds_points: tuple[dict, ...]
    fails_points: tuple[dict, ...]
    substituted: tuple = ()        # a slice claim's (name, expression): the sets live on that slice

    @property
    def everywhere(self) -> bool:
        return not self.fails

    @property
    def nowhere(self) -> bool:
        return not self.holds


# ---------------------------------------------------------------------------------------------
# normalised constraints
# ---------------------------------------------------------------------------------------------

def normalised_atom(atom: Atom) -> Atom:
    """The same half-space, scaled by a positive number: coefficient 1 when it bounds one parameter,
    else coprime integers (coefficients and constant together)."""
    coeffs = atom.form.coeffs
    if not coeffs:
        return atom
    if len(coeffs) == 1:
        k = 1 / abs(coeffs[0][1])
    else:
        values = [c for _, c in coeffs] + ([atom.form.const] if atom.form.const else [])
        den = 1
        for v in values:
            den = den * v.denominator // gcd(den, v.denominator)
        num = 0
        for v in values:
            num = gcd(num, int(v * den))
        k = Fraction(den, num)
    return Atom(affine([(n, c * k) for n, c in coeffs], atom.form.const * k), atom.strict)


def _is_lower(atom: Atom) -> bool:
    return atom.form.coeffs[0][1] > 0


def ordered(atoms: Sequence[Atom], names: Sequence[str]) -> tuple[Atom, ...]:
    """Normalised, deduplicated, in display order (module docstring, step 5); an equality's two
    halves adjacent, the half whose last parameter has a positive coefficient first."""
    atoms = list(dict.fromkeys(normalised_atom(a) for a in atoms if a.form.coeffs))
    rank = {n: i for i, n in enumerate(names)}
    forms = {a.form for a in atoms if not a.strict}
    eqs, singles, rest, seen = [], [], [], set()
    for a in atoms:
        neg = Atom(affine([(n, -c) for n, c in a.form.coeffs], -a.form.const), False)
        if not a.strict and neg.form in forms and len(a.form.coeffs) > 1:
            if a.form in seen:
                continue
            first, second = (a, neg) if a.form.coeffs[-1][1] > 0 else (neg, a)
            eqs += [first, second]
            seen |= {a.form, neg.form}
        elif len(a.form.coeffs) == 1:
            singles.append(a)
        else:
            rest.append(a)
    singles.sort(key=lambda a: (rank.get(a.form.coeffs[0][0], len(rank)), not _is_lower(a)))
    rest.sort(key=lambda a: a.text())
    return tuple(eqs + singles + rest)


# ---------------------------------------------------------------------------------------------
# exact merging
# ---------------------------------------------------------------------------------------------

def _valid_version(atom: Atom, other: Sequence[Atom], names) -> Atom | None:
    if implied(atom, other, names):
        return atom
    if atom.strict and implied(atom.relaxed(), other, names):
        return atom.relaxed()
    return None


def union_if_convex(p: Sequence[Atom], q: Sequence[Atom], names: Sequence[str]) -> tuple[Atom, ...] | None:
    """The polyhedron equal to P u Q, or None when this test finds none (module docstring, step 3)."""
    if feasible([a.relaxed() for a in list(p) + list(q)], names) is None:
        return None      # closures apart: the union of two disjoint closed-apart sets is not convex
    hull = []
    for mine, other in ((p, q), (q, p)):
        for a in mine:
            v = _valid_version(a, other, names)
            if v is not None:
                hull.append(v)
    hull = list(dict.fromkeys(hull))
    if difference(hull, [tuple(p), tuple(q)], names):
        return None
    return irredundant(hull, names)[0]


def merged(pieces: Sequence[Sequence[Atom]], names: Sequence[str], budget: Budget | None = None):
    """Pieces (each non-empty) merged pairwise while some union is convex; irredundant each.  At
    most MAX_MERGE_TESTS pair tests: beyond that the remaining pieces are left as they are (still
    exact, less simplified)."""
    out = [irredundant([normalised_atom(a) for a in p], names)[0] for p in pieces]
    changed, tests = True, 0
    failed: set = set()   # pairs whose union is not convex stay so: never tested twice
    planes = {}           # piece -> its hyperplanes (None: it has an equality, so maybe lower-dimensional)
    while changed and tests < MAX_MERGE_TESTS:
        changed = False
        for i in range(len(out)):
            for j in range(i + 1, len(out)):
                if (out[i], out[j]) in failed or _apart(out[i], out[j], planes):
                    continue
                if budget is not None:
                    budget.check(STAGE)
                tests += 1
                if tests > MAX_MERGE_TESTS:    # stop simplifying: the pieces stay exact, unmerged
                    break
                u = union_if_convex(out[i], out[j], names)
                if u is None:
                    failed.add((out[i], out[j]))
                else:
                    out[i] = u
                    del out[j]
                    changed = True
                    break
            if changed:
                break
    return out


def _plane(form) -> tuple:
    lead = form.coeffs[0][1]
    return tuple((n, c / lead) for n, c in form.coeffs), form.const / lead


def _hyperplanes(atoms: Sequence[Atom]):
    """(equalities, hyperplanes of the other atoms on their affine hull), each hyperplane up to a
    non-zero factor; None when it cannot tell (an atom bounding a hyperplane twice)."""
    atoms = [a for a in atoms if a.form.coeffs]
    forms = {a.form for a in atoms if not a.strict}
    eqs = [a for a in atoms if not a.strict and _neg(a).form in forms]
    rest = [a for a in atoms if a not in eqs]
    eq_planes = frozenset(_plane(a.form) for a in eqs)
    out = set()
    for a in (_on_hull(rest, eqs) if eqs else rest):
        key = _plane(a.form)
        if key in out:
            return None
        out.add(key)
    return eq_planes, frozenset(out)


def _apart(p, q, planes) -> bool:
    """A quick reason not to test a pair: two pieces of full dimension on the same affine hull, with
    disjoint relative interiors, have a convex union only when they meet along a common facet,
    whose hyperplane then bounds both (irredundant) pieces.  Skipping a pair only leaves the sets
    less simplified, never wrong."""
    for x in (p, q):
        if x not in planes:
            planes[x] = _hyperplanes(x)
    if planes[p] is None or planes[q] is None or planes[p][0] != planes[q][0]:
        return False
    return not planes[p][1] & planes[q][1]


def _neg(a: Atom) -> Atom:
    return Atom(affine([(n, -c) for n, c in a.form.coeffs], -a.form.const), False)


def implicit_equalities(atoms: Sequence[Atom], names: Sequence[str]) -> list[Atom]:
    """Non-strict atoms that hold with equality on the whole (non-empty) polyhedron."""
    return [a for a in atoms if not a.strict and a.form.coeffs and implied(_neg(a), atoms, names)]


def _on_hull(atoms: Sequence[Atom], eqs: Sequence[Atom]) -> list[Atom]:
    """The atoms with each equality's variable eliminated (`gamma > 1 + alpha` on alpha = 0 reads
    `gamma > 1`): the same set on the affine hull, which the equalities themselves keep.  An atom
    that becomes a constant holds there (the polyhedron is not empty) and is dropped."""
    from verifier.expressions.expr import substitute
    out = list(atoms)
    for e in eqs:
        n, c = sorted(e.form.coeffs, key=lambda t: (len(e.form.coeffs) > 1, t[0]))[-1]
        value = affine([(m, -d / c) for m, d in e.form.coeffs if m != n], -e.form.const / c)
        out = [Atom(substitute(a.form, {n: value}), a.strict) for a in out]
        out = [a for a in out if a.form.coeffs]
    return out


def relative_to(atoms: Sequence[Atom], context: Sequence[Atom], names: Sequence[str]) -> tuple[Atom, ...]:
    """Fewer, simpler constraints with the same intersection with the context: R & context ==
    atoms & context (module docstring, step 4).  Implicit equalities are stated as equalities and
    eliminated from the other constraints; an equality is dropped only as a whole."""
    full = list(atoms) + list(context)
    eqs = _independent([normalised_atom(a) for a in implicit_equalities(full, names)], names)
    forms = {e.form for e in eqs} | {_neg(e).form for e in eqs}
    hull = [x for e in eqs for x in (e, _neg(e))]
    keep = [normalised_atom(a) for a in _on_hull([a for a in atoms if normalised_atom(a).form not in forms
                                                  or a.strict], eqs)]
    keep = list(dict.fromkeys(keep))
    i = 0
    while i < len(keep):
        rest = keep[:i] + keep[i + 1:]
        if implied(keep[i], rest + hull + list(context), names):
            keep = rest
        else:
            i += 1
    pairs = [(e, _neg(e)) for e in eqs]
    i = 0
    while i < len(pairs):
        rest = [x for k, pair in enumerate(pairs) if k != i for x in pair]
        if all(implied(x, keep + rest + list(context), names) for x in pairs[i]):
            del pairs[i]
        else:
            i += 1
    return tuple([x for pair in pairs for x in pair] + keep)


def _independent(eqs: Sequence[Atom], names) -> list[Atom]:
    """A subset of the equalities that implies the rest (single-parameter ones first)."""
    out: list[Atom] = []
    for e in sorted(eqs, key=lambda a: (len(a.form.coeffs), a.text())):
        both = [x for f in out for x in (f, _neg(f))]
        if not (both and implied(e, both, names) and implied(_neg(e), both, names)):
            out.append(e)
    return out


def _units(piece: Sequence[Atom]) -> list[tuple[Atom, ...]]:
    """A piece's constraints with each equality's two halves as one unit (dropped together)."""
    out, used = [], set()
    for a in piece:
        if a in used:
            continue
        partner = next((b for b in piece if not a.strict and not b.strict and b.form == _neg(a).form), None)
        unit = (a, partner) if partner is not None and partner not in used else (a,)
        used.update(unit)
        out.append(unit)
    return out


def widened(pieces: Sequence[Sequence[Atom]], context: Sequence[Atom], names, budget=None):
    """Drop a constraint (an equality as a whole) of a piece whenever the larger piece, within the
    context, still lies in the union; then drop pieces the others cover.  The union is unchanged
    (exact set differences), the text shorter; the pieces may then overlap.  Each test is a set
    difference against every piece, so beyond MAX_WIDEN_PIECES pieces or MAX_MERGE_TESTS tests the
    pieces are left as they are (still exact, less simplified)."""
    if len(pieces) > MAX_WIDEN_PIECES:
        return [tuple(p) for p in pieces]
    pieces, tests = [list(p) for p in pieces], 0
    for k in range(len(pieces)):
        units, i = _units(pieces[k]), 0
        while i < len(units):
            if budget is not None:
                budget.check(STAGE)
            tests += 1
            if tests > MAX_MERGE_TESTS:
                return [tuple(p) for p in pieces]
            trial = [a for j, u in enumerate(units) if j != i for a in u]
            if difference(trial + list(context), [tuple(p) for p in pieces], names):
                i += 1
            else:
                del units[i]
                pieces[k] = trial
    k = 0
    while k < len(pieces):
        others = [tuple(p) for j, p in enumerate(pieces) if j != k]
        if others and not difference(pieces[k] + list(context), others, names):
            del pieces[k]
        else:
            k += 1
    return [tuple(p) for p in pieces]


# ---------------------------------------------------------------------------------------------
# the holds / fails sets of a region-wise proof
# ---------------------------------------------------------------------------------------------

class NotExact(Exception):
    """The sets cannot be stated exactly (undecided regimes, too many pieces, a failed re-check)."""


def _raw_pieces(spec: Spec, regimes) -> tuple[list, list]:
    """The holds and fails pieces, regime by regime: a regime's polytopes are exactly the union of its
    cells (verifier.regimes.polytope), and its formulas are the same on all of them, so working on
    regimes rather than cells gives the same sets with far fewer pieces to merge."""
    holds, fails = [], []
    for r in regimes:
        if r.status == "proved":
            holds += [tuple(p.polyhedron.atoms) for p in r.polytopes]
            continue
        if r.status != "refuted":
            raise NotExact(f"regime {r.index} is undecided")
        extra, empty = [], False
        for ob in obligations(spec, r.forms):
            if not ob.form.coeffs:
                empty = empty or not ob.holds({})
            else:
                extra.append(ob)
        if not empty:
            for p in r.polytopes:
                if feasible(list(p.polyhedron.atoms) + extra, spec.names) is not None:
                    holds.append(tuple(p.polyhedron.atoms) + tuple(extra))
        fails += [tuple(f.polyhedron.atoms) for f in r.failures]
    if len(holds) + len(fails) > MAX_PIECES:
        raise NotExact(f"{len(holds) + len(fails)} pieces before merging (limit {MAX_PIECES})")
    return holds, fails


def _recheck(claim: Claim, region, pieces, within, names, holds: bool) -> tuple[dict, ...]:
    points = []
    for p in pieces:
        atoms = list(p) + list(within or ())
        point = nice_point(atoms, names)
        if point is None or not region.contains(point) or violated_at(claim, point) == holds:
            raise NotExact("an interior point of a printed piece does not re-check: an engine defect")
        points.append(point)
    return tuple(points)


def _key(atoms, names):
    point = nice_point(list(atoms), names) or {}
    return tuple(point.get(n, 0) for n in names)


def optimality_region(claim: Claim, spec: Spec, regimes, region_pieces, budget: Budget | None = None):
    """(OptimalityRegion, '') for a comparison claim, or (None, why not)."""
    if spec.kind != "compare":
        return None, ""
    names = spec.names
    try:
        everywhere = all(getattr(c.extra, "status", "") == "proved" for r in regimes for c in r.cells)
        if everywhere:     # a proved claim: no cell to merge (merging is the costly part)
            holds, fails = [()], []
        else:
            holds, fails = _raw_pieces(spec, regimes)
            holds, fails = merged(holds, names, budget), merged(fails, names, budget)
        within = None
        if len(region_pieces) == 1:
            within = tuple(irredundant([normalised_atom(a) for a in region_pieces[0]], names)[0])
            holds = [relative_to(p, within, names) for p in holds]
            fails = [relative_to(p, within, names) for p in fails]
        holds = widened(holds, within or (), names, budget)
        fails = widened(fails, within or (), names, budget)
        holds = sorted((ordered(p, names) for p in holds), key=lambda p: _key(p + (within or ()), names))
        fails = sorted((ordered(p, names) for p in fails), key=lambda p: _key(p + (within or ()), names))
        region = witness_region(claim)
        if everywhere and within is None:   # several region pieces: re-check a point of the first
            within_check = tuple(region_pieces[0])
            hp = _recheck(claim, region, holds, within_check, names, True)
        else:
            hp = _recheck(claim, region, holds, within, names, True)
        fp = _recheck(claim, region, fails, within, names, False)
    except NotExact as exc:
        return None, f"exact holds/fails sets not shown: {exc}"
    return OptimalityRegion(names, ordered(within, names) if within is not None else None,
                            tuple(holds), tuple(fails), hp, fp, tuple(claim.subst)), ""


def contains(pieces, within, point) -> bool:
    """Is the point in within & (union of pieces)?  (For re-checks; exact.)"""
    if within is not None and not Polyhedron(tuple(within)).contains(point):
        return False
    return any(Polyhedron(tuple(p)).contains(point) for p in pieces)


def union_text(pieces, notation: Notation = DISPLAY, joiner: str = " or ", nowhere: str = "nowhere",
               names: Sequence[str] = ()) -> str:
    """`0 <= alpha <= 1/2 or alpha = 1` (verifier.expressions.display: normal forms, chains, the
    parameters in the order `names`); a piece of several constraints in parentheses when there are
    several pieces (`,` binds tighter than `or`, so the parentheses only help the reader)."""
    if not pieces:
        return nowhere
    parts = [display_parts(p, names, notation) for p in pieces]
    texts = [notation.joiner.join(x) or notation.everywhere for x in parts]
    if len(texts) == 1:
        return texts[0]
    return joiner.join(f"({t})" if len(x) > 1 else t for t, x in zip(texts, parts))


def sentences(op: OptimalityRegion, notation: Notation = DISPLAY, joiner: str = " or ") -> tuple[str, str, str]:
    """(holds, fails, within) as text in the notation: what the renderers print, every constraint in
    the display form of verifier.expressions.display and the order of the claim's parameters."""
    within = display_text(op.within, op.names, notation) if op.within else ""
    if op.substituted:   # the equalities of the slice, in the same display form
        from verifier.expressions.expr import param
        from verifier.expressions.region import atoms_of
        eqs = [a for n, e in op.substituted for a in atoms_of(param(n), "==", e)]
        on = display_text(eqs, op.names, notation)
        within = f"{within}{notation.joiner}{on}" if within else on
    return (union_text(op.holds, notation, joiner, names=op.names),
            union_text(op.fails, notation, joiner, names=op.names), within)
