"""Gap interaction: the axial field profile of a gridless gap, seen by a 1-D beam.

A gridless gap in a round tunnel of radius a is modelled, as in the
small-signal coupling of `tubefuncs.physics.gap.gap_coupling`, by a field
that is uniform across the gap (length d) on the tunnel wall r = a and zero
on the wall elsewhere [1].  Inside the tunnel each axial Fourier component
e^{-j beta z} of the field varies across the beam as I0(gamma_r r)/I0(gamma_r a),
with the radial constant gamma_r = sqrt(beta^2 - k0^2), k0 = omega/c
(quasi-static would be gamma_r = beta; the k0 term is the full wave equation
at the signal frequency).

A 1-D disk model needs one field profile g(z) per gap, with
Re(V e^{j omega t}) g(z) the accelerating field seen by a disk.  We take the
profile whose Fourier transform is the RMS coupling over the beam,

    G(beta) = int g(z) e^{j beta z} dz = M_rms(beta)
            = sinc(beta d / 2) sqrt(I0^2(gamma_r b) - I1^2(gamma_r b)) / I0(gamma_r a),

so that a disk crossing the gap at any constant velocity v gains exactly the
energy e |V| M_rms(omega/v) cos(...) that `gap_coupling` gives at the voltage
of that velocity: the coupling is evaluated per disk at its own velocity, and
at the DC velocity it is the worksheet's TUBE_GAP_COUPLING.  The RMS (not the
mean) is the value that makes modulation times induction equal the beam
average <M^2> in confined flow (see `gap_coupling`).  Below k0 (|beta| < k0,
waves faster than light, irrelevant to the beam but part of the transform)
gamma_r is imaginary and I0, I1 become J0, J1.

The profile is computed once per (frequency, radii, gap length) by a discrete
inverse cosine transform (FFT), with a smooth spectral cut-off
exp(-(beta/beta_c)^4), beta_c = 8 omega/u0 at the default step grid
(a quarter of the steps per beam wavelength in general), that leaves G within 4e-3 up to
twice the DC wave number (disks slowed to half the DC velocity) and makes
g smooth on the scale of the step grid.  It is truncated where |g| falls
below 1e-3 of its peak (the field decays as exp(-2.405 |z|/a) outside the
gap) and its samples on the step grid are rescaled so that the step-grid
quadrature of G at the DC wave number equals M_rms(omega/u0) exactly: the
small-signal coupling of every gap is the worksheet's, to rounding.

References
----------
[1] G. M. Branch, "Electron beam coupling in interaction gaps of cylindrical
    symmetry", IRE Trans. Electron Devices ED-8(3), 193-207, 1961 (gridless
    gap with a prescribed field at the tunnel wall) [from memory].
[2] M. Abramowitz and I. A. Stegun, *Handbook of Mathematical Functions*,
    NBS, 1964, Sec. 9.6 (I0, I1; I_n(jx) = j^n J_n(x)) [from memory].
"""

from __future__ import annotations

import numpy as np
from scipy import constants as sc
from scipy import special

#: Spectral cut-off of the profile, in DC wave numbers omega/u0.
CUTOFF_WAVES = 8.0
#: Truncation level of the profile tails, relative to its peak.
TAIL_LEVEL = 1e-3
#: Points of the inverse transform.
N_FFT = 4096


def rms_coupling(beta, k0, gap_length, beam_radius, tunnel_radius):
    """RMS gridless-gap coupling at axial wave number ``beta`` (any sign). [1]

    Parameters
    ----------
    beta : ndarray
        Axial wave number. [rad/m]
    k0 : ndarray
        Free-space wave number omega/c. [rad/m]
    gap_length, beam_radius, tunnel_radius : ndarray
        Gap length d, beam radius b, tunnel radius a. [m]

    Returns
    -------
    ndarray
        M_rms(beta) = sinc(beta d/2) sqrt(I0^2(g b) - I1^2(g b))/I0(g a),
        g = sqrt(beta^2 - k0^2) (J0, J1 where beta^2 < k0^2). [1]
    """
    beta = np.abs(np.asarray(beta, dtype=float))
    s2 = beta * beta - k0 * k0
    x = 0.5 * beta * gap_length
    m_grid = np.sinc(x / np.pi)  # sin(x)/x
    slow = s2 >= 0.0
    g = np.sqrt(np.abs(s2))
    gb = g * beam_radius
    ga = g * tunnel_radius
    with np.errstate(over="ignore", invalid="ignore"):
        i0b, i1b, i0a = special.i0e(gb), special.i1e(gb), special.i0e(ga)
        radial_slow = np.sqrt((i0b - i1b) * (i0b + i1b)) / i0a * np.exp(gb - ga)
        # I0(jx) = J0(x), I1(jx)^2 = -J1(x)^2 [2]
        radial_fast = np.sqrt(special.j0(gb) ** 2 + special.j1(gb) ** 2) / np.abs(special.j0(ga))
    return m_grid * np.where(slow, radial_slow, radial_fast)


def profile(frequency, u0, gap_length, beam_radius, tunnel_radius, cutoff_waves=CUTOFF_WAVES):
    """Axial field profile g(z) of one gridless gap, on a fine grid.

    Parameters
    ----------
    frequency, u0, gap_length, beam_radius, tunnel_radius : float
        Signal frequency [Hz], DC velocity [m/s], gap length, beam and tunnel
        radius [m].
    cutoff_waves : float, optional
        Spectral cut-off beta_c in DC wave numbers (8 by default; the model
        ties it to its step grid, a quarter of the steps per beam wavelength).

    Returns
    -------
    (z, g) : (ndarray, ndarray)
        Positions relative to the gap centre, symmetric, [m], and g(z) [1/m],
        truncated at `TAIL_LEVEL` of the peak.
    """
    omega = 2.0 * np.pi * frequency
    beta_e = omega / u0
    k0 = omega / sc.c
    # the transform's period must hold the gap and its decaying tails many times over
    period = 8.0 * (gap_length + 8.0 * tunnel_radius) + 4.0 * np.pi / beta_e
    d_beta = 2.0 * np.pi / period
    n_half = N_FFT // 2 + 1
    beta = d_beta * np.arange(n_half)
    spectrum = rms_coupling(beta, k0, gap_length, beam_radius, tunnel_radius)
    spectrum = spectrum * np.exp(-(beta / (cutoff_waves * beta_e)) ** 4)
    # g(z) = (1/pi) int_0^inf G(beta) cos(beta z) d beta; irfft gives
    # (1/n) [G_0 + 2 sum_k G_k cos(2 pi k m/n)] (real, even spectrum)
    g = np.fft.irfft(spectrum, n=N_FFT) * N_FFT * d_beta / (2.0 * np.pi)
    dz = period / N_FFT
    g = np.fft.fftshift(g)
    z = (np.arange(N_FFT) - N_FFT // 2) * dz
    keep = np.abs(g) >= TAIL_LEVEL * np.abs(g).max()
    idx = np.flatnonzero(keep)
    half = max(abs(z[idx[0]]), abs(z[idx[-1]]))
    inside = np.abs(z) <= half + 0.5 * dz
    return z[inside], g[inside]

