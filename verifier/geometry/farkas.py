"""Farkas certificates: why an affine form is >= 0 (or > 0) on a polyhedron, checkable by hand.

A certificate `form == c + sum y_i a_i` (identically, c >= 0, y >= 0) proves form >= 0 on the
polyhedron {a_i >= 0 / a_i > 0}; form > 0 follows when c > 0 or some strict atom has y_i > 0.  We
find them as LP duals (lp.minimize), or more cheaply from a cell's generators (farkas_by_cone): the
minimum of the form is attained at a vertex v, and by complementary slackness an optimal dual lives
on the atoms tight at v, so a tiny feasibility LP over those atoms suffices.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Sequence

from verifier.expressions.expr import Affine
from verifier.expressions.region import Atom
from verifier.geometry.lp import ONE, ZERO, minimize, rows_of, solve_standard



@dataclass(frozen=True)
class Farkas:
    """`form == const + sum mult[i] * atoms[i].form` with const >= 0 and mult >= 0 proves form >= 0 on
    the polyhedron; it proves form > 0 when const > 0 or some strict atom has a positive multiplier."""

    const: Fraction
    mult: tuple[tuple[int, Fraction], ...]  # (atom index, positive multiplier)


def farkas(form: Affine, atoms: Sequence[Atom], names: Sequence[str], strict: bool) -> Farkas | None:
    """A certificate that `form >= 0` (or `> 0` if strict) on the polyhedron, or None if false there.

    Assumes the polyhedron is non-empty (for an empty one the answer may be None)."""
    res = minimize(form, atoms, names)
    if res.status != "optimal" or res.value < 0 or (strict and res.value == 0 and not
                                                  any(a.strict for a in atoms)):
        return None
    if res.value > 0 or not strict:
        return Farkas(res.value, tuple((i, y) for i, y in enumerate(res.multipliers) if y))
    return strict_farkas(form, atoms, names)


def strict_farkas(form: Affine, atoms: Sequence[Atom], names: Sequence[str]) -> Farkas | None:
    """form == sum y_i atoms_i (no constant) with positive total weight on strict atoms, if any.

    By Motzkin's transposition theorem this exists exactly when min form = 0 on the closure and
    the face where form = 0 misses the (partly open) polyhedron.  Solved homogenised:
    max sum_strict y s.t. sum y_i a_i = lam * form, sum_strict y <= 1, y, lam >= 0; then y / lam.
    (lam = 0 with strict weight would make a strict atom an implicit equality: an empty polyhedron.)"""
    rows = rows_of([a.form for a in atoms], names)
    f = rows_of([form], names)[0]
    m, n = len(rows), len(names)
    strict = [a.strict for a in atoms]
    if not any(strict):
        return None
    # variables: y_1..y_m, lam, slack s
    M = [[rows[i][0][k] for i in range(m)] + [-f[0][k], ZERO] for k in range(n)]
    M.append([rows[i][1] for i in range(m)] + [-f[1], ZERO])
    M.append([ONE if strict[i] else ZERO for i in range(m)] + [ZERO, ONE])
    r = [ZERO] * (n + 1) + [ONE]
    c = [ONE if strict[i] else ZERO for i in range(m)] + [ZERO, ZERO]
    res = solve_standard(c, M, r)
    if res.status != "optimal" or res.value <= 0 or res.y[m] <= 0:
        return None
    lam = res.y[m]
    return Farkas(ZERO, tuple((i, y / lam) for i, y in enumerate(res.y[:m]) if y))


def check_farkas(form: Affine, atoms: Sequence[Atom], cert: Farkas, strict: bool) -> bool:
    """Independent re-check of a Farkas certificate by plain Fraction arithmetic."""
    if cert.const < 0 or any(y <= 0 or not 0 <= i < len(atoms) for i, y in cert.mult):
        return False
    total: dict[str, Fraction] = {}
    const = cert.const
    for i, y in cert.mult:
        for n, c in atoms[i].form.coeffs:
            total[n] = total.get(n, ZERO) + y * c
        const += y * atoms[i].form.const
    if {n: c for n, c in total.items() if c} != dict(form.coeffs) or const != form.const:
        return False
    return not strict or cert.const > 0 or any(atoms[i].strict for i, _ in cert.mult)


def farkas_by_cone(form: Affine, atoms: Sequence[Atom], cone) -> Farkas | None:
    """Certificate that form >= 0 on the closure of `atoms`, from their Cone (built from exactly these
    atoms, in order, so that atom i is constraint i + 1); None when form is negative somewhere."""
    h = cone.vector(form)
    vals = [sum(a * b for a, b in zip(h, r)) for r, _ in cone.rays]
    if any(v < 0 for v in vals) or any(sum(a * b for a, b in zip(h, l)) for l in cone.lines):
        return None
    single = _one_atom(form, h, atoms, cone)
    if single is not None:
        return single
    best = min((Fraction(v, r[-1]), k) for k, ((r, _), v) in enumerate(zip(cone.rays, vals)) if r[-1] > 0)
    r, zero = cone.rays[best[1]]
    tight = [i for i in range(len(atoms)) if i + 1 in zero and atoms[i].form.coeffs]
    point = {n: Fraction(x, r[-1]) for n, x in zip(cone.names, r)}
    value = form.const + sum((c * point[n] for n, c in form.coeffs), ZERO)
    rows = rows_of([atoms[i].form for i in tight], cone.names)
    target = rows_of([form], cone.names)[0][0]
    M = [[row[0][k] for row in rows] for k in range(len(cone.names))]
    res = solve_standard([ZERO] * len(tight), M, target)
    if res.status != "optimal":
        return None
    return Farkas(value, tuple((tight[j], y) for j, y in enumerate(res.y) if y))


def _one_atom(form: Affine, h, atoms: Sequence[Atom], cone) -> Farkas | None:
    """The common case of a cut: form = lam * atom + c with lam > 0, c >= 0 (no LP needed)."""
    key = cone.vector(Affine(form.coeffs, ZERO))
    for i, a in enumerate(atoms):
        if len(a.form.coeffs) != len(form.coeffs) or a.form.coeffs[0][0] != form.coeffs[0][0]:
            continue
        if cone.vector(Affine(a.form.coeffs, ZERO)) == key:
            n, c = a.form.coeffs[0]
            lam = form.coeff(n) / c
            rest = form.const - lam * a.form.const
            if rest >= 0:
                return Farkas(rest, ((i, lam),))
    return None


# ---------------------------------------------------------------------------------------------
# reuse between neighbouring polyhedra
# ---------------------------------------------------------------------------------------------
# Certificates found on one cell serve its neighbours: regime cells are refined depth first, so
# consecutive cells share a prefix of atoms, and multipliers that use only shared atoms prove the
# same fact there (the identity involves nothing else).  Reuse is checked atom by atom, never
# assumed; the cache is per process and bounded.
_RECENT: dict = {}
MAX_RECENT = 20_000


def reused(key, atoms: Sequence[Atom]) -> Farkas | None:
    """A remembered certificate for `key` (the target form, or (form, strict)) whose multipliers
    sit on atoms that are, at the same positions, also atoms of this polyhedron; else None."""
    for cert, used in _RECENT.get(key, ()):
        if all(i < len(atoms) and atoms[i] == a for i, a in used):
            return cert
    return None


def remember(key, atoms: Sequence[Atom], cert: Farkas | None) -> None:
    if cert is None:
        return
    if len(_RECENT) > MAX_RECENT:
        _RECENT.clear()
    seen = _RECENT.setdefault(key, [])
    seen.insert(0, (cert, tuple((i, atoms[i]) for i, _ in cert.mult)))
    del seen[4:]
