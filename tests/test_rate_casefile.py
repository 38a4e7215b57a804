"""Rate regions in case files: syntax, verdicts through `gdof check` / `report` / `casebook`, and the
error contract (one line naming file, key and column, exit 2, never a traceback)."""

from __future__ import annotations

import json

import pytest

from workbench.casefile import load_case
from workbench.cli import main
from tests.case_files import write

CASE = """\
title = "MAC region"
[parameters]
a1 = "exponent 1"
a2 = "exponent 2"
[assume]
region = "a1 >= 0, a2 >= 0"
[formulas]
top = "max(a1, a2)"
[rates]
d1 = "user 1"
d2 = "user 2"
[region.cap]
inequalities = ["d1 <= a1", "d2 <= a2", "d1 + d2 <= top"]
[region.sd]
corners = ["(a1, (a2 - a1)^+)", "((a1 - a2)^+, a2)"]
free_disposal = true
[region.box]
inequalities = ["d1 <= a1", "0.5*d2 <= a2/2"]
[[claims]]
name = "sd is the region"
statement = "sd == cap"
expect = "proved"
[[claims]]
name = "the box is not"
statement = "box == cap for all weights"
expect = "refuted"
[[claims]]
name = "sum"
statement = "max d1 + d2 over cap == top"
expect = "proved"
[[claims]]
name = "wrong sum"
statement = "max d1 + d2 over cap >= a1 + a2"
expect = "refuted"
[[claims]]
name = "a point"
statement = "cap contains (a1/2, 0)"
expect = "proved"
[[claims]]
name = "inside the box"
statement = "cap subset box"
expect = "proved"
"""


def test_regions_load_with_exact_numbers(tmp_path):
    case = load_case(write(tmp_path, CASE))
    assert set(case.regions) == {"cap", "sd", "box"} and list(case.rates) == ["d1", "d2"]
    (_, half) = case.regions["box"].inequalities    # 0.5*d2 <= a2/2 is d2/2 <= a2/2 exactly
    assert dict(half.coeffs) == {"d2": __import__("fractions").Fraction(1, 2)}
    assert case.regions["cap"].inequalities[2].bound.__str__() == "max(a1, a2)"   # [formulas] resolved


def test_check_prints_exponent_point_and_rate_tuple(tmp_path, capsys):
    path = write(tmp_path, CASE)
    assert main(["check", path]) == 1
    out = capsys.readouterr().out
    assert "the box is not -- refuted" in out
    assert "exponent point: a1 = 1, a2 = 1" in out and "rate tuple: (d1 = 1, d2 = 1)" in out
    assert "wrong sum -- refuted" in out and "attained at this rate tuple" in out


def test_casebook_runner_and_json(tmp_path, capsys):
    path = write(tmp_path, CASE)
    assert main(["casebook", path]) == 0
    capsys.readouterr()
    assert main(["check", "--json", path]) == 1
    claims = json.loads(capsys.readouterr().out)["claims"]
    box = next(c for c in claims if c["name"] == "the box is not")
    assert box["kind"] == "region support"
    assert box["rate_witness"]["point"] == {"a1": "1", "a2": "1"}
    assert box["rate_witness"]["rates"] == {"d1": "1", "d2": "1"}


def test_report_shows_region_verdicts_and_the_pair(tmp_path, capsys):
    path = write(tmp_path, CASE)
    assert main(["report", path, "--claim", "the box is not", "--claim", "sum"]) == 1
    out = capsys.readouterr().out
    assert "sum -- proved" in out and "the box is not -- refuted" in out
    assert "3. d1 + d2 <= max(a1, a2): a facet where" in out      # where the sum facet cuts
    assert "rate tuple: (d1 = 1, d2 = 1)" in out
    assert "max of d1 + d2 over cap" in out      # the regime table of the support formula


def one_error(capsys, *argv) -> str:
    code = main(list(argv))
    _, err = capsys.readouterr()
    assert code == 2, (code, err)
    assert err.count("\n") == 1 and err.startswith("gdof: error: ") and "Traceback" not in err, err
    return err.strip()


BAD_ROWS = [
    ('"d1*d2 <= a1"', "nonlinear term 'd1*d2'", "column 18"),
    ('"max(d1, a2) <= a1"', "rate 'd1' used inside min/max", "column 22"),
    ('"d1 + a1 <= 1"', "exponent 'a1' on the rate side", "column 23"),
    ('"d3 <= a1"', "unknown name 'd3' (rates: d1, d2", "column 18"),
    ('"d1 < a1"', "use <= or >=, not a strict inequality", "column 21"),
    ('"a1 <= a2"', "no rate in the inequality", "column 18"),
    ('"d1 <= d2 * a1"', "nonlinear term", "column"),
]


@pytest.mark.parametrize("row,message,where", BAD_ROWS)
def test_bad_inequalities_are_one_line_errors_with_position(tmp_path, capsys, row, message, where):
    text = CASE.replace('"d1 <= a1", "d2 <= a2", "d1 + d2 <= top"', f'{row}, "d2 <= a2"')
    line = one_error(capsys, "check", write(tmp_path, text))
    assert "region.cap.inequalities[0]" in line and message in line and where in line, line
    assert "line 13" in line or where == "column"


BAD_CLAIMS = [
    ("sd == cap", "sd == kap", "unknown region 'kap' (did you mean 'cap'?)"),
    ("cap contains (a1/2, 0)", "cap contains (d1, 0)", "rate 'd1' in a corner"),
    ("cap contains (a1/2, 0)", "cap contains (a1/2)", "a corner needs 2 coordinates"),
    ("max d1 + d2 over cap == top", "max d1 + a1 over cap == top", "exponent 'a1' on the rate side"),
    ("max d1 + d2 over cap == top", "max d1 + d2 over cap == top + d1", "unknown parameter 'd1'"),
    ("box == cap for all weights", "sd == cap for all weights", "given by corners"),
    ("sd == cap", "sd == sd", "both regions are given by corners"),
    ("sd == cap", "sd around cap", "a region claim reads"),
    ("sd == cap", "cap facet 9 is redundant", "there is no facet 9"),
    ("sd == cap", "sd facet 1 is redundant", "given by corners"),
]


@pytest.mark.parametrize("old,new,message", BAD_CLAIMS)
def test_bad_region_claims_are_one_line_errors(tmp_path, capsys, old, new, message):
    line = one_error(capsys, "check", write(tmp_path, CASE.replace(f'"{old}"', f'"{new}"')))
    assert "statement" in line and message in line, line


BAD_TABLES = [
    (CASE.replace('free_disposal = true', 'free_disposal = "yes"'), "region.sd.free_disposal", "true or false"),
    (CASE.replace('[region.box]\ninequalities', '[region.box]\ncorners = ["(0, 0)"]\ninequalities'),
     "region.box", "either inequalities"),
    (CASE.replace('[rates]\nd1 = "user 1"\nd2 = "user 2"\n', ''), "region", "declare the rates first"),
    (CASE.replace('free_disposal = true', 'free_disposl = true'), "free_disposl", "did you mean"),
    (CASE.replace('d2 = "user 2"', 'a2 = "user 2"'), "rates.a2", "already a parameter"),
]


@pytest.mark.parametrize("text,key,message", BAD_TABLES)
def test_bad_region_tables_are_one_line_errors(tmp_path, capsys, text, key, message):
    line = one_error(capsys, "check", write(tmp_path, text))
    assert key in line and message in line, line


def test_a_regime_wise_bound_cannot_be_a_facet(tmp_path, capsys):
    text = CASE.replace("[formulas]", '[outer]\nhk = "a1 if a1 >= a2; a2 if a2 >= a1"\n[formulas]')
    text = text.replace('"d1 + d2 <= top"', '"d1 + d2 <= hk"')
    line = one_error(capsys, "check", write(tmp_path, text))
    assert "given regime by regime" in line


def test_an_unbounded_weighted_sum_is_bad_input_when_read(tmp_path, capsys):
    text = CASE.replace('"max d1 + d2 over cap == top"', '"max d1 + d2 over half == top"')
    text = text.replace("[[claims]]", '[region.half]\ninequalities = ["d1 <= a1"]\n[[claims]]', 1)
    line = one_error(capsys, "check", write(tmp_path, text))
    assert "claims[2].statement" in line and "unbounded over region 'half'" in line


def test_rates_as_an_array_and_regions_without_nonnegativity(tmp_path, capsys):
    text = CASE.replace('[rates]\nd1 = "user 1"\nd2 = "user 2"\n', '')
    text = text.replace('title = "MAC region"', 'title = "MAC region"\nrates = ["d1", "d2"]')
    text = text.replace('[region.box]\ninequalities = ["d1 <= a1", "0.5*d2 <= a2/2"]',
                        '[region.box]\ninequalities = ["d1 <= a1", "0.5*d2 <= a2/2"]\nnonnegative = false')
    # without d >= 0 the box is not down-closed in the orthant: 'for all weights' is refused
    line = one_error(capsys, "check", write(tmp_path, text, "b.toml"))
    assert "claims[1].statement" in line and "does not require the rates to be non-negative" in line
    case = load_case(write(tmp_path, text.replace("box == cap for all weights", "cap subset box")))
    assert list(case.rates) == ["d1", "d2"] and case.regions["box"].nonnegative is False
