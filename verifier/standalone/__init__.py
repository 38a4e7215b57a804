"""The certificate checker that needs only the Python standard library (check_certificates.py).

Why it lives in the engine: the region-wise prover runs it on its own proofs before it reports a
claim as proved and certified (a second, independent implementation of the checks), and bundles ship
the same file so that an editor can run it without installing this project.  The file must never
import anything outside the standard library (a test parses its imports).
"""

from pathlib import Path

CHECKER = Path(__file__).with_name("check_certificates.py")
