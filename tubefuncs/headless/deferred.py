"""Load the `formulas` function library without its heaviest imports.

The statistics module of `formulas` (which holds MAX, MIN, AVERAGE, COUNT...)
imports ``scipy.stats``, ``scipy.linalg`` and ``scipy.interpolate`` at its
top: about half a second, more than everything else a small workbook needs,
for a handful of functions (KURT, SKEW, CONFIDENCE, FORECAST, PERCENTRANK...)
that few workbooks call.  :func:`import_formulas_statistics` imports that
module with stand-ins for the three scipy modules; each stand-in loads the
real module on its first use, so those functions still work, unchanged.
"""

from __future__ import annotations

import importlib
import sys
import types

#: scipy modules the statistics module imports at its top.
_SCIPY = ("scipy.stats", "scipy.linalg", "scipy.interpolate")
_STATISTICS = "formulas.functions.stat"


class _Deferred(types.ModuleType):
    """Stands for a module not imported yet: the first attribute read imports it."""

    __spec__ = None

    def __getattr__(self, attr):
        if attr.startswith("__"):
            raise AttributeError(attr)
        return getattr(importlib.import_module(self.__name__), attr)


def _deferred_callable(module: str, attr: str):
    def call(*args, **kwargs):
        return getattr(importlib.import_module(module), attr)(*args, **kwargs)
    call.__name__ = call.__qualname__ = attr
    call.__doc__ = f"{module}.{attr}, imported on first call."
    return call


def import_formulas_statistics():
    """Import ``formulas.functions.stat`` with its scipy imports deferred (once)."""
    if _STATISTICS in sys.modules:
        return sys.modules[_STATISTICS]
    import scipy  # noqa: F401  (the real package; only its submodules are deferred)

    installed = []
    for name in _SCIPY:
        if name in sys.modules:
            continue
        stand_in = _Deferred(name)
        if name == "scipy.interpolate":   # imported by name: ``from ... import interp1d``
            stand_in.interp1d = _deferred_callable(name, "interp1d")
        sys.modules[name] = stand_in
        installed.append(name)
    try:
        return importlib.import_module(_STATISTICS)
    finally:
        for name in installed:
            if isinstance(sys.modules.get(name), _Deferred):
                del sys.modules[name]
