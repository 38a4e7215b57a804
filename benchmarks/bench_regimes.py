"""Benchmark of the region-wise prover against the one-shot SMT proof and naive enumeration.

Run on demand:  python benchmarks/bench_regimes.py [--quick] [--workers N]
(not collected by pytest: the file name does not start with test_).

For each claim (1 to 6 parameters, 2 to 40 bound terms) we time
- the full regime report: prove_by_regimes with its defaults (regimes, certificates, thresholds,
  failure set, small witnesses, bound analysis, gaps, one SMT cross-check);
- the same without the SMT cross-check and witness search (the regime method alone);
- the one-shot verdict: verifier.claims.one_shot.prove with z3 (its default witness improvement included);
- naive enumeration: every combination of min/max choices over all min/max nodes, one exact
  feasibility LP each (stopped after a time budget; the full time is then extrapolated, marked '~').
and print medians and ratios, then the parallel speed-up on the largest case.
"""

from __future__ import annotations

import itertools
import os
import statistics
import sys
import time
from fractions import Fraction as F

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), ".."))

from verifier.claims.kinds import Side, relation  # noqa: E402
from verifier.claims.one_shot import prove  # noqa: E402
from verifier.expressions.expr import Affine, Min, Sum, extremum_nodes, max_, min_, param, pos  # noqa: E402
from verifier.expressions.region import Atom, Region, atoms_of  # noqa: E402
from verifier.geometry.lp import combine, feasible  # noqa: E402
from verifier.regimes.proof import prove_by_regimes  # noqa: E402
from verifier.regimes.spec import spec_of, targets  # noqa: E402


def nonneg(*names, hi=None):
    atoms = []
    for n in names:
        atoms += atoms_of(param(n), ">=", 0)
        if hi is not None:
            atoms += atoms_of(param(n), "<=", hi)
    return atoms


# --- the claims -------------------------------------------------------------------------------
a = param("alpha")
# Etkin, Tse, Wang, "Gaussian interference channel capacity to within one bit", IEEE Trans. IT 54(12),
# 2008: symmetric per-user GDoF bounds and the W curve (from memory).
SYM = (("single", a * 0 + 1), ("z", (max_(1, a) + pos(1 - a)) / 2), ("w", max_(a, 1 - a)),
       ("t", (max_(1, a) + pos(1 - a) + max_(a, 1 - a)) / 3))
W = min_(1, max_(a / 2, 1 - a / 2), max_(a, 1 - a))


def w_curve():
    return relation(Side(min_(*(e for _, e in SYM)), "outer", SYM), "==", W, Region.of(*nonneg("alpha")))


def tin_weak():
    return relation(1 - a, "==", W, Region.of(*nonneg("alpha"), *atoms_of(a, "<=", F(3, 5))))


def mac():
    # Two-user MAC in GDoF form (Cover & Thomas, Elements of Information Theory, ch. 15; common practice).
    a1, a2 = param("a1"), param("a2")
    parts = (("sum", a1 + a2), ("max", max_(a1, a2)))
    return relation(Side(min_(a1 + a2, max_(a1, a2)), "sum-GDoF", parts), "==", max_(a1, a2),
                    Region.of(*nonneg("a1", "a2")))


def hand3():
    b, g = param("beta"), param("gamma")
    region = Region.of(*atoms_of(g, ">", a), *atoms_of(a, ">", 1), *atoms_of(b, ">=", 0))
    return relation(min_(g, a + b, 2 * a), ">=", max_(a, g - b), region)


# Asymmetric two-user IC with four exponents n11, n22 (direct) and c12, c21 (cross: c12 is the
# interference at receiver 1 from transmitter 2).  Generic W-type genie bounds in the deterministic
# form of Bresler and Tse (Europ. Trans. Telecomm. 19(4), 2008), the GDoF version of the
# Etkin-Tse-Wang 2008 outer bounds (from memory): single-user, two Z-type, the W-type sum bound and
# the 2R1+R2 / R1+2R2 bounds combined into sum bounds.
n11, n22, c12, c21 = map(param, ("n11", "n22", "c12", "c21"))
B1 = max_(n11, c12) + pos(n11 - c21) + max_(c21, n22 - c12)      # 2 d1 + d2 <= B1
B2 = max_(n22, c21) + pos(n22 - c12) + max_(c12, n11 - c21)      # d1 + 2 d2 <= B2
IC = (("single", n11 + n22), ("z1", max_(n22, c21) + pos(n11 - c21)),
      ("z2", max_(n11, c12) + pos(n22 - c12)), ("w", max_(c12, n11 - c21) + max_(c21, n22 - c12)),
      ("s1", (B1 + n22) / 2), ("s2", (B2 + n11) / 2), ("t", (B1 + B2) / 3))
IC_OUTER = Side(min_(*(e for _, e in IC)), "outer sum", IC)
TIN = pos(n11 - c12) + pos(n22 - c21)  # treating interference as noise
IC_BASE = nonneg("n11", "n22", "c12", "c21")


def ic_tin_condition():
    # TIN is sum-GDoF optimal when n11 >= c12 + c21 and n22 >= c12 + c21 (Geng, Naderializadeh,
    # Avestimehr, Jafar, IEEE Trans. IT 61(4), 2015; from memory).
    cond = list(atoms_of(n11, ">=", c12 + c21)) + list(atoms_of(n22, ">=", c12 + c21))
    return relation(IC_OUTER, "==", TIN, Region.of(*IC_BASE, *cond))


def ic_outer_above_tin():
    return relation(IC_OUTER, ">=", TIN, Region.of(*IC_BASE))


def ic_tin_everywhere():
    return relation(IC_OUTER, "==", TIN, Region.of(*IC_BASE))


def order_statistic(n):
    # min over pairs of max(x_i, x_j) is the second smallest value, as is max over i of the min of
    # the others (common practice).
    xs = [param(f"x{i}") for i in range(n)]
    pairs = min_(*(max_(x, y) for x, y in itertools.combinations(xs, 2)))
    second = max_(*(min_(*(y for y in xs if y is not x)) for x in xs))
    return relation(pairs, "==", second, Region.of(*nonneg(*(f"x{i}" for i in range(n)), hi=1)))


def forty_bounds():
    # Synthetic GDoF-style bounds in three exponents (an invented stress test, no source):
    # bound k = (p alpha + q beta + r gamma + (k/8 - alpha)^+ + max(beta, gamma - k/10)) / w.
    b, g = param("beta"), param("gamma")
    bounds = []
    for k in range(40):
        p, q, r, w = 1 + k % 3, 1 + (k // 3) % 3, 1 + (k // 9) % 2, 2 + k % 4
        bounds.append((f"b{k}", (p * a + q * b + r * g + pos(F(k, 8) - a) + max_(b, g - F(k, 10))) / w))
    side = Side(min_(*(e for _, e in bounds)), "outer", tuple(bounds))
    return relation(side, "<=", a + b + g + 1, Region.of(*nonneg("alpha", "beta", "gamma", hi=2)))


CASES = [("W curve == ETW outer (1 param, 4 bounds)", w_curve),
         ("TIN == W on [0, 3/5] (1 param, refuted)", tin_weak),
         ("MAC sum-GDoF (2 params, 2 bounds)", mac),
         ("hand 3-param, gamma > alpha > 1 (refuted)", hand3),
         ("IC 4 exponents: outer == TIN under TIN condition", ic_tin_condition),
         ("IC 4 exponents: outer >= TIN", ic_outer_above_tin),
         ("IC 4 exponents: outer == TIN everywhere (refuted)", ic_tin_everywhere),
         ("order statistic, 5 params (10 pair terms)", lambda: order_statistic(5)),
         ("order statistic, 6 params (15 pair terms)", lambda: order_statistic(6)),
         ("40 synthetic bounds, 3 params", forty_bounds)]


# --- naive enumeration of all min/max choice combinations --------------------------------------
def _value(e, choice):
    if isinstance(e, Affine):
        return e
    if isinstance(e, Sum):
        out = e.affine
        for t in e.terms:
            out = combine(out, _value(t, choice))
        return out
    return _value(e.args[choice[e.key]], choice)


def naive(claim, budget=20.0):
    """(number of combinations, feasible ones or None, seconds or extrapolated seconds, exact?)"""
    spec = spec_of(claim)
    nodes = {}
    for t in targets(spec):
        for n in extremum_nodes(t):
            nodes.setdefault(n.key, n)
    nodes = list(nodes.values())
    total = 1
    for n in nodes:
        total *= len(n.args)
    start, done, ok = time.perf_counter(), 0, 0
    for combo in itertools.product(*(range(len(n.args)) for n in nodes)):
        choice = {n.key: k for n, k in zip(nodes, combo)}
        for piece in spec.region.pieces:
            atoms = list(piece.atoms)
            for n in nodes:
                chosen = _value(n.args[choice[n.key]], choice)
                for i, arg in enumerate(n.args):
                    if i != choice[n.key]:
                        d = combine(_value(arg, choice), chosen, F(-1))
                        atoms.append(Atom(d if isinstance(n, Min) else combine(Affine((), F(0)), d, F(-1)), False))
            ok += feasible(atoms, spec.names) is not None
        done += 1
        if time.perf_counter() - start > budget:
            break
    seconds = time.perf_counter() - start
    if done < total:
        return total, None, seconds * total / done, False
    return total, ok, seconds, True


# --- the run ---------------------------------------------------------------------------------
def timed(fn, *args, **kw):
    start = time.perf_counter()
    out = fn(*args, **kw)
    return out, time.perf_counter() - start


def main(argv):
    quick = "--quick" in argv
    workers = int(argv[argv.index("--workers") + 1]) if "--workers" in argv else 2
    prove(w_curve())  # warm up the solver bindings so the first case is not charged for imports
    rows = []
    print(f"{'case':52} {'cells':>5} {'reg':>4} {'report':>8} {'regimes':>8} {'one-shot':>8} "
          f"{'ratio':>6} {'naive':>10} {'combos':>9} status")
    for name, make in CASES:
        claim = make()
        rp, t_report = timed(prove_by_regimes, claim)
        _, t_regimes = timed(prove_by_regimes, claim, smt="none", improve_witness=False)
        verdict, t_one = timed(prove, claim)
        combos, feasible_count, t_naive, exact = naive(claim, budget=3.0 if quick else 20.0)
        assert rp.status == verdict.status, (name, rp.status, verdict.status)
        naive_text = f"{t_naive:9.2f}s" if exact else f"~{t_naive:8.0f}s"
        print(f"{name:52} {rp.cells:5d} {len(rp.regimes):4d} {t_report:7.2f}s {t_regimes:7.2f}s "
              f"{t_one:7.3f}s {t_report / t_one:6.1f} {naive_text:>10} {combos:9d} {rp.status}")
        rows.append((name, claim, t_report, t_regimes, t_one, t_naive))
    ratios = [r[2] / r[4] for r in rows]
    print(f"\nmedian report {statistics.median(r[2] for r in rows):.3f}s, regimes only "
          f"{statistics.median(r[3] for r in rows):.3f}s, one-shot {statistics.median(r[4] for r in rows):.3f}s; "
          f"median ratio report/one-shot {statistics.median(ratios):.1f}, "
          f"regimes-only/one-shot {statistics.median(r[3] / r[4] for r in rows):.1f}; "
          f"median naive/report {statistics.median(r[5] / r[2] for r in rows):.1f}")
    name, claim = max(((r[0], r[1]) for r in rows), key=lambda nc: prove_by_regimes(nc[1], smt="none",
                                                                                      improve_witness=False).cells)
    _, t1 = timed(prove_by_regimes, claim, smt="none", improve_witness=False, workers=1)
    _, tn = timed(prove_by_regimes, claim, smt="none", improve_witness=False, workers=workers)
    print(f"parallel on the largest case ({name}): 1 worker {t1:.2f}s, {workers} workers {tn:.2f}s, "
          f"speed-up {t1 / tn:.2f}x (cores: {os.cpu_count()})")


if __name__ == "__main__":
    main(sys.argv[1:])
