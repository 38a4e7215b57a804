"""The exact polyhedron toolkit (lp, lp_shape, lp_vertices) against scipy as a float oracle.

scipy (linprog with HiGHS, ConvexHull with Qhull) is used only here, as an independent numerical
check; the engine itself never touches floats.
"""

from fractions import Fraction as F

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import linprog
from scipy.spatial import ConvexHull

from verifier.expr import affine, param
from verifier.lp import feasible, minimize
from verifier.lp_farkas import check_farkas, farkas
from verifier.lp_shape import difference, irredundant, nice_point, shape, simplest_between
from verifier.lp_vertices import generators
from verifier.lp_volume import volume
from verifier.region import Atom, Polyhedron, atoms_of

NAMES = ("a", "b", "c")
small = st.fractions(-4, 4, max_denominator=3)


@st.composite
def polyhedra(draw, n=2, max_atoms=6):
    names = NAMES[:n]
    atoms = []
    for _ in range(draw(st.integers(1, max_atoms))):
        coeffs = [(x, draw(small)) for x in names]
        atoms.append(Atom(affine(coeffs, draw(small)), draw(st.booleans())))
    return names, atoms


def _scipy_min(form, atoms, names):
    A = np.array([[-float(a.form.coeff(n)) for n in names] for a in atoms])
    b = np.array([float(a.form.const) for a in atoms])
    res = linprog([float(form.coeff(n)) for n in names], A_ub=A, b_ub=b,
                  bounds=[(None, None)] * len(names), method="highs")
    return res


@settings(max_examples=150, deadline=None)
@given(polyhedra(3), st.lists(small, min_size=3, max_size=3))
def test_minimize_matches_scipy_and_multipliers_are_a_farkas_identity(poly, c):
    names, atoms = poly
    form = affine(zip(names, c))
    ours = minimize(form, atoms, names)
    ref = _scipy_min(form, atoms, names)  # scipy HiGHS as float oracle
    expected = {0: "optimal", 2: "infeasible", 3: "unbounded"}[ref.status]
    if expected == "infeasible" and _scipy_min(affine({}), atoms, names).status == 0:
        expected = "unbounded"  # HiGHS may report 'infeasible or unbounded' as infeasible
    assert ours.status == expected
    if ours.status == "optimal":
        assert abs(float(ours.value) - (ref.fun + float(form.const))) < 1e-7
        assert Polyhedron(tuple(a.relaxed() for a in atoms)).contains(ours.point)
        # form - value == sum y_i atom_i identically: a Farkas certificate of form >= value
        shifted = affine(form.coeffs, form.const - ours.value)
        cert = farkas(shifted, [a.relaxed() for a in atoms], names, strict=False)
        assert cert is not None and check_farkas(shifted, [a.relaxed() for a in atoms], cert, False)


@settings(max_examples=150, deadline=None)
@given(polyhedra(2, 5))
def test_feasibility_and_shape_agree_with_their_witnesses(poly):
    names, atoms = poly
    point = feasible(atoms, names)
    s = shape(atoms, names)
    assert (point is None) == (s is None)
    if s is None:
        return
    assert Polyhedron(tuple(atoms)).contains(point) and Polyhedron(tuple(atoms)).contains(s.point)
    nice = nice_point(atoms, names)
    assert Polyhedron(tuple(atoms)).contains(nice)
    for h in s.hull:  # the hull equations vanish at every point found
        assert h.const + sum(c * nice[n] for n, c in h.coeffs) == 0
    assert s.dim == len(names) - len(s.hull)
    for i in s.implicit:
        assert atoms[i].form.const + sum(c * nice[n] for n, c in atoms[i].form.coeffs) == 0


def test_dimension_of_faces_lines_and_points():
    a, b = param("a"), param("b")
    square = [*atoms_of(a, ">=", 0), *atoms_of(a, "<=", 1), *atoms_of(b, ">=", 0), *atoms_of(b, "<=", 1)]
    assert shape(square, ("a", "b")).dim == 2
    assert shape(square + list(atoms_of(a, "==", b)), ("a", "b")).dim == 1
    assert shape(square + list(atoms_of(a + b, "<=", 0)), ("a", "b")).dim == 0
    assert shape(square + list(atoms_of(a + b, "<", 0)), ("a", "b")) is None
    # a strict atom that is an implicit equality empties the set
    assert shape(square + list(atoms_of(a, ">=", 1)) + [Atom(affine({"b": 1}), True)], ("a", "b")).dim == 1
    assert shape([*atoms_of(a, ">", 0), *atoms_of(a, "<=", 0)], ("a",)) is None


def test_simplest_rationals_in_open_intervals():
    # Stern-Brocot: the simplest fraction strictly between two rationals (common practice).
    assert simplest_between(F(1, 2), F(2, 3)) == F(3, 5)
    assert simplest_between(F(1, 3), F(1, 2)) == F(2, 5)
    assert simplest_between(F(-1), F(1)) == 0
    assert simplest_between(F(2), F(3)) == F(5, 2)
    assert simplest_between(F(-7, 3), F(-2)) == F(-9, 4)


def test_irredundant_keeps_the_strict_atom_and_certifies_drops():
    a = param("a")
    atoms = [*atoms_of(a, ">=", 0), *atoms_of(a, ">", 0), *atoms_of(a, "<=", 2), *atoms_of(a, "<", 5)]
    kept, drops = irredundant(atoms, ("a",))
    assert set(kept) == {Atom(affine({"a": 1}), True), *atoms_of(a, "<=", 2)}
    for dropped, others, cert in drops:
        assert check_farkas(dropped.form, others, cert, dropped.strict)


def test_difference_is_disjoint_and_exact():
    a, b = param("a"), param("b")
    names = ("a", "b")
    box = [*atoms_of(a, ">=", 0), *atoms_of(a, "<=", 2), *atoms_of(b, ">=", 0), *atoms_of(b, "<=", 2)]
    hole = [*atoms_of(a, ">", 1), *atoms_of(b, ">", 1)]
    parts = difference(box, [hole], names)
    grid = [F(k, 2) for k in range(5)]
    for x in grid:
        for y in grid:
            p = {"a": x, "b": y}
            inside = [Polyhedron(q).contains(p) for q in parts]
            expected = Polyhedron(tuple(box)).contains(p) and not Polyhedron(tuple(hole)).contains(p)
            assert sum(inside) == int(expected)


@settings(max_examples=60, deadline=None)
@given(polyhedra(2, 5))
def test_vertices_and_area_match_qhull_on_bounded_polygons(poly):
    names, atoms = poly
    box = [x for n in names for x in atoms_of(param(n), ">=", -3) + atoms_of(param(n), "<=", 3)]
    atoms = atoms + box
    gens = generators(atoms, names)
    if gens is None:
        assert shape([x.relaxed() for x in atoms], names) is None
        return
    verts = np.array([[float(v[n]) for n in names] for v in gens.vertices])
    for v in gens.vertices:
        assert Polyhedron(tuple(x.relaxed() for x in atoms)).contains(v)
    area = volume(atoms, names)
    if len(verts) >= 3 and np.linalg.matrix_rank(verts - verts[0]) == 2:
        hull = ConvexHull(verts)  # Qhull (via scipy) as float oracle
        assert len(hull.vertices) == len(verts)  # every vertex we list is extreme
        assert abs(hull.volume - float(area)) < 1e-9
    else:
        assert area == 0


def test_rays_and_lines_of_unbounded_polyhedra():
    a, b = param("a"), param("b")
    names = ("a", "b")
    gens = generators([*atoms_of(b, ">=", a), *atoms_of(a, ">", 1)], names)
    assert gens.vertices == ({"a": 1, "b": 1},)
    assert set(tuple(r.values()) for r in gens.rays) == {(0, 1), (1, 1)}
    gens = generators(list(atoms_of(a, ">=", 0)), names)
    assert gens.lines == ({"a": 0, "b": 1},) and gens.rays == ({"a": 1, "b": 0},)
    assert volume(list(atoms_of(a, ">=", 0)), names) is None


def test_volume_of_the_unit_simplex_and_cube_in_three_dimensions():
    a, b, c = (param(n) for n in NAMES)
    simplex = [*atoms_of(a, ">=", 0), *atoms_of(b, ">=", 0), *atoms_of(c, ">=", 0),
               *atoms_of(a + b + c, "<=", 1)]
    assert volume(simplex, NAMES) == F(1, 6)  # 1/n! (common practice)
    cube = [x for v in (a, b, c) for x in atoms_of(v, ">=", 0) + atoms_of(v, "<=", 2)]
    assert volume(cube, NAMES) == 8
    assert len(generators(cube, NAMES).vertices) == 8


@pytest.mark.parametrize("strict", [False, True])
def test_farkas_certificates_for_strict_and_nonstrict_consequences(strict):
    a, b = param("a"), param("b")
    names = ("a", "b")
    cell = [*atoms_of(a, ">=", 0), Atom(affine({"b": F(1, 2), "a": -1}), True)]  # b/2 > a >= 0
    cert = farkas(b - a, cell, names, strict=strict)  # b > a follows, strictly
    assert cert is not None and check_farkas(b - a, cell, cert, strict)
    assert farkas(a - b, cell, names, strict=strict) is None
    closed = [x.relaxed() for x in cell]
    assert (farkas(b - a, closed, names, strict=strict) is None) == strict  # b = a = 0 is in the closure
