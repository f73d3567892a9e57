"""The march down the tube: disks through gaps and drifts, cavity by cavity.

`solve` takes the worksheet arguments (broadcast to a common shape S), flattens
them to P operating points and solves them as one batch: every array is
shaped (P, disks).  All points share one step grid along the tube (fine
enough for the most demanding point).

For each cavity in turn, input first:
1. the disks arrive at the start of the gap field (from the previous drift);
2. the gap voltage is solved self-consistently (`circuit.solve_gap`), each
   trial voltage pushing the disks through the gap field with space charge;
3. the disks, as pushed by the converged voltage, drift to the next gap.

Validity (`STATUS`): a point fails, with the cavity named, where a disk
stalls or turns back, the gap voltage does not converge, or the energy
balance (kinetic power the beam loses = wall + load powers - generator power
into the input gap) misses by more than `ENERGY_TOLERANCE` of the beam power.
Inputs outside the model fail before the march: a tunnel that passes its
lowest TM01 mode at the signal frequency, a beam current above the limiting
current of the tunnel, gaps that overlap.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from scipy import constants as sc

from .. import gain as _gain
from ..beam import REST_VOLTAGE, gamma, velocity
from ..plasma import reduced_plasma_freq
from . import circuit, gapfield, spacecharge
from .disks import Beam, initial_phases

POS, F0, RQ, Q0, QEXT, GAP = _gain.POS, _gain.F0, _gain.RQ, _gain.Q0, _gain.QEXT, _gain.GAP

#: Largest batch (operating points) one call may solve: memory grows as points x disks x harmonics.
MAX_POINTS = 4096
#: Energy balance allowed, relative to the beam power V0 I0.
ENERGY_TOLERANCE = 1e-3
#: 4 pi eps0 m c^3 / e, the current unit of the limiting current [A] (about 17.05 kA).
_ALFVEN = 4.0 * np.pi * sc.epsilon_0 * sc.m_e * sc.c**3 / sc.e
#: First zero of J0.
_J01 = 2.404825557695773

#: Gap voltage of the small-signal probe of each gap, relative to the beam voltage.
_LINEAR_PROBE = 1e-6
#: Disks of that probe (linear response: the fundamental only).
_PROBE_DISKS = 4

#: Status codes of an operating point.
OK, BAD_INPUT, STALLED, NO_CONVERGENCE, ENERGY, PROPAGATING, LIMITING, OVERLAP = range(8)


@dataclass(frozen=True)
class Accuracy:
    """Discretisation of the model.

    disks : charge disks per RF period.
    harmonics : harmonics of the space-charge field (disk thickness ~ wavelength/H).
    gap_steps : steps per DC beam wavelength inside gap fields.
    drift_steps_plasma : steps per reduced plasma wavelength in drifts.
    drift_steps_wave : steps per DC beam wavelength in drifts (at least).
    tol : relative tolerance of each gap voltage.
    max_iter : most gap passes per cavity.
    """

    disks: int = 48
    harmonics: int = 16
    gap_steps: float = 32.0
    drift_steps_plasma: float = 48.0
    drift_steps_wave: float = 2.0
    tol: float = 1e-6
    max_iter: int = 40


DEFAULT = Accuracy()


@dataclass
class Result:
    """Large-signal solution of a batch (shape S = broadcast shape of the arguments).

    Powers in W, voltages in V, energies in eV (per electron).
    """

    shape: tuple
    status: np.ndarray            # S, int (see the status codes)
    cavity: np.ndarray            # S, int, 1-based cavity of a failure (0: none)
    gap_voltage: np.ndarray       # (n,) + S complex, peak, phase vs the drive
    gap_current: np.ndarray       # (n,) + S complex, induced fundamental current
    wall_power: np.ndarray        # (n,) + S
    load_power: np.ndarray        # (n,) + S
    drive_power: np.ndarray       # S, available power of the generator
    input_power: np.ndarray       # S, power the generator delivers to the input cavity
    beam_power: np.ndarray        # S, V0 I0
    kinetic_loss: np.ndarray      # S, kinetic power the beam has lost after the output gap
    spent_min: np.ndarray         # S, slowest electron after the output gap [eV]
    spent_max: np.ndarray         # S, fastest electron after the output gap [eV]
    z: np.ndarray = field(default=None)           # (steps,) positions of the trace [m]
    harmonic_current: np.ndarray = None           # (steps, 2) + S: |I1|, |I2| along the beam
    phases: np.ndarray = None                     # (steps, disks) + S, relative phases [rad]
    table: np.ndarray = None

    @property
    def ok(self):
        return self.status == OK

    @property
    def output_power(self):
        """Power into the output cavity's external load. [W]"""
        return np.where(self.ok, self.load_power[-1], np.nan)

    def message(self, index=()):
        """Text of the failure at ``index`` (None when the point is fine)."""
        return status_text(int(self.status[index]), int(self.cavity[index]))


def status_text(status, cavity):
    """Message for a status code (None for OK)."""
    where = f"cavity {cavity}" if cavity else "the beam"
    return {
        OK: None,
        BAD_INPUT: "inputs outside the model's domain",
        STALLED: (f"{where}: electrons stall or turn back (kinetic energy below "
                  "0.5 % of the DC value); the drive or the gap voltage is too high "
                  "for this model"),
        NO_CONVERGENCE: f"{where}: the gap voltage did not converge (self-consistent solve)",
        ENERGY: f"{where}: energy balance missed by more than 1e-3 of the beam power",
        PROPAGATING: ("the tunnel passes its TM01 mode at this frequency "
                      "(2 pi f a / c >= 2.405): the drift is not cut off"),
        LIMITING: ("beam current above the space-charge limiting current of the tunnel "
                   "(17.05 kA (gamma^(2/3) - 1)^1.5 / (1 + 2 ln(a/b)))"),
        OVERLAP: f"cavity {cavity}: its gap overlaps the previous gap",
    }[status]


def limiting_current(voltage, beam_radius, tunnel_radius):
    """Space-charge limiting current of the beam in its tunnel (confined flow). [A]

    The one of `tubefuncs.physics.optics.limiting_current` (the limit TUBE_SMALL_SIGNAL_GAIN
    checks too), of the form 4 pi eps0 m c^3/e (gamma^(2/3) - 1)^(3/2) / (1 + 2 ln(a/b))
    (L. S. Bogdankevich and A. A. Rukhadze, Sov. Phys. Usp. 14, 163, 1971, from memory).
    """
    from ..optics import limiting_current as shared

    return shared(voltage, beam_radius, tunnel_radius)


def _overlap_rows(table, tunnel_radius):
    """1-based row whose gap overlaps the previous one, per point (0: none).

    The rule of `tubefuncs.physics.gain.cavity_limits`: spacing >= (d_k + d_{k+1})/2 + a
    (one tunnel radius of fringing field).
    """
    z, d = table[:, POS], table[:, GAP]
    a = np.asarray(tunnel_radius, dtype=float)
    out = np.zeros(a.shape, dtype=int)
    for n in range(len(z) - 1, 0, -1):
        bad = z[n] - z[n - 1] < 0.5 * (d[n] + d[n - 1]) + a
        out[bad] = n + 1
    return out


def _segments(table, half_widths):
    """Gap field regions [start, end] per cavity, clipped at mid-points between gaps."""
    z = table[:, POS]
    start = z - half_widths
    end = z + half_widths
    for n in range(1, len(z)):
        mid = 0.5 * (z[n - 1] + z[n])
        end[n - 1] = min(end[n - 1], mid)
        start[n] = max(start[n], mid)
    return start, end


def solve(frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power,
          convention="circuit", resonance="hot", depression="none", accuracy=DEFAULT,
          record=False):
    """Solve the large-signal model for broadcast arguments.

    Parameters
    ----------
    frequency, voltage, current, beam_radius, tunnel_radius, drive_power : numeric
        Signal frequency [Hz], beam voltage [V], beam current [A], beam and
        tunnel radius [m], available drive power [W]; broadcast together.
    cavities : array_like, shape (n, 6)
        Cavity table of TUBE_SMALL_SIGNAL_GAIN.
    convention, resonance, depression : str, optional
        The options of TUBE_SMALL_SIGNAL_GAIN: R/Q column "circuit" (default) or
        "accelerator"/"linac" (twice circuit); frequency column "hot" (default:
        beam-loaded; the disk model's small-signal beam-loading susceptance is
        taken out of each circuit) or "cold" (cold-test: the disks' own beam
        loading detunes the cavities); beam kinematics from the cathode
        voltage ("none", default) or from the depressed kinetic voltage
        ("mean", `tubefuncs.physics.optics.depressed_voltage`).  The beam
        power and the efficiency always use the cathode voltage.
    accuracy : Accuracy, optional
        Discretisation.
    record : bool, optional
        Keep the trace along the beam (harmonic currents, disk phases).

    Returns
    -------
    Result

    Raises
    ------
    ValueError
        The batch is larger than `MAX_POINTS`, or an option is not one of its choices.
    """
    convention = _gain._option(convention, _gain.CONVENTIONS, "convention")
    resonance = _gain._option(resonance, _gain.RESONANCES, "resonance")
    depression = _gain._option(depression, _gain.DEPRESSIONS, "depression")
    args = np.broadcast_arrays(*(np.asarray(x, dtype=float) for x in
                                 (frequency, voltage, current, beam_radius, tunnel_radius,
                                  drive_power)))
    shape = args[0].shape
    size = int(np.prod(shape))
    if size > MAX_POINTS:
        raise ValueError(f"at most {MAX_POINTS} operating points per call (got {size})")
    f, v, i, b, a, p = (x.ravel() for x in args)
    table, problem = _gain._as_table(cavities)
    if table is not None and not problem:
        from ..cavity import convention_factor

        table = table.copy()
        table[:, RQ] = table[:, RQ] / convention_factor(convention)  # -> circuit R/Q
    n_cav = 0 if table is None else table.shape[0]
    status = np.zeros(size, dtype=int)
    cav = np.zeros(size, dtype=int)
    cplx = np.full((n_cav, size), np.nan + 0j)
    real = np.full((n_cav, size), np.nan)
    nan = np.full(size, np.nan)
    result = Result(shape, status, cav, cplx, cplx.copy(), real, real.copy(), p.copy(),
                    nan.copy(), v * i, nan.copy(), nan.copy(), nan.copy(), table=table)
    if problem or _gain.table_problems(table):
        status[:] = BAD_INPUT
        return _reshape(result)
    good = ((f > 0) & (v > 0) & (i > 0) & (b > 0) & (a > 0) & (b <= a) & (p >= 0)
            & np.isfinite(f + v + i + b + a + p))
    status[~good] = BAD_INPUT
    with np.errstate(all="ignore"):
        prop = good & (2.0 * np.pi * f * a / sc.c >= _J01)
        status[prop] = PROPAGATING
        lim = good & ~prop & (i >= limiting_current(v, b, a))
        status[lim] = LIMITING
    over = _overlap_rows(table, a)
    take = (status == OK) & (over > 0)
    status[take], cav[take] = OVERLAP, over[take]
    v_kin = v
    if depression == "mean":
        from ..optics import depressed_voltage

        with np.errstate(all="ignore"):
            v_kin = np.asarray(depressed_voltage(i, v, b, a, "mean"), dtype=float)
        status[(status == OK) & ~(v_kin > 0)] = BAD_INPUT
    live = np.flatnonzero(status == OK)
    if live.size:
        _march(result, live, f[live], v_kin[live], i[live], b[live], a[live], p[live], table,
               accuracy, record, resonance == "hot")
    return _reshape(result)


def _reshape(result):
    s = result.shape
    n = result.gap_voltage.shape[0]
    for name in ("status", "cavity", "drive_power", "input_power", "beam_power",
                 "kinetic_loss", "spent_min", "spent_max"):
        setattr(result, name, getattr(result, name).reshape(s))
    for name in ("gap_voltage", "gap_current", "wall_power", "load_power"):
        setattr(result, name, getattr(result, name).reshape((n,) + s))
    if result.harmonic_current is not None:
        hc = result.harmonic_current
        result.harmonic_current = hc.reshape(hc.shape[:2] + s)
        ph = result.phases
        result.phases = ph.reshape(ph.shape[:2] + s)
    return result


def _march(result, live, f, v, i, b, a, p, table, acc, record, hot=True):
    """Solve the live points in one batch and store them into ``result``."""
    n_pts = live.size
    n_cav = table.shape[0]
    u0 = velocity(v)
    g0 = gamma(v)
    omega = 2.0 * np.pi * f
    beta_e = omega / u0
    lam_e = u0 / f
    with np.errstate(all="ignore"):
        f_q = np.asarray(reduced_plasma_freq(f, i, v, b, a), dtype=float)
    lam_q = np.where(f_q > 0, u0 / f_q, np.inf)

    # gap field profiles: one per distinct (f, u0, d, b, a); tabulated on a fine grid
    profiles = {}
    half = np.zeros(n_cav)
    keys = np.stack([f, u0, b, a], axis=1)
    uniq, inverse = np.unique(keys, axis=0, return_inverse=True)
    inverse = inverse.ravel()
    for n in range(n_cav):
        d = table[n, GAP]
        for k, (fk, uk, bk, ak) in enumerate(uniq):
            zg, gg = gapfield.profile(fk, uk, d, bk, ak, acc.gap_steps / 4.0)
            profiles[n, k] = (zg, gg)
            half[n] = max(half[n], zg[-1])
    start, end = _segments(table, half)

    dz_gap = float(np.min(lam_e)) / acc.gap_steps
    dz_drift = float(min(np.min(lam_q) / acc.drift_steps_plasma,
                         np.min(lam_e) * acc.drift_steps_wave))

    # space-charge weights and the disks
    harm = acc.harmonics
    k_h = spacecharge.harmonic_coefficients(f, u0, g0, v, b, a, harm)
    weights = (spacecharge.field_scale(f, i, b, acc.disks)[:, None] * k_h
               / np.arange(1, harm + 1))
    kinetic0 = g0 - 1.0
    beam = Beam(initial_phases(n_pts, acc.disks), np.repeat(g0[:, None], acc.disks, axis=1),
                omega[:, None], weights, 2.0 * i / acc.disks, kinetic0)

    trace_z, trace_i, trace_phi = [], [], []

    def keep(z_end, state):
        # trace at the end of a step: |I1|, |I2| and each disk's phase relative to an
        # unmodulated electron
        if record:
            e = np.exp(-1j * state.phi)
            trace_z.append(z_end)
            trace_i.append(np.abs(np.stack([e.sum(axis=1), (e * e).sum(axis=1)], axis=1))
                           * state.current_scale[:, None])
            rel = state.phi - omega[:, None] * (z_end - start[0]) / u0[:, None]
            trace_phi.append(np.angle(np.exp(1j * (rel - np.pi))) + np.pi)

    status = np.zeros(n_pts, dtype=int)
    cav = np.zeros(n_pts, dtype=int)
    volts = np.zeros((n_cav, n_pts), dtype=complex)
    amps = np.zeros((n_cav, n_pts), dtype=complex)
    source0 = circuit.generator_current(p, table[0, RQ], table[0, QEXT])
    for n in range(n_cav):
        z0, z1 = start[n], end[n]
        steps = max(4, int(np.ceil((z1 - z0) / dz_gap)))
        dz = (z1 - z0) / steps
        mids = z0 + dz * (np.arange(steps) + 0.5)
        # profile samples at the step mid-planes, per point: (P, steps)
        gmid = np.empty((n_pts, steps))
        for k in range(len(uniq)):
            zg, gg = profiles[n, k]
            rows = inverse == k
            gmid[rows] = np.interp(mids - table[n, POS], zg, gg, left=0.0, right=0.0)
        # rescale so that the step-grid quadrature gives M_rms(beta_e) exactly
        target = gapfield.rms_coupling(beta_e, omega / sc.c, table[n, GAP], b, a)
        quad = np.sum(gmid * np.cos(beta_e[:, None] * (mids - table[n, POS])), axis=1) * dz
        gmid *= (target / quad)[:, None]

        entry = beam

        def gap_pass(volt, entry=entry, gmid=gmid, dz=dz, steps=steps, mids=mids,
                     rec=False, rows=None):
            # rows: only these points (the others have converged); volt is theirs
            if rows is None:
                state, g = entry.copy(), gmid
            else:
                state, g = entry.take(rows), gmid[rows]
            induced = np.zeros(len(volt), dtype=complex)
            for m in range(steps):
                sums = state.step(dz, volt * g[:, m])
                induced += g[:, m] * dz * np.conj(sums[:, 0])
                if rec:
                    keep(mids[m] + 0.5 * dz, state)
            return induced * state.current_scale, state

        # the table's resonant frequency is the beam-loaded ("hot") one, as in
        # TUBE_SMALL_SIGNAL_GAIN: the small-signal beam-loading susceptance of the
        # gap, found from a pass of an unmodulated beam, is taken out of the circuit
        # (linear response of an unmodulated beam: the fundamental alone, which
        # _PROBE_DISKS equally spaced disks carry exactly)
        fresh_beam = Beam(initial_phases(n_pts, _PROBE_DISKS),
                          np.repeat(g0[:, None], _PROBE_DISKS, axis=1), omega[:, None],
                          weights[:, :1] * (acc.disks / _PROBE_DISKS),
                          2.0 * i / _PROBE_DISKS, kinetic0)
        probe = _LINEAR_PROBE * v
        i_probe, _ = gap_pass(probe + 0j, entry=fresh_beam)
        # cold-test frequencies: the beam's own susceptance stays in (it detunes)
        susceptance = np.imag(i_probe / probe) if hot else np.zeros(n_pts)
        z_cav = circuit.impedance(f, table[n, F0], table[n, RQ], table[n, Q0], table[n, QEXT],
                                  susceptance)
        source = source0 if n == 0 else np.zeros(n_pts)
        vn, i_n, beam, conv = circuit.solve_gap(gap_pass, z_cav, source + 0j, v,
                                               acc.tol, acc.max_iter, i_probe / probe)
        if record:
            _, beam = gap_pass(vn, rec=True)
        volts[n], amps[n] = vn, i_n
        fresh = status == OK
        bad = fresh & ~conv
        status[bad], cav[bad] = NO_CONVERGENCE, n + 1
        stalled = (status == OK) & beam.stalled()
        status[stalled], cav[stalled] = STALLED, n + 1
        if n + 1 < n_cav:
            # drift to the next gap field
            length = start[n + 1] - end[n]
            nd = max(1, int(np.ceil(length / dz_drift)))
            step = length / nd
            for m in range(nd):
                beam.step(step)
                keep(end[n] + step * (m + 1), beam)
            beam.check_low()
            stalled = (status == OK) & beam.stalled()
            status[stalled], cav[stalled] = STALLED, n + 1

    rq, q0, qext = table[:, RQ][:, None], table[:, Q0][:, None], table[:, QEXT][:, None]
    wall = circuit.wall_power(volts, rq, q0)
    load = circuit.load_power(volts, rq, qext)
    # generator power into the input cavity: (1/2) Re(V1 conj(I_g))
    p_in = 0.5 * np.real(volts[0] * np.conj(source0))
    kinetic_loss = -(beam.gam - g0[:, None]).sum(axis=1) * REST_VOLTAGE * i / acc.disks
    balance = kinetic_loss + p_in - (wall.sum(axis=0) + load.sum(axis=0))
    broke = (status == OK) & ~(np.abs(balance) <= ENERGY_TOLERANCE * v * i)
    status[broke], cav[broke] = ENERGY, n_cav

    r = result
    r.status[live] = status
    r.cavity[live] = cav
    r.gap_voltage[:, live] = volts
    r.gap_current[:, live] = amps
    r.wall_power[:, live] = wall
    r.load_power[:, live] = load
    r.input_power[live] = p_in
    r.kinetic_loss[live] = kinetic_loss
    r.spent_min[live] = (beam.gam.min(axis=1) - 1.0) * REST_VOLTAGE
    r.spent_max[live] = (beam.gam.max(axis=1) - 1.0) * REST_VOLTAGE
    if record:
        order = np.argsort(trace_z, kind="stable")
        r.z = np.asarray(trace_z)[order]
        hc = np.full((len(order), 2, r.status.size), np.nan)
        hc[:, :, live] = np.stack(trace_i, axis=0)[order].transpose(0, 2, 1)
        ph = np.full((len(order), acc.disks, r.status.size), np.nan)
        ph[:, :, live] = np.stack(trace_phi, axis=0)[order].transpose(0, 2, 1)
        r.harmonic_current, r.phases = hc, ph
