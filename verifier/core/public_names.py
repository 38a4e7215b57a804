"""A subpackage's public names, imported only when first used (PEP 562 module __getattr__).

Why lazy: `from verifier.regimes import prove_by_regimes` should work, and each subpackage's
`__init__` should list what it offers, but importing one small module of a subpackage (the one-shot
`gdof check` needs verifier.claims.one_shot, not the region-wise prover) must not load all its siblings.
"""

from __future__ import annotations

from importlib import import_module


def lazy_names(package: str, table: dict[str, tuple[str, ...]]):
    """(__all__, __getattr__, __dir__) for `package`, whose public names live in the modules of
    `table` (module name within the package -> the names it provides)."""
    where = {name: module for module, names in table.items() for name in names}

    def __getattr__(name: str):
        if name not in where:
            raise AttributeError(f"module {package!r} has no attribute {name!r}")
        return getattr(import_module(f"{package}.{where[name]}"), name)

    def __dir__():
        return sorted(where)

    return sorted(where), __getattr__, __dir__
