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


def solve_gap(gap_pass, z_cav, source, v_scale, tol, max_iter):
    """Solve V = Z (I_src - I(V)) for every point of a batch.

    Parameters
    ----------
    gap_pass : callable
        gap_pass(V) -> (I, state): the induced current for gap voltage V
        (complex, shape (P,)) and the disk state after the gap.
    z_cav : ndarray, complex, shape (P,)
        Cold impedance. [ohm]
    source : ndarray, complex, shape (P,)
        Generator current (0 for a cavity without drive). [A]
    v_scale : ndarray, shape (P,)
        Beam voltage, for the absolute floor of the tolerance. [V]
    tol : float
        Relative tolerance on the residual |V - Z (I_src - I(V))|.
    max_iter : int
        Most gap passes.

    Returns
    -------
    (V, I, state, converged)
    """
    va = z_cav * source
    ia, state_a = gap_pass(va)
    ra = va - z_cav * (source - ia)
    vb = z_cav * (source - ia)
    ib, state_b = gap_pass(vb)
    rb = vb - z_cav * (source - ib)
    floor = 1e-12 * v_scale
    for _ in range(max_iter):
        done = np.abs(rb) <= tol * np.abs(vb) + floor
        if np.all(done):
            break
        denom = rb - ra
        with np.errstate(invalid="ignore", divide="ignore"):
            secant = vb - rb * (vb - va) / denom
        vc = np.where(np.abs(denom) > 0, secant, z_cav * (source - ib))
        # keep trial voltages within a few beam voltages (beyond, every disk stalls)
        big = np.abs(vc) > 4.0 * v_scale
        vc = np.where(big, vc / np.abs(vc) * 4.0 * v_scale, vc)
        vc = np.where(done, vb, vc)
        va, ra = np.where(done, va, vb), np.where(done, ra, rb)
        vb = vc
        ib, state_b = gap_pass(vb)
        rb = vb - z_cav * (source - ib)
    done = np.abs(rb) <= tol * np.abs(vb) + floor
    return vb, ib, state_b, done
