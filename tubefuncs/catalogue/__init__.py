"""The catalogue: every worksheet function, collected from the topic modules.

Each topic module of this package (``beam``, ``plasma``, ...) defines a list
``FUNCTIONS`` of :class:`~tubefuncs.catalogue.spec.Function`.  This package
collects them, in module order, into :data:`CATALOGUE` (worksheet name ->
Function).  Front ends and docs are generated from it.
"""

from __future__ import annotations

import importlib
import json
import os
import pkgutil
import sys

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


def _topics() -> list[str]:
    names = [m.name for m in pkgutil.iter_modules(__path__) if m.name != "spec"]
    names.sort(key=lambda n: (TOPIC_ORDER.index(n) if n in TOPIC_ORDER else len(TOPIC_ORDER), n))
    return names


def _collect() -> dict[str, Function]:
    found: dict[str, Function] = {}
    for module_name in _topics():
        module = importlib.import_module(f"{__name__}.{module_name}")
        for fn in getattr(module, "FUNCTIONS", ()):
            if fn.name in found:
                raise RuntimeError(f"catalogue: {fn.name} declared twice")
            found[fn.name] = fn
    return found


def __getattr__(attr):
    # CATALOGUE is collected on first use: importing every topic module (and
    # the physics and scipy modules behind them) is a large part of a
    # command-line start, and a workbook usually calls a few topics only.
    if attr == "CATALOGUE":
        catalogue = globals()["CATALOGUE"] = _collect()
        _save_index(catalogue)
        return catalogue
    raise AttributeError(f"module {__name__!r} has no attribute {attr!r}")


CATALOGUE: dict[str, Function]   # (worksheet name -> Function, collected on first use)


def lookup(name: str) -> Function | None:
    """Catalogue entry for a worksheet name (case-insensitive), or None.

    Imports only the topic module that declares the name when the name index
    (:func:`names`) is at hand; the whole catalogue otherwise.
    """
    key = name.upper()
    catalogue = globals().get("CATALOGUE")
    if catalogue is None:
        topic = _index().get(key)
        if topic is not None:
            module = importlib.import_module(f"{__name__}.{topic}")
            for fn in getattr(module, "FUNCTIONS", ()):
                if fn.name == key:
                    return fn
        catalogue = __getattr__("CATALOGUE")
    return catalogue.get(key)


def names() -> frozenset:
    """Every worksheet name of the catalogue, without importing the topic modules
    when the name index is at hand.

    The index (worksheet name -> topic module) is kept in the user's cache
    folder under a fingerprint of the catalogue's source files: any change to
    them makes it unusable, and the catalogue is then collected (and the index
    written again).  Where no cache folder can be used, the catalogue is
    collected on every start, as before.
    """
    global _NAMES
    if _NAMES is None or "CATALOGUE" in globals():
        index = None if "CATALOGUE" in globals() else _index()
        _NAMES = frozenset(index) if index else frozenset(__getattr__("CATALOGUE"))
    return _NAMES


# ----------------------------------------------------------------------------- name index

_INDEX: dict | None = None
_NAMES: frozenset | None = None


def _fingerprint() -> str:
    import hashlib

    from .. import __version__

    digest = hashlib.sha256(__version__.encode())
    folder = __path__[0]
    for file in sorted(os.listdir(folder)):
        if file.endswith(".py"):
            digest.update(file.encode() + b"\0")
            with open(os.path.join(folder, file), "rb") as fh:
                digest.update(fh.read())
    return digest.hexdigest()


def _index_path() -> str:
    base = os.environ.get("XDG_CACHE_HOME") or (
        os.environ.get("LOCALAPPDATA") if os.name == "nt" else None) or os.path.join(
        os.path.expanduser("~"), ".cache")
    return os.path.join(base, "tubefuncs", "catalogue-index.json")


def _index() -> dict:
    """``{worksheet name: topic}`` from the cache when it matches the sources, else {}."""
    global _INDEX
    if _INDEX is None:
        _INDEX = {}
        try:
            with open(_index_path(), encoding="utf-8") as fh:
                data = json.loads(fh.read(1 << 20))
            topics = set(_topics())
            if (isinstance(data, dict) and data.get("fingerprint") == _fingerprint()
                    and isinstance(data.get("names"), dict)
                    and all(isinstance(k, str) and v in topics
                            for k, v in data["names"].items())):
                _INDEX = dict(data["names"])
        except (OSError, ValueError):
            pass
    return _INDEX


def _save_index(catalogue: dict) -> None:
    """Write the name index for the next start (best effort, atomically)."""
    import tempfile

    try:
        names_to_topics = {name: _topic_of(fn) for name, fn in catalogue.items()}
        if not all(names_to_topics.values()):
            return
        path = _index_path()
        data = json.dumps({"fingerprint": _fingerprint(), "names": names_to_topics})
        if os.path.exists(path):
            with open(path, encoding="utf-8") as fh:
                if fh.read(1 << 20) == data:
                    return
        os.makedirs(os.path.dirname(path), exist_ok=True)
        fd, tmp = tempfile.mkstemp(prefix=".catalogue-", dir=os.path.dirname(path))
        try:
            with os.fdopen(fd, "w", encoding="utf-8") as fh:
                fh.write(data)
            os.replace(tmp, path)
        except BaseException:
            os.unlink(tmp)
            raise
    except OSError:
        pass


def _topic_of(fn: Function) -> str | None:
    """The topic module whose FUNCTIONS list holds ``fn``."""
    for topic in _topics():
        module = sys.modules.get(f"{__name__}.{topic}")
        if module is not None and any(f is fn for f in getattr(module, "FUNCTIONS", ())):
            return topic
    return None
