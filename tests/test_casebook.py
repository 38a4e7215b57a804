"""The casebook as a regression suite: every declared verdict must hold, and the planted errors are live.

Each published case cites its source inside the case file (authors, venue, year) and says per formula
whether it was read in the source or recalled from memory; the demo cases are invented manuscripts.
A planted error is marked `# planted error: ...` and its correction `# fix: key = "value"`, which
applies to the first following line that sets `key`: with the correction in place the claim that was
declared refuted is proved, so the runner must report a mismatch (exit 1).
"""

from __future__ import annotations

import functools
import json
import re
from pathlib import Path

import pytest

from verifier.claims.kinds import KINDS
from verifier.rates.claims import KINDS as RATE_KINDS
from workbench.casebook_cmd import case_files, run_case
from workbench.cli import main

ROOT = Path(__file__).resolve().parent.parent
CASEBOOK = ROOT / "casebook"
FILES = case_files([CASEBOOK])
FIX_RE = re.compile(r"^\s*#\s*fix:\s*([A-Za-z_][A-Za-z0-9_]*)\s*=\s*(.+?)\s*$")


def _ids(paths):
    return [str(p.relative_to(CASEBOOK)) for p in paths]


def fixes(text: str) -> list[tuple[int, str, str]]:
    """(line index of the fix comment, key, value) for every `# fix:` comment of a case file."""
    return [(i, m.group(1), m.group(2)) for i, line in enumerate(text.splitlines())
            if (m := FIX_RE.match(line))]


def apply_fix(text: str, index: int, key: str, value: str) -> str:
    """The case text with the first line setting `key` after line `index` replaced by the fix."""
    lines = text.splitlines()
    setter = re.compile(rf"^\s*{re.escape(key)}\s*=")
    for j in range(index + 1, len(lines)):
        if setter.match(lines[j]):
            lines[j] = f"{key} = {value}"
            return "\n".join(lines) + "\n"
    raise AssertionError(f"fix for '{key}' at line {index + 1} has no line to replace")


@functools.lru_cache(maxsize=None)
def cached_run(path: Path):
    """Each case file is run once per test session; several tests read the same run."""
    return run_case(path)


PLANTED = [(path, fix) for path in FILES for fix in fixes(path.read_text(encoding="utf-8"))]


# --- the regression run ------------------------------------------------------------------------

@pytest.mark.parametrize("path", FILES, ids=_ids(FILES))
def test_every_declared_verdict_holds(path):
    run = cached_run(path)
    assert run.error is None, run.error
    if path.parent.name in ("published", "demo"):  # other folders may hold network descriptions
        assert run.results, f"{path} has no claims"
    wrong = [(cc.claim.name, cc.expect, o.status) for cc, o in run.mismatches]
    assert not wrong, f"verdicts differ from the declared ones in {path}: {wrong}"


def test_casebook_shelves_have_enough_cases():
    published = [p for p in FILES if p.parent.name == "published"]
    demo = [p for p in FILES if p.parent.name == "demo"]
    assert len(published) >= 6 and len(demo) >= 4
    assert (CASEBOOK / "demo" / "cache_downlink_manuscript.toml") in demo  # the README's example


@pytest.mark.parametrize("path", [p for p in FILES if p.parent.name == "published"],
                         ids=_ids([p for p in FILES if p.parent.name == "published"]))
def test_published_cases_cite_and_say_how_each_formula_was_obtained(path):
    text = path.read_text(encoding="utf-8")
    case = cached_run(path).case
    assert re.search(r"(19|20)\d\d", case.source), "the source names a year"
    assert "," in case.source and "'" in case.source, "the source names authors and a title"
    comments = "\n".join(line for line in text.splitlines() if line.lstrip().startswith("#"))
    assert re.search(r"read in source|from memory", comments, re.IGNORECASE)


def test_casebook_uses_every_claim_kind_and_both_regime_forms():
    kinds, text = set(), ""
    for path in FILES:
        kinds |= {cc.claim.kind for cc in cached_run(path).case.claims}
        text += path.read_text(encoding="utf-8")
    assert kinds == set(KINDS) | set(RATE_KINDS)
    assert "regimes = [" in text and re.search(r'= "[^"]* if [^"]*;', text)


def test_demo_has_a_three_parameter_case_over_gamma_alpha_one():
    cases = [cached_run(p).case for p in FILES if p.parent.name == "demo"]
    three = [c for c in cases if set(c.parameters) == {"alpha", "beta", "gamma"}]
    assert any("gamma > alpha" in c.assume.text() and "alpha > 1" in c.assume.text() for c in three)


def test_demo_manuscripts_mark_their_planted_errors():
    marked = [p for p in FILES if p.parent.name == "demo" and "# planted error:" in p.read_text()]
    assert len(marked) >= 2
    for path in marked:
        assert fixes(path.read_text(encoding="utf-8")), f"{path} has a planted error but no '# fix:'"
    assert len(PLANTED) >= 3


# --- the planted errors are live ---------------------------------------------------------------

@pytest.mark.parametrize("path,fix", PLANTED,
                         ids=[f"{p.name}:{f[1]}@{f[0] + 1}" for p, f in PLANTED])
def test_fixing_a_planted_error_makes_the_runner_fail(path, fix, tmp_path, capsys):
    fixed = tmp_path / path.name
    fixed.write_text(apply_fix(path.read_text(encoding="utf-8"), *fix), encoding="utf-8")
    assert main(["casebook", "--json", str(fixed)]) == 1
    (case,) = json.loads(capsys.readouterr().out)["cases"]
    flipped = [(c["expected"], c["status"]) for c in case["claims"] if not c["matches"]]
    assert flipped and all(pair == ("refuted", "proved") for pair in flipped)


def test_the_unfixed_demo_folder_passes(capsys):
    assert main(["casebook", str(CASEBOOK / "demo")]) == 0
    out = capsys.readouterr().out
    assert "case" in out and "mismatches" in out and "Every verdict as declared." in out
    # bundled cases are listed by the name `gdof check` accepts for them (workbench.bundled)
    rows = [line.split()[0] for line in out.splitlines() if line.startswith("demo/")]
    assert rows == sorted(rows) and len(rows) >= 4 and "Bundled cases from" in out


# --- output and exit status ----------------------------------------------------------------------

GOOD = """title = "tiny"
[parameters]
alpha = "x"
[assume]
region = "alpha >= 0"
[[claims]]
name = "one"
statement = "min(1, alpha) <= 1"
expect = "{expect}"
"""


def _write(tmp_path, name, text):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def test_json_output_has_counts_and_verdicts(tmp_path, capsys):
    path = _write(tmp_path, "a.toml", GOOD.format(expect="proved"))
    assert main(["casebook", "--json", str(path)]) == 0
    data = json.loads(capsys.readouterr().out)
    (case,) = data["cases"]
    assert case["counts"] == {"proved": 1, "refuted": 0, "unknown": 0}
    assert case["claims"][0]["matches"] is True and data["exit_status"] == 0


def test_a_wrong_declaration_is_a_mismatch_with_exit_1(tmp_path, capsys):
    path = _write(tmp_path, "a.toml", GOOD.format(expect="refuted"))
    assert main(["casebook", str(path)]) == 1
    out = capsys.readouterr().out
    assert "claims[0] 'one': declared refuted, came out proved" in out


def test_a_claim_without_expect_is_a_mismatch(tmp_path, capsys):
    path = _write(tmp_path, "a.toml", GOOD.format(expect="proved").replace('expect = "proved"\n', ""))
    assert main(["casebook", str(path)]) == 1
    assert "declares no expect" in capsys.readouterr().out


BAD = {
    "unknown_key": (GOOD.format(expect="proved") + 'colour = "red"\n', "colour"),
    "unknown_parameter": (GOOD.format(expect="proved").replace("min(1, alpha)", "min(1, beta)"),
                          "claims[0].statement"),
    "toml_syntax": (GOOD.format(expect="proved").replace('title = "tiny"', 'title = "tiny'), "TOML"),
    "empty_region": (GOOD.format(expect="proved").replace('expect =', 'where = "alpha > 2, alpha < 1"\nexpect ='),
                     "claims[0]"),
}


@pytest.mark.parametrize("name", sorted(BAD))
def test_bad_case_files_exit_2_with_one_line_naming_file_and_key(name, tmp_path, capsys):
    text, key = BAD[name]
    path = _write(tmp_path, f"{name}.toml", text)
    assert main(["casebook", str(path)]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1, err
    assert str(path) in err[0] and key in err[0]


def test_a_bad_file_does_not_hide_the_others(tmp_path, capsys):
    _write(tmp_path, "a_good.toml", GOOD.format(expect="proved"))
    _write(tmp_path, "b_bad.toml", BAD["unknown_key"][0])
    assert main(["casebook", str(tmp_path)]) == 2
    captured = capsys.readouterr()
    assert "a_good.toml" in captured.out and "ERROR" in captured.out
    assert "b_bad.toml" in captured.err


def test_no_case_files_is_bad_input(tmp_path, capsys):
    assert main(["casebook", str(tmp_path)]) == 2
    assert "no case files" in capsys.readouterr().err
    assert main(["casebook", str(tmp_path / "missing")]) == 2
