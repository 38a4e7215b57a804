"""Claims about rate regions: explicit objects, one per statement a region theorem makes.

Kinds, with R the claim's exponent region and A, B rate regions:
- subset   A inside B:            for every theta in R, A(theta) is contained in B(theta)
- equal    A equals B:            both inclusions
- contains A contains the point p: p(theta) (PL coordinates) lies in A(theta) for every theta in R
- max      max of w.d over A REL f: the largest weighted sum (the support function at w) compared with
           a formula f(theta) by REL (==, <=, >=, <, >), for every theta in R
- support  A and B have equal support functions for every weight vector w >= 0 ("for all weights")
- redundant  facet j of the H-form A is implied by the others for every theta in R: decided as the
           'max' claim "max of facet j's left side over A without facet j <= its right side", so a
           refutation is a rate tuple of A without the facet that the facet cuts off, and the
           region-wise report shows exactly where the facet is active (its thresholds)

What is decided for `support`, exactly: both regions must be down-closed H-forms (d >= 0, every
coefficient >= 0); then h_A(w) = h_B(w) for all w >= 0 and all theta in R holds exactly when
A(theta) = B(theta) for all theta in R (closed convex down-closed sets of the orthant are determined
by their support function on the orthant: a point of one set outside the other is separated by some
w >= 0, because the other set's down-closure in all of R^K does not contain it), so the claim is
decided as the equality.  Other forms are refused with a message saying so.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction

from verifier.claims.kinds import RELATIONS
from verifier.core.errors import InputError
from verifier.expressions.expr import Expr, affine, lift, params, to_text
from verifier.expressions.region import Region

from verifier.rates.region import HRegion, RateRegion, VRegion, same_rates

KINDS = ("region subset", "region equal", "region contains", "region max", "region support",
         "region redundant")


@dataclass(frozen=True)
class RateClaim:
    """A statement about rate regions over the exponent region `region`.  Build with the functions below."""

    kind: str
    region: Region
    first: RateRegion
    second: RateRegion | None = None
    point: tuple[Expr, ...] = ()
    weights: tuple[tuple[str, Fraction], ...] = ()
    rel: str = "=="
    formula: Expr | None = None
    name: str = ""
    params: tuple[str, ...] = field(default=())
    index: int = 0          # the facet of a 'redundant' claim (0-based)

    def weights_text(self) -> str:
        return to_text(affine(self.weights))

    def text(self) -> str:
        where = f" where {self.region.text()}" if self.region != Region.everywhere() else ""
        a, b = self.first.name, self.second.name if self.second is not None else ""
        if self.kind == "region subset":
            return f"{a} subset {b}{where}"
        if self.kind == "region equal":
            return f"{a} == {b}{where}"
        if self.kind == "region contains":
            return f"{a} contains ({', '.join(to_text(e) for e in self.point)}){where}"
        if self.kind == "region max":
            return f"max {self.weights_text()} over {a} {self.rel} {to_text(self.formula)}{where}"
        if self.kind == "region redundant":
            q = self.first.inequalities[self.index]
            return f"{a} facet {self.index + 1} ('{q.text()}') is redundant{where}"
        return f"{a} == {b} for all weights{where}"


def _names(region: Region, *regions, extra=()) -> tuple[str, ...]:
    out = set(region.params()) | set(extra)
    for r in regions:
        if r is not None:
            out |= r.exponents()
    return tuple(sorted(out))


def _check_names(claim: RateClaim) -> RateClaim:
    rates = set(claim.first.rates) | (set(claim.second.rates) if claim.second else set())
    clash = sorted(rates & set(claim.params))
    if clash:
        raise InputError(f"'{clash[0]}' is both a rate and an exponent")
    return claim


def subset(a: RateRegion, b: RateRegion, region: Region, name: str = "") -> RateClaim:
    """A(theta) inside B(theta) for all theta in region.  B must be given by inequalities, or A
    by inequalities and B by corners (decided through A's vertices, see decide.py)."""
    same_rates(a, b)
    if isinstance(a, VRegion) and isinstance(b, VRegion):
        raise InputError(f"'{a.name} subset {b.name}': both regions are given by corners; give the "
                         "containing one by its inequalities")
    return _check_names(RateClaim("region subset", region, a, b, name=name, params=_names(region, a, b)))


def equal(a: RateRegion, b: RateRegion, region: Region, name: str = "") -> RateClaim:
    same_rates(a, b)
    if isinstance(a, VRegion) and isinstance(b, VRegion):
        raise InputError(f"'{a.name} == {b.name}': both regions are given by corners; give one of them "
                         "by its inequalities")
    return _check_names(RateClaim("region equal", region, a, b, name=name, params=_names(region, a, b)))


def contains(a: RateRegion, point, region: Region, name: str = "") -> RateClaim:
    point = tuple(lift(e) for e in point)
    if len(point) != len(a.rates):
        raise InputError(f"the point has {len(point)} coordinates, region '{a.name}' has {len(a.rates)} rates")
    if isinstance(a, VRegion):
        raise InputError(f"'{a.name} contains ...': the region is given by corners; give it by inequalities")
    if any(params(e) & set(a.rates) for e in point):
        raise InputError("a point's coordinates are expressions of the exponents, not of the rates")
    extra = set().union(*(params(e) for e in point))
    return _check_names(RateClaim("region contains", region, a, point=point, name=name,
                                  params=_names(region, a, extra=extra)))


def max_of(a: RateRegion, weights, rel: str, formula, region: Region, name: str = "") -> RateClaim:
    rel = "==" if rel == "=" else rel
    if rel not in RELATIONS:
        raise InputError(f"unknown relation '{rel}'; use one of {' '.join(RELATIONS)}")
    weights = tuple(sorted((r, Fraction(c)) for r, c in dict(weights).items() if c))
    stray = sorted({r for r, _ in weights} - set(a.rates))
    if stray or not weights:
        raise InputError(f"the weighted sum must use the rates of '{a.name}' ({', '.join(a.rates)})")
    formula = lift(formula)
    if params(formula) & set(a.rates):
        raise InputError("the formula compared with a maximum is an expression of the exponents")
    return _check_names(RateClaim("region max", region, a, weights=weights, rel=rel, formula=formula,
                                  name=name, params=_names(region, a, extra=params(formula))))


def same_support(a: RateRegion, b: RateRegion, region: Region, name: str = "") -> RateClaim:
    """h_A(w) = h_B(w) for all w >= 0 (see the module docstring for exactly what is decided)."""
    same_rates(a, b)
    for r in (a, b):
        if not isinstance(r, HRegion):
            raise InputError(f"'for all weights' is decided for regions given by inequalities; "
                             f"'{r.name}' is given by corners (state '{a.name} == {b.name}' instead)")
        why = r.down_closed_reason()
        if why:
            raise InputError(f"'for all weights' is decided only for down-closed regions: {why}")
    return _check_names(RateClaim("region support", region, a, b, name=name, params=_names(region, a, b)))


def redundant(a: RateRegion, index: int, region: Region, name: str = "") -> RateClaim:
    """Facet `index` (0-based) of the H-form `a` is implied by its other constraints on `region`."""
    if not isinstance(a, HRegion):
        raise InputError(f"'{a.name}' is given by corners: facets are those of a region given by inequalities")
    if not 0 <= index < len(a.inequalities):
        raise InputError(f"region '{a.name}' has {len(a.inequalities)} inequalities; there is no facet {index + 1}")
    return _check_names(RateClaim("region redundant", region, a, name=name, index=index,
                                  params=_names(region, a)))


def without_facet(claim: RateClaim) -> RateClaim:
    """The 'redundant' claim as the equivalent 'max' claim (see the module docstring)."""
    a, j = claim.first, claim.index
    q = a.inequalities[j]
    rest = HRegion(f"{a.name} without facet {j + 1}", a.rates, a.inequalities[:j] + a.inequalities[j + 1:],
                   a.nonnegative)
    return max_of(rest, dict(q.coeffs), "<=", q.bound, claim.region, claim.name)
