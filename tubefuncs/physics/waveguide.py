"""Rectangular waveguide, TE10 mode: cutoff frequency and conductor loss.

The guide has a broad wall of inside width ``a`` and a narrow wall of inside
height ``b`` (b <= a, so that TE10 is the dominant mode), is empty (vacuum or
dry air) and has smooth, non-magnetic metal walls of conductivity sigma.

References
----------
[1] D. M. Pozar, *Microwave Engineering*, 4th ed., Wiley, 2012, Sec. 3.3
    (rectangular waveguide; TE10 attenuation due to conductor loss; the
    equation number, 3.96 in that section, is from memory).
[2] IEC 60028:1925, International standard of resistance for copper (default
    conductivity, see :mod:`tubefuncs.materials`).
"""

from __future__ import annotations

import numpy as np
from scipy import constants as sc

from ..materials import COPPER_CONDUCTIVITY

#: Wave impedance of free space, eta0 = mu0 c. [ohm]
ETA0 = sc.mu_0 * sc.c

#: Decibels of power per neper of field amplitude, 20 log10(e) (the 20-log
#: convention: a field decaying as exp(-alpha z) loses 8.686 alpha z dB of power).
DB20_PER_NEPER = 20.0 / np.log(10.0)


def waveguide_cutoff(width):
    """Cutoff frequency of the TE10 mode of an empty rectangular waveguide.

    Parameters
    ----------
    width : numeric
        Inside width a of the broad wall, > 0. [m]

    Returns
    -------
    numeric
        f_c = c / (2 a). [Hz]  NaN where width <= 0.

    Notes
    -----
    Vacuum filling; dry air at atmospheric pressure lowers f_c by about
    0.03 % (refractive index about 1.0003, from memory). The cutoff does not
    depend on the height b. References: [1], Sec. 3.3.
    """
    a = np.asarray(width, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        fc = (0.5 * sc.c) / a                          # [1]: f_c = c / (2a) for TE10
    if a.min(initial=np.inf) > 0:                      # cheap test; NaN fails it
        return fc[()]
    return np.where(a > 0, fc, np.nan)[()]


def waveguide_loss(frequency, width, height, length, conductivity=COPPER_CONDUCTIVITY):
    """Conductor loss of the TE10 mode along a rectangular waveguide.

    Parameters
    ----------
    frequency : numeric
        Signal frequency, above the TE10 cutoff c/(2 a). [Hz]
    width : numeric
        Inside width a of the broad wall, > 0. [m]
    height : numeric
        Inside height b of the narrow wall, 0 < b <= a. [m]
    length : numeric
        Length of the run, >= 0. [m]
    conductivity : numeric, optional
        Electrical conductivity of the walls, > 0; default annealed copper,
        5.8e7 S/m (IEC 60028 [2]). [S/m]

    Returns
    -------
    numeric
        Loss of the run, 20 log10(e) * alpha_c * length. [dB]  NaN at or
        below the TE10 cutoff, where height > width, and where an argument
        is outside its range.

    Notes
    -----
    The attenuation constant of TE10 from wall loss ([1], Sec. 3.3)

        alpha_c = R_s (2 b pi^2 + a^3 k^2) / (a^3 b beta k eta0)
                = R_s / (b eta0 sqrt(1 - (f_c/f)^2)) * (1 + (2b/a) (f_c/f)^2)

    in Np/m, with R_s = sqrt(pi f mu0 / sigma) the surface resistance of a
    good conductor, k = 2 pi f / c and beta = k sqrt(1 - (f_c/f)^2). The
    perturbation method behind it assumes skin depth << wall dimensions and
    smooth walls. The loss grows without bound towards cutoff; close to it
    (f < 1.25 f_c, say) the formula is correct but such a guide is not used.
    Above 2 f_c (or c/(2b)) higher modes also propagate; the result is still
    the loss of the TE10 mode.

    Real guides lose about 10-30 % more than this smooth-wall value (surface
    roughness, plating, flange joints) [from memory]. Dielectric loss of the
    filling is not included.
    """
    f = np.asarray(frequency, dtype=float)
    a = np.asarray(width, dtype=float)
    b = np.asarray(height, dtype=float)
    ell = np.asarray(length, dtype=float)
    sigma = np.asarray(conductivity, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        # Factors that do not depend on frequency are grouped first: with one
        # guide and a column of frequencies they stay single numbers.
        r2 = ((0.5 * sc.c) / a / f) ** 2                 # (f_c / f)^2 with f_c = c/(2a)
        rs = np.sqrt(f * ((np.pi * sc.mu_0) / sigma))    # R_s = sqrt(pi f mu0 / sigma)
        # [1]: alpha = R_s (1 + (2b/a)(f_c/f)^2) / (b eta0 sqrt(1 - (f_c/f)^2))  [Np/m]
        loss = ((DB20_PER_NEPER * ell) / (b * ETA0)) * rs * (1.0 + (2.0 * b / a) * r2) \
            / np.sqrt(1.0 - r2)
    # Out of domain -> NaN.  Below cutoff, r2 >= 1 already makes the square root
    # NaN or the division infinite, so only the other arguments need masks.
    ok = (b > 0) & (b <= a) & (ell >= 0) & (sigma > 0) & (f > 0)
    if np.all(ok) and np.ndim(loss) and r2.max() < 1.0:  # one reduction, no temporary
        return loss
    return np.where(ok & (r2 < 1.0), loss, np.nan)[()]
