"""The region-wise prover: split a region into cells where every expression is affine, decide and
certify each regime, the exact failure sub-region, thresholds, redundant bounds and gaps, and the
export of proofs for the standalone checker.
"""

from verifier.core.public_names import lazy_names

__all__, __getattr__, __dir__ = lazy_names(__name__, {
    "proof": ("prove_by_regimes", "RegimeProof"),
    "failure": ("FailureRegion",),
    "thresholds": ("Threshold", "slice_profile"),
    "analysis": ("Gap", "PartReport"),
    "export": ("export_proof", "export_json"),
})
