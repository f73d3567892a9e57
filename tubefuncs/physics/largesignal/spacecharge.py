"""Space-charge field between the charge disks of a solid beam in a round tunnel.

Green's function
----------------
A thin disk of charge q, uniform over the beam radius b, at z = 0 inside a
grounded round tunnel of radius a, has the potential
phi = sum_n A_n J0(p_n r/a) exp(-p_n |z|/a), p_n the zeros of J0.  The jump
of d(phi)/dz across the disk, expanded in the J0 series, gives A_n; averaging
the axial field over a second disk of the same radius gives the disk-to-disk
field [1], [2]

    E_z(z) = sign(z) (q / (pi eps0 b^2)) sum_n c_n exp(-p_n |z| / a),
    c_n = 2 J1^2(p_n b/a) / (p_n^2 J1^2(p_n)),

with sum_n c_n -> 1/2 as a -> infinity (the field q/(2 eps0 A) of a charged
sheet).  For disks moving together at the DC velocity u0 the field is the
static one at the rest-frame separation gamma0 z (the longitudinal field is
unchanged by the boost) [3]: p_n |z|/a -> gamma0 p_n |z|/a.

Periodic images
---------------
In the periodic steady state each disk has an image every beam wavelength
L = u0/f.  The image sum of one series term is a geometric series:

    sum_m sign(x - mL) exp(-kappa |x - mL|)
        = sinh(kappa (L/2 - x)) / sinh(kappa L/2),     0 < x < L,

so the periodic Green's function is exact, with no truncated image sum.

Made cheap
----------
The periodic Green's function is tabulated once per beam by its Fourier
coefficients in the RF phase: for harmonic h of the line charge, wave number
beta_h = h omega/u0, the field is the unreduced 1-D field times

    K_h = sum_n 2 c_n beta_h^2 / (beta_h^2 + (gamma0 p_n/a)^2),

the squared plasma-frequency reduction factor of the disk model at that
harmonic (K_h -> 1 for short waves).  The accelerating field on disk i from
all disks and their images is then (charge per disk I0 T/N, electrons)

    E_i = (2 I0 / (N omega eps0 pi b^2)) sum_{h=1}^{H} (K_h / h) Im(S_h e^{-j h phi_i}),
    S_h = sum_j e^{j h phi_j},

O(N H) per step instead of O(N^2), with phi = omega t the arrival phase.
Truncating at H harmonics gives the disks a thickness of about a beam
wavelength / H (no singular force between overtaking disks).  The sum over
i of the fields vanishes identically (Im |S_h|^2 = 0), so space charge moves
energy between disks but never creates any: the energy balance of the model
is exact.

Calibration to the exact reduction factor
------------------------------------------
The disk average treats the space-charge wave as uniform across the beam;
the exact lowest space-charge mode (`tubefuncs.physics.plasma`) has its
radial profile.  The two reduction factors differ by a few per cent (the
disk average is lower).  The coefficients K_h are scaled by one factor
R_exact^2 / K_1 so that the model's small-signal plasma wavelength is the
exact one of TUBE_PLASMA_WAVELENGTH, and agrees with TUBE_SMALL_SIGNAL_GAIN;
the higher harmonics keep the disk model's shape.

References
----------
[1] P. K. Tien, L. R. Walker and V. M. Wolontis, "A large signal theory of
    traveling-wave amplifiers", Proc. IRE 43(3), 260-277, 1955 (the beam as
    charge disks; field of a disk in a tunnel) [from memory].
[2] S. E. Webber, "Ballistic analysis of a two-cavity finite beam klystron"
    and "Large signal analysis of the multicavity klystron", IRE Trans.
    Electron Devices ED-5, 1958 (disk model of the klystron with the
    Bessel-series space-charge field) [from memory].
[3] J. D. Jackson, *Classical Electrodynamics*, 3rd ed., Wiley, 1999,
    Sec. 11.10 (fields of a uniformly moving charge) [from memory].
[4] G. M. Branch and T. G. Mihran, "Plasma frequency reduction factors in
    electron beams", IRE Trans. Electron Devices ED-2(2), 3-11, 1955
    [from memory].
"""

from __future__ import annotations

import numpy as np
from scipy import constants as sc
from scipy import special

from ..plasma import reduction_factor

#: Radial modes kept in the Bessel series (the terms fall as 1/n^2 beyond b/a ~ 1).
N_MODES = 400
_P = special.jn_zeros(0, N_MODES)
_J1P2 = special.j1(_P) ** 2


def series_coefficients(ratio):
    """c_n = 2 J1^2(p_n b/a) / (p_n^2 J1^2(p_n)) for b/a = ``ratio`` (shape (..., N_MODES))."""
    ratio = np.asarray(ratio, dtype=float)[..., None]
    return 2.0 * special.j1(_P * ratio) ** 2 / (_P**2 * _J1P2)


def green(z, beam_radius, tunnel_radius, gamma0=1.0):
    """Disk-to-disk accelerating field per unit charge, isolated disk (no images).

    Parameters
    ----------
    z : ndarray
        Position of the field disk relative to the source disk. [m]
    beam_radius, tunnel_radius : float
        b and a. [m]
    gamma0 : float, optional
        Lorentz factor of the common motion (relativistic contraction). [1]

    Returns
    -------
    ndarray
        E_z / q averaged over the field disk, for a positive source. [V/(m C)]
    """
    z = np.asarray(z, dtype=float)
    c = series_coefficients(beam_radius / tunnel_radius)
    decay = np.exp(-gamma0 * _P * np.abs(z)[..., None] / tunnel_radius)
    return np.sign(z) * np.sum(c * decay, axis=-1) / (np.pi * sc.epsilon_0 * beam_radius**2)


def periodic_green(x, wavelength, beam_radius, tunnel_radius, gamma0=1.0):
    """Periodic form of `green`: the source disk and its images every ``wavelength``.

    Parameters
    ----------
    x : ndarray
        Separation in (0, wavelength). [m]

    Returns
    -------
    ndarray
        sum_m green(x - m L) in closed form, sinh(kappa (L/2 - x))/sinh(kappa L/2)
        per series term. [V/(m C)]
    """
    x = np.asarray(x, dtype=float)[..., None]
    c = series_coefficients(beam_radius / tunnel_radius)
    kappa = gamma0 * _P / tunnel_radius
    half = 0.5 * wavelength
    # sinh(k(L/2 - x))/sinh(k L/2), written with exponentials that cannot overflow
    ratio = ((np.exp(-kappa * x) - np.exp(-kappa * (2 * half - x)))
             / (1.0 - np.exp(-2 * kappa * half)))
    return np.sum(c * ratio, axis=-1) / (np.pi * sc.epsilon_0 * beam_radius**2)


def harmonic_coefficients(frequency, u0, gamma0, voltage, beam_radius, tunnel_radius,
                          harmonics, calibrate=True):
    """Reduction coefficients K_h of the periodic Green's function, h = 1..H.

    Parameters
    ----------
    frequency, u0, gamma0, voltage, beam_radius, tunnel_radius : ndarray, shape (P,)
        Per operating point: signal frequency [Hz], DC velocity [m/s],
        Lorentz factor, beam voltage [V], beam and tunnel radius [m].
    harmonics : int
        H.
    calibrate : bool, optional
        Scale all K_h so that K_1 is the exact R^2 (see the module help).

    Returns
    -------
    ndarray, shape (P, H)
        K_h. [1]
    """
    h = np.arange(1, harmonics + 1, dtype=float)
    beta = (2.0 * np.pi * frequency / u0)[:, None] * h          # (P, H)
    kappa = (gamma0 / tunnel_radius)[:, None] * _P              # (P, M)
    c = series_coefficients(beam_radius / tunnel_radius)         # (P, M)
    b2 = beta[:, :, None] ** 2
    k_h = np.sum(2.0 * c[:, None, :] * b2 / (b2 + kappa[:, None, :] ** 2), axis=-1)
    if calibrate:
        exact = np.asarray(reduction_factor(frequency, voltage, beam_radius, tunnel_radius),
                           dtype=float) ** 2
        k_h = k_h * (exact / k_h[:, 0])[:, None]
    return k_h


def field_scale(frequency, current, beam_radius, disks):
    """2 I0 / (N omega eps0 pi b^2), the factor of the harmonic sum. [V/m]"""
    omega = 2.0 * np.pi * frequency
    return 2.0 * current / (disks * omega * sc.epsilon_0 * np.pi * beam_radius**2)


def disk_fields(phase_powers, weights, sums=None):
    """Accelerating space-charge field on every disk.

    Parameters
    ----------
    phase_powers : ndarray, complex, shape (P, N, H)
        e^{j h phi_i} for h = 1..H.
    weights : ndarray, shape (P, H)
        field_scale * K_h / h.
    sums : ndarray, complex, shape (P, H), optional
        S_h = sum_i e^{j h phi_i}, when already known.

    Returns
    -------
    ndarray, shape (P, N)
        E_i. [V/m]
    """
    s = phase_powers.sum(axis=1) if sums is None else sums
    # Im(w_h S_h conj(e^{j h phi_i})) summed over h = Im(conj(powers) @ (w S))
    # Im(conj(p) w) = -Im(p conj(w))
    ws = np.conj(weights * s)
    return -(phase_powers @ ws[..., None])[..., 0].imag
