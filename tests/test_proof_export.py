"""Proof export: real proofs re-checked by the standalone checker (a subprocess that cannot import the
project), tampered certificates refused, bundles carry certificates and the checker, and the checker
uses only the standard library."""

import ast
import copy
import importlib.util
import json
import random
import subprocess
import sys
from fractions import Fraction as F
from functools import lru_cache
from pathlib import Path

import pytest

from verifier.claims.kinds import monotone, reduces_to, relation, symmetric, within
from verifier.expressions.expr import max_, min_, param, pos
from verifier.expressions.region import Polyhedron, Region, atoms_of
from verifier.regimes.export import FORMAT, empty_certificate, export_proof
from verifier.regimes.proof import prove_by_regimes
from verifier.report.build import claim_report
from verifier.report.json_out import section_json
from verifier.text.parse import parse_region
from workbench.cli import main
from workbench.standalone import CHECKER

a, b = param("alpha"), param("beta")


def _pieces(*bounds):
    """A union of alpha-intervals [lo, hi], given as (lo, hi) pairs, possibly overlapping."""
    return Region(tuple(Polyhedron(atoms_of(a, ">=", F(lo)) + atoms_of(a, "<=", F(hi))) for lo, hi in bounds))


# Each claim is checked by hand in its comment.
CLAIMS = {
    # a >= 1: 1 + (a - 1) = a = max(1, a); a < 1: min(1, max(a, b)) >= a, so the max is the min
    "two_parameters": relation(min_(1, max_(a, b)) + pos(a - 1), "==", max_(min_(1, max_(a, b)), a),
                               parse_region("alpha >= 0, beta >= 0")),
    # lhs <= 1 <= rhs; three pieces that overlap pairwise
    "overlapping_union": relation(min_(1, max_(a, b)), "<=", 1 + pos(a - b), parse_region(
        "alpha >= 0, beta >= 0, alpha <= 2 or alpha >= 1, beta <= 3 or alpha <= 1/2, beta <= 1/2")),
    # the middle piece lies inside the first one (not syntactically): covered by splits + 'inside'
    "nested_piece": relation(min_(1, a), "<=", 1 + pos(a - 1), _pieces((0, 1), ("1/4", "1/2"), ("1/2", 2))),
    # on alpha + beta = 1: min(1, 1) = 1 <= 1 + beta
    "equality_region": relation(min_(1, a + b, 2 - a), "<=", 1 + b,
                                parse_region("alpha + beta == 1, alpha >= 0, beta >= 0")),
    # a <= 1: both 1 - a/2; 1 <= a <= 2: a/2 - (1 - a/2) = a - 1 <= 1
    "within": within(min_(1, max_(a / 2, 1 - a / 2)), 1 - a / 2, 1, parse_region("0 <= alpha <= 2")),
    # min and max of functions non-decreasing in alpha
    "monotone": monotone(min_(1, max_(a, b / 2)), "alpha", parse_region("alpha >= 0, beta >= 0")),
    # beta = 0: max(alpha, 0) = alpha for alpha >= 0
    "reduces_to": reduces_to(min_(1, max_(a, b)), {"beta": 0}, min_(1, a), parse_region("alpha >= 0, beta >= 0")),
    "symmetric": symmetric(min_(1, max_(a, b), a + b), "alpha", "beta", parse_region("alpha >= 0, beta >= 0")),
}
# fails at alpha = 2 (1 versus 1/2)
REFUTED = relation(min_(1, a), "<=", max_(a / 4, F(1, 2)), parse_region("alpha >= 0"))


@lru_cache(maxsize=None)
def _proof(name):
    claim = REFUTED if name == "refuted" else CLAIMS[name]
    return prove_by_regimes(claim, smt="none", improve_witness=False)


def exported(name):
    return copy.deepcopy(_export(name))


@lru_cache(maxsize=None)
def _export(name):
    return export_proof(_proof(name))


def run_checker(tmp_path, data, *more):
    path = tmp_path / "claim.json"
    path.write_text(data if isinstance(data, str) else json.dumps(data), encoding="utf-8")
    return subprocess.run([sys.executable, "-I", str(CHECKER), str(path), *more], capture_output=True,
                          text=True, timeout=300, cwd=tmp_path)


def assert_refused(tmp_path, data):
    got = run_checker(tmp_path, data)
    assert got.returncode == 1, got.stdout + got.stderr
    assert got.stdout.startswith("NOT certified: ") and not got.stderr


@lru_cache(maxsize=None)
def _checker_module():
    spec = importlib.util.spec_from_file_location("standalone_checker", CHECKER)
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    return mod


# ---------------------------------------------------------------------------------------------
# real proofs pass
# ---------------------------------------------------------------------------------------------

@pytest.mark.parametrize("name", sorted(CLAIMS))
def test_exported_proof_is_certified_by_the_standalone_checker(name, tmp_path):
    proof = _proof(name)
    assert proof.status == "proved" and proof.certified
    data = exported(name)
    assert data["format"] == FORMAT and data["complete"], data["incomplete"]
    # one certified polyhedron per regime polytope or cell, never more than the cells
    assert len(data["cells"]) == sum(len(r.certificates) for r in proof.regimes)
    assert len(data["cells"]) <= sum(len(r.cells) for r in proof.regimes)
    assert len(data["coverage"]) == len(data["region"])
    got = run_checker(tmp_path, data)
    assert got.returncode == 0, got.stdout + got.stderr
    assert got.stdout.startswith(f"certified: {proof.claim.text()}\n") and not got.stderr


def test_export_is_exact_json():
    """Numbers are strings 'p/q', never floats; the text round-trips."""
    data = exported("within")
    floats = []

    def walk(x):
        if isinstance(x, float):
            floats.append(x)
        for v in (x.values() if isinstance(x, dict) else x if isinstance(x, list) else ()):
            walk(v)
    walk(data)
    assert not floats and json.loads(json.dumps(data)) == data
    assert data["claim"]["gap"] == "1" and data["claim"]["kind"] == "within"
    assert "1/2" in json.dumps(data["claim"]["exprs"])


def test_the_union_claims_use_inside_leaves_and_empty_leaves():
    kinds = set()

    def walk(node):
        kinds.add(node["node"])
        if node["node"] == "split":
            walk(node["holds"])
            walk(node["fails"])
    for name in ("overlapping_union", "nested_piece"):
        for tree in exported(name)["coverage"]:
            walk(tree)
    assert kinds == {"split", "cell", "empty", "inside"}
    assert exported("nested_piece")["coverage"][1]["node"] == "split"  # no cell: rebuilt from piece 0


def test_several_regimes_over_two_parameters():
    proof = _proof("two_parameters")
    assert len(proof.regimes) >= 3 and len(proof.names) == 2


def test_reduces_to_lives_in_the_substituted_space():
    data = exported("reduces_to")
    assert data["names"] == ["alpha"] and "beta" not in json.dumps(data["region"])


def test_empty_certificate_for_strict_and_closed_emptiness():
    x0 = atoms_of(a, ">=", 0)[0]
    assert empty_certificate([x0, x0.negated()]) is not None  # alpha >= 0 and alpha < 0
    assert empty_certificate(list(atoms_of(a, ">=", 1) + atoms_of(a, "<=", 0))) is not None
    assert empty_certificate(list(atoms_of(a, ">=", 0) + atoms_of(a, "<=", 0))) is None  # alpha = 0


# ---------------------------------------------------------------------------------------------
# incomplete proofs and tampering are refused
# ---------------------------------------------------------------------------------------------

def test_refuted_claim_is_exported_incomplete_and_refused(tmp_path):
    data = exported("refuted")
    assert not data["complete"] and "refuted" in data["incomplete"]
    got = run_checker(tmp_path, data)
    assert got.returncode == 1 and "incomplete" in got.stdout
    data["complete"] = True  # the flag is not trusted: cells without certificates still fail
    assert_refused(tmp_path, data)


def _first_mult(x):
    """The first Farkas multiplier [i, y] anywhere in x (an obligation or a min/max bound)."""
    if isinstance(x, dict):
        if x.get("mult"):
            return x["mult"][0]
        x = list(x.values())
    for v in x if isinstance(x, list) else ():
        got = _first_mult(v)
        if got is not None:
            return got
    return None


def test_changed_farkas_multiplier_is_refused(tmp_path):
    for name, where in (("two_parameters", "pieces"), ("within", "obligations")):
        data = exported(name)
        item = _first_mult([c["certificate"][where] for c in data["cells"]])
        item[1] = str(F(item[1]) + F(1, 3))
        assert_refused(tmp_path, data)


def test_changed_obligation_constant_is_refused(tmp_path):
    data = exported("monotone")
    ob = data["cells"][0]["certificate"]["obligations"][0]
    ob["const"] = str(F(ob["const"]) + 1)
    assert_refused(tmp_path, data)


def test_dropped_cell_is_refused(tmp_path):
    data = exported("two_parameters")
    data["cells"].pop()
    assert_refused(tmp_path, data)


def test_flipped_strict_flag_is_refused(tmp_path):
    for where in ("cell", "region"):
        data = exported("overlapping_union")
        atoms = data["cells"][0]["atoms"] if where == "cell" else data["region"][0]
        atoms[-1]["strict"] = not atoms[-1]["strict"]
        assert_refused(tmp_path, data)


def _active_affine(e, p):
    """The affine node of expression data `e` that the piece proof `p` says is active (in the form)."""
    if e["op"] == "affine":
        return e
    if e["op"] == "sum":
        return e["affine"]
    return _active_affine(e["args"][p["index"]], p["active"])


def test_changed_coefficient_of_the_claim_is_refused(tmp_path):
    for name in ("two_parameters", "within", "monotone"):
        data = exported(name)
        node = _active_affine(data["claim"]["exprs"][0], data["cells"][0]["certificate"]["pieces"][0])
        node["coeffs"]["alpha"] = str(F(node["coeffs"].get("alpha", "0")) + 1)
        assert_refused(tmp_path, data)


def _splits(node, out):
    if node["node"] == "split":
        out.append(node)
        _splits(node["holds"], out)
        _splits(node["fails"], out)
    return out


def test_deleted_coverage_leaf_is_refused(tmp_path):
    data = exported("overlapping_union")
    split = next(s for s in _splits(data["coverage"][0], []) if s["holds"]["node"] == "cell")
    del split["holds"]
    assert_refused(tmp_path, data)
    data = exported("overlapping_union")  # the leaf's part left uncovered: its sibling takes its place
    tree = data["coverage"][0]
    split = next(s for s in _splits(tree, []) if s["holds"]["node"] == "cell")
    sibling = split["fails"]
    split.clear()
    split.update(sibling)
    assert_refused(tmp_path, data)


def test_inside_leaf_pointing_at_a_later_piece_is_refused(tmp_path):
    for shift in (0, 1):
        data = exported("overlapping_union")
        k, leaf = next((k, s[side]) for k, t in enumerate(data["coverage"]) for s in _splits(t, [])
                       for side in ("holds", "fails") if s[side]["node"] == "inside")
        leaf["piece"] = k + shift
        assert_refused(tmp_path, data)


def test_empty_leaf_with_wrong_multipliers_is_refused(tmp_path):
    data = exported("overlapping_union")
    leaf = next(s[side] for t in data["coverage"] for s in _splits(t, []) for side in ("holds", "fails")
                if s[side]["node"] == "empty")
    leaf["farkas"]["mult"][0][1] = str(F(leaf["farkas"]["mult"][0][1]) * 2)
    assert_refused(tmp_path, data)


def test_monotone_needs_one_polyhedron(tmp_path):
    """Slopes prove nothing across a non-convex union: a second piece is refused even when covered."""
    data = exported("monotone")
    data["region"].append(copy.deepcopy(data["region"][0]))
    data["coverage"].append({"node": "inside", "piece": 0})
    assert_refused(tmp_path, data)
    data = exported("monotone")
    data["claim"]["increasing"] = False
    assert_refused(tmp_path, data)


def test_changed_relation_is_refused(tmp_path):
    data = exported("overlapping_union")
    data["claim"]["relation"] = ">="
    assert_refused(tmp_path, data)
    data["claim"]["relation"] = "<"  # strictness: lhs < rhs is true, but not shown by these multipliers
    got = run_checker(tmp_path, data)
    assert got.returncode in (0, 1) and not got.stderr


def test_unreadable_and_malformed_input(tmp_path):
    got = run_checker(tmp_path, "{not json")
    assert got.returncode == 2 and got.stdout.startswith("NOT certified: ") and not got.stderr
    for junk in ([], {"format": FORMAT}, {"format": FORMAT, "version": 1, "complete": True, "claim": 3}):
        assert_refused(tmp_path, junk)
    assert subprocess.run([sys.executable, "-I", str(CHECKER), str(tmp_path / "missing.json")],
                          capture_output=True, text=True).returncode == 2


def _mutations(data, rng, count):
    """`count` copies of data, each with one field replaced by junk or deleted."""
    junk = [None, 0, -1, 1.5, True, "x", "1/0", "-1", "10" * 300, [], {}, [0, "1"], {"node": "cell"}]
    out = []
    for _ in range(count):
        d = copy.deepcopy(data)
        node = d
        while True:
            keys = list(node) if isinstance(node, dict) else list(range(len(node)))
            if not keys:
                break
            key = rng.choice(keys)
            child = node[key]
            if isinstance(child, (dict, list)) and child and rng.random() < 0.75:
                node = child
                continue
            if isinstance(node, dict) and rng.random() < 0.3:
                del node[key]
            else:
                node[key] = rng.choice(junk)
            break
        out.append(d)
    return out


def test_malformed_fields_never_crash_the_checker():
    checker = _checker_module()
    rng = random.Random(20240611)
    for name in ("overlapping_union", "within", "monotone"):
        for d in _mutations(exported(name), rng, 150):
            try:
                checker.check(d)
            except checker.Bad:
                pass


# ---------------------------------------------------------------------------------------------
# the checker itself, the report field, the bundle
# ---------------------------------------------------------------------------------------------

def test_checker_imports_only_the_standard_library():
    tree = ast.parse(CHECKER.read_text(encoding="utf-8"))
    names = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            names |= {n.name.split(".")[0] for n in node.names}
        elif isinstance(node, ast.ImportFrom):
            assert node.level == 0
            names.add(node.module.split(".")[0])
        elif isinstance(node, ast.Call) and getattr(node.func, "id", "") in ("__import__", "eval", "exec"):
            raise AssertionError(f"dynamic import or eval at line {node.lineno}")
    assert names <= {"argparse", "fractions", "json", "sys"}, names
    assert ast.get_docstring(tree) and "asymptotic" in ast.get_docstring(tree)


def test_claim_report_keeps_the_proof_without_serialising_it():
    section = claim_report(_proof("monotone"))
    assert section.proof is _proof("monotone")
    assert "proof" not in section_json(section) and "proof" not in repr(section)


CASE = '''
title = "certificates in a bundle"
[parameters]
alpha = "cross-link exponent"
[assume]
region = "alpha >= 0"
[outer]
single_user = "1"
genie = "(max(1, alpha) + (1 - alpha)^+)/2"
[[claims]]
name = "outer is at most one"
statement = "outer <= 1"
expect = "proved"
[[claims]]
name = "outer is at least one (wrong: 3/4 at alpha = 1/2)"
statement = "outer >= 1"
expect = "refuted"
'''


def test_bundle_carries_certificates_and_the_checker(tmp_path, capsys):
    case = tmp_path / "case.toml"
    case.write_text(CASE, encoding="utf-8")
    out = tmp_path / "bundle"
    assert main(["bundle", str(case), str(out)]) == 1  # one claim is refuted
    capsys.readouterr()
    files = sorted((out / "certificates").glob("*.json"))
    assert [f.name for f in files] == ["claim01.json"]
    assert "check_certificates.py" in (out / "certificates" / "README.txt").read_text()
    assert (out / "check_certificates.py").read_bytes() == CHECKER.read_bytes()
    got = subprocess.run([sys.executable, "-I", "check_certificates.py", *(str(f.relative_to(out)) for f in files)],
                         capture_output=True, text=True, cwd=out, timeout=300)
    assert got.returncode == 0, got.stdout + got.stderr
    assert got.stdout.startswith("certified: outer <= 1") and "checked: min(1, " in got.stdout


def _contained_leaves(data):
    out = []
    for tree in data["coverage"]:
        stack = [tree]
        while stack:
            node = stack.pop()
            if node["node"] == "split":
                stack += [node["holds"], node["fails"]]
            elif node["node"] == "cell" and node.get("farkas"):
                out.append(node)
    return out


def test_merged_regimes_are_certified_once_and_cells_shown_inside_them():
    """Cells of one regime whose union is convex share one certificate; the coverage tree shows
    each part inside it by Farkas multipliers over the path (checked in the parametrized test)."""
    for name in ("overlapping_union", "symmetric"):
        proof, data = _proof(name), exported(name)
        assert len(data["cells"]) < proof.cells
        leaves = _contained_leaves(data)
        assert leaves and all(any(f is not None for f in leaf["farkas"]) for leaf in leaves)
        assert all(len(leaf["farkas"]) == len(data["cells"][leaf["cell"]]["atoms"]) for leaf in leaves)


def test_changed_containment_multiplier_is_refused(tmp_path):
    data = exported("symmetric")
    leaf = _contained_leaves(data)[0]
    proof = next(f for f in leaf["farkas"] if f is not None)
    if proof["mult"]:
        proof["mult"][0][1] = str(F(proof["mult"][0][1]) + F(1, 2))
    else:
        proof["const"] = str(F(proof["const"]) + 1)
    assert_refused(tmp_path, data)


def test_containment_claimed_without_proof_is_refused(tmp_path):
    """A leaf may skip the proof of a cell's constraint only when that constraint is on its path."""
    data = exported("symmetric")
    leaf = _contained_leaves(data)[0]
    k = next(k for k, f in enumerate(leaf["farkas"]) if f is not None)
    leaf["farkas"][k] = None
    assert_refused(tmp_path, data)
    data = exported("symmetric")
    leaf = _contained_leaves(data)[0]
    leaf["farkas"].pop()
    assert_refused(tmp_path, data)
