"""Bounds pasted from a manuscript in LaTeX work in case files exactly like their text twins."""

import tomllib

import pytest

from verifier.core.errors import CaseFileError
from verifier.text.parse import parse_expr
from workbench.casefile import build_case

CASE = r'''
title = "latex"
[parameters]
alpha = "exponent"
gamma = "exponent"
[assume]
region = '\alpha \geq 0, \gamma \geq 0'
[outer]
pasted = '\min\left\{2\alpha, \frac{\gamma}{2}+(1-\alpha)^+\right\}'
[formulas]
typed = "min(2*alpha, gamma/2 + (1 - alpha)^+)"
[[claims]]
statement = "pasted == typed"
'''


def test_latex_values_parse_to_the_text_twin():
    case = build_case("c.toml", CASE, tomllib.loads(CASE))
    assert case.outer["pasted"] == parse_expr("min(2*alpha, gamma/2 + (1 - alpha)^+)")
    assert case.assume.contains({"alpha": 0, "gamma": 1})


def test_latex_error_names_the_macro_and_its_place():
    text = CASE.replace(r"\frac{\gamma}{2}", r"\log{\gamma}")
    with pytest.raises(CaseFileError, match=r"outer.pasted: .*\\log.*line 9, column 31"):
        build_case("c.toml", text, tomllib.loads(text))
