"""The catalogue: every worksheet function, collected from the topic modules.

Each topic module of this package (``beam``, ``plasma``, ...) defines a list
``FUNCTIONS`` of :class:`~tubefuncs.catalogue.spec.Function`.  This package
collects them, in module order, into :data:`CATALOGUE` (worksheet name ->
Function).  Front ends and docs are generated from it.
"""

from __future__ import annotations

import importlib
import pkgutil

from .spec import (  # noqa: F401  (re-exported)
    CAUTION_COOLING,
    CAUTION_HV,
    CAUTION_RF,
    FINITE,
    NONNEGATIVE,
    POSITIVE,
    REQUIRED,
    Check,
    Domain,
    Function,
    Param,
    between,
)

#: Order of topics in the docs; modules not listed come after, alphabetically.
TOPIC_ORDER = ("beam", "plasma", "gap", "cavity", "gain", "power", "link", "utility")


def _collect() -> dict[str, Function]:
    names = [m.name for m in pkgutil.iter_modules(__path__) if m.name != "spec"]
    names.sort(key=lambda n: (TOPIC_ORDER.index(n) if n in TOPIC_ORDER else len(TOPIC_ORDER), n))
    found: dict[str, Function] = {}
    for module_name in names:
        module = importlib.import_module(f"{__name__}.{module_name}")
        for fn in getattr(module, "FUNCTIONS", ()):
            if fn.name in found:
                raise RuntimeError(f"catalogue: {fn.name} declared twice")
            found[fn.name] = fn
    return found


CATALOGUE: dict[str, Function] = _collect()


def lookup(name: str) -> Function | None:
    """Catalogue entry for a worksheet name (case-insensitive), or None."""
    return CATALOGUE.get(name.upper())
