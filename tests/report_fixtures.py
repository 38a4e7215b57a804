"""Shared, cached region-wise proofs for the report, plot and bundle tests (each proof runs once)."""

from functools import lru_cache
from pathlib import Path

from verifier.regimes.proof import prove_by_regimes
from verifier.report.build import claim_report
from workbench.casefile import load_case

ROOT = Path(__file__).resolve().parent.parent
ETW = ROOT / "casebook/published/etkin_tse_wang_2008.toml"
DEMO = ROOT / "casebook/demo/cache_downlink_manuscript.toml"
W_CLAIM = "the W curve is the min of the symmetric outer bounds"
DEMO_WRONG = "Theorem 1 as submitted: optimal once the caches exceed user 2's link, gamma > alpha"


@lru_cache(maxsize=None)
def section(path, name):
    case = load_case(path)
    cc = next(c for c in case.claims if c.claim.name == name)
    label, sub = cc.subclaims[0]
    return claim_report(prove_by_regimes(sub), label, cc.expect)
