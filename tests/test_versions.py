"""Versions of a converse ([outer.NAME] tables): comparisons proved and refuted, both versions'
active bounds in the regime table, and the input errors.  Expected verdicts are hand derivations
stated beside each case; counterexamples are re-checked here with Fractions.
"""

import json
import textwrap
from fractions import Fraction as F

import pytest

from workbench.casefile import load_case
from workbench.cli import main

CASE = """
title = "two versions of a converse"
[parameters]
alpha = "cross-link exponent"
[assume]
region = "0 <= alpha <= 2"
[outer]
single_user = "1"
[outer.submitted]
genie = "max(alpha, 1 - alpha)"
[outer.revised]
genie = "max(alpha/2, 1 - alpha/2)"
[inner]
tin = "(1 - alpha)^+"
"""


def submitted(x):
    return min(F(1), max(x, 1 - x))


def revised(x):
    return min(F(1), max(x / 2, 1 - x / 2))


def write(tmp_path, claims=""):
    path = tmp_path / "case.toml"
    path.write_text(textwrap.dedent(CASE) + textwrap.dedent(claims))
    return str(path)


def claim(statement, where=""):
    where = f'where = "{where}"\n' if where else ""
    return f'[[claims]]\nname = "c"\nstatement = "{statement}"\n{where}'


def check(tmp_path, capsys, statement, where=""):
    code = main(["check", "--json", write(tmp_path, claim(statement, where))])
    out, err = capsys.readouterr()
    assert code in (0, 1, 2), err
    return code, (json.loads(out)["claims"][0] if code != 2 else err)


def test_a_version_is_the_min_of_its_bounds_and_the_shared_ones(tmp_path):
    case = load_case(write(tmp_path))
    named = case.named()
    assert "outer" not in named and {"submitted", "revised"} <= set(named)
    assert [n for n, _ in case.version_parts("revised")] == ["single_user", "genie"]


def test_the_revision_is_never_looser_is_refuted_where_it_is(tmp_path, capsys):
    # hand derivation: at a = 1/2 revised = 3/4 > submitted = 1/2 -- the revision is looser there
    code, entry = check(tmp_path, capsys, "revised <= submitted")
    assert code == 1
    p = {k: F(v) for k, v in entry["parts"][0]["counterexample"]["point"].items()}
    assert 0 <= p["alpha"] <= 2 and revised(p["alpha"]) > submitted(p["alpha"])


def test_the_revision_is_never_tighter_is_proved(tmp_path, capsys):
    # hand derivation: for a <= 2/3 revised = 1 - a/2 >= max(a, 1 - a) = submitted (a <= 1 - a/2
    # iff a <= 2/3); for 2/3 < a < 2 the revision is strictly tighter (a > 1 - a/2, resp. a/2 < 1)
    code, _ = check(tmp_path, capsys, "revised >= submitted", "alpha <= 2/3")
    assert code == 0
    code, entry = check(tmp_path, capsys, "revised >= submitted")
    assert code == 1
    x = F(entry["parts"][0]["counterexample"]["point"]["alpha"])
    assert revised(x) < submitted(x) and x > F(2, 3)


def test_they_agree_for_large_alpha(tmp_path, capsys):
    # hand derivation: for a >= 2 both are min(1, a) = 1 and min(1, a/2) = 1; below 2 revised < 1 = submitted
    code, _ = check(tmp_path, capsys, "revised == submitted", "alpha >= 2")
    assert code == 0
    code, entry = check(tmp_path, capsys, "revised == submitted", "alpha >= 1")
    assert code == 1
    x = F(entry["parts"][0]["counterexample"]["point"]["alpha"])
    assert 1 <= x <= 2 and revised(x) != submitted(x)


def test_the_regime_table_shows_both_versions_active_bounds(tmp_path, capsys):
    assert main(["report", write(tmp_path, claim("revised == submitted", "alpha >= 1"))]) == 1
    out = capsys.readouterr().out
    # hand derivation: on 1 <= alpha < 2 the submitted min is its single-user bound (max(a, 1-a) = a >= 1
    # ties only at a = 1), the revised one its genie bound a/2 < 1
    assert "revised: genie; submitted: single_user" in out


def test_the_single_outer_table_still_works(tmp_path, capsys):
    text = CASE.replace("[outer.submitted]\n", "").split("[outer.revised]")[0] + '[inner]\ntin = "(1 - alpha)^+"\n'
    path = tmp_path / "plain.toml"
    path.write_text(textwrap.dedent(text) + claim("inner <= outer"))
    # hand derivation: (1 - a)^+ <= min(1, max(a, 1 - a)) everywhere
    assert main(["check", str(path)]) == 0


@pytest.mark.parametrize("edit, message", [
    (lambda t: t + claim("inner <= outer"), r"'outer' has versions \(submitted, revised\): name the one"),
    (lambda t: t.replace('genie = "max(alpha/2, 1 - alpha/2)"', 'genie = "alpha if alpha <= 1; 1 if alpha > 1"'),
     r"outer\.revised\.genie: a version's own bound cannot be given regime by regime"),
    (lambda t: t.replace('genie = "max(alpha, 1 - alpha)"', 'single_user = "2"'),
     r"outer\.submitted\.single_user: the name 'single_user' is already a bound shared by every version"),
    (lambda t: t.replace("[outer.revised]", "[outer.alpha]"), r"outer\.alpha: the name 'alpha' is already used"),
    (lambda t: t.replace('genie = "max(alpha/2, 1 - alpha/2)"', 'genie = "max(alpha/2, 1 - beta)"'),
     r"outer\.revised\.genie: unknown parameter 'beta'"),
    (lambda t: t.replace('single_user = "1"', 'single_user = { formula = "1" }'),
     r"outer\.single_user\.formula: unknown key"),   # an inline table is still a (misspelt) bound
])
def test_version_errors_are_one_line(tmp_path, capsys, edit, message):
    path = tmp_path / "case.toml"
    path.write_text(edit(textwrap.dedent(CASE)))
    assert main(["check", str(path)]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    import re
    assert len(err) == 1 and re.search(message, err[0]), err
