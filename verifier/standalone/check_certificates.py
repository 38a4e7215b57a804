#!/usr/bin/env python3
"""Re-check gdof-workbench proof certificates with nothing but Python's standard library.

    python3 check_certificates.py certificates/*.json

Per file either "certified: <claim as the tool worded it>" and an indented "checked: <statement>"
line rebuilt from the data that was actually checked, or "NOT certified: <reason>".  Exit status 0
when every file certifies its claim, 1 otherwise, 2 when a file cannot be read as JSON.  Nothing in
a file is trusted: anything malformed or inconsistent means NOT certified, never a crash.

WHAT IS PROVED.  A file states a claim about expressions built from affine forms (rational
coefficients) with min, max and sums, over a region R = R_0 or R_1 or ... (each R_k a list of
constraints f >= 0 or f > 0, f affine).  It lists cells C_1, C_2, ... (polyhedra of the same kind:
a regime of the proof, or a piece of one), each with a certificate, and one coverage tree per R_k.  In exact rational arithmetic this script
checks:
 1. On every cell each compared expression equals one affine form: for min(e_1, ..., e_r) the
    certificate names the active argument e_j, takes its form g (recursively) and proves every other
    e_i >= g on the cell (max: <= g); for a min/max e_i, "e_i >= g" is shown by one argument
    (max) or all arguments (min), down to affine facts proved by Farkas multipliers.
 2. The claim's obligations hold on every cell, by Farkas multipliers: L <= R needs R - L >= 0
    (L < R: > 0), L == R both directions, |L - R| <= c needs c - (L - R) >= 0 and c + (L - R) >= 0;
    "f non-decreasing in p" needs the p-coefficient of f's form to be >= 0 (non-increasing: <= 0).
 3. The cells cover R: the tree of R_k starts with the constraints of R_k as its path; a split on
    a constraint a has a child with path + [a] and one with path + [not a] (not(f >= 0) is -f > 0,
    not(f > 0) is -f >= 0), so together they cover the parent; a leaf is a cell each of whose
    constraints is on the path or follows from the path's constraints by Farkas multipliers (so
    the path's polyhedron lies inside the cell), an empty path ("0 > 0" proved by Farkas multipliers), or an
    earlier piece R_j, j < k, all of whose constraints are on the path (covered by R_j's own tree).
Farkas multipliers: g == c + sum_i y_i f_i identically, with c >= 0 and every y_i >= 0, prove g >= 0
wherever all f_i >= 0; g > 0 when moreover c > 0 or y_i > 0 for some strict constraint f_i > 0.
So the claim holds at every point of R.  For monotonicity: f (a min/max of affine forms) is
continuous, and a segment in direction p inside R crosses finitely many convex cells, on each of
which f is affine with a slope >= 0 along p; this needs R convex, so R must be ONE polyhedron.

WHAT IS NOT PROVED.  Only the claim as encoded in the file is checked.  Compare the "checked:"
statement and region with the manuscript -- the expressions, the relation and every constraint;
the "certified:" line is the tool's own wording, copied from the file and not checked.  For a
claim that fixes parameters ("with beta = 0 ...") or swaps them (symmetry), the two printed
expressions are what was compared.  A claim the tool decided in parts (a scheme given regime by
regime) has one file per part: that the parts' regions cover the whole claim is not checked here.
GDoF statements are asymptotic in SNR: nothing is proved about rates at any finite SNR.
"""

import argparse
import json
import sys
from fractions import Fraction

FORMAT, VERSIONS = "gdof-workbench-certificate", (1, 2)   # 2 adds containment multipliers to cell leaves
RELATIONS = ("<=", "<", ">=", ">", "==")


class Bad(Exception):
    """The file does not prove its claim; the message says why."""


def need(condition, why):
    if not condition:
        raise Bad(why)


# --- numbers, affine forms {name: Fraction, "": constant} (no zero entries), constraints -----------

_NUMBERS = {}   # text -> Fraction: certificates repeat the same few numbers very often


def number(x):
    if type(x) is str and x in _NUMBERS:
        return _NUMBERS[x]
    need(isinstance(x, str) and 0 < len(x) <= 2000, f"not an exact number: {str(x)[:40]!r}")
    parts = (x[1:] if x.startswith("-") else x).split("/")
    need(len(parts) <= 2 and all(p.isascii() and p.isdigit() for p in parts), f"not an exact number: {x[:40]!r}")
    need(len(parts) == 1 or int(parts[1]) != 0, "division by zero")
    if len(_NUMBERS) > 100000:
        _NUMBERS.clear()
    value = _NUMBERS[x] = Fraction(x)
    return value


def add(f, g, k=1):
    """f + k*g."""
    out = dict(f)
    for n, c in g.items():
        out[n] = out.get(n, 0) + k * c
    return {n: c for n, c in out.items() if c != 0}


def form(d):
    need(isinstance(d, dict) and isinstance(d.get("coeffs"), dict), "malformed affine form")
    out = {}
    for n, c in d["coeffs"].items():
        need(isinstance(n, str) and n != "", "malformed parameter name")
        out = add(out, {n: number(c)})
    return add(out, {"": number(d.get("const"))})


def atom(d):
    """A constraint as a hashable pair (sorted form items, strict)."""
    need(isinstance(d, dict) and isinstance(d.get("strict"), bool), "malformed constraint")
    return tuple(sorted(form(d.get("form")).items())), d["strict"]


def neg(a):
    return tuple((n, -c) for n, c in a[0]), not a[1]


def atoms(items):
    need(isinstance(items, list), "malformed list of constraints")
    return [atom(a) for a in items]


def farkas(target, cons, cert, strict, what):
    """Check that cert = {const, mult: [[i, y], ...]} proves target >= 0 (> 0) on the constraints."""
    need(isinstance(cert, dict) and isinstance(cert.get("mult"), list), f"{what}: malformed multipliers")
    c = number(cert.get("const"))
    total, strictly = {"": c}, c > 0
    for item in cert["mult"]:
        need(isinstance(item, list) and len(item) == 2, f"{what}: malformed multiplier")
        i, y = item[0], number(item[1])
        need(type(i) is int and 0 <= i < len(cons) and y >= 0, f"{what}: bad multiplier index or sign")
        for n, a in cons[i][0]:          # total += y * constraint i, in place
            total[n] = total.get(n, 0) + y * a
        strictly = strictly or (y > 0 and cons[i][1])
    need(c >= 0, f"{what}: negative constant")
    total = {n: v for n, v in total.items() if v != 0}
    need(total == target, f"{what}: the multipliers do not add up to the target identically")
    need(strictly or not strict, f"{what}: strictness not shown")


# --- expressions: ("affine", f) | ("min" | "max", [args]) | ("sum", f, [terms]) ----------------------

def expr(d, depth=0):
    need(isinstance(d, dict) and depth < 200, "malformed expression")
    op = d.get("op")
    if op == "affine":
        return "affine", form(d)
    if op in ("min", "max"):
        args = d.get("args")
        need(isinstance(args, list) and len(args) >= 1, "malformed min/max")
        return op, [expr(a, depth + 1) for a in args]
    need(op == "sum" and isinstance(d.get("terms"), list), f"unknown expression node {str(op)[:20]!r}")
    return "sum", form(d.get("affine")), [expr(t, depth + 1) for t in d["terms"]]


def piece(e, p, cons):
    """The affine form that e provably equals on the cell, by the proof p."""
    need(isinstance(p, dict), "malformed piece proof")
    kind = p.get("kind")
    if e[0] == "affine":
        need(kind == "affine", "piece proof does not fit the expression")
        return e[1]
    if e[0] == "sum":
        subs = p.get("subs")
        need(kind == "sum" and isinstance(subs, list) and len(subs) == len(e[2]), "piece proof does not fit a sum")
        total = e[1]
        for t, s in zip(e[2], subs):
            total = add(total, piece(t, s, cons))
        return total
    args, j, bounds = e[1], p.get("index"), p.get("bounds")
    need(kind == "extremum" and type(j) is int and 0 <= j < len(args) and isinstance(bounds, list)
         and len(bounds) == len(args) - 1, "piece proof does not fit a min/max")
    g = piece(args[j], p.get("active"), cons)
    for a, b in zip(args[:j] + args[j + 1:], bounds):
        bound(a, g, e[0] == "min", b, cons)
    return g


def bound(e, g, ge, b, cons):
    """Check that b proves e >= g (ge) or e <= g on the cell."""
    need(isinstance(b, dict), "malformed bound proof")
    kind = b.get("kind")
    if kind == "farkas":
        f = piece(e, b.get("piece"), cons)
        farkas(add(f, g, -1) if ge else add(g, f, -1), cons, b.get("farkas"), False, "a min/max argument")
    elif kind == "one":  # max(...) >= g, or min(...) <= g, because one argument is
        k = b.get("index")
        need(e[0] == ("max" if ge else "min") and type(k) is int and 0 <= k < len(e[1]), "bad 'one' bound")
        bound(e[1][k], g, ge, b.get("bound"), cons)
    else:  # min(...) >= g, or max(...) <= g, because every argument is
        subs = b.get("bounds")
        need(kind == "all" and e[0] == ("min" if ge else "max") and isinstance(subs, list)
             and len(subs) == len(e[1]), "bad bound proof")
        for a, s in zip(e[1], subs):
            bound(a, g, ge, s, cons)


# --- the claim, its obligations, the coverage trees ------------------------------------------------

def obligations(claim, forms):
    """(target, strict) pairs that together prove the claim on a cell where the expressions = forms."""
    if claim["kind"] == "monotone":
        slope = forms[0].get(claim["param"], 0)
        return [(add({}, {"": slope if claim["increasing"] else -slope}), False)]
    d = add(forms[0], forms[1], -1)
    minus_d = add({}, d, -1)
    if claim["kind"] == "within":
        return [(add({"": claim["gap"]}, minus_d), False), (add({"": claim["gap"]}, d), False)]
    return {"<=": [(minus_d, False)], "<": [(minus_d, True)], ">=": [(d, False)], ">": [(d, True)],
            "==": [(d, False), (minus_d, False)]}[claim["rel"]]


def read_claim(d):
    need(isinstance(d, dict), "malformed claim")
    kind = d.get("kind")
    need(kind in ("relation", "within", "monotone", "reduces-to", "symmetric"), "unknown claim kind")
    claim = {"kind": kind, "rel": d.get("relation") if kind == "relation" else "==", "text": d.get("text")}
    need(claim["rel"] in RELATIONS, "unknown relation")
    if kind == "within":
        claim["gap"] = number(d.get("gap"))
    if kind == "monotone":
        claim["param"], claim["increasing"] = d.get("param"), d.get("increasing")
        need(isinstance(claim["param"], str) and claim["param"] != "" and isinstance(claim["increasing"], bool),
             "bad monotone data")
    exprs = d.get("exprs")
    need(isinstance(exprs, list) and len(exprs) == (1 if kind == "monotone" else 2), "wrong number of expressions")
    claim["exprs"] = [expr(e) for e in exprs]
    return claim


def cover(k, region, cells, tree):
    """Check that the coverage tree proves region[k] inside (cells, earlier pieces)."""
    stack, visited = [(tree, list(region[k]))], 0
    while stack:
        node, path = stack.pop()
        visited += 1
        need(isinstance(node, dict) and visited < 10 ** 7, f"piece {k}: malformed coverage tree")
        kind, have = node.get("node"), set(path)
        if kind == "split":
            a = atom(node.get("atom"))
            stack += [(node.get("holds"), path + [a]), (node.get("fails"), path + [neg(a)])]
        elif kind == "cell":
            i, proofs = node.get("cell"), node.get("farkas")
            need(type(i) is int and 0 <= i < len(cells), f"piece {k}: a cell leaf names no cell")
            if proofs is None:
                proofs = [None] * len(cells[i])
            need(isinstance(proofs, list) and len(proofs) == len(cells[i]),
                 f"piece {k}: a cell leaf needs one entry per constraint of its cell")
            for a, proof in zip(cells[i], proofs):
                if proof is None:
                    need(a in have, f"piece {k}: a cell leaf names a cell with a constraint not on its path")
                else:   # the path implies the constraint a: its polyhedron lies in a's half-space
                    farkas(dict(a[0]), path, proof, a[1], f"piece {k}: a cell leaf's containment")
        elif kind == "empty":
            farkas({}, path, node.get("farkas"), True, f"piece {k}: an empty leaf")
        else:
            j = node.get("piece")
            need(kind == "inside" and type(j) is int and 0 <= j < k and set(region[j]) <= have,
                 f"piece {k}: a leaf is neither a cell, nor empty, nor inside an earlier piece")


def check_cell(claim, cell):
    """The cell's constraints, once its certificate is checked."""
    need(isinstance(cell, dict) and isinstance(cell.get("certificate"), dict), "no certificate")
    cons, cert = atoms(cell.get("atoms")), cell["certificate"]
    pieces, proofs = cert.get("pieces"), cert.get("obligations")
    need(isinstance(pieces, list) and len(pieces) == len(claim["exprs"]), "wrong number of pieces")
    forms = [piece(e, p, cons) for e, p in zip(claim["exprs"], pieces)]
    obs = obligations(claim, forms)
    need(isinstance(proofs, list) and len(proofs) == len(obs), "wrong number of obligations")
    for (target, strict), proof in zip(obs, proofs):
        farkas(target, cons, proof, strict, "the claim")
    return cons


def read(data):
    """(claim, region, cells, coverage trees) of an export, its envelope checked; or Bad."""
    need(isinstance(data, dict) and data.get("format") == FORMAT and type(data.get("version")) is int
         and data["version"] in VERSIONS,
         f"not a {FORMAT} file of version {' or '.join(map(str, VERSIONS))}")
    need(data.get("complete") is True, f"the export is incomplete: {str(data.get('incomplete'))[:300]}")
    claim = read_claim(data.get("claim"))
    region = data.get("region")
    need(isinstance(region, list) and region, "malformed region")
    region = [atoms(p) for p in region]
    need(claim["kind"] != "monotone" or len(region) == 1,
         "a monotone claim needs the region to be one polyhedron (convex)")
    cells = data.get("cells")
    need(isinstance(cells, list) and cells, "no cells")
    trees = data.get("coverage")
    need(isinstance(trees, list) and len(trees) == len(region), "one coverage tree per region piece needed")
    return claim, region, cells, trees


def check_cells(claim, cells, first=0):
    """Each cell's constraints, once its certificate is checked; cells are numbered from `first`
    (so that a caller may check slices of the list separately, e.g. in parallel)."""
    out = []
    for n, cell in enumerate(cells, first):
        try:
            out.append(check_cell(claim, cell))
        except Bad as exc:
            raise Bad(f"cell {n}: {exc}") from None
    return out


def covered(claim, region, cell_atoms, trees):
    """The statement proved, once the coverage trees show that the checked cells cover the region."""
    for k, tree in enumerate(trees):
        cover(k, region, cell_atoms, tree)
    return statement(claim, region), len(cell_atoms)


def check(data):
    """The statement proved by this certificate (as text) and the number of cells, or Bad."""
    claim, region, cells, trees = read(data)
    return covered(claim, region, check_cells(claim, cells), trees)


# --- the statement as checked, rebuilt from the data ---------------------------------------------

def show_form(f):
    """'1 - alpha/2'-like text: a positive constant first, a negative one last."""
    terms = [("-" if c < 0 else "") + (f"{abs(c.numerator)}*" if abs(c.numerator) != 1 else "") + n
             + (f"/{c.denominator}" if c.denominator != 1 else "") for n, c in sorted(f.items()) if n]
    c = f.get("", 0)
    terms = ([str(c)] if c > 0 else []) + terms + ([str(c)] if c < 0 else [])
    return " + ".join(terms).replace("+ -", "- ") or "0"


def show_atom(a):
    """f >= 0 as 'positive terms >= negative terms': 'alpha >= 1', '2 >= alpha', 'beta > alpha'."""
    f = dict(a[0])
    left, right = {n: c for n, c in f.items() if c > 0}, {n: -c for n, c in f.items() if c < 0}
    return f"{show_form(left)} {'>' if a[1] else '>='} {show_form(right)}"


def show_expr(e):
    if e[0] == "affine":
        return show_form(e[1])
    if e[0] == "sum":
        return " + ".join(([show_form(e[1])] if e[1] else []) + [show_expr(t) for t in e[2]])
    return f"{e[0]}(" + ", ".join(show_expr(a) for a in e[1]) + ")"


def show_region(region):
    polys = [", ".join(show_atom(a) for a in p) or "everywhere" for p in region]
    return polys[0] if len(polys) == 1 else " or ".join(f"({p})" for p in polys)


def statement(claim, region):
    e = [show_expr(x) for x in claim["exprs"]]
    if claim["kind"] == "monotone":
        trend = "non-decreasing" if claim["increasing"] else "non-increasing"
        said = f"{e[0]} is {trend} in {claim['param']}"
    elif claim["kind"] == "within":
        said = f"|{e[0]} - ({e[1]})| <= {claim['gap']}"
    else:
        said = f"{e[0]} {claim['rel']} {e[1]}"
    return f"{said} for all points of: {show_region(region)}"


def main(argv=None):
    parser = argparse.ArgumentParser(description="Re-check gdof-workbench proof certificates (JSON).")
    parser.add_argument("files", nargs="+", help="certificate files (claimNN.json)")
    args = parser.parse_args(argv)
    status = 0
    for path in args.files:
        try:
            with open(path, encoding="utf-8") as fh:
                data = json.load(fh)
        except (OSError, ValueError, RecursionError) as exc:
            print(f"NOT certified: {path}: cannot read it ({type(exc).__name__}: {str(exc)[:200]})")
            status = 2
            continue
        claim = data.get("claim") if isinstance(data, dict) else None
        text = claim.get("text") if isinstance(claim, dict) else None
        text = text[:500] if isinstance(text, str) else path
        try:
            said, n = check(data)
        except Bad as exc:
            print(f"NOT certified: {text}: {exc}")
        except Exception as exc:  # a malformed file must never crash the checker or pass it
            print(f"NOT certified: {text}: malformed certificate ({type(exc).__name__})")
        else:
            print(f"certified: {text}")
            print(f"    checked: {said}  ({n} cells, {path})")
            continue
        status = max(status, 1)
    return status


if __name__ == "__main__":
    sys.exit(main())
