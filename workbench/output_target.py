"""Checks on where `report --out` and `bundle` will write, made before the (long) proof runs.

Why up front: a proof can take minutes; finding out afterwards that the folder is missing or
read-only wastes them, and `bundle --force` onto `.` or onto a folder holding the case file would
delete the user's own work.  Writability is tested the only reliable way, by creating and removing a
temporary file in the folder (permission bits lie under root, ACLs and read-only mounts).
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

from verifier.core.errors import InputError


def shown_path(path) -> str:
    """A path for a one-line message: control characters (a newline in a file name) escaped."""
    text = os.fsdecode(path) if isinstance(path, (bytes, os.PathLike)) else str(path)
    return "".join(ch if ch.isprintable() else repr(ch)[1:-1] for ch in text)


def _why(exc: OSError) -> str:
    return exc.strerror or type(exc).__name__


def _probe(folder: Path, what: str) -> None:
    """Refuse unless a file can be created (and removed) in `folder`."""
    try:
        fd, tmp = tempfile.mkstemp(prefix=".gdof-probe-", dir=folder)
    except OSError as exc:
        raise InputError(f"{what}: cannot write into folder '{shown_path(folder)}': {_why(exc)}") from None
    os.close(fd)
    try:
        os.unlink(tmp)
    except OSError:
        pass


def _existing_ancestor(folder: Path, what: str) -> Path:
    """The nearest folder that exists on the way up from `folder`; a file on the way is refused."""
    probe = folder
    while not probe.exists():
        if probe.is_symlink():
            raise InputError(f"{what}: '{shown_path(probe)}' is a dangling symbolic link")
        probe = probe.parent
    if not probe.is_dir():
        raise InputError(f"{what}: '{shown_path(probe)}' is a file, not a folder")
    return probe


def check_output_file(path, what: str = "report --out", keep=()) -> None:
    """`report --out FILE`: the file is written atomically by a sibling temporary and a rename, so
    its folder must exist and be writable, and FILE itself must not be a folder nor one of the
    input files `keep` (the case file would be replaced by its own report)."""
    if str(path) == "":
        raise InputError(f"{what}: empty file name")
    target = Path(path)
    shown = shown_path(path)
    for source in keep:
        if os.path.realpath(path) == os.path.realpath(source):
            raise InputError(f"{what}: '{shown}' is the input file '{shown_path(source)}'; "
                             "give another file name")
    if target.is_dir():
        raise InputError(f"{what}: '{shown}' is a folder; give a file name")
    if target.exists() and not target.is_file():
        raise InputError(f"{what}: '{shown}' is not a regular file")
    folder = target.parent
    if not folder.exists():
        raise InputError(f"{what}: folder '{shown_path(folder)}' of '{shown}' does not exist")
    if not folder.is_dir():
        raise InputError(f"{what}: '{shown_path(folder)}' is a file, not a folder")
    _probe(folder, what)


def _inside(child: Path, parent: Path) -> bool:
    return child == parent or parent in child.parents


def check_bundle_target(outdir, case_path, force: bool, what: str = "bundle") -> None:
    """`bundle CASE OUTDIR`: OUTDIR is new (or replaced with --force), so it must not hold the case
    file or the current folder, and the folder it goes into must be creatable and writable."""
    if str(outdir) == "":
        raise InputError(f"{what}: empty folder name")
    shown = shown_path(outdir)
    out = Path(os.path.realpath(outdir))
    cwd = Path(os.path.realpath(os.getcwd()))
    if _inside(cwd, out):
        raise InputError(f"{what}: '{shown}' is the current folder or contains it; "
                         "name a new folder for the bundle")
    if case_path is not None and _inside(Path(os.path.realpath(case_path)), out):
        raise InputError(f"{what}: '{shown}' contains the case file '{shown_path(case_path)}'; "
                         "name a new folder for the bundle")
    if out.exists() or Path(outdir).is_symlink():
        if not out.is_dir():
            raise InputError(f"{what}: '{shown}' exists and is not a folder")
        if not force:
            raise InputError(f"{what}: '{shown}' already exists (use --force to replace it)")
        if not looks_like_bundle(out):
            raise InputError(f"{what}: '{shown}' exists and is not an earlier bundle (no versions.txt "
                             "written by gdof); --force replaces only bundles")
    _probe(_existing_ancestor(Path(os.path.abspath(outdir)).parent, what), what)


def looks_like_bundle(folder: Path) -> bool:
    """An earlier bundle of ours: its versions.txt starts with the line we write."""
    try:
        first = (Path(folder) / "versions.txt").read_text(encoding="utf-8").splitlines()[:1]
    except (OSError, UnicodeDecodeError):
        return False
    return first == ["gdof report bundle"]


def write_error(exc: OSError, target, what: str) -> InputError:
    """An OSError while writing output (full disk, permission) as a one-line input-side error."""
    return InputError(f"{what}: cannot write '{shown_path(target)}': {_why(exc)}")
