"""`gdof network`: a network description becomes a case start whose cut-set bounds the engine can use."""

import tomllib

from verifier.claims.kinds import relation
from verifier.claims.one_shot import prove
from verifier.expressions.expr import max_, min_, param
from verifier.expressions.region import Region, atoms_of
from verifier.text.parse import parse_expr
from workbench.cli import main

NET = "examples/two_hop_relay.toml"


def test_network_fragment_is_a_loadable_case_with_the_relay_cutset(capsys, tmp_path):
    assert main(["network", NET]) == 0
    text = capsys.readouterr().out
    data = tomllib.loads(text)
    outer = min_(*(parse_expr(v, data["parameters"]) for v in data["outer"].values()))
    sd, sr, rd = param("sd"), param("sr"), param("rd")
    # Single relay cut-set GDoF min(max(sd, sr), max(sd, rd)): Avestimehr, Diggavi, Tse, "Wireless network
    # information flow: a deterministic approach", IEEE Trans. IT 57(4), 2011 (from memory).
    known = min_(max_(sd, sr), max_(sd, rd))
    region = Region.of(*[a for n in (sd, sr, rd) for a in atoms_of(n, ">=", 0)])
    assert prove(relation(outer, "==", known, region)).status == "proved"
    case = tmp_path / "case.toml"
    case.write_text(text + '[[claims]]\nstatement = "outer == min(max(sd, sr), max(sd, rd))"\n')
    assert main(["check", str(case)]) == 0


def test_network_errors_are_one_line(capsys, tmp_path):
    bad = tmp_path / "net.toml"
    bad.write_text('[parameters]\na = "x"\n[network]\nnodes = { S = "transmitter" }\nlinks = [["S", "D", "b"]]\n')
    assert main(["network", str(bad)]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "net.toml: network:" in err
