"""Results of the large-signal model: the worksheet quantities and saturation.

Every public function takes the worksheet arguments in SI units, broadcasts
them and solves all operating points as one batch (`model.solve`).  A point
the model cannot describe is NaN; `explain` gives its message (which cavity,
what happened) for the worksheet layer.

Definitions (the conventions of TUBE_SMALL_SIGNAL_GAIN):

- drive power: available power of a matched generator at the input port;
- output power: power into the output cavity's external load,
  |V_N|^2 / (2 (R/Q)_N Qext_N);
- gain: output power / drive power, in dB;
- efficiency: output power / beam power V0 I0;
- output phase: phase of the output-gap voltage relative to the drive, in
  degrees (-180, 180], transit delay included;
- saturation: the first maximum of the output power as the drive rises
  (the drive that gives it is the saturation drive).

A solve is cached (a few recent batches), so that the worksheet layer's
validity check and the computation share one run.
"""

from __future__ import annotations

import dataclasses
from collections import OrderedDict

import numpy as np

from .. import gain as _gain
from . import model

_CACHE: OrderedDict = OrderedDict()
_CACHE_SIZE = 24


def _key(args, table, accuracy):
    parts = [accuracy]
    for x in args:
        x = np.asarray(x, dtype=float)
        parts.append((x.shape, x.tobytes()))
    t = np.asarray(table, dtype=float) if table is not None else None
    parts.append(None if t is None else (t.shape, t.tobytes()))
    return tuple(parts)


def _table(cavities):
    try:
        return np.array(cavities, dtype=float)
    except (TypeError, ValueError):
        return None


def solve_cached(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                 drive_power, convention="circuit", resonance="hot", depression="none",
                 accuracy=model.DEFAULT):
    """`model.solve` with a small cache of recent batches."""
    table = _table(cavities)
    args = (frequency, voltage, current, beam_radius, tunnel_radius, drive_power)
    options = (convention, resonance, depression)
    key = _key(args, table, (accuracy,) + options)
    hit = _CACHE.get(key)
    if hit is not None:
        _CACHE.move_to_end(key)
        return hit
    result = model.solve(*args[:5], cavities if table is None else table, drive_power,
                         *options, accuracy=accuracy)
    _CACHE[key] = result
    _remember_failures(args + options, result.status, result.cavity)
    while len(_CACHE) > _CACHE_SIZE:
        _CACHE.popitem(last=False)
    return result


#: (status, cavity) of recently failed points, by their numeric arguments: the
#: worksheet layer asks for the message of one element of a range with single values
_FAILED: OrderedDict = OrderedDict()
_FAILED_SIZE = 4096


def _remember_failures(args, status, cavity):
    bad = np.flatnonzero((status.ravel() != model.OK) & (status.ravel() != model.BAD_INPUT))
    if bad.size == 0:
        return
    numeric, options = args[:6], tuple(args[6:])
    flat = [np.broadcast_to(np.asarray(x, dtype=float), status.shape).ravel() for x in numeric]
    for k in bad[:_FAILED_SIZE]:
        key = tuple(float(x[k]) for x in flat) + options
        _FAILED[key] = (int(status.flat[k]), int(cavity.flat[k]))
    while len(_FAILED) > _FAILED_SIZE:
        _FAILED.popitem(last=False)


def _recalled(args):
    """(status, cavity) remembered for single numeric arguments, or None."""
    try:
        key = tuple(float(np.asarray(x, dtype=float).reshape(())) for x in args[:6])
    except (TypeError, ValueError):
        return None
    return _FAILED.get(key + tuple(args[6:]))


def _where_ok(result, value):
    with np.errstate(all="ignore"):
        return np.where(result.ok, value, np.nan)[()]


def output_power(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                 drive_power, convention="circuit", resonance="hot", depression="none"):
    """RF power into the output load of a multi-cavity klystron (large signal).

    Parameters
    ----------
    frequency : numeric
        Signal frequency, > 0. [Hz]
    voltage : numeric
        Beam voltage V0, > 0. [V]
    current : numeric
        DC beam current I0, > 0. [A]
    beam_radius : numeric
        Radius of the solid round beam, <= tunnel_radius. [m]
    tunnel_radius : numeric
        Drift-tube radius. [m]
    cavities : array_like, shape (n, 6)
        Cavity table of TUBE_SMALL_SIGNAL_GAIN: position [m], resonant
        (hot) frequency [Hz], R/Q [ohm, circuit], Q0, Qext (NaN: idle), gap
        length [m].
    drive_power : numeric
        Available power of the matched drive generator, > 0; an array gives
        the transfer curve. [W]
    convention : str, optional
        R/Q column: "circuit" (V^2/(2 omega W), default) or "accelerator"
        ("linac"), twice the circuit value.
    resonance : str, optional
        Frequency column: "hot" (beam-loaded, default) or "cold" (cold-test).
    depression : str, optional
        Beam kinematics from the cathode voltage ("none", default) or from
        the depressed kinetic voltage ("mean").

    Returns
    -------
    numeric
        |V_N|^2 / (2 (R/Q)_N Qext_N). [W]  NaN where the model does not
        apply (see `explain`).

    Notes
    -----
    Relativistic 1-D disk model (`tubefuncs.physics.largesignal`): charge
    disks in periodic steady state, Bessel-series space charge with periodic
    images, gridless gap fields consistent with TUBE_GAP_COUPLING, every
    cavity voltage self-consistent with the current the beam induces.  A
    design estimate, not a rating.

    References
    ----------
    See `tubefuncs.physics.largesignal`.
    """
    r = solve_cached(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                     drive_power, convention, resonance, depression)
    return _where_ok(r, r.load_power[-1])


def efficiency(frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power,
               convention="circuit", resonance="hot", depression="none"):
    """Overall efficiency: output power / beam power V0 I0 (large signal).

    Parameters
    ----------
    frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power
        As in `output_power`.
    convention, resonance, depression : str, optional
        As in `output_power`.

    Returns
    -------
    numeric
        P_out / (V0 I0). [1]  NaN where the model does not apply.
    """
    r = solve_cached(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                     drive_power, convention, resonance, depression)
    return _where_ok(r, r.load_power[-1] / r.beam_power)


def large_signal_gain(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                      drive_power, convention="circuit", resonance="hot",
                      depression="none"):
    """Gain P_out / P_drive at the given drive, in dB (large signal).

    Parameters
    ----------
    frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power
        As in `output_power`.
    convention, resonance, depression : str, optional
        As in `output_power`.

    Returns
    -------
    numeric
        10 log10(P_out / P_drive). [dB]  It tends to TUBE_SMALL_SIGNAL_GAIN
        at low drive and falls as the tube saturates.
    """
    r = solve_cached(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                     drive_power, convention, resonance, depression)
    with np.errstate(all="ignore"):
        return _where_ok(r, 10.0 * np.log10(r.load_power[-1] / r.drive_power))


def output_phase(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                 drive_power, convention="circuit", resonance="hot",
                 depression="none"):
    """Phase of the output-gap voltage relative to the drive (large signal). [deg]

    Parameters
    ----------
    frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power
        As in `output_power`.
    convention, resonance, depression : str, optional
        As in `output_power`.

    Returns
    -------
    numeric
        Degrees in (-180, 180], the reference of TUBE_SMALL_SIGNAL_PHASE
        (transit delay included); its change with drive is the AM/PM
        conversion.
    """
    r = solve_cached(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                     drive_power, convention, resonance, depression)
    return _where_ok(r, np.degrees(np.angle(r.gap_voltage[-1])))


def output_gap_voltage(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                       drive_power, convention="circuit", resonance="hot",
                       depression="none"):
    """Peak RF voltage across the output gap (large signal). [V]

    Parameters
    ----------
    frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power
        As in `output_power`.
    convention, resonance, depression : str, optional
        As in `output_power`.

    Returns
    -------
    numeric
        |V_N|, the peak gap voltage. [V]
    """
    r = solve_cached(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                     drive_power, convention, resonance, depression)
    return _where_ok(r, np.abs(r.gap_voltage[-1]))


def spent_beam_min_energy(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                          drive_power, convention="circuit", resonance="hot",
                          depression="none"):
    """Kinetic energy of the slowest electrons leaving the output gap. [eV]

    Parameters
    ----------
    frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power
        As in `output_power`.
    convention, resonance, depression : str, optional
        As in `output_power`.

    Returns
    -------
    numeric
        min over disks of (gamma - 1) m c^2 / e. [eV]  What limits collector
        depression.
    """
    r = solve_cached(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                     drive_power, convention, resonance, depression)
    return _where_ok(r, r.spent_min)


def spent_beam_max_energy(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                          drive_power, convention="circuit", resonance="hot",
                          depression="none"):
    """Kinetic energy of the fastest electrons leaving the output gap. [eV]

    Parameters
    ----------
    frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power
        As in `output_power`.
    convention, resonance, depression : str, optional
        As in `output_power`.

    Returns
    -------
    numeric
        max over disks of (gamma - 1) m c^2 / e. [eV]  It exceeds e V0 at
        saturation: the collector and its X-ray shielding must take it.
    """
    r = solve_cached(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                     drive_power, convention, resonance, depression)
    return _where_ok(r, r.spent_max)


# ---------------------------------------------------------------------------
# Saturation: the first maximum over drive, found in batches
# ---------------------------------------------------------------------------

#: Coarse drive grid, decades around the small-signal estimate of the saturation drive.
_COARSE = np.linspace(-1.0, 1.5, 11)
#: Tolerance of the gap voltages on the search grids.
_SEARCH_TOL = 1e-4
#: Points of the refined grid between the neighbours of the coarse maximum.
_FINE = 7


class Saturation:
    """Saturation point of a batch: drive, output power, status (shape S)."""

    def __init__(self, drive, power, result):
        self.drive = drive
        self.power = power
        self.result = result  # model.Result at the saturation drive


def _first_peak(power):
    """Index of the first local maximum along the last axis (NaN stops the search).

    Returns (index, found): found is False where the curve is still rising at
    the end of the grid or is cut short by a failure before its peak.
    """
    p = np.where(np.isfinite(power), power, -np.inf)
    n = p.shape[-1]
    falls = np.zeros(p.shape, dtype=bool)
    falls[..., :-1] = p[..., 1:] < p[..., :-1]
    falls &= np.isfinite(p)
    idx = np.argmax(falls, axis=-1)
    found = np.take_along_axis(falls, idx[..., None], axis=-1)[..., 0]
    return np.minimum(idx, n - 1), found


def saturation(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
               convention="circuit", resonance="hot", depression="none", accuracy=model.DEFAULT):
    """Find the saturation drive and power for broadcast beam arguments.

    Returns
    -------
    Saturation
        drive [W], power [W] (NaN where not found) and the model result at the
        saturation drive (its status explains failures).
    """
    beam = np.broadcast_arrays(*(np.asarray(x, dtype=float) for x in
                                 (frequency, voltage, current, beam_radius, tunnel_radius)))
    shape = beam[0].shape
    table = _table(cavities)
    with np.errstate(all="ignore"):
        try:
            g_ss = np.asarray(_gain.small_signal_gain(*beam, cavities, convention, resonance,
                                                      depression), dtype=float)
        except (ValueError, TypeError):
            g_ss = np.full(shape, np.nan)
        p_beam = beam[1] * beam[2]
        estimate = 0.5 * p_beam / 10.0 ** (g_ss / 10.0)
    estimate = np.where(np.isfinite(estimate) & (estimate > 0), estimate,
                        1e-5 * np.where(p_beam > 0, p_beam, 1.0))
    estimate = np.where(np.isfinite(estimate) & (estimate > 0), estimate, 1.0)
    expand = tuple(x[..., None] for x in beam)
    # the search grids need the gap voltages to 1e-4 only (the final solve is at full accuracy)
    search = dataclasses.replace(accuracy, tol=max(accuracy.tol, _SEARCH_TOL))
    # 1. coarse grid, 2.5 decades
    drives = estimate[..., None] * 10.0 ** _COARSE
    options = (convention, resonance, depression)
    coarse = solve_cached(*expand, table, drives, *options, accuracy=search)
    p = np.where(coarse.ok, coarse.load_power[-1], np.nan)
    k, found = _first_peak(p)
    # 2. fine grid between the coarse neighbours of the peak
    n = drives.shape[-1]
    lo = np.take_along_axis(drives, np.maximum(k - 1, 0)[..., None], axis=-1)
    hi = np.take_along_axis(drives, np.minimum(k + 1, n - 1)[..., None], axis=-1)
    fine_drives = lo * (hi / lo) ** np.linspace(0.0, 1.0, _FINE)
    fine = solve_cached(*expand, table, fine_drives, *options, accuracy=search)
    pf = np.where(fine.ok, fine.load_power[-1], np.nan)
    j = np.nanargmax(np.where(np.isfinite(pf), pf, -np.inf), axis=-1)
    j = np.clip(j, 1, _FINE - 2)
    # 3. parabola through the three samples around the peak, in log(drive)
    x = np.log(fine_drives)
    xs = [np.take_along_axis(x, (j + d)[..., None], axis=-1)[..., 0] for d in (-1, 0, 1)]
    ys = [np.take_along_axis(pf, (j + d)[..., None], axis=-1)[..., 0] for d in (-1, 0, 1)]
    with np.errstate(all="ignore"):
        h = xs[1] - xs[0]
        curv = ys[0] - 2.0 * ys[1] + ys[2]
        shift = np.where(curv < 0, 0.5 * h * (ys[0] - ys[2]) / curv, 0.0)
    shift = np.clip(np.nan_to_num(shift), -h, h)
    drive = np.exp(xs[1] + shift)
    final = solve_cached(*beam, table, drive, *options, accuracy=accuracy)
    # a chain that does not amplify has no saturation in the sense of the trade: its
    # transfer curve turns over at a tiny fraction of the beam power and the overdriven
    # curve beyond is erratic, so a "maximum" found there would be a plausible wrong number
    amplifies = np.isfinite(g_ss) & (g_ss >= MIN_SATURATION_GAIN_DB)
    power = np.where(final.ok & found & amplifies, final.load_power[-1], np.nan)
    # report why the curve has no peak: the failure met on the coarse grid
    status = final.status.copy()
    cavity = final.cavity.copy()
    missing = final.ok & ~found
    if np.any(missing):
        first_bad = np.argmax(~coarse.ok, axis=-1)
        bad_status = np.take_along_axis(coarse.status, first_bad[..., None], axis=-1)[..., 0]
        bad_cav = np.take_along_axis(coarse.cavity, first_bad[..., None], axis=-1)[..., 0]
        has_bad = np.any(~coarse.ok, axis=-1)
        status = np.where(missing & has_bad, bad_status, status)
        cavity = np.where(missing & has_bad, bad_cav, cavity)
        status = np.where(missing & ~has_bad, _NO_PEAK, status)
    weak = final.ok & np.isfinite(g_ss) & (g_ss < MIN_SATURATION_GAIN_DB)
    status = np.where(weak, _NO_GAIN, status)
    final.status, final.cavity = status, cavity
    return Saturation(np.where(np.isfinite(power), drive, np.nan).reshape(shape),
                      power.reshape(shape), final)


#: Status of a transfer curve without a maximum on the searched grid.
_NO_PEAK = 100
#: Status of a chain whose small-signal gain is below `MIN_SATURATION_GAIN_DB`.
_NO_GAIN = 101
#: Least small-signal gain for which the saturation search runs [dB].
MIN_SATURATION_GAIN_DB = 3.0

_SAT_CACHE: OrderedDict = OrderedDict()
_SAT_FAILED: OrderedDict = OrderedDict()


def _scalar_key(args):
    try:
        return tuple(float(np.asarray(x, dtype=float).reshape(())) for x in args)
    except (TypeError, ValueError):
        return None


def saturation_cached(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                      convention="circuit", resonance="hot", depression="none",
                      accuracy=model.DEFAULT):
    """`saturation` with a small cache."""
    table = _table(cavities)
    options = (convention, resonance, depression)
    key = _key((frequency, voltage, current, beam_radius, tunnel_radius), table,
               (accuracy,) + options)
    hit = _SAT_CACHE.get(key)
    if hit is None:
        hit = saturation(frequency, voltage, current, beam_radius, tunnel_radius,
                         cavities if table is None else table, *options, accuracy=accuracy)
        _SAT_CACHE[key] = hit
        st, cv = hit.result.status, hit.result.cavity
        flat = [np.broadcast_to(np.asarray(x, dtype=float), st.shape).ravel()
                for x in (frequency, voltage, current, beam_radius, tunnel_radius)]
        for k in np.flatnonzero(~np.isfinite(hit.power.ravel()))[:_FAILED_SIZE]:
            _SAT_FAILED[tuple(float(x[k]) for x in flat) + options] = (int(st.flat[k]),
                                                                        int(cv.flat[k]))
        while len(_SAT_FAILED) > _FAILED_SIZE:
            _SAT_FAILED.popitem(last=False)
    return hit


def saturated_power(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                    convention="circuit", resonance="hot", depression="none"):
    """Saturated output power: the first maximum of the transfer curve.

    Parameters
    ----------
    frequency, voltage, current, beam_radius, tunnel_radius, cavities
        As in `output_power`.
    convention, resonance, depression : str, optional
        As in `output_power`.

    Returns
    -------
    numeric
        Largest output power as the drive rises to its first maximum. [W]
        NaN where the model does not apply or electrons stall before the
        peak.

    Notes
    -----
    The drive is searched in batches: 11 drives over 2.5 decades around the
    small-signal estimate 0.5 V0 I0 / G (0.1 to 30 times it), then 7 drives between the
    neighbours of the first maximum, then a parabola in log(drive) and a
    final solve at its vertex.
    """
    return saturation_cached(frequency, voltage, current, beam_radius, tunnel_radius,
                             cavities, convention, resonance, depression).power[()]


def saturation_drive(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                     convention="circuit", resonance="hot", depression="none"):
    """Drive power that saturates the tube (first maximum of the transfer curve). [W]

    Parameters
    ----------
    frequency, voltage, current, beam_radius, tunnel_radius, cavities
        As in `output_power`.
    convention, resonance, depression : str, optional
        As in `output_power`.

    Returns
    -------
    numeric
        Available drive power at saturation. [W]
    """
    return saturation_cached(frequency, voltage, current, beam_radius, tunnel_radius,
                             cavities, convention, resonance, depression).drive[()]


def saturated_efficiency(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                         convention="circuit", resonance="hot", depression="none"):
    """Efficiency at saturation: saturated power / V0 I0.

    Parameters
    ----------
    frequency, voltage, current, beam_radius, tunnel_radius, cavities
        As in `output_power`.
    convention, resonance, depression : str, optional
        As in `output_power`.

    Returns
    -------
    numeric
        P_sat / (V0 I0). [1]
    """
    sat = saturation_cached(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                            convention, resonance, depression)
    with np.errstate(all="ignore"):
        return (sat.power / sat.result.beam_power)[()]


# ---------------------------------------------------------------------------
# Messages for the worksheet layer
# ---------------------------------------------------------------------------

def _text(status, cavity):
    if status == _NO_GAIN:
        return (f"the small-signal gain is below {MIN_SATURATION_GAIN_DB:g} dB: the chain does "
                "not amplify, so it has no saturation point")
    if status == _NO_PEAK:
        return ("the output power still rises at 30 times the small-signal saturation "
                "estimate: no saturation found")
    return model.status_text(status, cavity)


def drive_ok(frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power,
             convention="circuit", resonance="hot", depression="none"):
    """Mask: the model describes the point (True also where the inputs are bad:
    the argument checks report those)."""
    r = solve_cached(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                     drive_power, convention, resonance, depression)
    return (r.ok | (r.status == model.BAD_INPUT))[()]


def drive_message(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                  drive_power, convention="circuit", resonance="hot", depression="none"):
    """Message of a point the model rejects (single values)."""
    options = (convention, resonance, depression)
    if np.ndim(cavities) != 2:
        # the worksheet layer passes one element of every range, the table included
        hit = _recalled((frequency, voltage, current, beam_radius, tunnel_radius, drive_power)
                        + options)
        if hit:
            return _text(*hit)
        return "outside the large-signal model"
    r = solve_cached(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                     drive_power, *options)
    flat_s, flat_c = r.status.ravel(), r.cavity.ravel()
    k = int(np.argmax(flat_s != model.OK)) if flat_s.size else 0
    return _text(int(flat_s[k]), int(flat_c[k])) or "outside the large-signal model"


def saturation_ok(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                  convention="circuit", resonance="hot", depression="none"):
    """Mask: a saturation point was found (or the inputs are bad, reported elsewhere)."""
    sat = saturation_cached(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                            convention, resonance, depression)
    return (np.isfinite(sat.power.reshape(sat.result.status.shape))
            | (sat.result.status == model.BAD_INPUT))[()]


def saturation_message(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                       convention="circuit", resonance="hot", depression="none"):
    """Message of a beam for which no saturation point was found (single values)."""
    options = (convention, resonance, depression)
    if np.ndim(cavities) != 2:
        key = _scalar_key((frequency, voltage, current, beam_radius, tunnel_radius))
        hit = _SAT_FAILED.get(key + options) if key else None
        return ("no saturation: " + _text(*hit)) if hit else "no saturation point found"
    sat = saturation_cached(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                            *options)
    flat_s, flat_c = sat.result.status.ravel(), sat.result.cavity.ravel()
    k = int(np.argmax(flat_s != model.OK)) if flat_s.size else 0
    text = _text(int(flat_s[k]), int(flat_c[k]))
    return ("no saturation: " + text) if text else "no saturation point found"
