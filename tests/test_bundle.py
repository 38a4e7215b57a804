"""gdof bundle: every file present, atomic writes, and a main.tex that compiles when pdflatex exists."""

import json
import shutil
import subprocess

import pytest

from report_fixtures import DEMO, DEMO_WRONG, section
from verifier.core.errors import InputError
from verifier.report.build import build_report
from workbench import bundle_cmd
from workbench.cli import main

FILES = ["report.md", "report.tex", "main.tex", "report.json", "counterexamples.json",
         "counterexamples.csv", "versions.txt", "plots/claim01_slice.png", "plots/claim01_slice.pdf",
         "plots/claim01_map.png", "plots/claim01_map.pdf"]


@pytest.fixture(scope="module")
def report():
    return build_report(section(DEMO, DEMO_WRONG), title="demo")


@pytest.fixture(scope="module")
def bundle(report, tmp_path_factory):
    return bundle_cmd.write_bundle(report, tmp_path_factory.mktemp("b") / "out", str(DEMO))


def test_all_files_present_and_not_empty(bundle):
    for name in FILES:
        assert (bundle / name).stat().st_size > 0, name
    assert "asymptotic in SNR" in (bundle / "versions.txt").read_text()
    assert "z3" in (bundle / "versions.txt").read_text()


def test_counterexample_files_are_exact(bundle, report):
    cex = report.sections[0].counterexamples
    data = json.loads((bundle / "counterexamples.json").read_text())["counterexamples"]
    assert [d["point"] for d in data] == [{k: str(v) for k, v in c.point.items()} for c in cex]
    rows = (bundle / "counterexamples.csv").read_text().splitlines()
    assert rows[0].startswith("claim,part,regime,regime_constraints,alpha,gamma,lhs,rhs") and \
        len(rows) == 1 + len(cex)


def test_csv_rows_name_the_regime_holding_each_point_and_the_active_bounds(bundle, report):
    """Checked against the report's own regime table: the row's constraints, read back as a region,
    contain the row's point, and the active bounds are those of the re-checked counterexample."""
    import csv
    from fractions import Fraction
    from verifier.text.parse import parse_region
    rows = list(csv.DictReader((bundle / "counterexamples.csv").open()))
    cex = report.sections[0].counterexamples
    assert rows and len(rows) == len(cex)
    tables = {str(r.index): r.constraints for r in report.sections[0].regimes}
    for row, c in zip(rows, cex):
        point = {n: Fraction(row[n]) for n in ("alpha", "gamma")}
        assert row["regime"] in tables and row["regime_constraints"] == tables[row["regime"]]
        assert parse_region(row["regime_constraints"]).contains(point)
        assert row["lhs_active"] == "; ".join(c.lhs_active) and row["rhs_active"] == "; ".join(c.rhs_active)
        assert row["lhs_active"] and row["rhs_active"]
    assert len({row["regime"] for row in rows}) > 1   # the demo's failures lie in several regimes


def test_a_forgotten_regime_is_a_csv_row_with_its_uncovered_point(tmp_path):
    from workbench.bundled import resolve_case
    from workbench.check_cmd import select
    from workbench.casefile import load_case
    from workbench.report_cmd import case_report
    case = load_case(resolve_case("demo/z_uplink_manuscript.toml"))
    claims = select(case, ["Theorem 1: the scheme meets"])
    text = bundle_cmd.counterexamples_csv(case_report(case, claims))
    head, row = text.splitlines()
    # the point the coverage obligation finds (gdof check prints the same: alpha = 3, beta = 1)
    assert head.startswith("claim,part,regime,regime_constraints,alpha,beta,lhs")
    assert "coverage of 'scheme',,,3,1,,," in row and row.endswith("no regime of 'scheme' contains this point")
    point = {"alpha": 3, "beta": 1}
    assert case.assume.contains(point) and not any(p.where.contains(point) for p in case.piecewise["scheme"].pieces)


def _no_leftovers(parent):
    return [p.name for p in parent.iterdir() if p.name.startswith(".")] == []


def test_failure_mid_write_leaves_no_bundle(report, tmp_path, monkeypatch):
    def boom(*args, **kwargs):
        raise RuntimeError("disk full (simulated)")
    monkeypatch.setattr(bundle_cmd, "save_figure", boom)
    with pytest.raises(RuntimeError):
        bundle_cmd.write_bundle(report, tmp_path / "out")
    assert not (tmp_path / "out").exists() and _no_leftovers(tmp_path)


def _old_bundle(out):
    out.mkdir()
    (out / "versions.txt").write_text("gdof report bundle\n")
    (out / "keep.txt").write_text("old")


def test_force_never_replaces_a_folder_that_is_not_a_bundle(report, tmp_path):
    out = tmp_path / "out"
    out.mkdir()
    (out / "thesis.tex").write_text("months of work")
    with pytest.raises(InputError, match="not an earlier bundle"):
        bundle_cmd.write_bundle(report, out, force=True)
    assert (out / "thesis.tex").read_text() == "months of work"


def test_existing_folder_refused_then_kept_on_failed_force(report, tmp_path, monkeypatch):
    out = tmp_path / "out"
    _old_bundle(out)
    with pytest.raises(InputError, match="already exists"):
        bundle_cmd.write_bundle(report, out)
    monkeypatch.setattr(bundle_cmd, "counterexamples_csv", lambda r: 1 / 0)
    with pytest.raises(ZeroDivisionError):
        bundle_cmd.write_bundle(report, out, force=True)
    assert (out / "keep.txt").read_text() == "old" and _no_leftovers(tmp_path)


def test_force_replaces(report, tmp_path):
    out = tmp_path / "out"
    _old_bundle(out)
    bundle_cmd.write_bundle(report, out, force=True)
    assert not (out / "keep.txt").exists() and (out / "report.md").exists() and _no_leftovers(tmp_path)


def test_cli_refuses_existing_outdir_before_proving(tmp_path, capsys):
    (tmp_path / "out").mkdir()
    assert main(["bundle", str(DEMO), str(tmp_path / "out")]) == 2
    assert "already exists" in capsys.readouterr().err


def test_main_tex_compiles(bundle, tmp_path):
    if not shutil.which("pdflatex"):
        pytest.skip("pdflatex is not installed on this machine; main.tex compilation not checked")
    work = tmp_path / "tex"
    shutil.copytree(bundle, work)
    proc = subprocess.run(["pdflatex", "-interaction=nonstopmode", "-halt-on-error", "main.tex"],
                          cwd=work, capture_output=True, text=True, timeout=120)
    assert proc.returncode == 0, proc.stdout[-2000:]
    assert (work / "main.pdf").stat().st_size > 0
