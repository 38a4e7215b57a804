"""Inputs whose naive handling is exponential end quickly: exact pruning keeps realistic ones small, and
the rest get one clear InputError naming the size and the limit (verifier.expressions.region, verifier.text.parse,
bounds.cutset, bounds.matching, bounds.network).  No timing here: each test would hang or exhaust
memory without the limit it exercises."""

import itertools
import pickle
import random
import textwrap
from fractions import Fraction as F

import pytest

from bounds import cutset
from bounds.cutset import TooManyCuts, message_cut_bounds, sum_cutset_bounds
from bounds.interference import ic_network
from bounds.matching import MatchingLimit, matching_gdof, maximal_matchings
from bounds.network import MAX_NODES, Network, from_mapping, relay_channel
from verifier.core.errors import InputError, ParseError, RegionError
from verifier.expressions.expr import add, evaluate, min_, param, pos
from verifier.expressions.region import MAX_POLYHEDRA, MAX_PRODUCT_PAIRS, Polyhedron, Region, atoms_of
from verifier.text import parse
from verifier.text.latex_in import parse_latex_expr, parse_latex_region
from verifier.text.parse import parse_expr, parse_piecewise, parse_region
from workbench.cli import main


def _groups(n, var=lambda i: f"a{i}"):
    return " and ".join(f"({var(i)} < 1 or {var(i)} > 2)" for i in range(n))


# --- regions: 'and' distributing over 'or' ---------------------------------------------------------

@pytest.mark.parametrize("n, size", [(16, 65536), (20, 1048576)])
def test_or_groups_beyond_the_limit_are_refused_naming_the_size(n, size):
    message = rf"^the region expands into {size} polyhedra \(limit 4096\); state fewer 'or' alternatives"
    with pytest.raises(RegionError, match=message + " at column 1$"):
        parse_region(_groups(n))
    with pytest.raises(RegionError, match=message):
        parse_piecewise(f"1 if {_groups(n)}; 2 otherwise")
    latex = r" \text{ and } ".join(rf"(a_{i} < 1 \text{{ or }} a_{i} > 2)" for i in range(n))
    with pytest.raises(RegionError, match=message):
        parse_latex_region(latex)


def test_a_union_beyond_the_limit_is_refused_naming_the_size():
    twelve = _groups(12)  # 4096 polyhedra, the most a region may have
    with pytest.raises(RegionError, match=r"^the region expands into 12288 polyhedra \(limit 4096\)"):
        parse_region(f"({twelve}) or ({twelve}) or ({twelve})")


def test_twelve_groups_are_within_the_limit_and_exact():
    region = parse_region(_groups(12))
    assert len(region.pieces) == MAX_POLYHEDRA == 4096
    rng = random.Random(1)
    for _ in range(40):
        point = {f"a{i}": F(rng.choice([0, 1, 3, 4, 5, 6, 9]), 3) for i in range(12)}
        assert region.contains(point) == all(v < 1 or v > 2 for v in point.values())


def _units(name, n):
    return Region(tuple(Polyhedron(atoms_of(param(f"{name}{i}"), ">=", 0)) for i in range(n)))


def test_meet_checks_the_size_before_building_anything(monkeypatch):
    def no_product(self, other):
        raise AssertionError("the product was being built")
    left, right = _units("x", 256), _units("y", 257)  # 65792 pairs > MAX_PRODUCT_PAIRS
    assert 256 * 257 > MAX_PRODUCT_PAIRS
    monkeypatch.setattr(Polyhedron, "meet", no_product)
    with pytest.raises(RegionError, match=r"^the region expands into 65792 polyhedra \(limit 4096\); "
                                          r"state fewer 'or' alternatives$"):
        left.meet(right)
    big, small = _units("z", 4050), _units("w", 65)
    with pytest.raises(RegionError, match=r"^the region expands into 4115 polyhedra \(limit 4096\)"):
        big.join(small)
    assert len(big.join(Region(small.pieces[:46])).pieces) == 4096


def test_meet_refuses_once_more_than_the_limit_survive():
    # 64 x 65 products in distinct parameters: none is empty, so the 4097th is refused
    with pytest.raises(RegionError, match=r"^the region expands into 4160 polyhedra \(limit 4096\)"):
        _units("x", 64).meet(_units("y", 65))
    # two schemes' coverage of 64 alpha-slices each: 67 x 67 pairs, almost all contradictory
    slices = " or ".join(f"({k}/64 <= alpha < {k + 1}/64)" for k in range(64)) + \
        " or alpha < 0 or alpha >= 1 or alpha < -1"
    one = parse_region(slices)
    both = one.meet(one)
    assert len(one.pieces) == 67 and len(both.pieces) < 100
    for k in range(-2, 67):
        for x in (F(k, 64) - F(1, 640), F(k, 64)):
            assert both.contains({"alpha": x}) == one.contains({"alpha": x})
    assert len(parse_region(f"({slices}) and ({slices})").pieces) == len(both.pieces)


def test_meet_drops_contradictory_products_so_one_parameter_stays_small():
    # 20 groups on one parameter: 2^20 products, all but 21 contradictory (a < 1 and a > 4, ...)
    text = " and ".join(f"(a < {2 * k + 1} or a > {2 * k + 2})" for k in range(20))
    region = parse_region(text)
    assert len(region.pieces) <= 21
    for k in range(42):  # both sides of every boundary, and the boundary itself
        for x in (F(k) - F(1, 3), F(k), F(k) + F(1, 3)):
            expected = all(x < 2 * j + 1 or x > 2 * j + 2 for j in range(20))
            assert region.contains({"a": x}) == expected, x


def test_pruning_is_exact_and_an_empty_region_still_reads_as_written():
    assert parse_region("(a < 1 or a > 2) and a > 3/2").pieces == parse_region("a > 2, a > 3/2").pieces
    # parallel forms in two parameters: b - a > -2 is a - b < 2
    assert parse_region("(a - b >= 2 or a < 0), b - a > -2") == parse_region("a < 0, b - a > -2")
    # a touching pair survives when both are non-strict (a == 1), not when one is strict
    assert len(parse_region("(a >= 1 or b > 0), a <= 1").pieces) == 2
    assert len(parse_region("(a > 1 or b > 0), a <= 1").pieces) == 1
    empty = parse_region("alpha > 1, alpha < 0")
    assert len(empty.pieces) == 1 and not empty.contains({"alpha": F(1, 2)})
    both = parse_region("(alpha > 1 or alpha < -1), alpha < 0, alpha > 0")  # every product empty
    assert both.text() == "alpha < -1, alpha < 0, alpha > 0"  # one of them kept, visibly contradictory


def test_long_conjunctions_after_or_groups_stay_linear_and_are_limited_in_atoms():
    groups = " and ".join(f"(a{i} > 1 or a{i} < 0)" for i in range(10))
    region = parse_region(groups + ", " + ", ".join(f"b{i} > {i}" for i in range(200)))
    assert len(region.pieces) == 1024 and all(len(p.atoms) == 210 for p in region.pieces)
    inside = {**{f"a{i}": F(2) for i in range(10)}, **{f"b{i}": F(i + 1) for i in range(200)}}
    assert region.contains(inside) and not region.contains({**inside, "b7": F(7)})
    text = groups + ", " + ", ".join(f"b{i} > 1" for i in range(1400))  # 1.4 million atoms
    with pytest.raises(RegionError, match=r"^the region expands into 1024 polyhedra with 263168 constraints "
                                          r"in all \(limit 262144\)"):
        parse_region(text)


def test_cached_hashes_and_direction_ids_are_not_pickled():
    # worker processes (verifier.regimes.proof) salt string hashes and number directions differently
    region = parse_region("(a < 1 or a > 2), b > 0")
    _ = [p.bounds for p in region.pieces], [hash(a) for p in region.pieces for a in p.atoms]
    copy = pickle.loads(pickle.dumps(region))
    assert copy == region
    assert all(set(vars(a)) == {"form", "strict"} for p in copy.pieces for a in p.atoms)
    assert all(set(vars(p)) == {"atoms"} for p in copy.pieces)


# --- 'otherwise': the complement of many regimes -------------------------------------------------

@pytest.mark.parametrize("n", [16, 40, 64])
def test_otherwise_after_many_alpha_slices_covers_a_forgotten_slice_exactly(n):
    forgotten = n // 2
    slices = [k for k in range(n) if k != forgotten]
    text = "; ".join(f"{k} if {k}/{n} <= alpha < {k + 1}/{n}" for k in slices) + "; 99 otherwise"
    pw = parse_piecewise(text)
    rest = pw.pieces[-1][1]
    assert len(rest.pieces) <= 3  # alpha < 0, the forgotten slice, alpha >= 1
    points = [F(-1), F(2)] + [F(k, n) + d for k in range(n + 1) for d in (F(-1, 7 * n), 0, F(1, 7 * n))]
    for x in points:
        expected = not any(F(k, n) <= x < F(k + 1, n) for k in slices)
        assert rest.contains({"alpha": x}) == expected, x
    assert pw.evaluate({"alpha": F(2 * forgotten + 1, 2 * n)}) == 99


def test_otherwise_after_slices_of_two_parameters_is_small_and_exact():
    m = 8
    cells = [(i, j) for i in range(m) for j in range(m) if (i, j) != (3, 5)]
    random.Random(4).shuffle(cells)
    text = "; ".join(f"{k} if {i}/{m} <= alpha < {i + 1}/{m}, {j}/{m} <= beta < {j + 1}/{m}"
                     for k, (i, j) in enumerate(cells)) + "; 99 otherwise"
    rest = parse_piecewise(text).pieces[-1][1]
    assert len(rest.pieces) <= 8
    grid = [F(-1)] + [F(k, m) + d for k in range(m + 1) for d in (F(-1, 5 * m), 0, F(1, 5 * m))]
    for x in grid:
        for y in grid:
            inside = any(F(i, m) <= x < F(i + 1, m) and F(j, m) <= y < F(j + 1, m) for i, j in cells)
            assert rest.contains({"alpha": x, "beta": y}) == (not inside), (x, y)
    # 64 strips of alpha inside 0 <= beta <= 1: the complement is the four sides
    strips = "; ".join(f"{k} if {k}/64 <= alpha < {k + 1}/64, 0 <= beta <= 1" for k in range(64))
    rest = parse_piecewise(strips + "; 99 otherwise").pieces[-1][1]
    assert len(rest.pieces) == 4
    for x, y in itertools.product([F(-1, 9), F(0), F(1, 2), F(1), F(10, 9)], repeat=2):
        assert rest.contains({"alpha": x, "beta": y}) == (not (0 <= x < 1 and 0 <= y <= 1))


def test_otherwise_in_the_truly_exponential_case_is_refused_with_the_limit():
    # regimes x_i <= 0, y_i <= 0 in distinct parameters: the complement has 2^k maximal pieces
    eight = "; ".join(f"{i} if x{i} <= 0, y{i} <= 0" for i in range(8))
    assert len(parse_piecewise(eight + "; 9 otherwise").pieces[-1][1].pieces) == 256
    nine = "; ".join(f"{i} if x{i} <= 0, y{i} <= 0" for i in range(9))
    with pytest.raises(RegionError, match=r"^'otherwise' would need more than 256 polyhedra \(limit 256; "
                                          r"reached at regime polyhedron 9 of 9\); state its region"):
        parse_piecewise(nine + "; 9 otherwise")


def test_otherwise_work_limit_names_where_it_stopped(monkeypatch):
    monkeypatch.setattr(parse, "MAX_OTHERWISE_WORK", 100)
    text = "; ".join(f"{k} if {k}/40 <= alpha < {k + 1}/40" for k in range(40)) + "; 0 otherwise"
    with pytest.raises(RegionError, match=r"^'otherwise' would take more than 100 steps to compute "
                                          r"\(limit 100; reached at regime polyhedron \d+ of 40"):
        parse_piecewise(text)


# --- networks: cuts and matchings ----------------------------------------------------------------

def _chain(n):
    """S -> R1 -> ... -> Rn -> D with hop exponents g0 .. gn."""
    names = ["S"] + [f"R{i}" for i in range(1, n + 1)] + ["D"]
    nodes = {x: "transmitter" if x == "S" else "receiver" if x == "D" else "relay" for x in names}
    links = [[a, b, f"g{k}"] for k, (a, b) in enumerate(zip(names, names[1:]))]
    return {"nodes": nodes, "links": links, "messages": [["W", "S", "D"]]}


def test_a_twelve_relay_chain_is_enumerated_and_its_cut_set_bound_is_the_weakest_hop():
    net = from_mapping(_chain(12))
    bounds = message_cut_bounds(net, "W")
    assert len(bounds) == 4096 == cutset.MAX_CUTS
    bound = min_(*bounds.values())
    rng = random.Random(2)
    for _ in range(5):
        point = {f"g{k}": F(rng.randint(-3, 30), rng.randint(1, 4)) for k in range(13)}
        # a line network's min cut is its weakest link (max-flow min-cut; common practice)
        assert evaluate(bound, point) == min(max(F(0), v) for v in point.values())


@pytest.mark.parametrize("n, cuts", [(13, 8192), (24, 16777216)])
def test_longer_chains_are_refused_before_enumerating(n, cuts):
    net = from_mapping(_chain(n))
    message = rf"^the network has {n} relays: {cuts} cuts per message \(limit 4096, that is 12 relays\)"
    with pytest.raises(TooManyCuts, match=message):
        message_cut_bounds(net, "W")
    with pytest.raises(TooManyCuts, match=f"the network has {n} relays"):
        sum_cutset_bounds(net)  # a size error is not mistaken for 'no joint cut'


def _network_file(tmp_path, n, case: bool):
    table = _chain(n)
    nodes = ", ".join(f'{k} = "{v}"' for k, v in table["nodes"].items())
    links = ", ".join(f'["{a}", "{b}", "{e}"]' for a, b, e in table["links"])
    params = "\n".join(f'g{k} = "hop {k}"' for k in range(n + 1))
    text = f'[parameters]\n{params}\n[network]\nnodes = {{ {nodes} }}\nlinks = [{links}]\n' \
           'messages = [["W", "S", "D"]]\n'
    if case:
        text = 'title = "chain"\n' + text + textwrap.dedent('''
            [assume]
            region = "g0 >= 0"
            [[claims]]
            statement = "outer <= g0"
            expect = "proved"
            ''')
    path = tmp_path / "chain.toml"
    path.write_text(text, encoding="utf-8")
    return str(path)


@pytest.mark.parametrize("command", ["network", "check"])
def test_a_long_chain_is_one_line_exit_2_from_the_command_line(tmp_path, capsys, command):
    assert main([command, _network_file(tmp_path, 24, case=command == "check")]) == 2
    captured = capsys.readouterr()
    assert captured.out == "" and captured.err.count("\n") == 1 and "Traceback" not in captured.err
    assert "the network has 24 relays: 16777216 cuts per message (limit 4096" in captured.err


def test_complete_matchings_beyond_the_limit_are_refused_and_sparse_ones_are_cheap():
    with pytest.raises(MatchingLimit, match=r"^a cut's 9 x 9 exponent matrix has more than 40320 maximal "
                                            r"matchings \(limit 40320\)"):
        matching_gdof([[param(f"a{i}_{j}") for j in range(9)] for i in range(9)])
    # a diagonal matrix has one maximal matching whatever its size (60! permutations)
    diagonal = [[param(f"d{i}") if i == j else None for j in range(60)] for i in range(60)]
    assert maximal_matchings(diagonal) == [tuple((i, i) for i in range(60))]
    assert matching_gdof(diagonal) == add(*(pos(param(f"d{i}")) for i in range(60)))


def test_maximal_matchings_equal_brute_force():
    # oracle: every matching of the links by brute force, keeping those no link can extend
    rng = random.Random(9)
    for _ in range(300):
        rows, cols = rng.randint(1, 5), rng.randint(1, 5)
        m = [[1 if rng.random() < 0.5 else None for _ in range(cols)] for _ in range(rows)]
        keep_r = [i for i in range(rows) if any(x is not None for x in m[i])]
        keep_c = [j for j in range(cols) if any(m[i][j] is not None for i in range(rows))]
        links = [(a, b) for a, i in enumerate(keep_r) for b, j in enumerate(keep_c) if m[i][j] is not None]
        every = [frozenset(s) for k in range(len(links) + 1) for s in itertools.combinations(links, k)
                 if len({a for a, _ in s}) == k == len({b for _, b in s})]
        maximal = {s for s in every if not any(s < t for t in every)} if links else set()
        assert {frozenset(x) for x in maximal_matchings(m)} == maximal


def test_a_nine_user_sum_cut_names_the_cut():
    gains = {f"a{i}{j}": f"a{i}{j}" for i in range(1, 10) for j in range(1, 10)}
    nodes = {f"T{i}": "transmitter" for i in range(1, 10)} | {f"R{i}": "receiver" for i in range(1, 10)}
    links = [[f"T{i}", f"R{j}", gains[f"a{i}{j}"]] for i in range(1, 10) for j in range(1, 10)]
    net = from_mapping({"nodes": nodes, "links": links,
                        "messages": [[f"W{i}", f"T{i}", f"R{i}"] for i in range(1, 10)]})
    with pytest.raises(TooManyCuts, match=r"^cut \{T1,.*\} \| \{R1,.*\}: a cut's 9 x 9 exponent matrix has "
                                          r"more than 40320 maximal matchings"):
        sum_cutset_bounds(net)


def test_total_matchings_over_the_cuts_are_limited(monkeypatch):
    monkeypatch.setattr(cutset, "MAX_CUT_MATCHINGS", 2)  # the relay channel's first cut has two
    with pytest.raises(TooManyCuts, match=r"^the cut-set bounds need more than 2 maximal matchings "
                                          r"\(limit 2; reached at cut 2 of 2\)"):
        message_cut_bounds(relay_channel(), "W")
    monkeypatch.setattr(cutset, "MAX_CUT_MATCHINGS", 4)
    assert len(message_cut_bounds(relay_channel(), "W")) == 2
    assert len(message_cut_bounds(ic_network("a11", "a12", "a21", "a22"), "W1")) >= 1


def test_too_many_nodes_is_refused():
    nodes = {f"N{i}": "transmitter" for i in range(MAX_NODES + 1)}
    with pytest.raises(InputError, match=rf"^the network has {MAX_NODES + 1} nodes \(limit {MAX_NODES}\)$"):
        Network(nodes, [])


# --- deep nesting ----------------------------------------------------------------------------------

@pytest.mark.parametrize("depth", [150, 9999, 10000])
@pytest.mark.parametrize("make", [
    lambda d: ("(" * d + "a" + ")" * d, parse_expr),
    lambda d: ("|" * d + "a" + "|" * d, parse_expr),
    lambda d: ("min(" * d + "a" + ")" * d, parse_expr),
    lambda d: ("(" * d + "a < 1" + ")" * d, parse_region),
    lambda d: ("{" * d + "a" + "}" * d, parse_latex_expr),
    lambda d: ("0 if " + "(" * d + "a < 1" + ")" * d + "; 1 otherwise", parse_piecewise),
])
def test_deep_nesting_is_a_one_line_input_error(depth, make):
    text, parser = make(depth)
    with pytest.raises(ParseError) as info:
        parser(text)
    message = str(info.value)
    assert "\n" not in message
    assert "nested too deeply (more than 100 levels)" in message or "input too long" in message


def test_deep_nesting_in_a_case_file_is_exit_2(tmp_path, capsys):
    path = tmp_path / "deep.toml"
    path.write_text('title = "deep"\n[parameters]\na = "x"\n[outer]\nb = "' + "(" * 5000 + "a" + ")" * 5000
                    + '"\n[[claims]]\nstatement = "outer <= 1"\n', encoding="utf-8")
    assert main(["check", str(path)]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "nested too deeply" in err and "Traceback" not in err
