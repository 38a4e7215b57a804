"""The standalone certificate checker shipped in every bundle, and the bundle's certificates folder.

verifier/standalone/check_certificates.py uses only the Python standard library, so that an editor can
re-check a proof without installing (or trusting) gdof-workbench; this module copies it into a bundle
and writes the certificate files next to it.
"""

from __future__ import annotations

import shutil
from pathlib import Path

from verifier.standalone import CHECKER

README = """Proof certificates: one file per proved claim, claimNN.json (NN: the claim's position in report.md,
as in plots/claimNN_*; a claim decided in parts has one number per part, and that the parts cover the
claim's region is not part of the certificates).
Re-check them without gdof-workbench, with any Python 3 (standard library only), from the bundle folder:

    python3 check_certificates.py certificates/*.json

It prints "certified: <claim>" and the statement as checked, or "NOT certified: <reason>", per file;
exit status 0 when every file is certified, 1 otherwise, 2 when a file cannot be read.
The docstring at the top of check_certificates.py says what is proved and what is not: compare each
printed statement and region with the manuscript.  GDoF statements are asymptotic in SNR.
"""


def write_certificates(report, folder: Path) -> list[Path]:
    """certificates/claimNN.json for every proved section that keeps its RegimeProof (NN numbered as
    the plots), plus certificates/README.txt and check_certificates.py when there is at least one."""
    from verifier.regimes.export import export_json
    written = []
    for k, section in enumerate(report.sections, 1):
        proof = getattr(section, "proof", None)
        if section.status != "proved" or proof is None:
            continue
        target = Path(folder) / "certificates" / f"claim{k:02d}.json"
        target.parent.mkdir(exist_ok=True)
        target.write_text(export_json(proof), encoding="utf-8")
        written.append(target)
    if written:
        (Path(folder) / "certificates" / "README.txt").write_text(README, encoding="utf-8")
        shutil.copyfile(CHECKER, Path(folder) / "check_certificates.py")
    return written
