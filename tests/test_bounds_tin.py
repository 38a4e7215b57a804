"""TIN with power control (bounds.tin) and the MAC region (bounds.mac)."""

import random
from fractions import Fraction

import numpy as np
from scipy.optimize import linear_sum_assignment, linprog

from bounds.mac import mac_bound_names, mac_region, mac_sum_gdof
from bounds.projection import max_sum
from bounds.tin import condition_atoms, cycles, tin_bounds, tin_condition, tin_condition_holds, tin_sum_gdof
from verifier.expressions.expr import evaluate, max_, param, pos

F = Fraction


def test_two_user_spot_value():
    # Geng, Naderializadeh, Avestimehr, Jafar, IEEE Trans. IT 61(4), 2015 (REFERENCES.md #4, from memory):
    # a11 = a22 = 1, a12 = a21 = 3/10 gives d1 + d2 <= 7/5
    a = [[1, F(3, 10)], [F(3, 10), 1]]
    assert evaluate(tin_sum_gdof(a), {}) == F(7, 5)
    assert evaluate(tin_bounds(a)["cycle 1->2->1"].rhs, {}) == F(7, 5)


def test_condition_at_a_few_points():
    # condition (Geng et al. 2015, abstract read in source): direct >= strongest caused + strongest suffered
    assert tin_condition_holds([[1, F(3, 10)], [F(3, 10), 1]])
    assert tin_condition_holds([[1, F(1, 2)], [F(1, 2), 1]])          # boundary: 1 = 1/2 + 1/2
    assert not tin_condition_holds([[1, F(6, 10)], [F(6, 10), 1]])
    # receiver-first: A[0][1] = 0.7 is what receiver 1 suffers from transmitter 2
    a = [[1, F(7, 10), 0], [F(4, 10), 2, F(1, 10)], [0, F(1, 2), 2]]
    assert not tin_condition_holds(a)                                  # 1 < 7/10 + max(4/10, 0)
    a[1][0] = F(3, 10)                                                 # now 1 >= 7/10 + 3/10
    assert tin_condition_holds(a)


def test_symbolic_condition_agrees_with_numeric_check():
    names = [[f"a{i}{j}" for j in (1, 2, 3)] for i in (1, 2, 3)]
    region = tin_condition(names)
    assert len(condition_atoms(names)) == 3 * 2 * 2
    rng = random.Random(2)
    for _ in range(300):
        point = {n: F(rng.randint(0, 12), 4) for row in names for n in row}
        numeric = [[point[n] for n in row] for row in names]
        assert region.contains(point) == tin_condition_holds(numeric)


def test_cycles_cover_every_cyclic_order_once():
    assert len(cycles(3)) == 3 + 2          # three 2-cycles, two orientations of the 3-cycle
    assert len(cycles(4)) == 6 + 8 + 6


def _tin_regime_matrix(rng, k):
    a = [[F(rng.randint(0, 10), 10) for _ in range(k)] for _ in range(k)]
    for i in range(k):
        caused = max(a[j][i] for j in range(k) if j != i)
        suffered = max(a[i][j] for j in range(k) if j != i)
        a[i][i] = caused + suffered + F(rng.randint(0, 10), 10)
    return a


def test_sum_gdof_in_the_tin_regime_is_a_min_weight_assignment():
    # arXiv 1401.2692 (abstract read in source): in TIN-optimal networks the sum-GDoF is a minimum weighted
    # matching, i.e. a partition of the users into vertex-disjoint cycles; weight of i -> j is a_ii - A[j][i]
    # (a_ii on the diagonal).  Reference library: scipy.optimize.linear_sum_assignment.
    rng = random.Random(4)
    for _ in range(20):
        k = rng.randint(2, 4)
        a = _tin_regime_matrix(rng, k)
        assert tin_condition_holds(a)
        w = [[a[i][i] - (a[j][i] if j != i else 0) for j in range(k)] for i in range(k)]
        rows, cols = linear_sum_assignment(np.array(w, dtype=float))
        assert evaluate(tin_sum_gdof(a), {}) == sum(w[i][j] for i, j in zip(rows, cols))


def test_symbolic_sum_gdof_equals_linprog_at_random_points():
    names = [[f"a{i}{j}" for j in (1, 2, 3)] for i in (1, 2, 3)]
    total = tin_sum_gdof(names)
    rows = list(tin_bounds(names).values())
    rng = random.Random(9)
    for _ in range(40):
        point = {n: F(rng.randint(0, 20), 5) for row in names for n in row}
        for i in (1, 2, 3):
            point[f"a{i}{i}"] += 5  # keep every cycle bound's right-hand side >= 0 so the LP is feasible
        a_ub = [[float(r.coeff(f"d{i}")) for i in (1, 2, 3)] for r in rows]
        b_ub = [float(evaluate(r.rhs, point)) for r in rows]
        res = linprog([-1, -1, -1], A_ub=np.array(a_ub), b_ub=np.array(b_ub), bounds=[(0, None)] * 3,
                      method="highs")
        assert res.status == 0  # reference library: scipy.optimize.linprog
        assert abs(float(evaluate(total, point)) + res.fun) < 1e-9


def test_mac_region_and_sum():
    # Cover, Thomas, Elements of Information Theory, 2nd ed. 2006, ch. 15, in GDoF form (REFERENCES.md #7)
    rows = mac_region(["a1", "a2", "a3"])
    assert len(rows) == 7 and mac_bound_names(3)[-1] == "d1 + d2 + d3"
    assert evaluate(rows[3].rhs, {"a1": 2, "a2": 5, "a3": 0}) == 5      # d1 + d2 <= max(a1, a2)
    symbolic = max_sum(rows, ["d1", "d2", "d3"])
    rng = random.Random(1)
    for _ in range(200):
        point = {f"a{i}": F(rng.randint(-5, 20), rng.randint(1, 4)) for i in (1, 2, 3)}
        assert evaluate(symbolic, point) == evaluate(mac_sum_gdof(["a1", "a2", "a3"]), point)
    assert mac_sum_gdof([param("a"), 1]) == max_(pos(param("a")), 1)
