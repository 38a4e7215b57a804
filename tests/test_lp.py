"""The exact polyhedron toolkit (lp, lp_shape, lp_vertices) against scipy as a float oracle.

scipy (linprog with HiGHS, ConvexHull with Qhull) is used only here, as an independent numerical
check; the engine itself never touches floats.
"""

from fractions import Fraction as F
from itertools import combinations

import numpy as np
import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st
from scipy.optimize import linprog
from scipy.spatial import ConvexHull

from verifier.expressions.expr import affine, param
from verifier.expressions.region import Atom, Polyhedron, atoms_of
from verifier.geometry.farkas import check_farkas, farkas
from verifier.geometry.lp import feasible, minimize
from verifier.geometry.shape import difference, irredundant, nice_point, shape, simplest_between
from verifier.geometry.vertices import generators
from verifier.geometry.volume import volume

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


def _solve_exact(columns, rhs):
    """The unique y with sum_j y_j columns[j] == rhs (exact Gaussian elimination), or None when the
    system is inconsistent or its columns are dependent."""
    m, k = len(rhs), len(columns)
    rows = [[F(columns[j][i]) for j in range(k)] + [F(rhs[i])] for i in range(m)]
    r = 0
    for col in range(k):
        piv = next((i for i in range(r, m) if rows[i][col] != 0), None)
        if piv is None:
            return None  # dependent columns: not a basic solution
        rows[r], rows[piv] = rows[piv], rows[r]
        rows[r] = [v / rows[r][col] for v in rows[r]]
        for i in range(m):
            if i != r and rows[i][col] != 0:
                f = rows[i][col]
                rows[i] = [a - f * b for a, b in zip(rows[i], rows[r])]
        r += 1
    if any(row[-1] != 0 for row in rows[r:]):
        return None
    return [rows[j][-1] for j in range(k)]


def _linear(form, names):
    return [F(form.coeff(n)) for n in names]


def _descent_ray(form, atoms, names):
    """An exact d with a_i.d >= 0 for every atom and form.d < 0, or None when there is none.

    Brute force, independent of verifier.geometry.lp: if such a d exists, min form.d over the cone cut by the
    box -1 <= d_k <= 1 is negative and attained at a vertex, the unique solution of n independent tight
    planes among a_i.d = 0 and d_k = +-1; so every choice of n planes is solved and checked."""
    n = len(names)
    planes = [(_linear(a.form, names), F(0)) for a in atoms]
    planes += [([F(int(j == k)) for j in range(n)], F(s)) for k in range(n) for s in (1, -1)]
    for chosen in combinations(planes, n):
        d = _solve_exact([list(col) for col in zip(*[p for p, _ in chosen])], [b for _, b in chosen])
        if d is None or any(abs(x) > 1 for x in d):
            continue
        if all(sum(c * x for c, x in zip(_linear(a.form, names), d)) >= 0 for a in atoms) and \
                sum(c * x for c, x in zip(_linear(form, names), d)) < 0:
            return d
    return None


def _farkas_infeasibility(atoms, names):
    """Exact y >= 0 with sum y_i a_i == 0 (linear parts) and sum y_i b_i == -1 (Farkas' lemma: the
    closure is then empty), or None.  Brute force over basic solutions (supports of independent
    columns), independent of verifier.geometry.lp."""
    cols = [_linear(a.form, names) + [F(a.form.const)] for a in atoms]
    rhs = [F(0)] * len(names) + [F(-1)]
    for size in range(1, min(len(cols), len(rhs)) + 1):
        for support in combinations(range(len(cols)), size):
            y = _solve_exact([cols[i] for i in support], rhs)
            if y is not None and all(v >= 0 for v in y):
                return dict(zip(support, y))
    return None


def _assert_certified(ours, form, atoms, names):
    """The tool's answer checked exactly, without scipy (used when scipy's status is not decisive)."""
    closure = Polyhedron(tuple(a.relaxed() for a in atoms))
    if ours.status == "unbounded":
        assert closure.contains(ours.point)
        assert _descent_ray(form, atoms, names) is not None
    elif ours.status == "infeasible":
        y = _farkas_infeasibility(atoms, names)
        assert y is not None
        for n in names:  # the identity itself, re-checked
            assert sum(v * atoms[i].form.coeff(n) for i, v in y.items()) == 0
        assert sum(v * atoms[i].form.const for i, v in y.items()) == -1
    else:
        assert ours.status == "optimal" and closure.contains(ours.point)
        point_value = form.const + sum(c * ours.point[n] for n, c in form.coeffs)
        assert point_value == ours.value and all(y >= 0 for y in ours.multipliers)
        # form == value + sum y_i atom_i identically, so form >= value on the closure
        for n in names:
            assert form.coeff(n) == sum(y * a.form.coeff(n) for y, a in zip(ours.multipliers, atoms))
        assert form.const == ours.value + sum(y * a.form.const for y, a in zip(ours.multipliers, atoms))


def _scipy_expected(form, atoms, names):
    """scipy's verdict, or None when its status is not decisive (1: iteration limit, 4: numerical
    difficulties / HiGHS model status unknown, or an 'infeasible' whose feasibility probe is not)."""
    ref = _scipy_min(form, atoms, names)  # scipy HiGHS as float oracle
    expected = {0: "optimal", 2: "infeasible", 3: "unbounded"}.get(ref.status)
    if expected == "infeasible":
        probe = _scipy_min(affine({}), atoms, names).status
        if probe == 0:
            expected = "unbounded"  # HiGHS may report 'infeasible or unbounded' as infeasible
        elif probe != 2:
            expected = None
    return expected, ref


# HiGHS (scipy 1.17) returns status 4, "model_status is Unknown", on this program, which is unbounded.
_STATUS_4 = ((NAMES, [Atom(affine({"a": 3, "b": F(3, 2), "c": F(5, 3)}, F(-4, 3)), True),
                      Atom(affine({"a": 4, "c": F(5, 2)}, F(7, 2)), True),
                      Atom(affine({"a": F(-11, 3), "b": 3, "c": F(-2, 3)}, -3), True),
                      Atom(affine({"a": F(-2, 3), "b": F(-5, 3), "c": 3}, 4), True),
                      Atom(affine({"a": 4, "b": F(-4, 3), "c": F(3, 2)}, F(7, 3)), False),
                      Atom(affine({"a": F(8, 3), "b": -2, "c": F(10, 3)}, F(11, 3)), False)]),
             [F(2), F(-11, 3), F(3, 2)])


@settings(max_examples=150, deadline=None)
@given(polyhedra(3), st.lists(small, min_size=3, max_size=3))
@example(*_STATUS_4)
def test_minimize_matches_scipy_and_multipliers_are_a_farkas_identity(poly, c):
    names, atoms = poly
    form = affine(zip(names, c))
    ours = minimize(form, atoms, names)
    _assert_certified(ours, form, atoms, names)  # exact, whatever scipy says
    expected, ref = _scipy_expected(form, atoms, names)
    if expected is None:
        return  # scipy undecided: the exact certificate above is the check
    assert ours.status == expected
    if ours.status == "optimal":
        assert abs(float(ours.value) - (ref.fun + float(form.const))) < 1e-7
        assert Polyhedron(tuple(a.relaxed() for a in atoms)).contains(ours.point)
        # form - value == sum y_i atom_i identically: a Farkas certificate of form >= value
        shifted = affine(form.coeffs, form.const - ours.value)
        cert = farkas(shifted, [a.relaxed() for a in atoms], names, strict=False)
        assert cert is not None and check_farkas(shifted, [a.relaxed() for a in atoms], cert, False)


def test_exact_oracle_certificates_refuse_wrong_answers():
    a, b = param("a"), param("b")
    names = ("a", "b")
    quadrant = [*atoms_of(a, ">=", 0), *atoms_of(b, ">=", 0)]
    assert _descent_ray(affine({"a": 1, "b": 1}), quadrant, names) is None   # bounded below
    assert _descent_ray(affine({"a": -1}), quadrant, names) == [F(1), F(0)]  # a grows freely
    assert _farkas_infeasibility(quadrant, names) is None
    empty = [*atoms_of(a, ">=", 1), *atoms_of(a, "<=", 0)]
    y = _farkas_infeasibility(empty, names)
    assert y is not None and set(y) == {0, 1}


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
