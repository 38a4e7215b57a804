"""Certificates: every proved cell carries one, the independent checker accepts it, tampering is caught."""

from dataclasses import replace
from fractions import Fraction as F

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from verifier.claims.kinds import relation, within
from verifier.expressions.expr import max_, min_, param, pos
from verifier.expressions.region import Atom, Region, atoms_of
from verifier.geometry.farkas import Farkas
from verifier.regimes.cell_proof import Bound, Piece
from verifier.regimes.certificates import check_certificate
from verifier.regimes.proof import prove_by_regimes
from tests.strategies import exprs

a, b = param("alpha"), param("beta")
# Etkin, Tse, Wang, IEEE Trans. IT 54(12), 2008: the W curve and its symmetric outer bounds (from memory).
W = min_(1, max_(a / 2, 1 - a / 2), max_(a, 1 - a))
OUTER = min_(1, (max_(1, a) + pos(1 - a)) / 2, max_(a, 1 - a), (max_(1, a) + pos(1 - a) + max_(a, 1 - a)) / 3)
ALPHA_NONNEG = Region.of(*atoms_of(a, ">=", 0))


def _certs(claim):
    rp = prove_by_regimes(claim, smt="none", improve_witness=False)
    return rp, [c for r in rp.regimes for c in r.certificates]


def test_every_regime_of_the_w_curve_identity_is_certified():
    rp, certs = _certs(relation(W, "==", OUTER, ALPHA_NONNEG))
    assert rp.status == "proved" and rp.certified
    assert len(certs) == sum(len(r.cells) for r in rp.regimes) and all(map(check_certificate, certs))


def _tamper_multiplier(cert):
    """Change one Farkas multiplier of the first obligation (or its constant when it has none)."""
    f = cert.farkas[0]
    if f.mult:
        (i, y), rest = f.mult[0], f.mult[1:]
        changed = Farkas(f.const, ((i, y + F(1, 3)),) + rest)
    else:
        changed = Farkas(f.const + 1, f.mult)
    return replace(cert, farkas=(changed,) + cert.farkas[1:])


def _tamper_bound(cert):
    """Change a multiplier inside the proof that a min/max argument is on the right side, or None."""
    p = cert.pieces[0]
    if p.kind != "extremum":
        return None
    for k, bound in enumerate(p.bounds):
        if bound.kind == "farkas" and bound.cert.mult:
            (i, y), rest = bound.cert.mult[0], bound.cert.mult[1:]
            new = replace(bound, cert=Farkas(bound.cert.const, ((i, 2 * y),) + rest))
            bounds = p.bounds[:k] + (new,) + p.bounds[k + 1:]
            return replace(cert, pieces=(replace(p, bounds=bounds),) + cert.pieces[1:])
    return None


def test_tampered_certificates_are_rejected():
    rp, certs = _certs(relation(W, "<=", OUTER, ALPHA_NONNEG))
    assert certs and all(map(check_certificate, certs))
    cert = next(c for c in certs if c.pieces[0].kind == "extremum")
    # a changed Farkas multiplier
    assert not check_certificate(_tamper_multiplier(cert))
    bounded = [t for t in map(_tamper_bound, certs) if t is not None]
    assert bounded and not any(map(check_certificate, bounded))
    # a different 'active argument' for the outer min
    p = cert.pieces[0]
    other = (p.index + 1) % 3
    assert not check_certificate(replace(cert, pieces=(replace(p, index=other),) + cert.pieces[1:]))
    # a cell constraint dropped (multipliers then point at the wrong atoms)
    assert not check_certificate(replace(cert, atoms=cert.atoms[1:])) or not cert.farkas[0].mult
    # a cell constraint moved (a 'changed vertex' of the cell): shift one atom's constant
    used = {i for f in cert.farkas for i, _ in f.mult}
    if used:
        i = min(used)
        moved = Atom(cert.atoms[i].form + F(1, 2), cert.atoms[i].strict)
        atoms = cert.atoms[:i] + (moved,) + cert.atoms[i + 1:]
        assert not check_certificate(replace(cert, atoms=atoms))
    # a different claim: the certificate of W <= OUTER does not certify W < OUTER
    assert not check_certificate(replace(cert, rel="<"))
    # another expression
    assert not check_certificate(replace(cert, exprs=(W + 1, cert.exprs[1])))
    # garbage never raises
    assert not check_certificate(replace(cert, pieces=(None, None)))
    assert not check_certificate(replace(cert, farkas=(Farkas(F(-1), ()),)))


def test_strict_claims_need_a_strict_atom_or_a_positive_constant():
    # alpha/2 < 1 on [0, 2): proved only thanks to the strict atom alpha < 2.
    region = Region.of(*atoms_of(a, ">=", 0), *atoms_of(a, "<", 2))
    rp, certs = _certs(relation(a / 2, "<", 1, region))
    assert rp.status == "proved" and len(certs) == 1 and check_certificate(certs[0])
    cert = certs[0]
    (i, _), = cert.farkas[0].mult
    assert cert.atoms[i].strict
    closed = tuple(Atom(x.form, False) for x in cert.atoms)
    assert not check_certificate(replace(cert, atoms=closed))


def test_within_certificates_bound_both_differences():
    rp, certs = _certs(within(W, 1 - a / 2, F(1, 2), Region.of(*atoms_of(a, ">=", 0), *atoms_of(a, "<=", 3 / 2))))
    assert rp.status == "proved" and certs and all(len(c.farkas) == 2 for c in certs)
    assert all(map(check_certificate, certs))
    assert not any(check_certificate(replace(c, gap=F(1, 4))) for c in certs if c.exprs[0] != c.exprs[1])


NAMES = ("alpha", "beta")
BOX = Region.of(*[x for n in NAMES for x in atoms_of(param(n), ">=", 0) + atoms_of(param(n), "<=", 2)])


@settings(max_examples=40, deadline=None)
@given(exprs(NAMES, max_leaves=6), exprs(NAMES, max_leaves=6), st.sampled_from(["==", "<=", ">=", "<", ">"]))
def test_random_certificates_verify_and_tampering_is_caught(lhs, rhs, rel):
    rp, certs = _certs(relation(lhs, rel, rhs, BOX))
    assert all(map(check_certificate, certs))
    assert all(r.certificates for r in rp.regimes if r.status == "proved")
    for cert in certs[:3]:
        assert not check_certificate(_tamper_multiplier(cert))
        bad = _tamper_bound(cert)
        assert bad is None or not check_certificate(bad)


def test_piece_proofs_must_match_the_tree_shape():
    rp, certs = _certs(relation(W, "<=", 1, ALPHA_NONNEG))
    cert = certs[0]
    assert not check_certificate(replace(cert, pieces=(Piece("affine"), cert.pieces[1])))
    assert not check_certificate(replace(cert, pieces=(Piece("sum", ()), cert.pieces[1])))
    p = cert.pieces[0]
    assert not check_certificate(replace(cert, pieces=(replace(p, bounds=p.bounds[:-1]),) + cert.pieces[1:]))
    wrong = tuple(Bound("one", (bd,), 5) for bd in p.bounds)
    assert not check_certificate(replace(cert, pieces=(replace(p, bounds=wrong),) + cert.pieces[1:]))


@pytest.mark.parametrize("kind", ["compare", "monotone"])
def test_unknown_kinds_and_arities_are_rejected(kind):
    rp, certs = _certs(relation(W, "<=", 1, ALPHA_NONNEG))
    cert = certs[0]
    if kind == "compare":
        assert not check_certificate(replace(cert, kind="nonsense"))
    else:
        assert not check_certificate(replace(cert, kind="monotone"))  # two expressions: wrong arity
