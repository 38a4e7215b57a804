"""K-user multiple-access channel in GDoF form.

Why: the MAC region is the simplest polymatroid a reviewer meets, and the building block of many
converses (a receiver decoding several messages).  Cover-Thomas, "Elements of Information Theory",
2nd ed., ch. 15 (from memory): the Gaussian MAC region is sum_{i in S} R_i <= log(1 + sum_{i in S} SNR_i)
for every subset S of users; with SNR_i = SNR^(a_i) this becomes, in GDoF,

    sum_{i in S} d_i <= max_{i in S} (a_i)^+      for every nonempty S,

and the sum-GDoF is max_i (a_i)^+.
"""

from __future__ import annotations

from itertools import combinations
from typing import Sequence

from verifier.core.errors import InputError
from verifier.expressions.expr import Expr, max_, pos

from .network import to_expr
from .projection import Inequality, le


def rate_names(k: int, prefix: str = "d") -> list[str]:
    return [f"{prefix}{i}" for i in range(1, k + 1)]


def mac_region(exponents: Sequence[object], prefix: str = "d") -> list[Inequality]:
    """One inequality per nonempty subset of users: sum of their d_i <= the largest (a_i)^+."""
    if not exponents:
        raise InputError("a MAC needs at least one user")
    exps = [pos(to_expr(a, f"MAC exponent {i + 1}")) for i, a in enumerate(exponents)]
    names = rate_names(len(exps), prefix)
    out = []
    for k in range(1, len(exps) + 1):
        for subset in combinations(range(len(exps)), k):
            out.append(le([names[i] for i in subset], max_(*(exps[i] for i in subset))))
    return out


def mac_sum_gdof(exponents: Sequence[object]) -> Expr:
    """Sum-GDoF of the K-user MAC: max_i (a_i)^+."""
    if not exponents:
        raise InputError("a MAC needs at least one user")
    return max_(*(pos(to_expr(a)) for a in exponents))


def mac_bound_names(k: int, prefix: str = "d") -> list[str]:
    """Readable names of the region's inequalities, in the order mac_region returns them."""
    names = rate_names(k, prefix)
    out = []
    for size in range(1, k + 1):
        for subset in combinations(range(k), size):
            out.append(" + ".join(names[i] for i in subset))
    return out
