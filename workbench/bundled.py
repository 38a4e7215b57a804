"""The casebook that ships with the tool, and how a command names one of its cases.

Why: the demo manuscripts and published cases are how a new user meets the tool, and `gdof casebook`
is a regression run a user repeats after upgrading; both must work after a plain `pip install .`,
run from any folder.  pyproject.toml installs the repository's casebook/ as the package data
`workbench.casebook_data` (tests/test_packaging.py checks that every file is shipped); in a checkout
or an editable install the repository's own casebook/ is used instead.  Real paths (not
importlib.resources streams): case files are read by path and reports print the path they came from.

A case named on the command line is the file of that name when it exists (a local file always wins);
otherwise a bundled case named relative to the casebook, with or without `casebook/` in front and
`.toml` at the end (`demo/cache_downlink_manuscript.toml`, `casebook/demo/cache_downlink_manuscript`),
or by its bare name when only one case has it (`cache_downlink_manuscript`).
"""

from __future__ import annotations

import os
from pathlib import Path

from verifier.core.errors import InputError

HERE = Path(__file__).resolve().parent
INSTALLED = HERE / "casebook_data"          # a wheel's package data
CHECKOUT = HERE.parent / "casebook"         # the repository's folder (checkout, editable install)
CASE_HELP = ("a case file (TOML), or a bundled case such as demo/cache_downlink_manuscript.toml "
             "(gdof casebook --list names them)")


def casebook_root() -> Path | None:
    """The bundled casebook folder, or None when neither copy exists (a broken install)."""
    for folder in (INSTALLED, CHECKOUT):
        if folder.is_dir() and any(folder.rglob("*.toml")):
            return folder
    return None


def default_casebook() -> str:
    """What `gdof casebook` runs without a PATH: the bundled casebook, wherever the command runs."""
    root = casebook_root()
    if root is None:
        raise InputError("no bundled casebook found (the installation lacks workbench/casebook_data); "
                         "name case files or folders")
    return shown(root)


def shown(path: Path) -> str:
    """`path` relative to the current folder when it lies inside it (as a user would type it), else
    absolute: a table of case files stays readable in the repository and honest elsewhere."""
    rel = os.path.relpath(path)
    return str(path) if rel.startswith("..") else rel


def bundled_name(path) -> str | None:
    """The name of `path` inside the bundled casebook (`demo/...toml`), or None for any other file."""
    root = casebook_root()
    try:
        return Path(path).resolve().relative_to(root).as_posix() if root is not None else None
    except (ValueError, OSError):
        return None


def bundled_cases() -> list[str]:
    """Every bundled case as its name relative to the casebook (`demo/...toml`), sorted."""
    root = casebook_root()
    if root is None:
        return []
    return sorted(p.relative_to(root).as_posix() for p in root.rglob("*.toml"))


def _exists(name: str) -> bool:
    """Path.exists that answers False for names the system refuses (too long, a NUL byte): the loader
    reports those itself."""
    try:
        return Path(name).exists()
    except (OSError, ValueError):
        return False


def _relative(name: str) -> str:
    """`name` as a path inside the casebook: `./` and one leading `casebook/` dropped."""
    rel = name.replace("\\", "/")
    while rel.startswith("./"):
        rel = rel[2:]
    rel = rel.rstrip("/")
    return "" if rel == "casebook" else rel[len("casebook/"):] if rel.startswith("casebook/") else rel


def _candidates(name: str) -> list[str]:
    rel = _relative(name)
    rel = rel if rel.endswith(".toml") else rel + ".toml"
    cases = bundled_cases()
    if rel in cases:
        return [rel]
    return [c for c in cases if "/" not in rel and c.rsplit("/", 1)[-1] == rel]


def resolve_case(name: str) -> str:
    """The file a command should read for the case `name` (module docstring); `name` unchanged when it
    exists or names no bundled case (the loader then says the file is missing)."""
    if not name or _exists(name):
        return name
    hits = _candidates(name)
    return shown(casebook_root() / hits[0]) if len(hits) == 1 else name


def resolve_folder(name: str) -> str:
    """Like resolve_case for `gdof casebook PATH`: a missing local path may name a bundled shelf
    (`demo`, `casebook/published`) or case."""
    if not name or _exists(name):
        return name
    root, rel = casebook_root(), _relative(name)
    if root is not None and ".." not in rel.split("/") and not rel.startswith("/") and (root / rel).is_dir():
        return shown(root / rel)
    return resolve_case(name)
