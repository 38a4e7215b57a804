"""`gdof network NET.toml`: start a case from a network description.

Reads a TOML file with `[parameters]` and a `[network]` table (nodes, links with exponents, messages;
see bounds/network.py) and prints a case-file skeleton whose `[outer]` table holds the network's cut-set
bounds, each under a readable cut name, ready for the user to add schemes and claims.
"""

from __future__ import annotations

from pathlib import Path

from bounds.fragment import case_fragment
from bounds.network import from_mapping
from verifier.core.errors import CaseFileError, InputError


def configure(p) -> None:
    p.add_argument("file", help="TOML file with [parameters] and [network]")
    p.add_argument("--message", action="append", default=None, metavar="NAME",
                   help="bound only these messages' (sum-)GDoF (repeatable; default all)")


configure.solver_options = False


def _read(path: str) -> dict:
    """The file's tables with exact numbers (the case-file reader's rules: one-line errors)."""
    from .casefile import exact_table, read_toml
    text, data = read_toml(path)
    return exact_table(path, text, data, "file")


def run(args) -> int:
    data = _read(args.file)
    params = data.get("parameters", {})
    if "network" not in data:
        raise CaseFileError(f"{args.file}: network: missing [network] table")
    try:
        net = from_mapping(data["network"], list(params) or None)
        fragment = case_fragment(net, args.message)
    except InputError as err:
        raise CaseFileError(f"{args.file}: network: {err}") from None
    names = sorted(params) or sorted(net.params())
    head = [f'title = "Cut-set bounds of {Path(args.file).stem}"', "", "[parameters]"]
    head += [f'{n} = "{params.get(n, "link exponent")}"' for n in names]
    head += ["", "[assume]", 'region = "' + ", ".join(f"{n} >= 0" for n in names) + '"', ""]
    print("\n".join(head) + fragment)
    return 0
