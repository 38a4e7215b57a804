"""The error contract: bad input is ONE line on stderr, `gdof: error: ...`, naming the problem and
where it is, exit 2 -- never a traceback, never exit 4, and never a silently changed case."""

import errno
import os
import re
from fractions import Fraction

import pytest

from verifier.core.errors import InputError, UnknownNameError
from verifier.expressions.expr import const
from workbench import bundle_cmd, report_cmd
from workbench.assertions import assert_claim
from workbench.casefile import load_case
from workbench.cli import build_parser, main, one_line
from tests.case_files import write

BASE = """\
title = "tiny"
[parameters]
alpha = "cross-link exponent"
gamma = "second exponent"
[assume]
region = "alpha >= 0, gamma >= 0"
[outer]
one = "1"
genie = "(max(1, alpha) + (1 - alpha)^+)/2"
[inner]
tin = "1 - alpha"
[[claims]]
name = "tin below outer"
statement = "inner <= outer"
"""


def one_error(capsys, *argv) -> str:
    """Run gdof; assert exit 2 with exactly one `gdof: error:` line; return that line."""
    code = main(list(argv))
    out, err = capsys.readouterr()
    assert code == 2, (code, err)
    assert err.endswith("\n") and err.count("\n") == 1, err
    assert err.startswith("gdof: error: ") and "Traceback" not in err, err
    return err.rstrip("\n")


def check_error(tmp_path, capsys, text, name="case.toml") -> str:
    return one_error(capsys, "check", write(tmp_path, text, name))


def proof_must_not_run(monkeypatch):
    def boom(*args, **kwargs):
        raise AssertionError("the proof ran before the output target was checked")
    monkeypatch.setattr(report_cmd, "case_report", boom)
    monkeypatch.setattr(bundle_cmd, "case_report", boom)


# --- 1. TOML numbers are the exact rationals written ------------------------------------------

def test_toml_float_is_the_exact_decimal_not_text(tmp_path, capsys):
    # With a parameter named e, repr(1e-7) = "1e-07" used to parse as e - 7 and prove w <= e - 7.
    text = BASE.replace('[inner]', '[formulas]\nw = 1e-7\nv = 0.1\nu = 15e2\n[inner]', 1)
    text = text.replace('gamma = "second exponent"', 'e = "an exponent called e"').replace("gamma", "e")
    path = write(tmp_path, text + '[[claims]]\nname = "false"\nstatement = "w <= e - 7"\n')
    case = load_case(path)
    assert case.formulas["w"] == const(Fraction(1, 10_000_000))
    assert case.formulas["v"] == const(Fraction(1, 10)) and case.formulas["u"] == const(1500)
    code = main(["check", "--claim", "false", path])
    out = capsys.readouterr().out
    assert code == 1 and "false -- refuted" in out and "w = 1/10000000" in out


@pytest.mark.parametrize("value,message", [
    ("inf", r"outer\.one: 'Infinity' is not a finite number"),
    ("-inf", r"outer\.one: '-Infinity' is not a finite number"),
    ("nan", r"outer\.one: 'NaN' is not a finite number"),
    ("true", r"outer\.one: expected an expression in quotes or a number, found a boolean"),
    ("1e999999999", r"outer\.one: number too large"),
    ("1e-999999999", r"outer\.one: number too large or too precise"),
    ("9" * 80, r"outer\.one: number too large"),
    ("9" * 5001, r"not valid TOML: a number too large to read"),
    ('"' + "9" * 5001 + '"', r"outer\.one: number too large .*line 8"),
    ('"1e-7"', r"outer\.one: '1e-7' is scientific notation"),
    ("1979-05-27", r"outer\.one: .* found a date or time"),
])
def test_bad_numbers_are_refused(tmp_path, capsys, value, message):
    line = check_error(tmp_path, capsys, BASE.replace('one = "1"', f"one = {value}"))
    assert re.search(message, line), line


def test_scientific_notation_in_a_claim_is_refused_even_with_a_parameter_e(tmp_path, capsys):
    text = BASE.replace("gamma", "e") + '[[claims]]\nstatement = "tin <= e + 1E+3"\n'
    line = check_error(tmp_path, capsys, text)
    assert "claims[1].statement: '1E+3' is scientific notation" in line


# --- 2. wrong TOML types name the key and the expected type -----------------------------------

TYPE_ERRORS = [
    (lambda t: "assume = 3\n" + t.replace('[assume]\nregion = "alpha >= 0, gamma >= 0"\n', ""),
     r"assume: expected a table .*found an integer"),
    (lambda t: t.replace('region = "alpha >= 0, gamma >= 0"', "region = ['alpha >= 0']"),
     r"assume\.region: expected a region in quotes, found an array"),
    (lambda t: "outer = [1]\n" + t.replace('[outer]\none = "1"\ngenie = "(max(1, alpha) + (1 - alpha)^+)/2"\n', ""),
     r"outer: expected a table .*found an array"),
    (lambda t: "inner = \"x\"\n" + t.replace('[inner]\ntin = "1 - alpha"\n', ""),
     r"inner: expected a table .*found a string"),
    (lambda t: "formulas = true\n" + t, r"formulas: expected a table .*found a boolean"),
    (lambda t: t.replace('one = "1"', 'one = ["1"]'),
     r"outer\.one: expected an expression in quotes or a number, found an array"),
    (lambda t: t.replace('one = "1"', "one = { formula = '1' }"),
     r"outer\.one\.formula: unknown key"),
    (lambda t: t.replace('one = "1"', "one = { regimes = 'x' }"),
     r"outer\.one: a bound given regime by regime needs regimes = .*found a string"),
    (lambda t: t.replace('one = "1"', "one = { regimes = [] }"),
     r"outer\.one: .*found an empty array"),
    (lambda t: t.replace('one = "1"', "one = { regimes = [['1', 'alpha >= 0', 'x']] }"),
     r"outer\.one\.regimes\[0\]: each regime is .*found an array of 3"),
    (lambda t: t.replace('one = "1"', "one = { regimes = [['1', true]] }"),
     r"outer\.one\.regimes\[0\]: expected a region in quotes, found a boolean"),
    (lambda t: t.replace('tin = "1 - alpha"', "tin = false"),
     r"inner\.tin: expected an expression .*found a boolean"),
    (lambda t: t + '[formulas]\nw = { regimes = [] }\n', r"formulas\.w: a formula is one expression"),
    (lambda t: t.replace("[[claims]]", "[claims]"), r"claims: expected an array of tables.*\[\[claims\]\]"),
    (lambda t: 'claims = ["inner <= outer"]\n' + t.split("[[claims]]")[0],
     r"claims\[0\]: expected a table .*found a string"),
    (lambda t: t.replace('statement = "inner <= outer"', "statement = 3"),
     r"claims\[0\]\.statement: expected the claim in quotes, found an integer"),
    (lambda t: t.replace('statement = "inner <= outer"', "statement = ['inner <= outer']"),
     r"claims\[0\]\.statement: .*found an array"),
    (lambda t: t + "where = 1\n", r"claims\[0\]\.where: expected a region in quotes, found an integer"),
    (lambda t: t.replace('name = "tin below outer"', "name = 7"),
     r"claims\[0\]\.name: expected the claim's name in quotes, found an integer"),
    (lambda t: t.replace('name = "tin below outer"', 'name = ""'), r"claims\[0\]\.name: empty name"),
    (lambda t: t + "expect = true\n", r"claims\[0\]\.expect: expected one of proved, refuted, unknown, found a boolean"),
    (lambda t: t.replace('alpha = "cross-link exponent"', "alpha = 1"),
     r"parameters\.alpha: expected its meaning as text in quotes, found an integer"),
    (lambda t: t.replace('gamma = "second exponent"', 'gamma = { a = 1 }'),
     r"parameters\.gamma: .*found a table"),
    (lambda t: t.replace('[parameters]\nalpha = "cross-link exponent"\ngamma = "second exponent"\n', "")
     .replace('title = "tiny"', 'title = "tiny"\nparameters = ["alpha"]'),
     r"parameters: expected a table .*found an array"),
    (lambda t: t.replace('title = "tiny"', "title = { a = 1 }"), r"title: expected text in quotes, found a table"),
    (lambda t: t.replace('title = "tiny"', "source = 2011"), r"source: expected text in quotes, found an integer"),
    (lambda t: t.replace('gamma = "second exponent"', 'min = "a function name"'),
     r"parameters\.min: 'min' cannot be a parameter name"),
    (lambda t: t.replace('one = "1"', 'if = "1"'), r"outer\.if: 'if' is not a valid name"),
    (lambda t: t.replace('tin = "1 - alpha"', 'one = "1 - alpha"'), r"inner\.one: the name 'one' is already used"),
]


@pytest.mark.parametrize("mutate,message", TYPE_ERRORS)
def test_wrong_types_name_the_key_and_the_expected_type(tmp_path, capsys, mutate, message):
    line = check_error(tmp_path, capsys, mutate(BASE))
    assert "case.toml: " in line and re.search(message, line), line


NETWORK = """
[network]
nodes = { S = "transmitter", D = "receiver" }
links = [["S", "D", "alpha"]]
messages = [["W", "S", "D"]]
"""

NETWORK_ERRORS = [
    ('links = [["S", "D", "alpha"]]', 'links = "S D alpha"',
     r"network\.links: expected an array of \[tx, rx, exponent\], found a string"),
    ('links = [["S", "D", "alpha"]]', 'links = [["S", "D"]]', r"network\.links\[0\]: .*found an array of 2"),
    ('links = [["S", "D", "alpha"]]', "links = [3]", r"network\.links\[0\]: .*found a number"),
    ('links = [["S", "D", "alpha"]]', 'links = [["S", "D", ["alpha"]]]',
     r"network\.links\[0\]: the exponent must be a number or an expression in quotes, found an array"),
    ('links = [["S", "D", "alpha"]]', 'links = [["S", "D", true]]', r"network\.links\[0\]: .*found a boolean"),
    ('links = [["S", "D", "alpha"]]', 'links = [[1, "D", "alpha"]]',
     r"network\.links\[0\]\[0\]: expected a node name in quotes, found a number"),
    ('links = [["S", "D", "alpha"]]', 'links = [["S", "D", inf]]', r"network\.links\[0\]\[2\]: .*not a finite number"),
    ('nodes = { S = "transmitter", D = "receiver" }', 'nodes = ["S", "D"]',
     r"network\.nodes: expected a table of name = role, found an array"),
    ('nodes = { S = "transmitter", D = "receiver" }', 'nodes = { S = 1, D = "receiver" }',
     r"network\.nodes\.S: expected a role in quotes"),
    ('messages = [["W", "S", "D"]]', 'messages = "W"', r"network\.messages: expected an array .*found a string"),
    ('messages = [["W", "S", "D"]]', 'messages = [{ name = 1, source = "S", destination = "D" }]',
     r"network\.messages\[0\]\.name: expected a message name in quotes, found a number"),
    ('messages = [["W", "S", "D"]]', 'messages = [{ name = "W", sourse = "S", destination = "D" }]',
     r"network\.messages\[0\]\.sourse: unknown key \(did you mean 'source'\?\)"),
    ('messages = [["W", "S", "D"]]', 'mesages = [["W", "S", "D"]]',
     r"network\.mesages: unknown key \(did you mean 'messages'\?\)"),
    ('messages = [["W", "S", "D"]]', 'messages = [["W", "S", "D"]]\ntarget = "W"',
     r"network\.target: expected an array of message names"),
]


@pytest.mark.parametrize("old,new,message", NETWORK_ERRORS)
def test_network_table_types_are_checked(tmp_path, capsys, old, new, message):
    line = check_error(tmp_path, capsys, BASE.split("[outer]")[0] + NETWORK.replace(old, new))
    assert re.search(message, line), line


def test_network_table_that_is_not_a_table(tmp_path, capsys):
    line = check_error(tmp_path, capsys, 'network = "S -> D"\n' + BASE)
    assert re.search(r"network: expected a table .*found a string", line), line


# --- 3. files that cannot be read --------------------------------------------------------------

def test_non_utf8_file_names_the_file_and_the_offset(tmp_path, capsys):
    path = tmp_path / "latin1.toml"
    path.write_bytes(BASE.replace("tiny", "caf\xe9").encode("latin-1"))
    line = one_error(capsys, "check", str(path))
    assert "latin1.toml: not UTF-8 text: byte 0xe9 at offset 12 (line 1, column 13)" in line


def test_missing_file_folder_and_empty_name(tmp_path, capsys):
    assert "nope.toml: cannot read: No such file or directory" in one_error(capsys, "check", str(tmp_path / "nope.toml"))
    assert "is a folder, not a case file" in one_error(capsys, "check", str(tmp_path))
    assert "empty file name" in one_error(capsys, "check", "")


def test_deeply_nested_toml_is_an_input_error(tmp_path, capsys):
    line = check_error(tmp_path, capsys, "x = " + "[" * 5000 + "]" * 5000 + "\n" + BASE)
    assert "case.toml: not valid TOML" in line


# --- 4. unknown keys are refused, with a suggestion -------------------------------------------

@pytest.mark.parametrize("mutate,message", [
    (lambda t: t.replace("region =", "regoin ="),
     "case.toml: assume.regoin: unknown key (did you mean 'region'?) at line 6"),
    (lambda t: t.replace('title = "tiny"', 'titel = "tiny"'), "case.toml: titel: unknown key (did you mean 'title'?) at line 1"),
    (lambda t: t.replace("[outer]", "[outr]"), "case.toml: outr: unknown key (did you mean 'outer'?) at line 7"),
    (lambda t: t + 'wehre = "alpha <= 1"\n', "case.toml: claims[0].wehre: unknown key (did you mean 'where'?) at line 15"),
    (lambda t: t + '[[claims]]\nstatement = "inner <= 1"\nexpected = "proved"\n',
     "case.toml: claims[1].expected: unknown key (did you mean 'expect'?) at line 17"),
    (lambda t: t.replace('one = "1"', "one = { regime = [['1', 'alpha >= 0']] }"),
     "case.toml: outer.one.regime: unknown key (did you mean 'regimes'?) at line 8"),
    (lambda t: t + "[plot]\nx = 'alpha'\n", "case.toml: plot: unknown key"),
    (lambda t: t + "colour = 1\n", "case.toml: claims[0].colour: unknown key (a claim has: expect, name, statement, where)"),
])
def test_unknown_keys_are_refused_with_a_suggestion(tmp_path, capsys, mutate, message):
    line = check_error(tmp_path, capsys, mutate(BASE))
    assert message in line, line


# --- 5. names in claims -----------------------------------------------------------------------

def test_misspelt_bound_is_an_unknown_name_with_separate_lists(tmp_path, capsys):
    line = check_error(tmp_path, capsys, BASE.replace("inner <= outer", "inner <= outr"))
    assert ("claims[0].statement: unknown name 'outr' (parameters: alpha, gamma; bounds and formulas: "
            "outer, inner, one, genie, tin; did you mean 'outer'?) (line 14, column 23)") in line


def test_misspelt_parameter_suggests_the_parameter(tmp_path, capsys):
    line = check_error(tmp_path, capsys, BASE.replace("inner <= outer", "inner <= gama"))
    assert "unknown parameter 'gama' (parameters: alpha, gamma;" in line and "did you mean 'gamma'?" in line


def test_outer_without_an_outer_table(tmp_path, capsys):
    text = BASE.replace('[outer]\none = "1"\ngenie = "(max(1, alpha) + (1 - alpha)^+)/2"\n', "")
    line = check_error(tmp_path, capsys, text)
    assert "claims[0].statement: 'outer' is used but the case file has no [outer] table" in line
    line = check_error(tmp_path, capsys, text.replace("[inner]\ntin", "[outer]\n[inner]\ntin"))
    assert "'outer' is used but the [outer] table of the case file is empty" in line
    no_inner = BASE.replace('[inner]\ntin = "1 - alpha"\n', "")
    assert "'inner' is used but the case file has no [inner] table" in check_error(tmp_path, capsys, no_inner)


@pytest.mark.parametrize("mutate,message", [
    (lambda t: t + 'where = "tin <= 1"\n', r"claims\[0\]\.where: 'tin' is a bound or formula; 'where' may use only"),
    (lambda t: t.replace('tin = "1 - alpha"', 'tin = "one - alpha"'), r"inner\.tin: 'one' is a bound or formula"),
    (lambda t: t.replace('tin = "1 - alpha"', 'tin = "1 - alhpa"'),
     r"inner\.tin: unknown parameter 'alhpa' \(did you mean 'alpha'\?\)"),
    (lambda t: t + '[formulas]\na = "b + 1"\nb = "alpha"\n', r"formulas\.a: 'b' is defined later in \[formulas\]"),
    (lambda t: t.replace("inner <= outer", "inner nonincreasing in alhpa"),
     r"unknown parameter 'alhpa' \(parameters: alpha, gamma; did you mean 'alpha'\?\)"),
])
def test_other_name_errors_say_what_is_wrong(tmp_path, capsys, mutate, message):
    line = check_error(tmp_path, capsys, mutate(BASE))
    assert re.search(message, line), line


# --- 6. command-line options --------------------------------------------------------------------

@pytest.mark.parametrize("option", ["--timeout", "--budget"])
@pytest.mark.parametrize("value", ["nan", "inf", "-inf", "-1", "0", "soon"])
def test_time_options_must_be_finite_and_positive(tmp_path, capsys, option, value):
    line = one_error(capsys, "check", f"{option}={value}", write(tmp_path, BASE))
    assert f"argument {option}" in line and value in line


@pytest.mark.parametrize("command", ["report", "bundle"])
@pytest.mark.parametrize("value", ["0", "-2", "100000"])
def test_workers_must_be_sensible(tmp_path, capsys, monkeypatch, command, value):
    proof_must_not_run(monkeypatch)
    extra = [str(tmp_path / "out")] if command == "bundle" else []
    line = one_error(capsys, command, "--workers", value, write(tmp_path, BASE), *extra)
    assert "argument --workers" in line and value in line


def test_every_solver_subcommand_has_the_budget_option():
    parser = build_parser()
    for command, argv in [("check", ["c.toml"]), ("report", ["c.toml"]), ("bundle", ["c.toml", "o"]),
                          ("casebook", [])]:
        assert parser.parse_args([command] + argv).budget == 600
        assert parser.parse_args([command, "--budget", "2.5"] + argv).budget == 2.5
    sub = next(a for a in parser._actions if a.dest == "command").choices["check"]
    help_text = " ".join(sub.format_help().split())
    assert "time allowed for each claim over all stages, solver queries included" in help_text


TWO_CLAIMS = BASE + '[[claims]]\nname = "tin below two"\nstatement = "inner <= 2"\n'


def test_claim_that_matches_nothing_lists_the_claims(tmp_path, capsys):
    line = one_error(capsys, "check", "--claim", "nothing", write(tmp_path, TWO_CLAIMS))
    assert "--claim 'nothing': no claim of that name" in line
    assert "'tin below outer'; 'tin below two'" in line


def test_claim_prefix_selects_a_unique_claim_and_refuses_an_ambiguous_one(tmp_path, capsys):
    path = write(tmp_path, TWO_CLAIMS)
    assert main(["check", "--claim", "tin below t", path]) == 0
    out = capsys.readouterr().out
    assert "tin below two -- proved" in out and "tin below outer" not in out
    line = one_error(capsys, "check", "--claim", "tin below", path)
    assert "--claim 'tin below' matches several claims" in line and "'tin below outer'; 'tin below two'" in line


# --- 7. output targets are checked before the proof -------------------------------------------

def _unwritable_folder(tmp_path):
    """A folder no file can be created in, or None when chmod does not stop this user (root)."""
    folder = tmp_path / "locked"
    folder.mkdir()
    folder.chmod(0o500)
    if os.access(folder, os.W_OK):
        folder.chmod(0o700)
        return None
    return folder


def test_report_out_targets_are_refused_before_the_proof(tmp_path, capsys, monkeypatch):
    proof_must_not_run(monkeypatch)
    case = write(tmp_path, BASE)
    for out, message in [(tmp_path / "missing" / "r.txt", "does not exist"),
                         (tmp_path, "is a folder; give a file name"),
                         (tmp_path / "case.toml" / "r.txt", "is a file, not a folder"),
                         ("/proc/gdof-report.txt", "cannot write into folder '/proc'"),
                         (case, "is the input file")]:
        line = one_error(capsys, "report", "--out", str(out), case)
        assert line.startswith("gdof: error: report --out: ") and message in line, line
    assert open(case).read() == BASE


def test_report_out_into_a_read_only_folder(tmp_path, capsys, monkeypatch):
    folder = _unwritable_folder(tmp_path)
    if folder is None:
        pytest.skip("chmod does not stop this user from writing (root)")
    proof_must_not_run(monkeypatch)
    try:
        line = one_error(capsys, "report", "--out", str(folder / "r.txt"), write(tmp_path, BASE))
    finally:
        folder.chmod(0o700)
    assert "cannot write into folder" in line and "Permission denied" in line


@pytest.mark.parametrize("force", [[], ["--force"]])
def test_bundle_never_replaces_the_current_folder_or_the_case_folder(tmp_path, capsys, monkeypatch, force):
    proof_must_not_run(monkeypatch)
    work = tmp_path / "work"
    work.mkdir()
    case = write(work, BASE)
    (work / "notes.txt").write_text("mine")
    monkeypatch.chdir(work)
    for outdir, message in [(".", "is the current folder or contains it"),
                            (str(tmp_path), "is the current folder or contains it"),
                            ("/", "is the current folder or contains it"),
                            (str(work / "case.toml"), "contains the case file")]:
        line = one_error(capsys, "bundle", case, outdir, *force)
        assert message in line, line
    monkeypatch.chdir(tmp_path)
    line = one_error(capsys, "bundle", case, "work", *force)
    assert "contains the case file" in line
    assert (work / "notes.txt").read_text() == "mine" and (work / "case.toml").exists()


def test_bundle_into_an_uncreatable_or_read_only_parent(tmp_path, capsys, monkeypatch):
    proof_must_not_run(monkeypatch)
    case = write(tmp_path, BASE)
    line = one_error(capsys, "bundle", case, str(tmp_path / "case.toml" / "sub" / "out"))
    assert "is a file, not a folder" in line
    line = one_error(capsys, "bundle", case, "/proc/gdof-bundle/out")
    assert "cannot write into folder '/proc'" in line
    (tmp_path / "afile").write_text("x")
    assert "exists and is not a folder" in one_error(capsys, "bundle", case, str(tmp_path / "afile"), "--force")
    folder = _unwritable_folder(tmp_path)
    if folder is not None:
        try:
            line = one_error(capsys, "bundle", case, str(folder / "out"))
        finally:
            folder.chmod(0o700)
        assert "Permission denied" in line


def test_full_disk_while_writing_is_one_line(tmp_path, capsys, monkeypatch):
    def full(*args, **kwargs):
        raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))
    case = write(tmp_path, BASE)
    monkeypatch.setattr(report_cmd, "write_atomic", full)
    line = one_error(capsys, "report", "--out", str(tmp_path / "r.txt"), case)
    assert "report --out: cannot write" in line and "No space left on device" in line
    monkeypatch.setattr(bundle_cmd, "write_bundle", full)
    line = one_error(capsys, "bundle", case, str(tmp_path / "out"))
    assert "bundle: cannot write" in line and "No space left on device" in line


@pytest.mark.skipif(not os.path.exists("/dev/full"), reason="needs /dev/full")
def test_stdout_on_a_full_disk_is_one_line(tmp_path):
    import subprocess
    import sys
    with open("/dev/full", "w") as full:
        proc = subprocess.run([sys.executable, "-m", "workbench", "check", write(tmp_path, BASE)],
                              stdout=full, stderr=subprocess.PIPE, text=True)
    assert proc.returncode == 2 and proc.stderr.count("\n") == 1
    assert proc.stderr.startswith("gdof: error: writing the output: No space left on device")


# --- 8. control characters in file names never split the message ------------------------------

def test_newline_in_a_file_name_stays_on_one_line(tmp_path, capsys):
    line = check_error(tmp_path, capsys, "bogus = 1\n" + BASE, name="evil\nname\r.toml")
    assert "evil\\nname\\r.toml: bogus: unknown key" in line
    line = one_error(capsys, "check", str(tmp_path / "gone\n.toml"))
    assert "gone\\n.toml: cannot read" in line
    line = one_error(capsys, "report", "--out", str(tmp_path / "no\ndir" / "r.txt"), str(tmp_path / "x.toml"))
    assert "no\\ndir" in line


def test_one_line_flattens_any_message():
    assert one_line("a\nb\rc\td") == "a\\nb\\rc\\td"
    assert "\n" not in one_line(InputError("x\ny"))


# --- 9. assert_claim: a misspelt name is not a new variable ---------------------------------

def test_assert_claim_refuses_a_misspelt_name():
    with pytest.raises(UnknownNameError, match=r"unknown parameter 'alhpa' .*did you mean 'alpha'\?"):
        assert_claim("min(1, alpha) <= 1 + alhpa", where="alpha >= 0")
    with pytest.raises(UnknownNameError, match="alhpa"):  # used to pass: refuted with alhpa = -1
        assert_claim("min(1, alpha) <= 1 + alhpa", where="alpha >= 0", expect="refuted")
    with pytest.raises(UnknownNameError, match=r"definitions\['w'\]: unknown parameter 'alhpa'"):
        assert_claim("w <= 1", where="alpha >= 0", definitions={"w": "min(1, alhpa)"})
    with pytest.raises(UnknownNameError, match="'alhpa' occurs nowhere in the claim"):
        assert_claim("(1 - alpha)^+ nonincreasing in alhpa", where="alpha >= 0")
    with pytest.raises(UnknownNameError, match="declare the parameters"):
        assert_claim("min(1, alpha) <= 1 + alpha")


def test_assert_claim_readme_examples_still_work():
    assert assert_claim("min(1, alpha) <= 1 + alpha", where="alpha >= 0").status == "proved"
    assert assert_claim("min(1, alpha) <= 1 + beta", names=["alpha", "beta"], expect="refuted")
    assert assert_claim("(1 - alpha)^+ nonincreasing in alpha").status == "proved"


# --- 10. other inputs that used to be internal errors or silently ignored -------------------------

def test_claims_splitting_into_too_many_regimes_are_refused(tmp_path, capsys):
    bounds = "\n".join(f'h{i} = "alpha if alpha <= 1/2; 1 if alpha > 1/2 + 1/{i + 3}"' for i in range(13))
    text = BASE.replace('tin = "1 - alpha"', bounds).replace("inner <= outer", "inner <= 2")
    line = check_error(tmp_path, capsys, text)
    assert re.search(r"claims\[0\]\.statement: .* split it into 8192 sub-claims \(limit \d+\)", line), line


@pytest.mark.parametrize("mutate,message", [
    (lambda t: t.replace('statement = "inner <= outer"', 'statement = ""'), r"claims\[0\]\.statement: empty claim"),
    (lambda t: t.replace('statement = "inner <= outer"', 'statement = "   "'), r"claims\[0\]\.statement: empty claim"),
    (lambda t: t.replace('region = "alpha >= 0, gamma >= 0"', 'region = ""'), r"assume\.region: empty input"),
    (lambda t: t.replace('one = "1"', 'one = ""'), r"outer\.one: empty input"),
    (lambda t: t + 'where = ""\n', r"claims\[0\]\.where: empty input"),
    (lambda t: t.replace('one = "1"', 'one = "' + "(" * 200 + "1" + ")" * 200 + '"'), r"outer\.one: .*nested too deeply"),
    (lambda t: t.replace('one = "1"', 'one = "' + "1+" * 15000 + '1"'), r"outer\.one: input too long"),
    (lambda t: t.replace("[[claims]]", "[[claims]]\n[[claims]]"), r"claims\[0\]: each \[\[claims\]\] entry needs statement"),
    (lambda t: t.replace('[parameters]\nalpha = "cross-link exponent"\ngamma = "second exponent"\n', "[parameters]\n"),
     r"parameters: declare the parameters"),
])
def test_empty_and_huge_values(tmp_path, capsys, mutate, message):
    line = check_error(tmp_path, capsys, mutate(BASE))
    assert re.search(message, line), line


def test_an_empty_claim_region_names_the_key_and_line(tmp_path, capsys):
    line = check_error(tmp_path, capsys, BASE + 'where = "alpha < 0"\n')
    assert "case.toml: claims[0].where: the claim's region '" in line and "is empty at line 15" in line
    line = check_error(tmp_path, capsys, BASE.replace('"alpha >= 0, gamma >= 0"', '"alpha > 1, alpha < 1/2"'))
    assert "case.toml: assume.region: the claim's region" in line and "is empty at line 6" in line


def test_deeply_nested_network_value_is_an_input_error(tmp_path, capsys):
    nested = "[" * 900 + '"alpha"' + "]" * 900
    text = BASE.split("[outer]")[0] + NETWORK.replace('links = [["S", "D", "alpha"]]', f'links = [["S", "D", {nested}]]')
    line = check_error(tmp_path, capsys, text)
    assert "case.toml: " in line and "nested too deeply" in line


def test_two_claims_with_one_name_are_refused(tmp_path, capsys):
    text = BASE + '[[claims]]\nname = "tin below outer"\nstatement = "inner <= 1"\n'
    line = one_error(capsys, "check", write(tmp_path, text))
    assert "claims[1].name" in line and "already the name of claims[0]" in line


def test_gdof_network_reads_files_by_the_case_file_rules(tmp_path, capsys):
    bad = tmp_path / "bad.toml"
    bad.write_bytes(b'title = "\xff"\n')
    assert "not UTF-8" in one_error(capsys, "network", str(bad))
    big = tmp_path / "big.toml"
    big.write_text("x = " + "9" * 5001 + "\n")
    assert "too large" in one_error(capsys, "network", str(big))
