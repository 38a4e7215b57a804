"""Differential fuzzing: the engine's verdicts against a direct z3 encoding written in the test.

Oracle (independent of the engine): tests/fuzz_claims.py generates each claim as its own tiny AST,
builds the engine's claim from it through the public constructors (or the text parser), and encodes
the claim's violation straight into z3 (Python API, exact reals) from the same AST; points are
re-evaluated with the test's own Fraction evaluator.  Ground truth: violation unsat -> the claim
holds, sat -> it fails (and z3's model must re-check exactly), the region itself unsat -> the engine
must raise RegionError.

Asserted for every claim:
(a) no disagreement: 'proved' never meets a re-checked failing point, 'refuted' never meets 'holds';
(b) every counterexample re-checks with our evaluator: inside the claim's region (both points for
    'nondecreasing in p'), the claim violated there, the printed side values exact;
(c) 'unknown' only under a short per-query timeout (counted: hypothesis events, and the long run's
    summary).
The region-wise prover (prove_by_regimes) runs on a smaller subset with the same assertions.

Generated: 1-4 parameters; min/max/(x)^+/|x| nested to depth 4; awkward rationals (1/999983, 10^9,
7/3, ...); relations == <= < >= >, "within c", nondecreasing/nonincreasing, reduces-to, symmetric;
regions: whole space, orthants, boxes, thin slabs (width 1/999983), random polyhedra with strict and
non-strict constraints, equalities (alpha == beta, alpha == c), unions of two, the odd empty one;
templates: random claims, true identities not visible in canonical form (lattice and (x)^+ rewrites),
and planted failures on a hyperplane, at a single point, on a band of width 1/999983, monotone dips,
asymmetric bands, reduces-to offsets.

Profiles: the default runs a few dozen claims (quick; ranked counterexamples only on tame claims
and the planted ones, see below); GDOF_PROFILE=thorough runs ten times more;
GDOF_SLOW=1 runs the long seeded loop (GDOF_FUZZ_CLAIMS claims, default 3000; GDOF_FUZZ_SEED;
GDOF_FUZZ_START: the index of the first claim, so that two processes can share one seed's range;
GDOF_FUZZ_TIMEOUT per query, default 5 s; GDOF_FUZZ_REGIMES_EVERY, default 10; GDOF_FUZZ_RANK_EVERY,
default 4: one claim in 4 gets the ranked counterexample, the others the engine's re-checked solver
model, improve_witness=False, much faster; GDOF_FUZZ_REPORT: a
JSON file for the summary; GDOF_FUZZ_LOG: one line per claim) and prints its figures:
    GDOF_SLOW=1 python3 -m pytest -q tests/test_fuzz_differential.py -k long
"""

from __future__ import annotations

import json
import os
import random
import re
import time
from collections import Counter
from dataclasses import replace
from fractions import Fraction as F

import pytest
from hypothesis import event, given, settings
from hypothesis import strategies as st

from tests.fuzz_claims import (EPS, DataChooser, RandomChooser, Spec, Tame, add, cst, describe_outcome,
                               gen_spec, lin, minimise, neg, run_one, var)

QUICK_TIMEOUT = 5.0          # per solver query; short, so 'unknown' is allowed and counted
BASE = settings().max_examples   # 40 in the quick profile, 400 in 'thorough'


def _events(o):
    event(f"template {o.spec.template}")
    event(f"verdict {o.truth.status if o.truth else '?'} -> {o.status}")
    if o.unknown:
        event("engine unknown")


# The engine's ranked counterexample (a lattice search over denominators up to 1000) is the slow
# part of a refutation, up to minutes for a thin failure set with no small-denominator point; the
# quick profile therefore checks verdicts and re-checked solver models on every claim
# (improve_witness=False), and the ranked counterexamples on tame claims and the planted ones.

@settings(max_examples=max(8, BASE * 3))
@given(st.data())
def test_prove_agrees_with_direct_z3(data):
    spec = gen_spec(DataChooser(data))
    o = run_one(spec, timeout=QUICK_TIMEOUT, rank=False)
    _events(o)
    assert not o.findings, describe_outcome(o)


@settings(max_examples=max(3, BASE // 2))
@given(st.data())
def test_ranked_counterexamples_of_tame_claims_recheck(data):
    spec = gen_spec(Tame(DataChooser(data)), max_params=3, max_depth=3)
    o = run_one(spec, timeout=QUICK_TIMEOUT)
    _events(o)
    assert not o.findings, describe_outcome(o)


@settings(max_examples=max(3, BASE // 4))
@given(st.data())
def test_regime_prover_agrees_with_direct_z3(data):
    spec = gen_spec(DataChooser(data), max_params=3, max_depth=3)
    o = run_one(spec, timeout=QUICK_TIMEOUT, regimes=True, rank=False)
    _events(o)
    assert not o.findings, describe_outcome(o, "regimes")


# --- planted failures, written out: the generator's templates must really plant them ----------

A, B = "alpha", "beta"
E = ("max", (lin(((A, 1),), 0), ("pos", lin(((B, F(7, 3)),), -1))))     # max(alpha, (7/3 beta - 1)^+)
BOX2 = ((( cst(0), "<=", var(A)), (var(A), "<=", cst(2)), (cst(-1), "<", var(B)), (var(B), "<", cst(1))),)


def _abs(x):
    return ("abs", x)


PLANTED = [
    # fails only on the line alpha = 1 (the brief's min(alpha - 1, 1 - alpha) piece)
    Spec("relation", BOX2, add(E, ("min", (lin(((A, 1),), -1), lin(((A, -1),), 1)))), E, rel="<",
         template="planted/line"),
    # fails only at the point (1/3, -3/7)
    Spec("relation", BOX2, E, add(E, _abs(lin(((A, 1),), F(-1, 3))), _abs(lin(((B, 1),), F(3, 7)))),
         rel="<", template="planted/point"),
    # fails only on the band |alpha + beta - 1| < 1/999983
    Spec("relation", BOX2, add(E, ("pos", add(cst(EPS), neg(_abs(lin(((A, 1), (B, 1)), -1)))))), E,
         rel="<=", template="planted/band"),
    # within: the band reaches exactly 1/999983, so gap 1/999983 holds and a gap just below fails
    Spec("within", BOX2, add(E, ("pos", add(cst(EPS), neg(_abs(lin(((A, 1),), -1)))))), E,
         gap=EPS * (1 - EPS), template="planted/within-band"),
    # nondecreasing except on a dip of width 1/7 at alpha = 1 (slope 1 - 2 there); the generator
    # plants dips of width 1/999983 (whose pairs have no small denominator: a slow search)
    Spec("monotone", BOX2, add(var(A), ("mul", F(-2), ("pos", add(cst(F(1, 7)), neg(_abs(lin(((A, 1),), -1))))))),
         param=A, template="planted/monotone-dip"),
    # symmetric but for a bump of width 1/999983 at alpha = 1/2
    Spec("symmetric", BOX2, add(("min", (var(A), var(B))), ("pos", add(cst(EPS), neg(_abs(lin(((A, 1),), F(-1, 2))))))),
         swap=(A, B), template="planted/symmetric-band"),
    # both sides read on the slice alpha = 1; the right side is off by 1/999983 there
    Spec("reduces-to", BOX2, E, add(E, _abs(lin(((A, 1),), -1 - EPS))), values=((A, F(1)),),
         template="planted/reduces-offset"),
    # failure on a band inside the plane alpha == beta of a 3-parameter region (measure zero in R^3)
    Spec("relation", (((var(A), "==", var(B)), (cst(0), "<", var("gamma")), (var(A), ">=", cst(0)),
                       (var(A), "<=", cst(1))),),
         add(var("gamma"), ("pos", add(cst(EPS), neg(_abs(lin(((A, 1),), F(-1, 3))))))), var("gamma"),
         rel="<=", template="planted/band-in-plane"),
]


@pytest.mark.parametrize("spec", PLANTED, ids=[s.template for s in PLANTED])
def test_planted_failures_are_refuted_with_a_rechecked_point(spec):
    o = run_one(spec, timeout=QUICK_TIMEOUT * 2)
    assert o.truth.status == "false", describe_outcome(o)   # the plant itself is live
    assert not o.findings, describe_outcome(o)
    assert o.status in ("refuted", "unknown"), describe_outcome(o)


# the same plants one notch short of failing: each must be proved (these are the claims a sloppy
# encoding of strictness, of |x| or of the band's end points would refute)
NEAR_MISSES = [
    replace(PLANTED[0], rel="<=", template="near/line"),
    replace(PLANTED[1], rel="<=", template="near/point"),
    replace(PLANTED[2], rel=">=", template="near/band"),
    replace(PLANTED[3], gap=EPS, template="near/within-band"),
    Spec("monotone", BOX2, add(var(A), ("mul", F(-1), ("pos", add(cst(EPS), neg(_abs(lin(((A, 1),), -1))))))),
         param=A, template="near/monotone-flat-dip"),
    replace(PLANTED[5], lhs=("min", (var(A), var(B))), template="near/symmetric"),
    replace(PLANTED[6], rhs=add(E, _abs(lin(((A, 1),), -1))), template="near/reduces-spike"),
    replace(PLANTED[7], rel=">=", template="near/band-in-plane"),
]


@pytest.mark.parametrize("spec", NEAR_MISSES, ids=[s.template for s in NEAR_MISSES])
def test_near_misses_of_the_plants_are_proved(spec):
    o = run_one(spec, timeout=QUICK_TIMEOUT * 2)
    assert o.truth.status == "true", describe_outcome(o)
    assert not o.findings, describe_outcome(o)
    assert o.status in ("proved", "unknown"), describe_outcome(o)


# --- the long run ------------------------------------------------------------------------------

def _category(finding: str) -> str:
    """A finding's kind without its numbers, to keep the same bug while minimising."""
    return re.sub(r"[-\d/{}',.:]+", "", finding.split("\n")[0])[:60]


@pytest.mark.slow
@pytest.mark.skipif(os.environ.get("GDOF_SLOW") != "1", reason="long fuzz run: set GDOF_SLOW=1")
def test_long_differential_run(capsys):
    n = int(os.environ.get("GDOF_FUZZ_CLAIMS", "3000"))
    first = int(os.environ.get("GDOF_FUZZ_START", "0"))   # claims first .. first+n-1 of the seed
    seed = int(os.environ.get("GDOF_FUZZ_SEED", "0"))
    timeout = float(os.environ.get("GDOF_FUZZ_TIMEOUT", "5"))
    every = int(os.environ.get("GDOF_FUZZ_REGIMES_EVERY", "10"))
    rank_every = int(os.environ.get("GDOF_FUZZ_RANK_EVERY", "4"))
    report = os.environ.get("GDOF_FUZZ_REPORT")
    log = open(os.environ["GDOF_FUZZ_LOG"], "a") if os.environ.get("GDOF_FUZZ_LOG") else None
    stats = Counter()
    verdicts, templates = Counter(), Counter()
    failures, slowest = [], (0.0, "", "")
    started = time.perf_counter()
    for i in range(first, first + n):
        ch = RandomChooser(random.Random(f"{seed}:{i}"))
        regimes = every > 0 and i % every == 0
        spec = gen_spec(ch, max_params=3 if regimes else 4, max_depth=3 if regimes else 4)
        start = time.perf_counter()
        rank = rank_every > 0 and i % rank_every == 0
        o = run_one(spec, timeout=timeout, regimes=regimes, rank=rank)
        took = time.perf_counter() - start
        stats["claims"] += 1
        stats["regimes claims"] += regimes
        stats["ranked counterexample claims"] += rank
        stats["engine unknown"] += o.unknown
        stats["ground truth unknown"] += o.truth.status == "unknown"
        verdicts[f"{o.truth.status} -> {o.status}" + (f" / {o.regimes_status}" if regimes else "")] += 1
        templates[spec.template] += 1
        if log:
            log.write(f"{i}\t{took:.2f}\t{o.seconds:.2f}\t{o.regimes_seconds:.2f}\t{spec.template}\t"
                      f"{o.truth.status}\t{o.status}\t{o.regimes_status}\t{len(o.findings)}\n")
            log.flush()
        if took > slowest[0]:
            slowest = (took, f"#{i} [{spec.kind}/{spec.template}] {spec.text()[:300]}",
                       f"prove {o.seconds:.2f} s, regimes {o.regimes_seconds:.2f} s")
        if o.findings:
            stats["claims with findings"] += 1
            failures.append((i, o))
            with capsys.disabled():
                print(f"\n### finding in claim #{i} (seed {seed})\n{describe_outcome(o, 'regimes' if regimes else 'prove')}",
                      flush=True)
        if stats["claims"] % 250 == 0:
            with capsys.disabled():
                print(f"\n[fuzz] {stats['claims']}/{n} claims, {stats['claims with findings']} with findings, "
                      f"{stats['engine unknown']} unknown, {time.perf_counter() - started:.0f} s", flush=True)
    minimised = []
    for i, o in failures[:int(os.environ.get("GDOF_FUZZ_MINIMISE", "6"))]:
        regimes = o.regimes_status != ""
        cats = {_category(f) for f in o.findings}

        def still_fails(s, regimes=regimes, cats=cats):
            again = run_one(s, timeout=timeout, regimes=regimes, rank=False)
            return any(_category(f) in cats for f in again.findings)
        small = minimise(o.spec, still_fails, max_tries=400)
        again = run_one(small, timeout=timeout, regimes=regimes, rank=False)
        minimised.append((i, again))
        with capsys.disabled():
            print(f"\n### minimised finding of claim #{i}\n{describe_outcome(again, 'regimes' if regimes else 'prove')}",
                  flush=True)
    summary = {
        "claims": stats["claims"], "regimes claims": stats["regimes claims"],
        "ranked counterexample claims": stats["ranked counterexample claims"],
        "claims with findings": stats["claims with findings"],
        "disagreements": sum(1 for _, o in failures for f in o.findings
                             if "PROVED but" in f or "GROUND TRUTH SAYS TRUE" in f),
        "engine unknown": stats["engine unknown"], "ground truth unknown": stats["ground truth unknown"],
        "slowest seconds": round(slowest[0], 2), "slowest claim": slowest[1], "slowest split": slowest[2],
        "total seconds": round(time.perf_counter() - started, 1), "seed": seed, "first claim": first,
        "timeout": timeout,
        "verdicts": dict(verdicts.most_common()), "templates": dict(sorted(templates.items())),
        "finding claims": [i for i, _ in failures],
    }
    with capsys.disabled():
        print("\n[fuzz summary]\n" + json.dumps(summary, indent=1), flush=True)
    if report:
        with open(report, "w") as fh:
            json.dump({**summary, "findings": [describe_outcome(o) for _, o in failures],
                       "minimised": [describe_outcome(o) for _, o in minimised]}, fh, indent=1)
    assert not failures, f"{len(failures)} claims with findings (see the output above)"
