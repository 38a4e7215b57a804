"""JSON rendering of a Report; the schema is documented in docs/report-schema.md.

Why every number is a string "p/q": JSON numbers are floats to most readers, and a counterexample
that went through a float is no longer a counterexample.  `fraction` reads such a string back.
"""

from __future__ import annotations

import json
from fractions import Fraction
from typing import Mapping

from verifier.expressions.expr import Affine, to_text
from verifier.expressions.region import Atom, Polyhedron
from verifier.report.build import ClaimReport, Report, constraint_text, num

SCHEMA_VERSION = 2


def fraction(text: str) -> Fraction:
    """Read back an exact number written by this module ("3/4", "-2")."""
    return Fraction(text)


def point_json(point: Mapping | None):
    return None if point is None else {k: num(v) for k, v in point.items()}


def affine_json(a: Affine) -> dict:
    return {"text": to_text(a), "coeffs": {n: num(c) for n, c in a.coeffs}, "const": num(a.const)}


def atom_json(atom: Atom) -> dict:
    return {"text": atom.text(), "form": affine_json(atom.form), "strict": atom.strict}


def polyhedron_json(p: Polyhedron) -> dict:
    return {"text": p.text(), "atoms": [atom_json(a) for a in p.atoms]}


def regime_json(row) -> dict:
    return {"index": row.index, "constraints": row.constraints,
            "pieces": [dict(polyhedron_json(p.polyhedron), dim=p.dim,
                            vertices=[point_json(v) for v in p.vertices],
                            rays=[point_json(v) for v in p.rays], lines=[point_json(v) for v in p.lines])
                       for p in row.polytopes],
            "point": point_json(row.point), "dim": row.dim,
            "sides": [{"label": s.label, "formula": affine_json(s.formula), "active": list(s.active)}
                      for s in row.sides],
            "verdict": row.verdict, "certified": row.certified, "note": row.note}


def counterexample_json(c) -> dict:
    return {"point": point_json(c.point), "lhs": num(c.lhs_value), "rhs": num(c.rhs_value),
            "difference": num(c.difference), "lhs_active": list(c.lhs_active),
            "rhs_active": list(c.rhs_active), "strictly_inside": c.strictly_inside, "origin": c.origin}


def failure_json(f, names=()) -> dict | None:
    if f is None:
        return None
    pieces = [{"regime": p.regime, "obligation": p.obligation, "region": polyhedron_json(p.polyhedron),
               "display": constraint_text(p.polyhedron.atoms, names),
               "dim": p.dim, "full_dimensional": p.full_dimensional, "point": point_json(p.point),
               "worst_value": None if p.worst_value is None else num(p.worst_value),
               "worst_point": point_json(p.worst_point), "worst_attained": p.worst_attained}
              for p in f.pieces]
    return {"pieces": pieces, "full_dimensional": f.full_dimensional,
            "share": None if f.share is None else num(f.share), "share_note": f.share_note}


def exact_sets_json(op) -> dict | None:
    """Where the claim holds and fails exactly (verifier.regimes.optimality); null when not computed."""
    if op is None:
        return None
    from verifier.regimes.optimality import sentences
    holds, fails, within = sentences(op)
    return {"parameters": list(op.names),
            "within": None if op.within is None else polyhedron_json(Polyhedron(op.within)),
            "holds": [polyhedron_json(Polyhedron(p)) for p in op.holds],
            "fails": [polyhedron_json(Polyhedron(p)) for p in op.fails],
            "holds_points": [point_json(x) for x in op.holds_points],
            "fails_points": [point_json(x) for x in op.fails_points],
            "holds_text": holds, "fails_text": fails, "within_text": within,
            "slice": {n: to_text(e) for n, e in op.substituted}}


def section_json(s: ClaimReport) -> dict:
    return {"name": s.name, "label": s.label, "statement": s.statement, "kind": s.kind,
            "status": s.status, "expected": s.expect, "method": s.method, "detail": s.detail,
            "parameters": list(s.names), "sides": list(s.labels),
            "regimes": [regime_json(r) for r in s.regimes],
            "thresholds": [{"text": t.text, "form": affine_json(t.form), "between": [list(b) for b in t.between]}
                           for t in s.thresholds],
            "failure": failure_json(s.failure, s.names),
            "exact_sets": exact_sets_json(s.optimality),
            "counterexamples": [counterexample_json(c) for c in s.counterexamples],
            "bounds": [{"side": p.side, "name": p.name, "redundant": p.redundant,
                        "active_in": list(p.active_in), "unique_in": list(p.unique_in)} for p in s.parts],
            "gaps": [{"direction": g.direction, "value": None if g.value is None else num(g.value),
                      "point": point_json(g.point), "attained": g.attained, "regime": g.regime}
                     for g in s.gaps],
            "smt": {"solver": s.smt_solver, "status": s.smt_status, "agree": s.agree},
            "certified": s.certified, "rechecked": s.checked, "cells": s.cells, "seconds": f"{s.seconds:.4f}"}


def report_json(report: Report) -> dict:
    """The report as plain JSON data (dicts, lists, strings, bools, ints, null)."""
    return {"schema": "gdof-report", "schema_version": SCHEMA_VERSION, "title": report.title,
            "source": report.source, "solver": report.solver, "versions": dict(report.versions),
            "summary": report.status_counts,
            "claims": [{"name": c.name, "statement": c.statement, "status": c.status, "expected": c.expect,
                        "notes": list(c.notes), "parts": [section_json(s) for s in c.sections],
                        "regions": [region_json(r) for r in c.regions]}
                       for c in report.claims],
            "caution": report.caution}


def region_json(item) -> dict:
    """Exact data (numbers as strings, as the rest of the report JSON)."""
    from verifier.rates.regimes import RegionNotShown
    from verifier.regimes.optimality import union_text
    if isinstance(item, RegionNotShown):
        return {"region": item.name, "shown": False, "reason": item.reason, "see": item.see or None}
    rr = item
    rows = [{"index": i, "text": rr.row_label(i)} for i in range(len(rr.rows))]
    regimes = [{"index": g.index, "where": union_text(g.pieces, names=rr.names), "point": point_json(g.point), "dim": g.dim,
                "cells": g.cells, "status": list(g.status), "bounds": [None if b is None else affine_json(b) for b in g.bounds],
                "corners": [[affine_json(f) for f in c] for c in g.corners]} for g in rr.regimes]
    cuts = [{"text": t.text, "form": affine_json(t.form) if t.form is not None else None,
             "between": [list(b) for b in t.between], "changes": list(t.changes)} for t in rr.thresholds]
    return {"region": rr.region.name, "shown": True, "rates": list(rr.region.rates), "parameters": list(rr.names),
            "rows": rows, "bounded": rr.bounded, "pointed": rr.pointed, "regimes": regimes, "thresholds": cuts}


def render_json(report: Report) -> str:
    return json.dumps(report_json(report), indent=2, ensure_ascii=False) + "\n"
