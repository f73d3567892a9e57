"""tubefuncs: RF-tube (klystron) physics as worksheet functions.

The Python twins of the worksheet functions are importable from here, in SI
units: ``tubefuncs.transit_angle(frequency, length, voltage)`` is the twin of
``=TUBE_TRANSIT_ANGLE(frequency, length, voltage)``.
"""

from __future__ import annotations

__version__ = "0.1.0"


def __getattr__(attr):
    # Python twins are resolved from the catalogue on first use, so that the
    # catalogue stays the one list of functions.  Dunder names and submodules
    # (``from tubefuncs import errors`` asks here first) never collect it.
    if attr.startswith("__") or _is_submodule(attr):
        raise AttributeError(f"module 'tubefuncs' has no attribute {attr!r}")
    from .catalogue import CATALOGUE

    for fn in CATALOGUE.values():
        if fn.python_name == attr:
            globals()[attr] = fn.func  # found once; later look-ups skip this hook
            return fn.func
    raise AttributeError(f"module 'tubefuncs' has no attribute {attr!r}")


def _is_submodule(attr: str) -> bool:
    import pkgutil

    return any(m.name == attr for m in pkgutil.iter_modules(__path__))


def __dir__():
    from .catalogue import CATALOGUE

    return sorted(set(globals()) | {fn.python_name for fn in CATALOGUE.values()})
