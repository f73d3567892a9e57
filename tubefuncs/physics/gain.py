"""Small-signal gain and phase of a multi-cavity klystron (space-charge waves).

A chain of resonant cavities sits along a confined electron beam.  The drive
sets up a voltage on the input gap; each gap velocity-modulates the beam;
the modulation grows into an RF convection current by space-charge-wave
propagation; the current induced in every downstream gap sets up that
cavity's voltage, which modulates the beam again.  In linear theory the
contributions add, so the induced current of gap n is the sum over *every*
upstream gap k of a transadmittance Y_kn times V_k [1]-[3].

Cavity table
------------
A ``cavities`` table has one row per cavity, input first, output last, and
six columns (SI units):

====  ======================  ======  =========================================
col   quantity                unit    note
====  ======================  ======  =========================================
0     position along the beam m       gap centre; any origin; increasing
1     resonant frequency      Hz      beam-loaded ("hot"); cold-test with
                                      the option resonance="cold"
2     R/Q                     ohm     circuit convention, V^2/(2 omega W);
                                      accelerator with convention=...
3     Q0                      1       unloaded (wall) Q
4     Qext                    1       external Q; empty (NaN), inf or a very
                                      large number = idle cavity (no load)
5     gap length              m       for the gridless gap coupling
====  ======================  ======  =========================================

Trailing rows that are empty in every column are ignored (a worksheet range
chosen larger than the table).

Definitions
-----------
- Gain = P_out / P_avail, where P_out = |V_N|^2 / (2 (R/Q)_N Qext_N) is the
  power into the output cavity's external load and P_avail is the available
  power of a matched driver at the input cavity's external port.
- Phase = arg(V_N) relative to the drive, in degrees wrapped to
  (-180, 180]: the drive reference is the input-gap voltage that the driver
  would set up at the input cavity's resonance without beam.  It includes
  the transit delay of the beam, omega (z_N - z_1)/u0.

References
----------
[1] S. Ramo, "Space charge and field waves in an electron beam", Phys. Rev.
    56, 276, 1939 (space-charge waves) [from memory].
[2] T. Wessel-Berg, "A general theory of klystrons with arbitrary, extended
    interaction fields", Microwave Laboratory Report 376, Stanford
    University, 1957 (gap coupling to the fast and slow space-charge waves,
    transadmittance, beam loading) [from memory].
[3] G. Caryotakis, "High power klystrons: theory and practice at the Stanford
    Linear Accelerator Center", SLAC-PUB-10620, 2004, Ch. 3 (small-signal
    multicavity theory; space-charge beam-loading conductance
    (beta_e/8 beta_q)(M_-^2 - M_+^2)).
[4] D. L. Webster, "Cathode-ray bunching", J. Appl. Phys. 10, 501, 1939
    (ballistic bunching: the zero-space-charge limit) [from memory].
[5] D. M. Pozar, *Microwave Engineering*, 4th ed., Wiley, 2012, Ch. 6
    (parallel resonant circuit, external Q, coupling of a resonator to a
    matched line) [from memory for the chapter].
[6] J. D. Jackson, *Classical Electrodynamics*, 3rd ed., Wiley, 1999,
    Sec. 11.5 (relativistic energy and momentum) [from memory].
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy import constants as sc

from .beam import REST_VOLTAGE, gamma, velocity
from .gap import gap_coupling
from .plasma import reduced_plasma_freq

TWO_PI = 2.0 * np.pi

#: Column names of a cavity table, in order.
CAVITY_COLUMNS = ("position", "resonant frequency", "R/Q", "Q0", "Qext", "gap length")
#: Units of the cavity-table columns, in order.
CAVITY_UNITS = ("m", "Hz", "ohm", "", "", "m")
N_COLUMNS = len(CAVITY_COLUMNS)
POS, F0, RQ, Q0, QEXT, GAP = range(N_COLUMNS)

# Smallest beta_q/beta_e used: a vanishing plasma frequency (I0 -> 0) would
# turn the fast/slow-wave differences into 0/0.  Their limits are derivatives,
# which this step reproduces to a relative (1e-6 theta)^2/6 for a transit
# angle theta, with rounding errors near 1e-16/(1e-6 theta).
_MIN_WAVE_STEP = 1e-6


# ---------------------------------------------------------------------------
# Cavity table: reading and validation
# ---------------------------------------------------------------------------

#: Kinds of table problem, as `table_problems` labels them.
PROBLEM_KINDS = ("layout", "rows", "empty", "value", "order", "port")


def _as_table(cavities):
    """2-D float array of the table with trailing all-empty rows removed.

    Returns (table, problem) where problem is None or a short text.
    """
    try:
        t = np.array(cavities, dtype=float)
    except (TypeError, ValueError):
        return None, "cavities must hold numbers only (empty cells allowed in Qext)"
    if t.ndim != 2:
        return None, (f"cavities must be a range of {N_COLUMNS} columns, one row per cavity "
                      f"(got a {t.ndim}-D value)")
    if t.shape[1] != N_COLUMNS:
        return None, (f"cavities must have {N_COLUMNS} columns (position, resonant frequency, "
                      f"R/Q, Q0, Qext, gap length); got {t.shape[1]}")
    empty = np.all(np.isnan(t), axis=1)
    n = t.shape[0]
    while n > 0 and empty[n - 1]:
        n -= 1
    return t[:n], None


def table_problems(cavities):
    """Problems of a cavity table on its own, labelled by kind.

    Parameters
    ----------
    cavities : array_like
        Cavity table (see the module help).

    Returns
    -------
    list of (str, str)
        (kind, text) pairs; kind is one of `PROBLEM_KINDS`: 'layout' (not a
        6-column range of numbers), 'rows' (fewer than 2 cavities), 'empty'
        (an empty cell outside Qext, or an empty row inside the table),
        'value' (a value out of range), 'order' (positions not increasing),
        'port' (input or output cavity without a finite Qext).
    """
    t, problem = _as_table(cavities)
    if problem:
        return [("layout", problem)]
    n = t.shape[0]
    if n < 2:
        return [("rows", f"cavities needs at least 2 rows (input and output cavity); got {n}")]
    problems = []
    for i, row in enumerate(t, start=1):
        if np.all(np.isnan(row)):
            problems.append(("empty", f"cavities row {i} is empty"))
            continue
        for col in (POS, F0, RQ, Q0, GAP):
            x = row[col]
            name = CAVITY_COLUMNS[col]
            unit = f" {CAVITY_UNITS[col]}" if CAVITY_UNITS[col] else ""
            if np.isnan(x):
                problems.append(("empty", f"cavities row {i}: {name} is empty"))
            elif col == POS and not np.isfinite(x):
                problems.append(("value", (f"cavities row {i}: position must be finite "
                                          f"(got {x:g} m)")))
            elif col != POS and not (0.0 < x < np.inf):
                problems.append(("value", (f"cavities row {i}: {name} must be > 0{unit} "
                                          f"(got {x:g}{unit})")))
        qext = row[QEXT]
        if not np.isnan(qext) and not qext > 0.0:
            problems.append(("value", (f"cavities row {i}: Qext must be > 0, or empty for an "
                                      f"idle cavity (got {qext:g})")))
    z = t[:, POS]
    for i in range(1, n):
        if np.isfinite(z[i]) and np.isfinite(z[i - 1]) and not z[i] > z[i - 1]:
            problems.append(("order", (f"cavities row {i + 1}: position {z[i]:g} m must be "
                                      f"downstream of row {i} ({z[i - 1]:g} m); rows run "
                                      "input to output along the beam")))
    if not 0.0 < t[0, QEXT] < np.inf:
        problems.append(("port", ("cavities row 1 (input cavity) needs a finite Qext: it is "
                                 "the drive port")))
    if not 0.0 < t[-1, QEXT] < np.inf:
        problems.append(("port", (f"cavities row {n} (output cavity) needs a finite Qext: it "
                                 "is the output port")))
    return problems


@dataclass(frozen=True)
class _Beam:
    """Beam quantities broadcast over the numeric arguments (SI arrays)."""

    f: np.ndarray     # signal frequency [Hz]
    v: np.ndarray     # beam voltage [V]
    i: np.ndarray     # beam current [A]
    b: np.ndarray     # beam radius [m]
    a: np.ndarray     # tunnel radius [m]
    u0: np.ndarray    # DC velocity [m/s]
    f_q: np.ndarray   # reduced plasma frequency [Hz]
    ok: np.ndarray    # inputs inside the model's domain


def _beam(frequency, voltage, current, beam_radius, tunnel_radius):
    """Beam quantities broadcast over the arguments (SI arrays), see `_Beam`."""
    f = np.asarray(frequency, dtype=float)
    v = np.asarray(voltage, dtype=float)
    i = np.asarray(current, dtype=float)
    b = np.asarray(beam_radius, dtype=float)
    a = np.asarray(tunnel_radius, dtype=float)
    f, v, i, b, a = np.broadcast_arrays(f, v, i, b, a)
    u0 = velocity(v)
    # reduced plasma frequency f_q = R f_p at the signal frequency ([1]; the
    # reduction factor R and the longitudinal (gamma^3) plasma frequency f_p come
    # from tubefuncs.physics.plasma, NaN there where f_q >= f)
    f_q = np.asarray(reduced_plasma_freq(f, i, v, b, a), dtype=float)
    ok = (f > 0) & (v > 0) & (i > 0) & (b > 0) & (a > 0) & (b <= a) & (f_q < f)
    return _Beam(f, v, i, b, a, u0, f_q, ok)


#: Options of the gain functions (text arguments, case-insensitive), default first.
CONVENTIONS = ("circuit", "accelerator", "linac")
RESONANCES = ("hot", "cold")
DEPRESSIONS = ("none", "mean")
#: Kinds of validity limit that `cavity_limits` checks.
LIMIT_KINDS = ("overlap", "cutoff", "current", "conductance")


def _option(value, allowed, argument):
    """Normalised text option (case and blanks ignored), or ValueError naming the argument."""
    key = value.strip().lower() if isinstance(value, str) else None
    if key not in allowed:
        choices = ", ".join(f"'{c}'" for c in allowed)
        raise ValueError(f"{argument} must be one of {choices}, got {value!r}")
    return key


@dataclass(frozen=True)
class _Setup:
    """Everything the chain and the validity limits share (see `_prepare`)."""

    beam: _Beam
    table: np.ndarray      # validated table, R/Q in the circuit convention
    cathode_voltage: np.ndarray
    beta_q: np.ndarray     # plasma wave number used (floored), shape S [rad/m]
    modulation: np.ndarray
    g0: np.ndarray
    m_fast: np.ndarray     # (n,) + S
    m_slow: np.ndarray
    y_beam: np.ndarray     # (n,) + S beam admittance [S]
    limits: dict           # kind -> bool array S (True = fine) or per-cavity (n,) + S


def _prepare(frequency, voltage, current, beam_radius, tunnel_radius, table,
             convention="circuit", resonance="hot", depression="none"):
    """Beam, couplings, beam admittance and validity masks of a validated table."""
    from . import optics
    from .cavity import convention_factor
    from .loading import P01, _hilbert_gridless

    resonance = _option(resonance, RESONANCES, "resonance")
    depression = _option(depression, DEPRESSIONS, "depression")
    table = np.array(table, dtype=float)
    table[:, RQ] = table[:, RQ] / convention_factor(convention)  # -> circuit R/Q
    v_cathode = np.asarray(voltage, dtype=float)
    if depression == "mean":
        # beam-averaged kinetic voltage after the space-charge depression
        v_kin = optics.depressed_voltage(current, voltage, beam_radius, tunnel_radius, "mean")
    else:
        v_kin = v_cathode
    beam = _beam(frequency, v_kin, current, beam_radius, tunnel_radius)
    f, v, i, b, a, u0 = beam.f, beam.v, beam.i, beam.b, beam.a, beam.u0
    nd = f.ndim
    g = gamma(v)
    modulation = 1.0 / (g * (g + 1.0))  # relativistic velocity modulation [6]
    with np.errstate(invalid="ignore", divide="ignore"):
        g0 = i / v
        beta_e = TWO_PI * f / u0
        # a vanishing plasma wave number is replaced by a tiny one, which avoids
        # 0/0 and changes the results by about (1e-6 theta_0)^2/6 relative
        beta_q = np.maximum(TWO_PI * beam.f_q / u0, _MIN_WAVE_STEP * beta_e)
        gap_len = _column(table[:, GAP], nd)
        m_fast = wave_coupling(f, gap_len, beta_e - beta_q, b, a)
        m_slow = wave_coupling(f, gap_len, beta_e + beta_q, b, a)
        y_beam = _beam_conductance(modulation * g0, beta_e, m_fast, m_slow, beta_q).astype(complex)
        if resonance == "cold":
            # the table holds cold-test frequencies: add the beam susceptance
            # B_B = kappa G0 (beta_e/(2 beta_q)) [S(beta_s) - S(beta_f)] (loading module)
            shape = m_fast.shape
            full = [np.broadcast_to(x, shape).ravel() for x in
                    (beta_e, beta_q, TWO_PI * f / sc.c, gap_len, b, a)]
            be, bq, k0, dd, bb, aa = full
            good = np.isfinite(m_fast.ravel()) & np.isfinite(m_slow.ravel())
            s_diff = np.full(be.shape, np.nan)
            if np.any(good):
                sel = [x[good] for x in (be, bq, k0, dd, bb, aa)]
                s_f, s_s = _hilbert_gridless((sel[0] - sel[1], sel[0] + sel[1]), sel[0],
                                             *sel[2:])
                s_diff[good] = s_s - s_f
            y_beam = y_beam + 1j * (modulation * g0 * beta_e / (2.0 * beta_q)
                                    * s_diff.reshape(shape))
    rq = _column(table[:, RQ], nd)
    inv_qext = _column(np.where(np.isnan(table[:, QEXT]), 0.0, 1.0 / table[:, QEXT]), nd)
    half = 0.5 * (table[1:, GAP] + table[:-1, GAP])
    spacing = np.diff(table[:, POS])
    with np.errstate(invalid="ignore"):
        limits = {
            # gaps (plus a fringing margin of one tunnel radius) must not overlap
            "overlap": _column(spacing - half, nd) >= a,
            # the tunnel must be below the TM01 cutoff at the signal frequency
            "cutoff": TWO_PI * f * a / sc.c < P01,
            # the beam must be below its space-charge limiting current
            "current": i < optics.limiting_current(v_cathode, b, a),
            # the net conductance of every cavity must be positive
            "conductance": ~(1.0 / _column(table[:, Q0], nd) + inv_qext
                             + rq * np.real(y_beam) <= 0.0),
        }
    return _Setup(beam, table, v_cathode, beta_q, modulation, g0, m_fast, m_slow, y_beam,
                  limits)


def _first(mask):
    """Flat index of the first False of a mask, or None."""
    bad = ~np.asarray(mask, dtype=bool)
    return int(np.flatnonzero(bad.ravel())[0]) if bad.any() else None


def _limit_texts(setup):
    """(kind, text) of the first violation of each validity limit."""
    beam, t, lim = setup.beam, setup.table, setup.limits
    out = []
    f = beam.f.ravel()
    a = np.broadcast_to(beam.a, beam.f.shape).ravel()
    n_rows = t.shape[0]
    for k in range(1, n_rows):
        bad = ~np.broadcast_to(lim["overlap"][k - 1], beam.f.shape)
        if bad.any():
            j = int(np.flatnonzero(bad.ravel())[0])
            spacing = t[k, POS] - t[k - 1, POS]
            half = 0.5 * (t[k, GAP] + t[k - 1, GAP])
            out.append(("overlap", (
                f"cavities rows {k} and {k + 1} overlap: spacing {spacing:.4g} m must be >= "
                f"half the sum of the gap lengths ({half:.4g} m) plus a fringing margin of one "
                f"tunnel_radius ({a[j]:.4g} m)")))
            break
    j = _first(np.broadcast_to(lim["cutoff"], beam.f.shape))
    if j is not None:
        out.append(("cutoff", (
            f"tunnel_radius {a[j]:.4g} m propagates at {f[j]:.6g} Hz: 2 pi f a/c = "
            f"{TWO_PI * f[j] * a[j] / sc.c:.4g} must be < 2.405 (TM01 cutoff); the gap "
            "coupling model needs a cut-off tunnel")))
    j = _first(np.broadcast_to(lim["current"], beam.f.shape))
    if j is not None:
        from . import optics
        vc = np.broadcast_to(setup.cathode_voltage, beam.f.shape).ravel()[j]
        b = np.broadcast_to(beam.b, beam.f.shape).ravel()[j]
        i = np.broadcast_to(beam.i, beam.f.shape).ravel()[j]
        il = float(optics.limiting_current(vc, b, a[j]))
        out.append(("current", (
            f"current {i:.4g} A must be below the space-charge limiting current "
            f"{il:.4g} A of the beam in its tunnel (voltage {vc:.6g} V, beam_radius {b:.4g} m, "
            f"tunnel_radius {a[j]:.4g} m)")))
    cond = np.broadcast_to(lim["conductance"], (n_rows,) + beam.f.shape).reshape(n_rows, -1)
    for row in range(n_rows):
        if not cond[row].all():
            j = int(np.flatnonzero(~cond[row])[0])
            rq = t[row, RQ]
            y = np.broadcast_to(setup.y_beam[row], beam.f.shape).ravel()[j]
            qext = t[row, QEXT]
            net = 1.0 / t[row, Q0] + (0.0 if np.isnan(qext) else 1.0 / qext) + rq * y.real
            out.append(("conductance", (
                f"cavities row {row + 1}: net conductance 1/Q0 + 1/Qext + (R/Q) G_B = {net:.3g} "
                f"<= 0 at {f[j]:.6g} Hz (beam loading G_B = {y.real:.3g} S): the beam would "
                "drive the cavity into oscillation")))
            break
    return out


@dataclass(frozen=True)
class CavityLimits:
    """Validity limits of a cavity table with its beam (see `cavity_limits`).

    Attributes
    ----------
    ok : ndarray of bool, broadcast shape S of the numeric arguments
        True where every limit holds.
    problems : list of (str, str)
        (kind, text) of the first violation of each kind, kind one of
        `LIMIT_KINDS`; texts under 255 characters name the row or argument
        and the limit.
    """

    ok: np.ndarray
    problems: list

    @property
    def message(self):
        """The first two problem texts joined (a cell's error message)."""
        return "; ".join(text for _, text in self.problems[:2])


def cavity_limits(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                  convention="circuit", resonance="hot", depression="none"):
    """Validity limits of the small-signal (and any table-fed) klystron model.

    Parameters
    ----------
    frequency, voltage, current, beam_radius, tunnel_radius, cavities
        As in `small_signal_gain`. [Hz, V, A, m, m, table]
    convention, resonance, depression : str, optional
        As in `small_signal_gain`.

    Returns
    -------
    CavityLimits
        ``ok`` mask over the broadcast numeric arguments and the first
        problem of each kind.  A table with problems of its own
        (`table_problems`) gives ``ok`` all True and no problems here: those
        are reported by `table_problems`.

    Notes
    -----
    Limits (each an error, never a number):

    - overlap: neighbouring gaps, each widened by its fringing field, must
      not overlap: spacing >= (d_k + d_{k+1})/2 + a.  The gap field leaks into
      the tunnel as exp(-2.405 |z|/a); one tunnel radius between the gap
      edges (the field down to about 10 % from each side) is the margin;
    - cutoff: the tunnel must not propagate at the signal frequency,
      2 pi f a/c < 2.405 (TM01 cutoff of a round guide); above it the gridless
      gap field is not confined and the coupling model fails;
    - current: I0 below the space-charge limiting current
      (`tubefuncs.physics.optics.limiting_current`, cathode voltage);
    - conductance: 1/Q0 + 1/Qext + (R/Q) G_B > 0 for every cavity, G_B the
      space-charge beam-loading conductance; a negative net conductance means
      the beam drives the cavity into oscillation (a long gridless gap with a
      transit angle beyond about 2 pi).

    The lambda_q/2 spacing rule (`cavity_spacing_ok`) is a design rule, not a
    validity limit, and is not checked here.  Another model fed by the same
    table (e.g. a large-signal one) can call this function as it stands.
    """
    t, problem = _as_table(cavities)
    if problem or table_problems(t):
        shape = np.broadcast_shapes(*(np.shape(x) for x in (frequency, voltage, current,
                                                           beam_radius, tunnel_radius)))
        return CavityLimits(np.ones(shape, dtype=bool), [])
    setup = _prepare(frequency, voltage, current, beam_radius, tunnel_radius, t, convention,
                     resonance, depression)
    return CavityLimits(_limits_ok(setup), _limit_texts(setup))


def _limits_ok(setup):
    shape = setup.beam.f.shape
    ok = np.ones(shape, dtype=bool)
    for kind in LIMIT_KINDS:
        mask = setup.limits[kind]
        if np.ndim(mask) > len(shape):
            mask = np.all(mask, axis=0)
        ok &= np.broadcast_to(mask, shape)
    return ok


def validate_cavities(cavities, frequency=None, voltage=None, current=None,
                      beam_radius=None, tunnel_radius=None, convention="circuit",
                      resonance="hot", depression="none"):
    """Problems of a cavity table, as short texts (empty list: none).

    Parameters
    ----------
    cavities : array_like, shape (n, 6)
        Cavity table (see the module help): position [m], resonant frequency
        [Hz], R/Q [ohm], Q0 [1], Qext [1] (NaN = idle), gap length [m].
    frequency, voltage, current, beam_radius, tunnel_radius : numeric, optional
        Signal frequency [Hz], beam voltage [V], beam current [A], beam radius
        [m] and tunnel radius [m].  When all are given, the checks that need
        the beam are made too: beam_radius <= tunnel_radius and the validity
        limits of `cavity_limits`.
    convention, resonance, depression : str, optional
        As in `small_signal_gain`.

    Returns
    -------
    list of str
        One text per problem, each under 255 characters, naming the row
        (1-based, counted from the top of the table) and what is allowed.

    Notes
    -----
    The table alone is checked for: 6 columns; at least 2 rows; numbers in
    every cell except Qext; positions strictly increasing along the beam;
    resonant frequency, R/Q, Q0 and gap length > 0; Qext > 0 or empty; a
    finite Qext on the input and the output cavity.  With the beam, the
    limits of `cavity_limits` (overlapping gaps, tunnel above cutoff, current
    above the limiting current, negative net cavity conductance).
    """
    problems = [text for _, text in table_problems(cavities)]
    beam_args = (frequency, voltage, current, beam_radius, tunnel_radius)
    if problems or any(x is None for x in beam_args):
        return problems
    b = np.asarray(beam_radius, dtype=float)
    a = np.asarray(tunnel_radius, dtype=float)
    bad_radius = ~(b <= a)
    if np.any(bad_radius):
        b, a = np.broadcast_arrays(b, a)
        k = np.flatnonzero(bad_radius.ravel())[0]
        problems.append(f"beam_radius must be <= tunnel_radius (got {b.ravel()[k]:g} m > "
                        f"{a.ravel()[k]:g} m)")
        return problems
    limits = cavity_limits(*beam_args, cavities, convention, resonance, depression)
    return problems + [text for _, text in limits.problems]


def cavity_spacing_ok(frequency, voltage, current, beam_radius, tunnel_radius, cavities):
    """Design rule: whether every cavity lies within lambda_q/2 of the previous one.

    Parameters
    ----------
    frequency, voltage, current, beam_radius, tunnel_radius : numeric
        As in `small_signal_gain`. [Hz, V, A, m, m]
    cavities : array_like, shape (n, 6)
        Cavity table.

    Returns
    -------
    ndarray of bool
        False where some cavity is more than u0/(2 f_q) downstream of the
        previous one at that frequency; True elsewhere.

    Notes
    -----
    A design rule, not a validity limit: beyond lambda_q/2 the current
    launched by the previous gap has passed its maximum at lambda_q/4 and a
    null, which wastes drift length, but the linear theory still holds.  The
    gain functions do not use it.
    """
    t, problem = _as_table(cavities)
    beam = _beam(frequency, voltage, current, beam_radius, tunnel_radius)
    if problem or t.shape[0] < 2 or not np.all(np.isfinite(t[:, POS])):
        return np.ones(beam.f.shape, dtype=bool)[()]
    with np.errstate(invalid="ignore"):
        # L > lambda_q/2 = u0/(2 f_q)
        far = np.diff(t[:, POS]).max() * beam.f_q > 0.5 * beam.u0
    return (~far)[()]


# ---------------------------------------------------------------------------
# The cavity chain
# ---------------------------------------------------------------------------

def wave_coupling(frequency, gap_length, wave_number, beam_radius=None, tunnel_radius=None):
    """Coupling coefficient of a gap to a beam wave of given wave number.

    Parameters
    ----------
    frequency : numeric
        Signal frequency f, > 0. [Hz]
    gap_length : numeric
        Gap length d, >= 0. [m]
    wave_number : numeric
        Axial wave number beta of the wave e^{j(omega t - beta z)}, with
        phase velocity omega/beta < c. [rad/m]
    beam_radius, tunnel_radius : numeric or None, optional
        Beam and tunnel radius for a gridless gap (RMS over the beam); both
        None for a gridded gap. [m]

    Returns
    -------
    numeric
        Coupling coefficient M(beta). [1]  NaN where the wave is not slower
        than light (omega/beta >= c) or beta <= 0.

    Notes
    -----
    A space-charge wave of wave number beta at angular frequency omega is
    seen by the gap exactly as a DC beam of velocity omega/beta would be:
    the transit angle is beta d and the radial constant of the gap field
    is sqrt(beta^2 - (omega/c)^2) = beta/gamma_ph, with gamma_ph the Lorentz
    factor of the phase velocity.  So M(beta) is `gap_coupling` evaluated at
    the beam voltage whose electrons move at omega/beta.  At beta = beta_e it
    is the ordinary coupling of the beam.  The fast space-charge wave of a
    relativistic beam becomes faster than light when f_q/f > 1 - u0/c; its
    gap field then varies as J0 across the tunnel, which the gridless-gap
    model of `gap_coupling` does not cover, hence NaN [2].
    """
    f = np.asarray(frequency, dtype=float)
    k = np.asarray(wave_number, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        b_ph = TWO_PI * f / (k * sc.c)  # phase velocity / c
        # (gamma - 1) m c^2/e of the phase velocity, written without cancellation:
        # gamma - 1 = b^2 / (s (1 + s)), s = sqrt(1 - b^2)
        s = np.sqrt((1.0 - b_ph) * (1.0 + b_ph))
        v_ph = REST_VOLTAGE * b_ph**2 / (s * (1.0 + s))
        ok = (k > 0) & (b_ph < 1.0) & (b_ph > 0)
        v_ph = np.where(ok, v_ph, np.nan)
        return gap_coupling(f, gap_length, v_ph, beam_radius, tunnel_radius)


def _column(x, ndim):
    """Cavity column as shape (n,) + (1,)*ndim, to broadcast against the beam."""
    return np.asarray(x, dtype=float).reshape((-1,) + (1,) * ndim)


def _beam_conductance(modulated_g0, beta_e, m_fast, m_slow, beta_q):
    """Beam-loading conductance from the fast/slow-wave couplings. [S]

    G_B = kappa G0 beta_e (M_f^2 - M_s^2) / (4 beta_q), M_f, M_s at beta_e -/+ beta_q:
    the space-charge form [3] (beta_e/(8 beta_q)) (M_-^2 - M_+^2) G0 times the
    relativistic 2/(gamma(gamma+1)); as beta_q -> 0 it is the kinematic
    -(beta_e/2) kappa G0 dM^2/d(beta_e).
    """
    return modulated_g0 * beta_e * (m_fast**2 - m_slow**2) / (4.0 * beta_q)


def _chain(frequency, u0, modulation, g0, beta_q, table, m_fast, m_slow, y_beam=None):
    """Gap voltages of the cavity chain for 1 W of available drive power.

    Parameters
    ----------
    frequency, u0, modulation, g0, beta_q : ndarray, broadcast shape S
        Signal frequency [Hz], DC velocity [m/s], velocity-modulation factor
        kappa = 1/(gamma(gamma+1)) (1/2 non-relativistically) [6], DC beam
        conductance G0 = I0/V0 [S] and plasma wave number beta_q > 0 [rad/m].
    table : ndarray, shape (n, 6)
        Validated cavity table.
    m_fast, m_slow : ndarray, shape (n,) + S
        Coupling of each gap to the fast and the slow space-charge wave,
        i.e. at the wave numbers beta_e - beta_q and beta_e + beta_q. [1]
    y_beam : ndarray, complex, shape (n,) + S, optional
        Beam-loading admittance of each gap (circuit R/Q table) [S]; by
        default the conductance `_beam_conductance` alone (hot frequencies).

    Returns
    -------
    ndarray, complex, shape (n,) + S
        Peak gap voltages, phase relative to the drive. [V per sqrt(W)]
    """
    nd = np.ndim(frequency)
    zeta = _column(table[:, POS] - table[0, POS], nd)  # distance from the input gap
    f0 = _column(table[:, F0], nd)
    rq = _column(table[:, RQ], nd)
    q0 = _column(table[:, Q0], nd)
    qext = table[:, QEXT]
    inv_qext = _column(np.where(np.isnan(qext), 0.0, 1.0 / qext), nd)  # NaN/inf: idle

    beta_e = TWO_PI * frequency / u0
    kg0 = modulation * g0

    # Beam-loading conductance, space-charge form [3] (plus the susceptance for
    # cold-test frequencies, `tubefuncs.physics.loading`)
    if y_beam is None:
        y_beam = _beam_conductance(kg0, beta_e, m_fast, m_slow, beta_q)

    # Cavity impedance, parallel resonant circuit [5], circuit R/Q:
    # Z = (R/Q) / (1/Q0 + 1/Qext + (R/Q) (G_B + j B_B) + j (f/f0 - f0/f))
    detune = frequency / f0 - f0 / frequency
    z_cav = rq / (1.0 / q0 + inv_qext + rq * y_beam + 1j * detune)

    # Transadmittance gap k -> gap n, a distance L = zeta_n - zeta_k downstream:
    # the gap launches a fast and a slow space-charge wave (beta_e -/+ beta_q),
    # each coupled by M at its own wave number [2]:
    #   Y_kn = kappa G0 (beta_e / (2 beta_q)) [M_f,k M_f,n e^{-j(beta_e - beta_q) L}
    #                                     - M_s,k M_s,n e^{-j(beta_e + beta_q) L}]
    # Equal couplings M give j kappa G0 (omega/omega_q) M_k M_n sin(beta_q L) e^{-j beta_e L} [3].
    # With wave phasors w_n = M_n e^{-j beta zeta_n}, M_k e^{-j beta L} M_n = w_n conj(w_k),
    # so the sum over every upstream gap k is a running sum per wave.
    w_fast = m_fast * np.exp(-1j * (beta_e - beta_q) * zeta)
    w_slow = m_slow * np.exp(-1j * (beta_e + beta_q) * zeta)
    scale = kg0 * beta_e / (2.0 * beta_q)

    # Matched driver of available power P = 1 W behind the input coupling:
    # Norton current sqrt(8 P G_ext) into the cavity, G_ext = 1/((R/Q) Qext) [5]
    volts = np.empty(np.shape(m_fast), dtype=complex)
    volts[0] = z_cav[0] * np.sqrt(8.0 * inv_qext[0] / rq[0])
    sum_fast = np.zeros(np.shape(frequency), dtype=complex)
    sum_slow = np.zeros(np.shape(frequency), dtype=complex)
    for n in range(1, len(zeta)):
        sum_fast += np.conj(w_fast[n - 1]) * volts[n - 1]
        sum_slow += np.conj(w_slow[n - 1]) * volts[n - 1]
        induced = scale * (w_fast[n] * sum_fast - w_slow[n] * sum_slow)  # sum_k Y_kn V_k
        # The induced current drives the cavity against the gap voltage
        # (power flows from beam to cavity): V_n = -Z_n sum_k Y_kn V_k
        volts[n] = -z_cav[n] * induced
    return volts


@dataclass(frozen=True)
class SmallSignalResponse:
    """Small-signal response of a cavity chain (see `small_signal_response`).

    Attributes
    ----------
    gap_voltage : ndarray, complex, shape (n_cavities,) + S
        Peak gap voltage of every cavity for 1 W of available drive power,
        phase relative to the drive. [V]
    transfer : ndarray, complex, shape S
        Complex power-wave gain: |transfer|^2 = P_out/P_avail and
        arg(transfer) = arg(V_N) relative to the drive. [1]
    """

    gap_voltage: np.ndarray
    transfer: np.ndarray

    @property
    def gain_db(self):
        """Power gain 10 log10(P_out/P_avail). [dB]"""
        with np.errstate(divide="ignore", invalid="ignore"):
            return (10.0 * np.log10(np.abs(self.transfer) ** 2))[()]

    @property
    def phase_deg(self):
        """Phase of the output-gap voltage relative to the drive, (-180, 180]. [deg]"""
        return np.degrees(np.angle(self.transfer))[()]


def small_signal_response(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                          convention="circuit", resonance="hot", depression="none"):
    """Complex small-signal response of a multi-cavity klystron.

    Parameters
    ----------
    frequency : numeric
        Signal frequency, > 0; an array gives one result per element. [Hz]
    voltage : numeric
        Beam voltage V0, > 0. [V]
    current : numeric
        DC beam current I0, > 0. [A]
    beam_radius : numeric
        Radius b of the solid round beam, 0 < b <= tunnel_radius. [m]
    tunnel_radius : numeric
        Drift-tube (tunnel) radius a. [m]
    cavities : array_like, shape (n, 6)
        Cavity table, input first, output last: position [m], resonant
        frequency [Hz], R/Q [ohm, circuit convention], Q0, Qext (NaN, inf or
        huge: idle cavity), gap length [m].  See the module help.
    convention : str, optional
        Convention of the R/Q column: "circuit" (default, V^2/(2 omega W)) or
        "accelerator" (V^2/(omega W); "linac" accepted).  Eigenmode solvers
        often report the accelerator value, twice the circuit one.
    resonance : str, optional
        What the resonant-frequency column holds: "hot" (default), the
        beam-loaded frequencies; or "cold", cold-test frequencies (what a
        cavity measurement gives): the beam-loading susceptance B_B of each
        gap is then added to its cavity (`tubefuncs.physics.loading`), which
        moves each resonance to its beam-loaded value at every frequency.
    depression : str, optional
        "none" (default): the beam kinematics use the cathode voltage;
        "mean": they use the beam-averaged kinetic voltage after the
        space-charge potential depression
        (`tubefuncs.physics.optics.depressed_voltage`).

    Returns
    -------
    SmallSignalResponse
        ``gap_voltage`` (n,) + S complex [V for 1 W of available drive] and
        ``transfer`` (S) complex with |transfer|^2 the power gain; properties
        ``gain_db`` and ``phase_deg``.  S is the broadcast shape of the
        numeric arguments.  Everything is NaN where the inputs make no sense
        (see Notes), everywhere if the table itself has a problem (see
        `validate_cavities`).

    Notes
    -----
    Model (confined flow, small signal, thin-gap superposition):

    - Beam: relativistic u0 and gamma; reduced plasma frequency
      f_q = R f_p with the longitudinal plasma frequency f_p (gamma^3) and
      the reduction factor R at the signal frequency for a solid beam in its
      tunnel (`tubefuncs.physics.plasma`).  beta_e = omega/u0,
      beta_q = 2 pi f_q/u0.
    - Gap k modulates the velocity by M V_k/(V0 gamma (gamma+1)), which is
      M V_k/(2 V0) non-relativistically [6]; this is the factor
      kappa = 1/(gamma(gamma+1)) below.
    - Sign convention: phasors e^{j omega t}; V_k is the gap voltage that
      accelerates electrons, the current is e times the electron flux.  Then
      Y_kn carries +j (ballistically the bunch current lags the modulating
      voltage by theta0 - 90 deg [4], since j e^{-j theta0} = e^{-j(theta0 - 90 deg)})
      and V_n = -Z_n sum_k Y_kn V_k (the cavity voltage decelerates the bunch
      that drives it).  A consequence: an intermediate cavity tuned above the
      signal (inductive) adds in phase with the direct modulation from the
      cavities before it.
    - Each gap launches a fast and a slow space-charge wave (wave numbers
      beta_e -/+ beta_q) and couples to each with the gridless-gap RMS
      coefficient M taken at that wave number (`wave_coupling`) [2].  The
      current induced in gap n by gap k, a distance L
      downstream, is Y_kn V_k with

          Y_kn = kappa G0 (beta_e/(2 beta_q)) [M_f,k M_f,n e^{-j(beta_e - beta_q)L}
                                          - M_s,k M_s,n e^{-j(beta_e + beta_q)L}],

      G0 = I0/V0.  With equal couplings M this is the familiar
      j kappa G0 (omega/omega_q) M_k M_n sin(omega_q L/u0) e^{-j beta_e L} [3],
      and as f_q -> 0 it tends to the ballistic j kappa G0 theta0 M_k M_n e^{-j theta0}
      of Webster's small-X result [4] plus the gaps' finite-extent term.
      The induced current of gap n sums over every upstream gap.
    - Cavity n is a parallel resonant circuit [5]:
      Z_n = (R/Q)/(1/Q0 + 1/Qext + (R/Q) G_B + j(f/f0 - f0/f)), and
      V_n = -Z_n sum_{k<n} Y_kn V_k.
    - Beam loading: the conductance G_B = kappa G0 beta_e (M_f^2 - M_s^2)/(4 beta_q),
      the space-charge form of [3] with the relativistic factor, consistent
      with the transadmittance above (it reduces to the kinematic
      gridded-gap result -(theta/2) kappa G0 dM^2/dtheta as f_q -> 0 with grids).
      The beam-loading susceptance B_B shifts each resonance: by default the
      table's resonant frequencies are read as the beam-loaded ("hot")
      ones; with resonance="cold" they are cold-test frequencies and
      j B_B joins each cavity's admittance.
    - Input: a matched driver of available power P behind the input
      cavity's external coupling is a Norton current sqrt(8 P G_ext),
      G_ext = 1/((R/Q) Qext), so V_1 = 2 Q_L sqrt(2 (R/Q) P/Qext)/(1 + j Q_L
      (f/f0 - f0/f)) with Q_L including beam loading [5].
    - Output: P_out = |V_N|^2/(2 (R/Q)_N Qext_N).
    - Idle cavity: Qext empty (NaN) or inf means no external load
      (1/Qext = 0); a very large Qext gives the same result continuously.

    Validity: small signal (gap voltages << V0, no saturation), confined
    flow, no velocity spread, one space-charge mode, gap couplings from the
    flat-field-at-the-wall gridless gap model.  Intermediate cavities with
    a finite Qext are loaded by it (their power is not counted as output).

    NaN where: frequency <= 0, voltage <= 0, current <= 0, beam_radius <= 0,
    beam_radius > tunnel_radius, f_q >= f (no fast space-charge wave), the
    fast wave faster than light (f_q/f > 1 - u0/c, see `wave_coupling`),
    where a validity limit of `cavity_limits` fails (overlapping gaps, tunnel
    above the TM01 cutoff, current above the limiting current, a cavity with
    negative net conductance), or, with depression="mean", no depressed
    solution; everywhere if `validate_cavities` finds a table problem.  The
    lambda_q/2 spacing rule is a design rule and is not enforced.
    """
    t, problem = _as_table(cavities)
    if problem or table_problems(t):
        shape = np.broadcast_shapes(*(np.shape(x) for x in (frequency, voltage, current,
                                                           beam_radius, tunnel_radius)))
        n = t.shape[0] if t is not None else 0
        return SmallSignalResponse(np.full((n,) + shape, np.nan, dtype=complex),
                                   np.full(shape, np.nan) + 0j)
    setup = _prepare(frequency, voltage, current, beam_radius, tunnel_radius, t, convention,
                     resonance, depression)
    beam, t = setup.beam, setup.table
    ok = beam.ok & _limits_ok(setup)
    ok &= np.all(np.isfinite(setup.m_fast) & np.isfinite(setup.m_slow)
                 & np.isfinite(setup.y_beam), axis=0)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        volts = _chain(beam.f, beam.u0, setup.modulation, setup.g0, setup.beta_q, t,
                       setup.m_fast, setup.m_slow, setup.y_beam)
    volts = np.where(ok, volts, np.nan)
    # transfer = V_N sqrt(G_ext,N / 2) / sqrt(P_avail), P_avail = 1 W
    transfer = volts[-1] * np.sqrt(0.5 / (t[-1, RQ] * t[-1, QEXT]))
    return SmallSignalResponse(volts, transfer)


def small_signal_gain(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                      convention="circuit", resonance="hot", depression="none"):
    """Small-signal power gain of a multi-cavity klystron.

    Parameters
    ----------
    frequency : numeric
        Signal frequency, > 0. [Hz]
    voltage : numeric
        Beam voltage V0, > 0. [V]
    current : numeric
        DC beam current I0, > 0. [A]
    beam_radius : numeric
        Radius of the solid round beam, 0 < beam_radius <= tunnel_radius. [m]
    tunnel_radius : numeric
        Drift-tube radius. [m]
    cavities : array_like, shape (n, 6)
        Cavity table, input first: position [m], resonant frequency [Hz], R/Q
        [ohm, circuit], Q0, Qext (empty = idle), gap length [m].
    convention, resonance, depression : str, optional
        R/Q convention ("circuit" default, "accelerator"), what the frequency
        column holds ("hot" default, "cold") and whether the kinematics use
        the depressed voltage ("none" default, "mean"); see
        `small_signal_response`.  Optional and last, in this order.

    Returns
    -------
    numeric
        Gain 10 log10(P_out/P_avail): P_out is the power into the output
        cavity's external load, P_avail the available power of a matched
        driver at the input cavity's external port. [dB]  NaN where the
        inputs make no sense (see `small_signal_response`).

    Notes
    -----
    Space-charge-wave theory, every upstream gap contributing; see
    `small_signal_response` for the model, its assumptions and validity.

    References
    ----------
    [1]-[6] of the module.
    """
    return small_signal_response(frequency, voltage, current, beam_radius, tunnel_radius,
                                 cavities, convention, resonance, depression).gain_db


def small_signal_phase(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                       convention="circuit", resonance="hot", depression="none"):
    """Small-signal phase of the output-gap voltage relative to the drive.

    Parameters
    ----------
    frequency, voltage, current, beam_radius, tunnel_radius, cavities
        As in `small_signal_gain`.
    convention, resonance, depression : str, optional
        As in `small_signal_gain`.

    Returns
    -------
    numeric
        Phase of the output-gap voltage relative to the drive, in **degrees**,
        wrapped to (-180, 180]. [deg]  The drive reference is the input-gap
        voltage the matched driver would set up at the input cavity's
        resonance without beam; the phase includes the beam transit delay
        omega (z_N - z_1)/u0, so it turns quickly with frequency.  NaN where
        the inputs make no sense.

    Notes
    -----
    See `small_signal_response` for the model.  Degrees, not radians, as the
    worksheet function TUBE_SMALL_SIGNAL_PHASE returns them.

    References
    ----------
    [1]-[6] of the module.
    """
    return small_signal_response(frequency, voltage, current, beam_radius, tunnel_radius,
                                 cavities, convention, resonance, depression).phase_deg


def bandwidth(frequency, gain_db, drop_db=1.0):
    """Edges of the band around the gain peak within ``drop_db`` of the peak.

    Parameters
    ----------
    frequency : array_like, 1-D, increasing
        Swept frequencies. [Hz]
    gain_db : array_like, 1-D
        Gain at those frequencies. [dB]
    drop_db : float, optional
        Allowed drop below the peak, > 0 (1 dB by default). [dB]

    Returns
    -------
    (float, float)
        Lower and upper band edge, linearly interpolated between samples.
        [Hz]  An edge is NaN when the gain stays within ``drop_db`` of the
        peak up to the end of the sweep (the band is wider than the sweep);
        both are NaN when no gain value is finite.

    Notes
    -----
    The band is the contiguous run of samples around the highest gain whose
    gain is at least peak - drop_db; a second lobe separated by a deeper dip
    is not counted.  Common practice.
    """
    f = np.asarray(frequency, dtype=float)
    g = np.asarray(gain_db, dtype=float)
    finite = np.isfinite(g)
    if not np.any(finite):
        return np.nan, np.nan
    peak = int(np.nanargmax(np.where(finite, g, -np.inf)))
    level = g[peak] - drop_db
    inside = finite & (g >= level)
    lo = peak
    while lo > 0 and inside[lo - 1]:
        lo -= 1
    hi = peak
    while hi < len(g) - 1 and inside[hi + 1]:
        hi += 1

    def edge(i_in, i_out):
        if not np.isfinite(g[i_out]):
            return f[i_in]
        # linear interpolation of the crossing of `level`
        return f[i_in] + (f[i_out] - f[i_in]) * (g[i_in] - level) / (g[i_in] - g[i_out])

    f_low = edge(lo, lo - 1) if lo > 0 else np.nan
    f_high = edge(hi, hi + 1) if hi < len(g) - 1 else np.nan
    return float(f_low), float(f_high)


#: Frequencies of the coarse sweep that `small_signal_bandwidth` searches.
_BANDWIDTH_POINTS = 4001
#: Half-span of that sweep beyond the outermost cavities, in widest cavity bandwidths.
_BANDWIDTH_MARGIN = 8.0


def _refined_crossing(f_guess, half_step, level, beam_and_table):
    """Frequency near ``f_guess`` where the gain crosses ``level`` (201-point sweep)."""
    fine = np.linspace(f_guess - half_step, f_guess + half_step, 201)
    g = small_signal_gain(fine, *beam_and_table) - level
    crossing = np.nonzero(np.diff(np.sign(g)) != 0)[0]
    if crossing.size == 0:
        return f_guess
    k = crossing[0]
    return fine[k] + (fine[k + 1] - fine[k]) * g[k] / (g[k] - g[k + 1])


def _band_width(sweep, beam_and_table, drop):
    """Width of the band within ``drop`` dB of the peak, found in three passes."""
    # 1. coarse sweep over the whole tuning range
    f_low, f_high = bandwidth(sweep, small_signal_gain(sweep, *beam_and_table), drop)
    if not (np.isfinite(f_low) and np.isfinite(f_high)):
        return np.nan
    # 2. zoom on the band, one band width either side
    width = f_high - f_low
    zoom = np.linspace(max(f_low - width, 0.5 * f_low), f_high + width, _BANDWIDTH_POINTS)
    gain_db = small_signal_gain(zoom, *beam_and_table)
    f_low, f_high = bandwidth(zoom, gain_db, drop)
    if not (np.isfinite(f_low) and np.isfinite(f_high)):
        return np.nan
    # 3. refine the peak, then each edge, on fine sweeps around the samples
    step = zoom[1] - zoom[0]
    k = int(np.nanargmax(gain_db))
    fine = np.linspace(zoom[k] - step, zoom[k] + step, 201)
    level = max(np.nanmax(small_signal_gain(fine, *beam_and_table)), gain_db[k]) - drop
    return (_refined_crossing(f_high, step, level, beam_and_table)
            - _refined_crossing(f_low, step, level, beam_and_table))


def small_signal_bandwidth(voltage, current, beam_radius, tunnel_radius, cavities,
                           drop_db=1.0, convention="circuit", resonance="hot",
                           depression="none"):
    """Bandwidth around the small-signal gain peak, within ``drop_db`` of the peak.

    Parameters
    ----------
    voltage : numeric
        Beam voltage V0, > 0. [V]
    current : numeric
        DC beam current I0, > 0. [A]
    beam_radius : numeric
        Radius of the solid round beam, 0 < beam_radius <= tunnel_radius. [m]
    tunnel_radius : numeric
        Drift-tube radius. [m]
    cavities : array_like, shape (n, 6)
        Cavity table as for `small_signal_gain`.
    drop_db : numeric, optional
        Drop below the peak gain that bounds the band, > 0 (1 dB by default).
        [dB]
    convention, resonance, depression : str, optional
        As in `small_signal_gain` (after drop_db, in this order).

    Returns
    -------
    numeric
        Width f_high - f_low of the contiguous band around the gain peak in
        which the gain stays within ``drop_db`` of the peak. [Hz]  NaN when
        the table or beam makes no sense, or when the band reaches the edge of
        the searched sweep.

    Notes
    -----
    The gain (`small_signal_gain`) is swept over the cavity frequencies
    widened by eight times the widest cavity bandwidth f0/Q_L (Q0 and Qext
    only) on each side, on 4001 points; then again on 4001 points over the
    band found, widened by its own width on each side; the peak and each band
    edge are then located on sweeps of 201 points across the samples around
    them, and the edges interpolated linearly.  A second lobe separated from the peak by a deeper
    dip is not counted (common practice for the "1 dB bandwidth").  The beam
    arguments broadcast; each beam case is one vectorised sweep.

    References
    ----------
    [1]-[6] of the module.
    """
    args = np.broadcast_arrays(*(np.asarray(x, dtype=float) for x in
                                 (voltage, current, beam_radius, tunnel_radius, drop_db)))
    out = np.full(args[0].shape, np.nan)
    table, problem = _as_table(cavities)
    if problem or table_problems(table):
        return out[()]
    f0 = table[:, F0]
    qext = np.where(np.isnan(table[:, QEXT]), np.inf, table[:, QEXT])
    q_loaded = 1.0 / (1.0 / table[:, Q0] + 1.0 / qext)
    widest = float(np.max(f0 / q_loaded))
    low = max(float(f0.min()) - _BANDWIDTH_MARGIN * widest, 0.5 * float(f0.min()))
    high = float(f0.max()) + _BANDWIDTH_MARGIN * widest
    sweep = np.linspace(low, high, _BANDWIDTH_POINTS)
    for idx in np.ndindex(out.shape):
        v, i, b, a, drop = (x[idx] for x in args)
        if drop > 0:
            out[idx] = _band_width(sweep, (v, i, b, a, table, convention, resonance,
                                           depression), drop)
    return out[()]


#: Relative step of the central differences of the phase-pushing figures.
_PUSH_STEP = 1e-5


def _phase_derivative(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                      convention, resonance, depression, which):
    args = [np.asarray(x, dtype=float) for x in (voltage, current)]
    x = args[which]
    h = _PUSH_STEP * x
    up, down = list(args), list(args)
    up[which] = x + h
    down[which] = x - h
    t_up = small_signal_response(frequency, up[0], up[1], beam_radius, tunnel_radius,
                                 cavities, convention, resonance, depression).transfer
    t_down = small_signal_response(frequency, down[0], down[1], beam_radius, tunnel_radius,
                                   cavities, convention, resonance, depression).transfer
    with np.errstate(invalid="ignore", divide="ignore"):
        # arg(T+/T-) is the phase difference without wrapping
        return (np.angle(t_up / t_down) / (2.0 * h))[()]


def phase_per_volt(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                   convention="circuit", resonance="hot", depression="none"):
    """Phase pushing by the beam voltage: d(output phase)/d(V0) at fixed current.

    Parameters
    ----------
    frequency, voltage, current, beam_radius, tunnel_radius, cavities
        As in `small_signal_gain`. [Hz, V, A, m, m, table]
    convention, resonance, depression : str, optional
        As in `small_signal_gain`.

    Returns
    -------
    numeric
        d phi/d V0 of `small_signal_phase` (radians here) at constant current.
        [rad/V]  NaN where the gain model gives no result.

    Notes
    -----
    Central difference of the complex transfer at V0 (1 +/- 1e-5), so the
    phase is never unwrapped; the truncation error is about 1e-10 relative.
    It is dominated by the transit delay: d(omega L/u0)/dV0 =
    -(omega L/u0)/(V0 gamma (gamma + 1)) so the output phase *advances* as V0
    rises, by theta0/(V0 gamma(gamma+1)) rad/V; the cavities and space charge
    add to it.  The figure a modulator ripple budget needs: phase ripple =
    this times the voltage ripple.  For a diode gun whose current follows
    V0^1.5, add 1.5 (I0/V0) times `phase_per_ampere`.
    """
    return _phase_derivative(frequency, voltage, current, beam_radius, tunnel_radius,
                             cavities, convention, resonance, depression, 0)


def phase_per_ampere(frequency, voltage, current, beam_radius, tunnel_radius, cavities,
                     convention="circuit", resonance="hot", depression="none"):
    """Phase pushing by the beam current: d(output phase)/d(I0) at fixed voltage.

    Parameters
    ----------
    frequency, voltage, current, beam_radius, tunnel_radius, cavities
        As in `small_signal_gain`. [Hz, V, A, m, m, table]
    convention, resonance, depression : str, optional
        As in `small_signal_gain`.

    Returns
    -------
    numeric
        d phi/d I0 at constant voltage. [rad/A]  NaN where the gain model
        gives no result.

    Notes
    -----
    Central difference as in `phase_per_volt`.  The current acts through the
    plasma frequency (the phase of the fast/slow-wave sum), the beam loading
    of every cavity and, with depression="mean", the depressed voltage.
    """
    return _phase_derivative(frequency, voltage, current, beam_radius, tunnel_radius,
                             cavities, convention, resonance, depression, 1)
