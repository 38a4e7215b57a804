"""What `pip install .` ships: every package of the source tree and every casebook file (as the package
data workbench.casebook_data), and how a command finds a bundled case from any folder.

Why: pyproject.toml lists its packages by name (the casebook is mapped into the package tree, which
`packages.find` cannot express), so a new subpackage or case file could silently be left out of a
non-editable install; these tests compare the list with the folders.  The install itself is checked by
hand (README: a throwaway venv), as a test would need the network or a wheel build.
"""

import fnmatch
import tomllib
from pathlib import Path

import pytest

from workbench import bundled
from workbench.cli import main

ROOT = Path(__file__).resolve().parent.parent
SETUPTOOLS = tomllib.loads((ROOT / "pyproject.toml").read_text())["tool"]["setuptools"]
DATA = "workbench.casebook_data"


def _source_packages() -> set[str]:
    return {".".join(p.parent.relative_to(ROOT).parts)
            for top in ("verifier", "bounds", "workbench") for p in (ROOT / top).rglob("__init__.py")}


def _shipped(package: str) -> Path:
    """The folder a listed package is built from (package-dir maps the casebook)."""
    for name, folder in SETUPTOOLS.get("package-dir", {}).items():
        if package == name or package.startswith(name + "."):
            rest = package[len(name) + 1:]
            return ROOT / folder / Path(*rest.split(".")) if rest else ROOT / folder
    return ROOT / Path(*package.split("."))


def test_every_source_package_is_listed():
    listed = {p for p in SETUPTOOLS["packages"] if not p.startswith(DATA)}
    assert listed == _source_packages()


def test_package_data_ships_every_casebook_file():
    shipped = set()
    for package in SETUPTOOLS["packages"]:
        folder = _shipped(package)
        for pattern in SETUPTOOLS.get("package-data", {}).get(package, []):
            shipped |= {p for p in folder.glob(pattern) if p.is_file()}
    in_repo = {p for p in (ROOT / "casebook").rglob("*") if p.is_file() and "__pycache__" not in p.parts}
    assert in_repo and shipped == in_repo


def test_every_casebook_folder_is_a_listed_package():
    folders = {p for p in (ROOT / "casebook").rglob("*") if p.is_dir() and p.name != "__pycache__"}
    listed = {_shipped(p) for p in SETUPTOOLS["packages"] if p.startswith(DATA)}
    assert listed == folders | {ROOT / "casebook"}


# --- naming a bundled case ---------------------------------------------------------------------

README_CASE = "demo/cache_downlink_manuscript.toml"   # the README's headline case


@pytest.fixture
def elsewhere(tmp_path, monkeypatch):
    """The current folder is an empty one, as after `pip install` in a fresh shell."""
    monkeypatch.chdir(tmp_path)
    return tmp_path


@pytest.mark.parametrize("name", [README_CASE, "casebook/" + README_CASE, "demo/cache_downlink_manuscript",
                                  "cache_downlink_manuscript", "./" + README_CASE])
def test_a_bundled_case_is_found_from_any_folder(elsewhere, name):
    found = Path(bundled.resolve_case(name))
    assert found.is_absolute() and found.read_bytes() == (ROOT / "casebook" / README_CASE).read_bytes()


def test_a_local_file_wins_and_unknown_names_stay_as_given(elsewhere):
    (elsewhere / "demo").mkdir()
    (elsewhere / README_CASE).write_text("title = 'mine'\n")
    assert bundled.resolve_case(README_CASE) == README_CASE
    for name in ("demo/none.toml", "../demo/cache_downlink_manuscript.toml", "x" * 5000, ""):
        assert bundled.resolve_case(name) == name


def test_the_installed_copy_is_preferred(tmp_path, monkeypatch):
    installed = tmp_path / "casebook_data"
    (installed / "demo").mkdir(parents=True)
    (installed / "demo" / "only_here.toml").write_text("title = 'x'\n")
    monkeypatch.setattr(bundled, "INSTALLED", installed)
    monkeypatch.chdir(tmp_path)
    assert bundled.bundled_cases() == ["demo/only_here.toml"]
    assert bundled.resolve_case("only_here") == "casebook_data/demo/only_here.toml"
    assert bundled.resolve_folder("demo") == "casebook_data/demo"


def test_casebook_list_names_every_bundled_case(elsewhere, capsys):
    assert main(["casebook", "--list"]) == 0
    names = [line.split()[0] for line in capsys.readouterr().out.splitlines()]
    assert names == sorted(p.relative_to(ROOT / "casebook").as_posix()
                           for p in (ROOT / "casebook").rglob("*.toml"))


def test_check_runs_a_bundled_case_by_name(elsewhere, capsys):
    assert main(["check", "--claim", "Lemma 1", README_CASE]) == 0
    assert "Lemma 1: the scheme never exceeds the converse -- proved" in capsys.readouterr().out
