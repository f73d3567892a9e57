"""Units at the boundary: worksheet text -> SI floats, SI results -> requested unit.

One :class:`pint.UnitRegistry` for the package.  A unit text is parsed once
and its outcome (an SI value, or the reason it cannot be read) is cached, so a
recalculation never parses the same text twice.  Parsing is case-sensitive:
``mm`` and ``Mm`` differ by 10^9.

dBm and dBW are plain, tested functions here (pint's logarithmic units are
still marked beta): a power argument accepts ``"43 dBm"``; a power result
accepts ``unit="dBW"``.

Only a number followed by a unit expression is accepted.  The text is checked
against a narrow pattern before pint sees it, so that no text can make pint
evaluate huge integer powers (``"9**9**9 m"`` would hang the evaluator).
"""

from __future__ import annotations

import math
import re

import numpy as np


def _registry():
    """The package's unit registry, from pint's on-disk definition cache when it can.

    Building the registry from pint's definition files costs about 0.3 s, a
    large part of a command-line recalculation; pint's own cache (in the
    user's cache folder) brings it to about 15 ms.  Where that folder cannot
    be used, the registry is built without it.
    """
    pint = _import_pint()

    try:
        registry = pint.UnitRegistry(cache_folder=":auto:")
    except Exception:  # unwritable cache folder, missing platformdirs, ...
        registry = pint.UnitRegistry()
    # Perveance: the trade's unit is the perv (A/V^1.5); "uperv" is micro-perv.
    registry.define("perv = ampere / volt ** 1.5")
    return registry


def _import_pint():
    """Import pint without its optional dask support.

    pint looks for dask at import and, when it is installed, imports it: 60 ms
    of a 0.13 s import, for arrays this package never gives pint.  The dask
    package stays importable for everyone else afterwards.
    """
    import sys

    hide = "pint" not in sys.modules and "dask" not in sys.modules
    if hide:
        sys.modules["dask"] = None   # the import system's "not installed"
    try:
        import pint
    finally:
        if hide and "dask" in sys.modules and sys.modules["dask"] is None:
            del sys.modules["dask"]
    return pint


class _Registry:
    """:data:`ureg`: the one :class:`pint.UnitRegistry`, built on first use.

    Importing pint and loading its definitions costs about 0.1 s, and most
    recalculations read no unit text at all (numbers in SI need no pint).
    """

    __slots__ = ()
    _built = None

    def __getattr__(self, attr):
        built = _Registry._built
        if built is None:
            built = _Registry._built = _registry()
        return getattr(built, attr)

    def __repr__(self) -> str:
        return "<tubefuncs unit registry (pint)>"


ureg = _Registry()

#: Longest unit text accepted (a cell of unit text is short).
MAX_TEXT = 64

_NUMBER = r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d{1,3})?"
_NUMBER_RE = re.compile(rf"^\s*({_NUMBER})\s*$")
_QUANTITY_RE = re.compile(rf"^\s*({_NUMBER})\s*(.*?)\s*$")
# Unit expressions: letters (incl. micro signs, ohm, degree), digits of at most
# two figures (exponents such as m**2, m^-1), operators and parentheses.
_UNIT_RE = re.compile(r"^[A-Za-z_µμΩ°%][A-Za-z_µμΩ°%0-9 /*^.\-()·]*$")
_LONG_DIGITS = re.compile(r"\d{3,}|\*\*\s*[-+]?\d+\s*\*\*|\^\s*[-+]?\d+\s*\^")
_DB_POWER_RE = re.compile(rf"^\s*({_NUMBER})\s*(dBm|dBW)\s*$")
_DEGREES_C = re.compile(r"(?<![A-Za-z_])(degC|°C|celsius|degree_Celsius)(?![A-Za-z_])")
_DEGREES_F = re.compile(r"(?<![A-Za-z_])(degF|°F|fahrenheit|degree_Fahrenheit)(?![A-Za-z_])")

#: Names of dimensions for messages, by default SI unit of the argument.
DIMENSION_NAMES = {
    "V": ("voltage", "80 kV"), "A": ("current", "12 A"), "m": ("length", "12 mm"),
    "Hz": ("frequency", "2.998 GHz"), "W": ("power", "2 MW"), "s": ("time", "5 us"),
    "ohm": ("resistance", "45 ohm"), "S": ("conductance", "2 mS"),
    "S/m": ("conductivity", "58 MS/m"), "T": ("magnetic flux density", "0.12 T"),
    "rad": ("angle", "90 deg"), "K": ("temperature difference", "10 K"),
    "m**2": ("area", "2 cm**2"), "A/V**1.5": ("perveance", "1.8 uperv"),
    "1/s": ("rate", "100 Hz"), "m**3/s": ("volume flow", "120 L/min"),
    "kg/s": ("mass flow", "2 kg/s"), "m/s": ("velocity", "150000 km/s"),
    "": ("plain number", "0.6"),
}


#: Units of the trade that pint keeps in another system of units: the gauss
#: (CGS-Gaussian in pint) is read as 1e-4 T, as solenoid data sheets mean it
#: (1 G = 1e-4 T, SI Brochure 9th ed., Table 9).
TRADE_UNITS = {"T": {"G": 1e-4, "gauss": 1e-4, "kG": 0.1, "kgauss": 0.1, "mG": 1e-7}}


class UnitTextError(ValueError):
    """A unit text that cannot be read; the message is for the user."""


def dimension_name(unit: str) -> tuple[str, str]:
    """(name, example) of the dimension of an SI unit, for messages."""
    return DIMENSION_NAMES.get(unit, (f"quantity in {unit}", f"1 {unit}"))


def _dimensionality(unit: str):
    return ureg.parse_units(unit).dimensionality if unit else ureg.dimensionless.dimensionality


_PARSED: dict[tuple, float | str] = {}
#: Entries kept in each unit-text cache (keys are at most MAX_TEXT characters).
MAX_CACHED = 100_000

#: dB-valued arguments, by the suffix of their name: the unit texts each accepts
#: and the offset to add (a level in dBm given for dBW is 30 dB lower).
DB_LEVELS = {
    "_db": {"dB": 0.0},
    "_dbi": {"dBi": 0.0, "dB": 0.0},
    "_dbw": {"dBW": 0.0, "dBm": -30.0},
    "_dbk": {"dB/K": 0.0, "dBK": 0.0, "dB K^-1": 0.0},
    "_dbhz": {"dB-Hz": 0.0, "dBHz": 0.0},
}
_LEVEL_RE = re.compile(rf"^\s*({_NUMBER})\s*(\S.*?)\s*$")
#: Logarithmic units (pint reads "30 dB" as a power ratio of 1000): never a plain ratio.
_LOG_UNITS = re.compile(r"(?<![A-Za-z_])(dB\w*|B|Np|neper|bel|decibel|octave|decade)"
                        r"(?![A-Za-z_])")
#: Angle units, dimensionless to pint but never a plain ratio or a factor of a length.
_ANGLE_UNITS = frozenset({"radian", "degree", "arcminute", "arcsecond", "turn", "revolution",
                          "gradian", "grade", "milliradian", "microradian", "steradian",
                          "square_degree", "cycle"})
_RATIO_UNITS = frozenset({"percent", "permille", "ppm", "ppb", "ppt", "dimensionless"})


def db_level(param_name: str):
    """The dB texts a dB-valued argument accepts (by its name's suffix), or None."""
    for suffix in DB_LEVELS:
        if param_name.endswith(suffix):
            return suffix
    return None


def _level(text: str, suffix: str) -> float:
    m = _LEVEL_RE.match(text)
    accepted = DB_LEVELS[suffix]
    if m:
        number, unit_text = float(m.group(1)), m.group(2)
        if unit_text in accepted:
            return number + accepted[unit_text]
        words = ", ".join(f"'{u}'" for u in accepted)
        raise UnitTextError(f"is a value in {next(iter(accepted))}: write a number or a number "
                            f"with {words} (got the unit '{unit_text[:20]}')")
    raise UnitTextError(f"cannot read it as a value in {next(iter(accepted))}: write a "
                        f"number, e.g. '30' or '30 {next(iter(accepted))}'")


def to_si(text: str, unit: str, difference: bool = False, level: str | None = None) -> float:
    """Value of a worksheet text in the SI unit ``unit``.

    Parameters
    ----------
    text : str
        A number (taken in ``unit``) or a number and a unit: ``"80 kV"``.
    unit : str
        The SI unit of the argument ('' for a plain number).
    difference : bool
        The argument is a temperature difference: ``degC`` means kelvin steps.

    Raises
    ------
    UnitTextError
        Unparsable text, unknown unit or wrong dimension; the message says why.
    """
    if len(text) > MAX_TEXT:   # (never a cache key: texts of any length stay out)
        name = dimension_name(unit)[0]
        raise UnitTextError(f"text is too long for a {name} (at most {MAX_TEXT} characters)")
    key = (text, unit, difference, level)
    hit = _PARSED.get(key)
    if hit is None:
        try:
            hit = _level(text, level) if level is not None and not _NUMBER_RE.match(text) \
                else _parse(text, unit, difference)
        except UnitTextError as exc:
            hit = str(exc)
        if len(_PARSED) >= MAX_CACHED:
            _PARSED.clear()
        _PARSED[key] = hit
    if isinstance(hit, str):
        raise UnitTextError(hit)
    return hit


def _parse(text: str, unit: str, difference: bool) -> float:
    name, example = dimension_name(unit)
    if len(text) > MAX_TEXT:
        raise UnitTextError(f"text is too long for a {name} (at most {MAX_TEXT} characters)")
    plain = _NUMBER_RE.match(text)
    if plain:
        return float(plain.group(1))
    if unit == "W":
        db = _DB_POWER_RE.match(text)
        if db:
            level = float(db.group(1))
            return dbm_to_watts(level) if db.group(2) == "dBm" else dbw_to_watts(level)
    if re.match(r"^\s*[+-]?\d+,\d", text):
        raise UnitTextError(f"cannot read it as a {name}: write the decimal point as "
                            f"'.', not ',' (e.g. '{example}')")
    match = _QUANTITY_RE.match(text)
    if not match or not match.group(2):
        raise UnitTextError(f"cannot read it as a {name}: write a number and a unit, "
                            f"e.g. '{example}'")
    number, unit_text = float(match.group(1)), match.group(2)
    trade = TRADE_UNITS.get(unit, {}).get(unit_text)
    if trade is not None:
        return number * trade
    if not _UNIT_RE.match(unit_text) or _LONG_DIGITS.search(unit_text):
        raise UnitTextError(f"cannot read the unit '{unit_text}' (write e.g. '{example}')")
    if difference:
        unit_text = _DEGREES_C.sub("delta_degC", unit_text)
        unit_text = _DEGREES_F.sub("delta_degF", unit_text)
    if unit == "Hz" and "rad" in unit_text:
        raise UnitTextError("give a frequency in Hz, not an angular frequency in rad/s")
    if _LOG_UNITS.search(unit_text) and unit != "W":
        raise UnitTextError(f"'{unit_text}' is a logarithmic unit; this argument takes a "
                            f"{name}, e.g. '{example}' (dB values go to dB arguments)")
    try:
        parsed = ureg.parse_units(unit_text)
        dimensionality = parsed.dimensionality
    except Exception:  # pint raises several kinds; all mean "unknown unit"
        raise UnitTextError(f"unknown unit '{unit_text}' (units are case-sensitive; "
                            f"e.g. '{example}')") from None
    if dimensionality != _dimensionality(unit):
        raise UnitTextError(f"'{unit_text}' is not a unit of {name} (e.g. '{example}')")
    _plain_kinds(unit_text, parsed, unit, name, example)
    try:
        value = ureg.Quantity(number, parsed).to(unit or ureg.dimensionless).magnitude
    except Exception:
        raise UnitTextError(f"cannot convert '{unit_text}' to {unit or 'a plain number'}"
                            ) from None
    return float(value)


def _plain_kinds(unit_text: str, parsed, unit: str, name: str, example: str) -> None:
    """Refuse what pint's dimensions let through but is not plainly the quantity:
    a logarithmic unit ("30 dB" would be a ratio of 1000), an angle where a
    ratio or a length is meant ("30 deg" coupling, "5 deg*m"), a percent
    inside a compound unit ("5 mm%")."""
    if _LOG_UNITS.search(unit_text):
        raise UnitTextError(f"'{unit_text}' is a logarithmic unit; this argument takes a "
                            f"{name}, e.g. '{example}' (dB values go to dB arguments)")
    names = set(parsed._units)
    angles = names & _ANGLE_UNITS
    ratios = names & _RATIO_UNITS
    want = _angle_power(ureg.parse_units(unit)) if unit else 0.0
    if _angle_power(parsed) != want:
        if want:
            raise UnitTextError(f"'{unit_text}' is not a unit of {name} (e.g. '{example}')")
        raise UnitTextError(f"'{unit_text}' holds an angle, which is not a {name} "
                            f"(e.g. '{example}')")
    if angles and not want:
        raise UnitTextError(f"'{unit_text}' holds an angle, which is not a {name} "
                            f"(e.g. '{example}')")
    if ratios and (len(names) > 1 or unit != ""):
        raise UnitTextError(f"'{unit_text}' mixes a ratio unit into a {name} "
                            f"(e.g. '{example}')")


# --- results ---------------------------------------------------------------

_CONVERTERS: dict[tuple[str, str], object] = {}


def result_converter(unit_text: str, result_unit: str):
    """Function mapping an SI result array to ``unit_text``.

    Raises UnitTextError when the unit is unknown or of another dimension.
    """
    if len(unit_text) > MAX_TEXT:   # (never a cache key)
        raise UnitTextError(f"unit text is too long (at most {MAX_TEXT} characters)")
    key = (unit_text, result_unit)
    hit = _CONVERTERS.get(key)
    if hit is None:
        try:
            hit = _make_converter(unit_text.strip(), result_unit)
        except UnitTextError as exc:
            hit = str(exc)
        if len(_CONVERTERS) >= MAX_CACHED:
            _CONVERTERS.clear()
        _CONVERTERS[key] = hit
    if isinstance(hit, str):
        raise UnitTextError(hit)
    return hit


def _make_converter(unit_text: str, result_unit: str):
    name, example = dimension_name(result_unit)
    if unit_text == "" or unit_text == result_unit:
        return None
    if result_unit == "W" and unit_text in ("dBm", "dBW"):
        return watts_to_dbm if unit_text == "dBm" else watts_to_dbw
    trade = TRADE_UNITS.get(result_unit, {}).get(unit_text)
    if trade is not None:
        return 1.0 / trade
    if len(unit_text) > MAX_TEXT or not _UNIT_RE.match(unit_text) or _LONG_DIGITS.search(
            unit_text):
        raise UnitTextError(f"cannot read the unit '{unit_text}'")
    if _LOG_UNITS.search(unit_text):
        raise UnitTextError(f"'{unit_text}' is a logarithmic unit; only dBm and dBW are "
                            f"converted (power results)")
    try:
        target = ureg.parse_units(unit_text)
        _ = target.dimensionality   # (pint raises here for some undefined names)
    except Exception:
        raise UnitTextError(f"unknown unit '{unit_text}' (units are case-sensitive)") from None
    if target.dimensionality != _dimensionality(result_unit):
        raise UnitTextError(f"'{unit_text}' is not a unit of {name} (the result is in "
                            f"{result_unit})")
    _plain_kinds(unit_text, target, result_unit, name, example)
    if result_unit == "Hz" and "rad" in unit_text:
        raise UnitTextError("a frequency result cannot be given in rad/s; use Hz")
    factor = float(ureg.Quantity(1.0, result_unit).to(target).magnitude)
    if not math.isfinite(factor) or factor == 0:
        raise UnitTextError(f"cannot convert {result_unit} to '{unit_text}'")
    return factor


def apply_converter(converter, values):
    """Apply what :func:`result_converter` returned to a float or array."""
    if converter is None:
        return values
    if isinstance(converter, float):
        return values * converter
    return converter(values)


# --- decibels: plain, tested functions ---------------------------------------

def watts_to_dbm(power):
    """Power level in dBm: 10 log10(P / 1 mW). [dBm]  NaN for P <= 0."""
    p = np.asarray(power, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        out = 10.0 * np.log10(p / 1e-3)
    return np.where(p > 0, out, np.nan)[()]


def watts_to_dbw(power):
    """Power level in dBW: 10 log10(P / 1 W). [dBW]  NaN for P <= 0."""
    p = np.asarray(power, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        out = 10.0 * np.log10(p)
    return np.where(p > 0, out, np.nan)[()]


def dbm_to_watts(level):
    """Power in W of a level in dBm: 1 mW * 10^(L/10). [W]  inf beyond float range."""
    with np.errstate(over="ignore"):
        return (1e-3 * np.power(10.0, np.asarray(level, dtype=float) / 10.0))[()]


def dbw_to_watts(level):
    """Power in W of a level in dBW: 1 W * 10^(L/10). [W]  inf beyond float range."""
    with np.errstate(over="ignore"):
        return np.power(10.0, np.asarray(level, dtype=float) / 10.0)[()]


def power_ratio_to_db(ratio):
    """Power ratio in dB: 10 log10(ratio). [dB]"""
    r = np.asarray(ratio, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        out = 10.0 * np.log10(r)
    return np.where(r > 0, out, np.nan)[()]


def amplitude_ratio_to_db(ratio):
    """Voltage or current ratio in dB: 20 log10(|ratio|). [dB]"""
    r = np.abs(np.asarray(ratio))
    with np.errstate(divide="ignore", invalid="ignore"):
        out = 20.0 * np.log10(r)
    return np.where(r > 0, out, np.nan)[()]


# --- TUBE_IN ------------------------------------------------------------------

_DB_LEVELS = {"dBm": ("W", watts_to_dbm, dbm_to_watts), "dBW": ("W", watts_to_dbw, dbw_to_watts)}


def in_unit(quantity, unit=None):
    """A quantity as a number in a chosen unit (the twin of ``TUBE_IN``).

    Parameters
    ----------
    quantity : numeric or str
        A number in SI, or text holding a number and a unit ("4.5 us", "2 kW",
        "43 dBm"); an array of either gives an array.
    unit : str, optional
        The unit wanted ("ns", "dBm", "MHz"...); omitted or empty: the SI unit of
        the quantity's dimension.  A plain number ``quantity`` is read in the SI
        unit of this unit's dimension.

    Returns
    -------
    numeric
        The quantity in ``unit``; NaN where a dB level cannot be formed (power <= 0).

    Raises
    ------
    UnitTextError
        Unreadable text, an unknown unit, or a unit of another dimension (the
        message names both units); conversions that are not plain scale factors
        or offsets (an angular frequency to Hz, nepers to decibels) are refused.
    """
    unit = "" if unit is None else str(unit).strip()
    if isinstance(quantity, (list, tuple, np.ndarray)) and not (
            isinstance(quantity, np.ndarray) and quantity.ndim == 0):
        items = np.asarray(quantity, dtype=object)
        out = np.empty(items.shape, dtype=float)
        for idx, item in np.ndenumerate(items):
            try:
                out[idx] = in_unit(item, unit)
            except UnitTextError:
                if items.size == 1:
                    raise
                out[idx] = np.nan     # (an element that cannot be read: NaN, the others kept)
        return out
    if isinstance(quantity, np.ndarray):
        quantity = quantity.item()
    backward = _unit_from_si(unit) if unit else None
    if isinstance(quantity, str):
        text = quantity.strip()
        if len(text) > MAX_TEXT:
            raise UnitTextError(f"text is too long (at most {MAX_TEXT} characters)")
        plain = _NUMBER_RE.match(text)
        if plain:
            number, source = float(plain.group(1)), ""
        else:
            if re.match(r"^\s*[+-]?\d+,\d", text):
                raise UnitTextError(f"cannot read {text!r}: write the decimal point as '.', "
                                    f"not ','")
            m = _QUANTITY_RE.match(text)
            if not m or not m.group(2):
                raise UnitTextError(f"cannot read {text[:40]!r}: write a number and a unit, "
                                    f"e.g. '4.5 us'")
            number, source = float(m.group(1)), m.group(2)
    elif isinstance(quantity, (bool, np.bool_)) or not isinstance(
            quantity, (int, float, np.integer, np.floating)):
        raise UnitTextError(f"quantity must be a number or text with a unit (got "
                            f"{type(quantity).__name__})")
    else:
        try:
            number, source = float(quantity), None
        except OverflowError:
            raise UnitTextError("quantity is too large for a number") from None
    if not math.isfinite(number):
        raise UnitTextError("quantity must be a finite number")
    if source is None or source == "":
        if backward is None:
            return number
        return float(np.asarray(backward[1](np.asarray(number)), dtype=float))
    forward = _unit_to_si(source)
    if backward is None:
        return float(np.asarray(forward[1](np.asarray(number)), dtype=float))
    if forward[0] != backward[0] or forward[2] != backward[2]:
        raise UnitTextError(f"cannot convert '{source}' to '{unit}': "
                            + ("one is an angular quantity (rad) and the other is not; "
                               "converting needs a factor of 2 pi" if forward[0] == backward[0]
                               else "different dimensions"))
    si = forward[1](np.asarray(number, dtype=float))
    return float(np.asarray(backward[1](si), dtype=float))


def _angle_power(q) -> float:
    """The exponent of angle units in a unit (rad/s: 1; Hz: 0)."""
    return float(sum(e for n, e in q._units.items() if n in _ANGLE_UNITS))


def _unit_to_si(unit_text: str):
    """(dimensionality, function to SI, angle exponent) of a unit text."""
    unit_text = unit_text.strip()
    if unit_text in _DB_LEVELS:
        base, _, to_watts = _DB_LEVELS[unit_text]
        return _dimensionality(base), to_watts, 0.0
    q = _checked_units(unit_text)
    if _is_offset(unit_text):
        return (q.dimensionality, lambda v: ureg.Quantity(v, q).to_base_units().magnitude,
                _angle_power(q))
    factor = ureg.Quantity(1.0, q).to_base_units().magnitude
    return q.dimensionality, lambda v: v * factor, _angle_power(q)


def _unit_from_si(unit_text: str):
    unit_text = unit_text.strip()
    if unit_text in _DB_LEVELS:
        base, from_watts, _ = _DB_LEVELS[unit_text]
        return _dimensionality(base), from_watts, 0.0
    q = _checked_units(unit_text)
    base = ureg.Quantity(1.0, q).to_base_units().units
    if _is_offset(unit_text):
        return (q.dimensionality, lambda v: ureg.Quantity(v, base).to(q).magnitude,
                _angle_power(q))
    factor = ureg.Quantity(1.0, base).to(q).magnitude
    return q.dimensionality, lambda v: v * factor, _angle_power(q)


def _is_offset(unit_text: str) -> bool:
    try:
        return not ureg.parse_units(unit_text).is_compatible_with(ureg.dimensionless) and \
            not ureg.Quantity(1.0, unit_text)._is_multiplicative
    except Exception:
        return False


def _checked_units(unit_text: str):
    if unit_text == "":
        return ureg.dimensionless
    if len(unit_text) > MAX_TEXT or not _UNIT_RE.match(unit_text) or _LONG_DIGITS.search(
            unit_text):
        raise UnitTextError(f"cannot read the unit '{unit_text[:MAX_TEXT]}'")
    if _LOG_UNITS.search(unit_text):
        raise UnitTextError(f"'{unit_text}' is a logarithmic unit; only dBm and dBW (power) "
                            f"are converted, as plain tested functions")
    try:
        q = ureg.parse_units(unit_text)
        _ = q.dimensionality   # (pint raises here for some undefined names)
        return q
    except Exception:
        raise UnitTextError(f"unknown unit '{unit_text}' (units are case-sensitive)") from None
