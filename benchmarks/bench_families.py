"""Speed benchmark: the region-wise report against the one-shot verdict, family by family.

Run on demand (pytest does not collect it):

    python3 benchmarks/bench_families.py             # every family, 2 workers for the parallel row
    python3 benchmarks/bench_families.py --quick     # the small families only
    python3 benchmarks/bench_families.py "bounds 4x8" "thin band 1/999983"

Each claim runs in a fresh subprocess, so the peak memory (maximum resident set size) belongs to that
claim alone, and times are CPU seconds of that process (the machine may be shared).  The baseline is
the one-shot verdict (`verifier.claims.one_shot.prove`, counterexample search included) on the same claim in
the same subprocess; `ratio` = report / one-shot.  The targets are the ones the project set for
itself; the table says which are met.  Families are generated deterministically (benchmarks/families.py).
"""

from __future__ import annotations

import json
import os
import resource
import subprocess
import sys
import time

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, ".."))
sys.path.insert(0, HERE)

TARGETS = {"bounds 4x8": 10.0, "bounds 5x4": 10.0, "bounds 3x16": 5.0, "bounds 6x4": 60.0,
           "thin band 1/10": 2.0, "thin band 1/999983": 2.0, "thin band x10^9": 2.0}
QUICK = ["bounds 1x2", "bounds 2x8", "nested depth 4", "thin band 1/10", "thin band 1/999983",
         "thin band x10^9", "chain 6"]
BUDGET = 900.0


def one(name: str, workers: int = 1) -> dict:
    """Run one family member in this process and return its figures."""
    from families import FAMILIES
    from verifier.core.budget import Budget
    from verifier.claims.one_shot import prove
    from verifier.regimes.proof import prove_by_regimes
    prove(FAMILIES["bounds 1x2"]())            # solver bindings loaded before timing
    claim = FAMILIES[name]()
    start = time.process_time()
    verdict = prove(claim, budget=Budget(BUDGET))
    one_shot = time.process_time() - start
    start, wall = time.process_time(), time.perf_counter()
    proof = prove_by_regimes(claim, workers=workers, budget=Budget(BUDGET))
    report = time.process_time() - start
    wall = time.perf_counter() - wall
    return {"name": name, "one_shot": one_shot, "report": report, "wall": wall,
            "status": proof.status, "one_shot_status": verdict.status, "cells": proof.cells,
            "regimes": len(proof.regimes), "detail": proof.detail[:120],
            "maxrss_mb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024}


def in_subprocess(name: str, workers: int = 1) -> dict:
    out = subprocess.run([sys.executable, __file__, "--one", name, str(workers)], capture_output=True,
                         text=True, timeout=BUDGET * 2)
    if out.returncode != 0:
        return {"name": name, "error": out.stderr.strip().splitlines()[-1] if out.stderr else "failed"}
    return json.loads(out.stdout.strip().splitlines()[-1])


def trivial_check_cpu() -> float:
    """CPU seconds of a whole `gdof check` process on a one-line claim (imports included)."""
    import tempfile
    text = ('title = "t"\n[parameters]\nalpha = "a"\n[assume]\nregion = "alpha >= 0"\n'
            '[formulas]\nf = "min(1, alpha)"\n[[claims]]\nname = "c"\nstatement = "f <= 1 + alpha"\n')
    with tempfile.NamedTemporaryFile("w", suffix=".toml", delete=False) as fh:
        fh.write(text)
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    runs = 3
    for _ in range(runs):
        subprocess.run([sys.executable, "-m", "workbench.cli", "check", fh.name], capture_output=True,
                       cwd=os.path.join(HERE, ".."))
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    os.unlink(fh.name)
    return (after.ru_utime + after.ru_stime - before.ru_utime - before.ru_stime) / runs


def main(argv):
    from families import FAMILIES
    if argv[:1] == ["--one"]:
        print(json.dumps(one(argv[1], int(argv[2]) if len(argv) > 2 else 1)))
        return 0
    quick = "--quick" in argv
    names = [a for a in argv if not a.startswith("--")] or (QUICK if quick else list(FAMILIES))
    print(f"trivial `gdof check` process: {trivial_check_cpu():.2f} s CPU (target <= 0.25)")
    head = f"{'family':22} {'report':>9} {'one-shot':>9} {'ratio':>7} {'regimes':>7} {'cells':>6} {'peak MB':>8}  target"
    print(head)
    print("-" * len(head))
    for name in names:
        r = in_subprocess(name)
        if "error" in r:
            print(f"{name:22} error: {r['error']}")
            continue
        target = TARGETS.get(name)
        mark = "" if target is None else (f"<= {target:g} s: " + ("met" if r["report"] <= target else "NOT met"))
        agree = "" if r["status"] == r["one_shot_status"] else f"  (report {r['status']}, one-shot {r['one_shot_status']})"
        print(f"{name:22} {r['report']:8.2f}s {r['one_shot']:8.3f}s {r['report'] / max(r['one_shot'], 1e-3):7.1f} "
              f"{r['regimes']:7d} {r['cells']:6d} {r['maxrss_mb']:8.0f}  {mark}{agree}", flush=True)
    if not quick and not [a for a in argv if not a.startswith("--")]:
        serial, parallel = in_subprocess("bounds 3x16", 1), in_subprocess("bounds 3x16", 2)
        if "error" not in serial and "error" not in parallel:
            print(f"\nworkers: bounds 3x16 ({serial['cells']} cells) wall {serial['wall']:.2f} s with 1, "
                  f"{parallel['wall']:.2f} s with 2: {serial['wall'] / parallel['wall']:.2f}x (target >= 1.6x)")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
