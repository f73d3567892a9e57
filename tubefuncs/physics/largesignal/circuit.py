"""Cavity circuits: impedance, the matched generator and the self-consistent gap voltage.

Every cavity is a parallel resonant circuit at its gap [1], with the
conventions of TUBE_SMALL_SIGNAL_GAIN (`tubefuncs.physics.gain`): circuit
R/Q = V^2/(2 omega W), unloaded Q0, external Qext (NaN or inf: idle),

    Z(f) = (R/Q) / (1/Q0 + 1/Qext + j (f/f0 - f0/f)),

the *cold* impedance: beam loading is not put in by hand here, it comes out
of the disks' motion through the gap.  The input cavity is driven by a
matched generator of available power P behind its external coupling, a
Norton current I_g = sqrt(8 P / ((R/Q) Qext)) of phase zero [1].  The gap
voltage V (accelerating for electrons, phasor e^{j omega t}) satisfies

    V = Z (I_g - I(V)),

I(V) the fundamental current the disks induce in the gap
((2 I0/N) sum_j int g(z) e^{-j phi_j(z)} dz), which depends on V through
the disks' motion in the gap field (beam loading, large-signal saturation).
The equation is solved per cavity, down the beam, by the complex secant
method: I(V) is close to I_free + Y_beam V (beam loading is nearly linear),
on which the secant step is exact; idle cavities of high Q, where the plain
fixed point V <- Z (I_g - I(V)) would diverge (|Z Y_beam| > 1), converge in
a few passes too.

Powers: wall (1/2)|V|^2/((R/Q) Q0), load (1/2)|V|^2/((R/Q) Qext), the power
the beam gives the gap -(1/2) Re(V conj(I)) (the energy balance of a cavity:
wall + load = generator + beam).

References
----------
[1] D. M. Pozar, *Microwave Engineering*, 4th ed., Wiley, 2012, Ch. 6
    (parallel resonant circuit, external Q, a resonator driven from a
    matched line) [from memory for the chapter].
"""

from __future__ import annotations

import numpy as np


def impedance(frequency, f0, r_over_q, q0, qext, beam_susceptance=0.0):
    """Cavity impedance at the gap (parallel resonance), circuit R/Q. [ohm]

    ``beam_susceptance`` B_B [S] is taken out of the circuit,
    Z = (R/Q) / (1/Q0 + 1/Qext + j (f/f0 - f0/f) - j (R/Q) B_B), so that with the
    beam's own small-signal admittance G_B + j B_B added the cavity resonates at
    f0: f0 is the beam-loaded ("hot") resonant frequency.
    """
    inv_qext = np.where(np.isnan(qext), 0.0, 1.0 / qext)
    detune = frequency / f0 - f0 / frequency
    return r_over_q / (1.0 / q0 + inv_qext + 1j * (detune - r_over_q * beam_susceptance))


def generator_current(drive_power, r_over_q, qext):
    """Norton current of a matched generator of available power P. [A]"""
    return np.sqrt(8.0 * drive_power / (r_over_q * qext))


def wall_power(v, r_over_q, q0):
    """Power into the cavity walls, (1/2)|V|^2/((R/Q) Q0). [W]"""
    return 0.5 * np.abs(v) ** 2 / (r_over_q * q0)


def load_power(v, r_over_q, qext):
    """Power into the external load, (1/2)|V|^2/((R/Q) Qext); 0 for an idle cavity. [W]"""
    inv = np.where(np.isnan(qext), 0.0, 1.0 / qext)
    return 0.5 * np.abs(v) ** 2 * inv / r_over_q


def _as_matrix(c):
    """2x2 real matrix of multiplication by complex c, as (a, b, c, d) arrays."""
    return [c.real.copy(), -c.imag, c.imag.copy(), c.real.copy()]


def solve_gap(gap_pass, z_cav, source, v_scale, tol, max_iter, admittance=None):
    """Solve V = Z (I_src - I(V)) for every point of a batch.

    Parameters
    ----------
    gap_pass : callable
        gap_pass(V, rows=None) -> (I, state): the induced current for gap
        voltage V (complex, shape (P,), or of the points ``rows`` only) and
        the disk state after the gap.
    z_cav : ndarray, complex, shape (P,)
        Circuit impedance. [ohm]
    source : ndarray, complex, shape (P,)
        Generator current (0 for a cavity without drive). [A]
    v_scale : ndarray, shape (P,)
        Beam voltage, for the absolute floor of the tolerance. [V]
    tol : float
        Relative tolerance on the residual |V - Z (I_src - I(V))|.
    max_iter : int
        Most gap passes.
    admittance : ndarray, complex, shape (P,), optional
        Small-signal beam-loading admittance Y of the gap.

    Returns
    -------
    (V, I, state, converged)

    Notes
    -----
    The residual r(V) = V - Z (I_src - I(V)) is a map of the plane (real and
    imaginary part of V); near saturation it is not complex-analytic (it
    depends on |V|), so a complex secant converges slowly.  Broyden's method
    in two real dimensions is used instead (C. G. Broyden, Math. Comp. 19,
    577, 1965, from memory), started from the small-signal Jacobian
    1 + Z Y: the first step V = Z (I_src - I_free)/(1 + Z Y) is exact in the
    linear regime (I_free the current induced at V = 0).
    """
    y = np.zeros_like(z_cav) if admittance is None else admittance
    jac = _as_matrix(1.0 + z_cav * y)
    x = np.zeros_like(z_cav)
    cur, state = gap_pass(x)
    r = x - z_cav * (source - cur)
    floor = 1e-12 * v_scale
    done = np.abs(r) <= tol * np.abs(x) + floor
    for _ in range(max_iter):
        if np.all(done):
            break
        rows = np.flatnonzero(~done)  # only the points still moving are pushed again
        a, b, c, d = (m[rows] for m in jac)
        xr, rr, zr = x[rows], r[rows], z_cav[rows]
        det = a * d - b * c
        with np.errstate(invalid="ignore", divide="ignore"):
            dx_re = -(d * rr.real - b * rr.imag) / det
            dx_im = -(-c * rr.real + a * rr.imag) / det
        dx = dx_re + 1j * dx_im
        dx = np.where(np.isfinite(dx), dx, 0.0)
        new = xr + dx
        # keep trial voltages within a few beam voltages (beyond, every disk stalls)
        vmax = 4.0 * v_scale[rows]
        big = np.abs(new) > vmax
        new = np.where(big, new / np.abs(np.where(big, new, 1.0)) * vmax, new)
        dx = new - xr
        cur_new, part = gap_pass(new, rows=rows)
        r_new = new - zr * (source[rows] - cur_new)
        # Broyden update J += (dr - J dx) dx^T / |dx|^2
        dr = r_new - rr
        jdx_re = a * dx.real + b * dx.imag
        jdx_im = c * dx.real + d * dx.imag
        norm = np.abs(dx) ** 2
        with np.errstate(invalid="ignore", divide="ignore"):
            u_re = np.where(norm > 0, (dr.real - jdx_re) / norm, 0.0)
            u_im = np.where(norm > 0, (dr.imag - jdx_im) / norm, 0.0)
        for m, upd in zip(jac, (a + u_re * dx.real, b + u_re * dx.imag,
                                c + u_im * dx.real, d + u_im * dx.imag)):
            m[rows] = upd
        x[rows], r[rows], cur[rows] = new, r_new, cur_new
        state.put(rows, part)
        done = np.abs(r) <= tol * np.abs(x) + floor
    return x, cur, state, done
