"""The generators of bounds/ as rate regions (verifier.rates.HRegion) usable in region claims.

Why adapters and not new generators: mac.py, interference.py, tin.py, projection.py and cutset.py
already produce the inequalities (bounds.projection.Inequality: constant coefficients, PL right
sides); a region claim needs them as one named H-form, with the names of the bounds kept as labels so
a refutation says which facet failed.
"""

from __future__ import annotations

from itertools import combinations
from typing import Iterable, Mapping, Sequence

from verifier.core.errors import InputError
from verifier.expressions.expr import min_
from verifier.rates.region import HRegion, RateInequality

from .cutset import sum_cut_bounds
from .interference import hk_region, ic_outer_bounds
from .mac import mac_bound_names, mac_region, rate_names
from .network import Network
from .projection import Inequality, eliminate, le, obviously_nonnegative
from .tin import tin_bounds

MAX_MESSAGE_SUBSETS = 1023    # 2^10 - 1: cut-set regions of at most ten messages


def as_rate_region(name: str, rows: Sequence[Inequality] | Mapping[str, Inequality],
                   rates: Sequence[str] | None = None, nonnegative: bool = True,
                   conditions: list | None = None) -> HRegion:
    """An H-form from bounds/ inequalities (a mapping keeps its keys as labels).  A row without rates
    (0 <= c(theta), left by an elimination) is an InputError, or is appended to `conditions` when a
    list is given: the region is then the stated one only where every condition holds."""
    labelled = list(rows.items()) if isinstance(rows, Mapping) else [("", r) for r in rows]
    found = sorted(set().union(*(r.variables() for _, r in labelled))) if labelled else []
    rates = tuple(rates) if rates is not None else tuple(found)
    out, seen = [], set()
    for label, row in labelled:
        if (row.coeffs, row.rhs) in seen:
            continue     # Fourier-Motzkin may derive one row twice
        seen.add((row.coeffs, row.rhs))
        if nonnegative and len(row.coeffs) == 1 and row.coeffs[0][1] < 0 and obviously_nonnegative(row.rhs):
            continue     # -d <= (something >= 0): implied by d >= 0
        if not row.coeffs:
            if obviously_nonnegative(row.rhs):
                continue     # 0 <= (x)^+ ...: says nothing about the rates
            if conditions is not None:
                conditions.append(row.rhs)
                continue
            raise InputError(f"region '{name}': the condition 0 <= {row.rhs} involves no rate; state it "
                             "in the claim's region instead")
        out.append(RateInequality(row.coeffs, row.rhs, label))
    return HRegion(name, rates, tuple(out), nonnegative)


def mac_rate_region(exponents: Sequence[object], name: str = "MAC", prefix: str = "d") -> HRegion:
    """The K-user MAC GDoF region (bounds.mac): one facet per nonempty subset of users."""
    rows = mac_region(exponents, prefix)
    return as_rate_region(name, dict(zip(mac_bound_names(len(exponents), prefix), rows)),
                          rate_names(len(exponents), prefix))


def ic_rate_region(a11, a12, a21, a22, name: str = "IC outer") -> HRegion:
    """The two-user IC outer region of bounds.interference (Etkin-Tse-Wang bounds), rates d1, d2."""
    return as_rate_region(name, ic_outer_bounds(a11, a12, a21, a22), ("d1", "d2"))


def hk_rate_region(a11, a12, a21, a22, name: str = "HK") -> HRegion:
    """The simple Han-Kobayashi scheme's region in (d1, d2), split rates eliminated (Fourier-Motzkin)."""
    return as_rate_region(name, hk_region(a11, a12, a21, a22), ("d1", "d2"))


def tin_rate_region(a: Sequence[Sequence[object]], name: str = "TIN", prefix: str = "d") -> HRegion:
    """The polyhedral TIN region of bounds.tin (single-user and cycle bounds), rates >= 0."""
    return as_rate_region(name, tin_bounds(a, prefix), [f"{prefix}{i + 1}" for i in range(len(a))])


def projected_rate_region(name: str, rows: Sequence[Inequality], keep: Sequence[str],
                          nonnegative: bool = True) -> tuple[HRegion, tuple]:
    """The shadow on the rates `keep` of a region in more variables (auxiliary split rates), and the
    exponent conditions c(theta) >= 0 under which the shadow is non-empty as stated (put them in the
    claim's region: outside them the original region is empty)."""
    others = sorted(set().union(*(r.variables() for r in rows)) - set(keep))
    conditions: list = []
    region = as_rate_region(name, eliminate(rows, others, nonnegative=nonnegative), keep, nonnegative,
                            conditions)
    return region, tuple(conditions)


def cutset_rate_region(network: Network, messages: Iterable[str] | None = None, name: str = "cut-set",
                       prefix: str = "d_", rates: Mapping[str, str] | None = None) -> HRegion:
    """The cut-set region of several messages: for every nonempty set S of them, the sum of their
    rates is at most the smallest cut separating all of S's sources from all of S's destinations
    (bounds.cutset.sum_cut_bounds; a set with no such cut gives no facet).  `rates` maps message
    names to rate names (default: prefix + message name)."""
    chosen = [m.name for m in network.messages] if messages is None else list(messages)
    if 2 ** len(chosen) - 1 > MAX_MESSAGE_SUBSETS:
        raise InputError(f"a cut-set region of {len(chosen)} messages has {2 ** len(chosen) - 1} sets of "
                         f"messages (limit {MAX_MESSAGE_SUBSETS})")
    rates = {m: (rates or {}).get(m, f"{prefix}{m}") for m in chosen}
    for m, r in rates.items():
        if not r.isidentifier():
            raise InputError(f"message '{m}' does not make a rate name ('{r}')")
    rows = {}
    for size in range(1, len(chosen) + 1):
        for subset in combinations(chosen, size):
            sources = {network.message(m).source for m in subset}
            if sources & {network.message(m).destination for m in subset}:
                continue
            cuts = sum_cut_bounds(network, list(subset))
            if cuts:
                rows[" + ".join(rates[m] for m in subset)] = le([rates[m] for m in subset], min_(*cuts.values()))
    return as_rate_region(name, rows, tuple(rates.values()))
