"""The `gdof` command: exit codes, one-line errors for bad input, JSON output, nothing executed."""

import json
import subprocess
import sys
import textwrap

import pytest

from workbench.cli import main
from tests.case_files import write

GOOD = """
title = "tiny"
[parameters]
alpha = "exponent"
[assume]
region = "alpha >= 0"
[outer]   # symmetric outer bounds of Etkin, Tse, Wang, IEEE Trans. IT 54(12), 2008 (from memory)
one = "1"
half = "(max(1, alpha) + (1 - alpha)^+)/2"
both = "max(alpha, 1 - alpha)"
third = "(max(1, alpha) + (1 - alpha)^+ + max(alpha, 1 - alpha))/3"
[inner]
tin = "1 - alpha"
[[claims]]
name = "tin below outer"
statement = "inner <= outer"
expect = "proved"
{extra}
"""


def run(capsys, *argv):
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def test_all_proved_exits_0(tmp_path, capsys):
    code, out, _ = run(capsys, "check", write(tmp_path, GOOD.format(extra="")))
    assert code == 0 and "tin below outer -- proved" in out and "asymptotic in SNR" in out


def test_refuted_exits_1_with_exact_counterexample(tmp_path, capsys):
    extra = '[[claims]]\nname = "tin optimal"\nstatement = "inner == outer"\nwhere = "alpha <= 3/5"\n'
    code, out, _ = run(capsys, "check", write(tmp_path, GOOD.format(extra=extra)))
    assert code == 1 and "tin optimal -- refuted" in out
    # TIN is optimal exactly on [0, 1/2] (Etkin, Tse, Wang, IEEE Trans. IT 2008); the smallest
    # denominator strictly inside (1/2, 3/5) is 4/7 (hand check: no fraction with denominator <= 6 lies there).
    assert "counterexample: alpha = 4/7" in out


def test_unknown_exits_3(tmp_path, capsys, monkeypatch):
    from verifier.solvers import smt
    real = smt.check

    def fake(query, solver="z3", timeout=30.0):
        if query.conditions:
            return smt.Answer("unknown", solver, detail="timeout")
        return real(query, solver, timeout)
    monkeypatch.setattr("verifier.claims.one_shot.check", fake)
    code, out, _ = run(capsys, "check", write(tmp_path, GOOD.format(extra="")))
    assert code == 3 and " -- unknown" in out


def test_json_output_is_exact(tmp_path, capsys):
    extra = '[[claims]]\nname = "tin optimal"\nstatement = "inner == outer"\nwhere = "alpha <= 3/5"\n'
    code, out, _ = run(capsys, "check", "--json", write(tmp_path, GOOD.format(extra=extra)))
    data = json.loads(out)
    refuted = [c for c in data["claims"] if c["status"] == "refuted"][0]
    cex = refuted["parts"][0]["counterexample"]
    assert cex["point"] == {"alpha": "4/7"} and cex["lhs"] == "3/7" and "caution" in data


BAD_STATEMENTS = [
    ("inner <= alpha*alpha", "nonlinear term 'alpha\\*alpha'"),
    ("inner <= alpha^2", "nonlinear term 'alpha\\^2'"),
    ("inner <= 1/alpha", "nonlinear term '1/alpha'"),
    ("inner <= gama", "unknown parameter 'gama'"),
    ("inner <= log(alpha)", "unknown function 'log'"),
    ("inner <= min(alpha, 1", "unclosed"),
    ("inner <= __import__('os').system('touch pwned')", "unknown function '__import__'"),
    ("inner <= " + "9" * 80, "number too large"),
]


@pytest.mark.parametrize("statement,message", BAD_STATEMENTS)
def test_bad_statement_is_one_line_exit_2(tmp_path, capsys, statement, message):
    text = GOOD.format(extra="").replace('statement = "inner <= outer"', f'statement = "{statement}"')
    code, out, err = run(capsys, "check", write(tmp_path, text))
    assert code == 2 and out == ""
    assert err.count("\n") == 1 and "Traceback" not in err
    assert "case.toml: claims[0].statement:" in err
    assert __import__("re").search(message, err), err
    assert "column" in err
    assert not (tmp_path / "pwned").exists()


@pytest.mark.parametrize("mutate,message", [
    (lambda t: t.replace('region = "alpha >= 0"', 'region = "alpha > 1, alpha < 0"'), "is empty"),
    (lambda t: "bogus = 1\n" + t, "bogus: unknown key"),
    (lambda t: t.replace("statement =", "statment ="), "claims\\[0\\]"),
    (lambda t: t.replace("[outer]", "[outer"), "not valid TOML"),
    (lambda t: t.replace('one = "1"', 'one = "1 +"'), "outer.one:"),
    (lambda t: t.replace('expect = "proved"', 'expect = "true"'), "claims\\[0\\].expect"),
])
def test_bad_case_file_is_one_line_exit_2(tmp_path, capsys, mutate, message):
    code, out, err = run(capsys, "check", write(tmp_path, mutate(GOOD.format(extra=""))))
    assert code == 2 and err.count("\n") == 1 and "Traceback" not in err
    assert __import__("re").search(message, err), err


def test_missing_file_and_bad_option_exit_2(tmp_path, capsys):
    assert run(capsys, "check", str(tmp_path / "nope.toml"))[0] == 2
    code, _, err = run(capsys, "check", "--solver", "nosuch", "x.toml")
    assert code == 2 and err.count("\n") == 1


def test_error_column_points_into_the_file(tmp_path, capsys):
    text = GOOD.format(extra="").replace('statement = "inner <= outer"', 'statement = "inner <= gama"')
    _, _, err = run(capsys, "check", write(tmp_path, text))
    line = [i for i, l in enumerate(textwrap.dedent(text).splitlines(), 1) if "gama" in l][0]
    col = textwrap.dedent(text).splitlines()[line - 1].index("gama") + 1
    assert f"line {line}, column {col}" in err


def test_installed_entry_point_runs_as_a_module():
    # The same main() behind `python -m workbench`: a real process, so no traceback leaks on bad input.
    proc = subprocess.run([sys.executable, "-m", "workbench", "check", "/nonexistent.toml"],
                          capture_output=True, text=True)
    assert proc.returncode == 2 and proc.stderr.count("\n") == 1
