"""The regimes of the regions a region claim speaks of, for `gdof report` (display only).

Why here and not in the engine: which regions are shown (those given by inequalities; corner lists are
already explicit), over which exponent region (the claim's), and that a limit or a spent budget makes
a region 'not shown' rather than the claim unknown, are presentation choices.  The engine,
verifier.rates.regimes, re-checks every corner and status exactly; a disagreement there is shown
loudly as 'not shown: RE-CHECK FAILED', never as a result.
"""

from __future__ import annotations

from verifier.core.budget import Budget, OutOfBudget
from verifier.rates.region import HRegion
from verifier.rates.regimes import RegionNotShown, region_regimes


_DONE: dict = {}   # (region, exponent region) -> RegionRegimes: a pure function of the two, kept


def region_regimes_of(claim, budget: Budget) -> list:
    """RegionRegimes (or RegionNotShown) for every distinct H-form region of a rate claim."""
    out, seen = [], set()
    for region in (claim.first, claim.second):
        if not isinstance(region, HRegion) or region.name in seen:
            continue
        seen.add(region.name)
        key = (region, claim.region)
        try:
            if key not in _DONE:
                if len(_DONE) >= 64:     # a long notebook session: keep the memo small
                    _DONE.clear()
                _DONE[key] = region_regimes(region, claim.region, budget)
            out.append(_DONE[key])
        except OutOfBudget as exc:          # TooLarge included: a named size limit
            out.append(RegionNotShown(region.name, str(exc)))
        except AssertionError as exc:
            out.append(RegionNotShown(region.name, f"RE-CHECK FAILED, please report: {exc}"))
    return out


def once_per_case(first: dict, claim, items) -> tuple:
    """The items, with a region already shown under an earlier claim of the case (same region, same
    exponent region: `first` maps that to the claim's name and is updated) replaced by a pointer."""
    kept = []
    for item in items:
        if isinstance(item, RegionNotShown):
            kept.append(item)
            continue
        key = (item.region, claim.region)
        if key in first:
            kept.append(RegionNotShown(item.region.name, "", first[key]))
        else:
            first[key] = claim.name or claim.text()
            kept.append(item)
    return tuple(kept)
