"""prove_by_regimes: decide a claim regime by regime, with certificates, thresholds and failure sets.

Pipeline: spec (regime_spec) -> cells (regimes.decompose), each decided and certified by the worker
that found it (regime_work.finish_cell; a process pool when workers > 1) -> regimes (cells grouped by
their affine formulas and active named parts, presented as one polytope per region piece when their
union is convex) -> thresholds, failure region, best counterexamples, bound analysis, maximum gaps ->
the one-shot SMT proof (verifier.claims.one_shot) as a second, independent method, run first with a quarter
of the claim's budget.  `timing` has the seconds spent in 'smt', 'decompose' (with the per-cell
verdicts), 'regimes', 'analysis' and 'total'.

Overall status: the region-wise method says 'proved' only if every regime is proved and certified
(or decided by SMT), 'refuted' if a regime fails at a point that re-checks exactly, else 'unknown';
the two methods are then combined by verifier.core.verdicts (rule 3: one complete proof suffices, a
re-checked refutation beats a proof and a disagreement is loud).  Running out of the budget while
splitting leaves the one-shot verdict alone; running out during the analysis (thresholds, gaps)
leaves the verdicts as they are and says which analysis is missing.

Monotone claims: on each cell f is affine, and (f continuous, being built from min/max of affine
functions) f is non-decreasing along p on a convex region iff the p-coefficient of f is >= 0 on
every cell: a segment in direction p crosses finitely many cell closures, on each of which f is
affine with non-negative slope.  A negative slope on a cell refutes the claim on any region (two
nearby points inside that cell).  When the region is not convex (its pieces' union is not one
polyhedron) non-negative slopes do not suffice, and the verdict is the SMT one; when the region's
affine hull does not contain the p direction there are no pairs to compare and the claim holds
vacuously (also left to SMT, which sees no witness).
"""

from __future__ import annotations

import time
from concurrent.futures import ProcessPoolExecutor
from dataclasses import dataclass, field
from functools import partial
from typing import Callable, Mapping

from verifier.claims.kinds import witness_of, Claim
from verifier.claims.one_shot import prove, Verdict
from verifier.claims.witness import best_counterexample, Counterexample
from verifier.core.budget import Budget, OutOfBudget
from verifier.core.errors import RegionError
from verifier.core.verdicts import methods, overall
from verifier.geometry.shape import reduce_modulo
from verifier.regimes.analysis import max_gap, part_reports, Gap, PartReport
from verifier.regimes.certificates import check_certificate
from verifier.regimes.decompose import decompose, disjoint_pieces, worker_setup as regimes_worker_setup
from verifier.regimes.export import export_proof
from verifier.regimes.failure import failure_region, FailureRegion
from verifier.regimes.optimality import optimality_region
from verifier.regimes.polytope import cell_polytope, convex_union, nice, region_is_convex
from verifier.regimes.spec import spec_of, targets
from verifier.regimes.thresholds import thresholds, Threshold
from verifier.regimes.witness import counterexamples
from verifier.regimes.work import assemble, certify_regime, finish_cell, PROVED, REFUTED, Regime, UNKNOWN
from verifier.standalone import check_certificates as checker


@dataclass(frozen=True)
class RegimeProof:
    """Everything the region-wise prover found about one claim (renderers read only this)."""

    claim: Claim
    status: str                          # proved / refuted / unknown
    method: str                          # 'regimes' or 'smt' (monotone on a non-convex region, ...)
    names: tuple[str, ...]               # parameters of the regime space
    labels: tuple[str, ...]              # what each compared expression is called
    regimes: tuple[Regime, ...]
    thresholds: tuple[Threshold, ...]
    failure: FailureRegion | None
    counterexamples: tuple[Counterexample, ...]   # best first
    parts: tuple[PartReport, ...]
    gaps: tuple[Gap, ...]                # sup(lhs - rhs), sup(rhs - lhs); empty for monotone
    smt: Verdict | None                  # the one-shot verdict used as a cross-check
    agree: bool | None                   # regime verdict and one-shot verdict agree (None: not run)
    detail: str = ""
    timing: Mapping[str, float] = field(default_factory=dict)
    cells: int = 0
    workers: int = 1
    checked: bool | None = None          # the standalone checker re-verified certificates + coverage
    optimality: object = None            # verifier.regimes.optimality.OptimalityRegion: where it holds / fails

    @property
    def certified(self) -> bool:
        return bool(self.regimes) and all(r.certified for r in self.regimes)


def _key(spec, cell, index):
    forms = tuple(reduce_modulo(cell.forms[index[e.key]], cell.hull, spec.names) for e in spec.exprs)
    active = []
    for side in range(len(spec.exprs)):
        side_form = forms[side]
        names = tuple(n for s, n, e in spec.parts if s == side and
                      reduce_modulo(cell.forms[index[e.key]], cell.hull, spec.names) == side_form)
        active.append(names)
    return forms, tuple(active)


def _shown(members, polys, by_piece, pieces, names):
    """Presented polytopes of one regime, each with the positions (in `members`) of the cells it
    holds: per region piece, the merged union when it is convex, else the cells themselves."""
    out = []
    ids = {id(c) for c in members}
    for piece in sorted({c.piece for c in members}):
        mine = [k for k, c in enumerate(members) if c.piece == piece]
        others = [p for c, p in by_piece[piece] if id(c) not in ids]
        merged = convex_union([polys[k] for k in mine], others, pieces[piece], names) \
            if len(mine) > 1 else None
        out += [(merged, mine)] if merged is not None else [(polys[k], [k]) for k in mine]
    return out


def _regimes(spec, cells, tgts, pieces, pool, budget, options):
    """Group decided cells into regimes (same formulas and active parts), present and certify each."""
    index = {e.key: i for i, e in enumerate(tgts)}
    groups: dict = {}
    for cell in cells:
        groups.setdefault(_key(spec, cell, index), []).append(cell)
    polys = {}
    for c in cells:
        budget.check("regime grouping")
        polys[id(c)] = cell_polytope(c)
    by_piece: dict = {}
    for c in cells:
        by_piece.setdefault(c.piece, []).append((c, polys[id(c)]))
    shown = []
    for m in groups.values():
        budget.check("regime grouping")
        shown.append(_shown(m, [polys[id(c)] for c in m], by_piece, pieces, spec.names))
    flat = [p for group in shown for p, _ in group]
    if pool is not None:
        nice_all = list(pool.map(_nice, flat, [spec.names] * len(flat), chunksize=8))
    else:
        nice_all = []
        for poly in flat:
            budget.check("regime grouping")
            nice_all.append(_nice(poly, spec.names))
    regimes, k = [], 0
    for r, ((_, active), members) in enumerate(groups.items()):
        polytopes = nice_all[k:k + len(shown[r])]
        k += len(shown[r])
        budget.check("regime certificates")
        members, certs, cover = certify_regime(spec, options, members,
                                               [(p, ks) for p, (_, ks) in zip(polytopes, shown[r])])
        forms = tuple(members[0].forms[index[e.key]] for e in spec.exprs)
        regimes.append(assemble(r, members, polytopes, forms, active, spec.exprs, certs, cover))
    return tuple(regimes)


def _nice(poly, names):
    return nice(poly, names)


def _worker_setup(spec, tgts, options, index):
    regimes_worker_setup(tgts, spec.names, partial(finish_cell, spec=spec, options=options, index=index,
                                                   ship=True), options.get("budget"))


def prove_by_regimes(claim: Claim, solver: str = "z3", timeout: float = 30.0, cross_check: bool = False,
                     workers: int = 1, progress: Callable[[str, int, int], None] | None = None,
                     box: Mapping[str, tuple] | None = None, smt: str = "claim",
                     improve_witness: bool = True, budget: Budget | None = None,
                     exact_sets: bool = True) -> RegimeProof:
    """Decide `claim` regime by regime (see the module docstring).

    smt: 'claim' (the one-shot query as a second method, default), 'regimes' (also each cell
    separately), or 'none'.  box: {name: (lo, hi)} clips unbounded failure sets when locating the
    worst violation.  progress(stage, done, total) is called as cells are found and decided.
    budget: the claim's whole time (verifier.core.budget); the one-shot query may use a quarter of it, the
    regions the rest; running out is reported in `detail` and never turns into 'proved'.
    exact_sets: compute the exact holds / fails sets of a comparison (verifier.regimes.optimality);
    callers that read only the failure region skip them (they are the costly part of merging)."""
    budget = Budget.of(budget, timeout)
    clock = {"start": time.perf_counter()}
    spec = spec_of(claim)
    pieces = disjoint_pieces(spec.region, spec.names)
    if not pieces:
        raise RegionError(f"the region '{spec.region.text()}' of claim '{claim.name or claim.text()}' is empty")
    verdict = None
    if smt != "none":
        verdict = prove(claim, solver, timeout, cross_check, improve_witness=False, budget=budget.share(0.25))
    clock["smt"] = time.perf_counter()
    tgts = targets(spec)
    index = tuple(next(i for i, t in enumerate(tgts) if t.key == e.key) for e in spec.exprs)
    options = {"box": box, "solver": solver, "budget": budget, "smt_regimes": smt == "regimes",
               "claim": claim}
    pool = ProcessPoolExecutor(max_workers=workers, initializer=_worker_setup,
                               initargs=(spec, tgts, options, index)) if workers > 1 else None
    try:
        finish = partial(finish_cell, spec=spec, options=options, index=index, ship=False)
        cells = decompose(tgts, spec.region, spec.names, pool, progress, finish=finish, budget=budget)
        clock["decompose"] = time.perf_counter()
        regimes = _regimes(spec, cells, tgts, pieces, pool, budget, options)
        budget.check("regime grouping")
        clock["regimes"] = time.perf_counter()
        return _assemble(claim, spec, pieces, cells, regimes, clock, solver, verdict, workers, budget,
                         improve_witness, pool, exact_sets)
    except OutOfBudget as exc:
        if pool is not None:
            pool.shutdown(wait=True, cancel_futures=True)
            pool = None
        return _without_regimes(claim, spec, verdict, exc, clock, solver, budget, workers, improve_witness)
    finally:
        if pool is not None:
            pool.shutdown()


def _without_regimes(claim, spec, verdict, exc, clock, solver, budget, workers, improve_witness):
    """The region-wise proof ran out of time: the one-shot verdict stands alone (rule 3)."""
    status, note = methods(("the region-wise proof", UNKNOWN),
                           ("the one-shot query", verdict.status if verdict else UNKNOWN),
                           verdict is not None and verdict.status == REFUTED)
    cexs = ()
    if verdict is not None and verdict.status == REFUTED and verdict.counterexample is not None:
        model = witness_of(claim, verdict.counterexample.point)
        cexs = (best_counterexample(claim, model, verdict.solver, budget) if improve_witness
                else verdict.counterexample,)
    detail = "; ".join(x for x in (f"region-wise proof incomplete: {exc}", note,
                                   f"verdict from {verdict.solver}" if verdict and status != UNKNOWN else "")
                       if x)
    for k in ("decompose", "regimes", "analysis"):
        clock.setdefault(k, time.perf_counter())
    return RegimeProof(claim, status, "smt", spec.names, spec.labels, (), (), None, cexs, (), (), verdict,
                       None, detail, _timing(clock), 0, workers)


def _analyse(budget, notes, stage, default, work):
    """One analysis stage; running out of time leaves `default` and a note (verdicts unaffected)."""
    if notes:
        return default
    try:
        budget.check(stage)
        return work()
    except OutOfBudget as exc:
        notes.append(f"analysis incomplete: {exc}")
        return default


def _assemble(claim, spec, pieces, cells, regimes, clock, solver, verdict, workers, budget, improve_witness,
              pool=None, exact_sets=True):
    notes: list[str] = []
    compare = spec.kind == "compare"
    status, method, detail = _regime_status(spec, regimes, pieces)
    # the independent check of a proved claim runs in the workers while this process analyses
    check_done = _independent_check(claim, spec, regimes, pool, workers) \
        if status == PROVED and method == "regimes" else None
    ths = _analyse(budget, notes, "thresholds", (), lambda: thresholds(regimes, spec.names, budget))
    fails = [p for r in regimes for p in r.failures]
    failure = _analyse(budget, notes, "failure region", None,
                       lambda: failure_region(fails, pieces, spec.names)) if compare else None
    parts = part_reports(tuple(dict.fromkeys((s, n) for s, n, _ in spec.parts)), regimes)
    gaps = _analyse(budget, notes, "largest gap", (), lambda: (max_gap(regimes, spec.names, 1, budget),
                                                               max_gap(regimes, spec.names, -1, budget))) \
        if compare else ()
    try:
        cexs = counterexamples(claim, spec, regimes, solver, budget, improve_witness)
    except OutOfBudget as exc:
        notes.append(f"counterexample ranking incomplete: {exc}")
        cexs = counterexamples(claim, spec, regimes, solver, budget, improve=False)
    optimal = _analyse(budget, notes, "optimality region", (None, ""),
                       lambda: optimality_region(claim, spec, regimes, pieces, budget)) \
        if compare and exact_sets else (None, "")
    if optimal[1]:
        notes.append(optimal[1])
    clock["analysis"] = time.perf_counter()
    if status == REFUTED and not cexs:
        status, detail = UNKNOWN, "regimes fail but no failing point re-checks exactly: an engine defect"
    checked = None
    if check_done is not None:
        checked, why = check_done()
        if checked is False:
            status, detail = UNKNOWN, "; ".join(x for x in (detail, why) if x)
    if checked is None:       # not re-checked as a whole: check each certificate here
        bad = sorted({r.index for r in regimes for c in r.certificates if not check_certificate(c)})
        if bad:
            why = (f"CERTIFICATE CHECK FAILED in regimes {', '.join(map(str, bad))}: an engine defect, "
                   "please report it")
            status = UNKNOWN if status == PROVED else status
            detail = "; ".join(x for x in (detail, why) if x)
    clock["certificates"] = time.perf_counter()
    agree = None
    if verdict is not None:
        smt_refutes = verdict.status == REFUTED
        combined, note = methods(("the region-wise proof", status), ("the one-shot query", verdict.status),
                                 True)
        decisive = {PROVED, REFUTED}
        agree = (status == verdict.status) if status in decisive and verdict.status in decisive else None
        if method == "smt" or status == UNKNOWN:
            detail = "; ".join(x for x in (detail, f"verdict from {verdict.solver}") if x)
        status = combined
        detail = "; ".join(x for x in (detail, note) if x)
        if status == REFUTED and not cexs and smt_refutes and verdict.counterexample is not None:
            model = witness_of(claim, verdict.counterexample.point)
            cexs = (best_counterexample(claim, model, verdict.solver, budget) if improve_witness
                    else verdict.counterexample,)
    elif method == "smt":
        status = UNKNOWN
    detail = "; ".join(x for x in [detail] + notes if x)
    clock.setdefault("smt", clock["analysis"])
    timing = _timing(clock)
    return RegimeProof(claim, status, method, spec.names, spec.labels, regimes, ths, failure, cexs,
                       parts, gaps, verdict, agree, detail, timing, len(cells), workers, checked,
                       optimal[0] if status in (PROVED, REFUTED) else None)


def _independent_check(claim, spec, regimes, pool=None, workers=1):
    """Start the standalone checker (standard library only, a second implementation) on the
    exported certificates and the coverage of the region by the cells; returns `done()`, which
    gives (True, '') when it accepts, (None, reason) when the proof is not fully certified (some
    cell decided by SMT, a monotone claim over several polyhedra), (False, reason) when the checker
    rejects a proof we built: an engine defect, and the region-wise method then says unknown.
    With a pool the cells are checked in slices by the workers meanwhile; the coverage is checked
    in `done()`."""
    provisional = RegimeProof(claim, PROVED, "regimes", spec.names, spec.labels, regimes, (), None, (),
                              (), (), None, None)
    data = export_proof(provisional)
    if not data["complete"]:
        return lambda: (None, data["incomplete"])

    def rejected(exc):
        return False, (f"CERTIFICATE CHECK FAILED: the independent checker rejects the region-wise proof "
                       f"({exc}); an engine defect, please report it")
    try:
        read = checker.read(data)   # JSON-shaped already (tests/test_proof_export: exact JSON round trip)
    except checker.Bad as exc:
        verdict = rejected(exc)
        return lambda: verdict
    claim_data, region, cells, trees = read
    jobs = None
    if pool is not None:
        size = max(1, -(-len(cells) // (2 * workers)))
        jobs = [pool.submit(checker.check_cells, claim_data, cells[i:i + size], i)
                for i in range(0, len(cells), size)]

    def done():
        try:
            atoms = checker.check_cells(claim_data, cells) if jobs is None else \
                [a for job in jobs for a in job.result()]
            checker.covered(claim_data, region, atoms, trees)
        except checker.Bad as exc:
            return rejected(exc)
        return True, ""
    return done


STAGES = ("smt", "decompose", "regimes", "analysis", "certificates")


def _timing(clock):
    """Seconds per stage (a stage that did not run counts 0) and the total."""
    out, previous = {}, clock["start"]
    for stage in STAGES:
        at = clock.get(stage, previous)
        out[stage] = at - previous
        previous = at
    out["total"] = max(clock.values()) - clock["start"]
    return out


def _regime_status(spec, regimes, pieces):
    statuses = [r.status for r in regimes]
    loud = "; ".join(r.detail for r in regimes if "DISAGREE" in r.detail)
    if spec.kind == "monotone":
        hulls = {r.cells[0].hull for r in regimes}
        if any(h.coeff(spec.param) != 0 for hull in hulls for h in hull):
            return UNKNOWN, "smt", f"the region's affine hull does not contain the {spec.param} direction"
    if REFUTED in statuses:
        return REFUTED, "regimes", loud
    if spec.kind == "monotone" and not region_is_convex(pieces, spec.names):
        return UNKNOWN, "smt", "monotone on a non-convex region: slopes do not decide it"
    status = overall(statuses)
    return status, "regimes", loud or ("" if status == PROVED else "some regimes are undecided")
