"""Link budget: path loss, antenna gain, EIRP, G/T, C/N0, Saleh amplifier model.

Levels in dB follow two conventions, named in the helpers: ``_db10`` for power
ratios (10 log10) and ``_db20`` for field or amplitude ratios (20 log10).

References
----------
[1] Recommendation ITU-R P.525-4 (08/2019), "Calculation of free-space
    attenuation", point-to-point links: exact form 20 log10(4 pi d / lambda)
    and rounded form 32.4 + 20 log10 f[MHz] + 20 log10 d[km] [version from
    memory; P.525-5 (11/2024) is the current version].
[2] J. D. Kraus, *Antennas*, 2nd ed., McGraw-Hill, 1988, Ch. 2 (effective
    aperture and directivity, G = 4 pi A_e / lambda^2) [from memory].
[3] CODATA recommended values of the fundamental physical constants (Boltzmann
    constant, exact since the 2019 SI), via ``scipy.constants``.
[4] A. A. M. Saleh, "Frequency-independent and frequency-dependent nonlinear
    models of TWT amplifiers", IEEE Trans. Commun. 29(11), 1715-1720, 1981,
    doi:10.1109/TCOM.1981.1094911 (amplitude and phase functions of the
    frequency-independent model).
"""

from __future__ import annotations

import numpy as np
from scipy import constants as sc

#: 10 log10 of the Boltzmann constant, -228.5992 dB(W/(K Hz)) ([3]; the
#: common -228.6 is rounded).
BOLTZMANN_DB10 = 10.0 * np.log10(sc.k)

#: Saleh [4] coefficients widely quoted as his fitted values (amplitude
#: alpha_a, beta_a; phase alpha_phi, beta_phi). The attribution of this
#: particular set to the fit in [4] is from memory.
SALEH_AMPLITUDE_ALPHA = 2.1587
SALEH_AMPLITUDE_BETA = 1.1517
SALEH_PHASE_ALPHA = 4.0033
SALEH_PHASE_BETA = 9.1040

# Domain tests: a min/max reduction per argument is cheaper than building masks,
# so the masks (and np.where) are only built when some element is out of range.
# NaN makes a reduction NaN, which fails the test and takes the masked path.
_INF = np.inf


def _db10(power_ratio):
    """10 log10 of a power ratio (numpy array in, array out). [dB]"""
    return 10.0 * np.log10(power_ratio)


def _db20(amplitude_ratio):
    """20 log10 of a field or amplitude ratio (numpy array in, array out). [dB]"""
    return 20.0 * np.log10(amplitude_ratio)


def fspl(frequency, distance):
    """Free-space basic transmission loss between isotropic antennas.

    Parameters
    ----------
    frequency : numeric
        Frequency, > 0. [Hz]
    distance : numeric
        Path length, > 0. [m]

    Returns
    -------
    numeric
        L_bf = 20 log10(4 pi d / lambda). [dB]  NaN where frequency <= 0 or
        distance <= 0.

    Notes
    -----
    The exact form of [1]. ITU-R also gives the rounded form
    32.4 + 20 log10 f[MHz] + 20 log10 d[km]; its constant is rounded from
    32.45, so it lies 0.048 dB below this result. Far field only: the
    antennas must be many wavelengths apart (and beyond 2 D^2 / lambda for an
    aperture of size D); the formula is meaningless for d < lambda / (4 pi),
    where it falls below 0 dB. Atmospheric absorption, rain and
    scintillation are not included.
    """
    f = np.asarray(frequency, dtype=float)
    d = np.asarray(distance, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        loss = _db20((4.0 * np.pi / sc.c) * f * d)     # [1]: 20 log10(4 pi d / lambda)
    if f.min(initial=_INF) > 0 and d.min(initial=_INF) > 0:
        return loss[()]
    return np.where((f > 0) & (d > 0), loss, np.nan)[()]


def dish_gain(frequency, diameter, efficiency=0.6):
    """Gain of a circular aperture antenna (parabolic dish) over isotropic.

    Parameters
    ----------
    frequency : numeric
        Frequency, > 0. [Hz]
    diameter : numeric
        Diameter of the aperture, > 0. [m]
    efficiency : numeric, optional
        Aperture efficiency eta, 0 < eta <= 1; default 0.6 (common practice:
        front-fed dishes reach about 0.55-0.70). [1]

    Returns
    -------
    numeric
        G = 10 log10(eta (pi D / lambda)^2). [dBi]  NaN where an argument is
        out of range.

    Notes
    -----
    G = 4 pi A_e / lambda^2 with the effective aperture A_e = eta pi D^2 / 4
    ([2]). Valid for large apertures, D of several wavelengths or more; the
    efficiency lumps illumination taper, spillover, blockage and surface
    errors, and is the number to take from the antenna's data sheet.
    """
    f = np.asarray(frequency, dtype=float)
    dia = np.asarray(diameter, dtype=float)
    eta = np.asarray(efficiency, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        # [2]: G = eta (pi D / lambda)^2, written so that numpy reuses temporaries
        gain = _db10(eta * np.square((np.pi / sc.c) * dia * f))
    if (f.min(initial=_INF) > 0 and dia.min(initial=_INF) > 0
            and eta.min(initial=_INF) > 0 and eta.max(initial=-_INF) <= 1.0):
        return gain[()]
    ok = (f > 0) & (dia > 0) & (eta > 0) & (eta <= 1.0)
    return np.where(ok, gain, np.nan)[()]


def eirp(power, antenna_gain_dbi, feed_loss_db=0.0):
    """Effective isotropic radiated power.

    Parameters
    ----------
    power : numeric
        Transmitter output power, > 0. [W]
    antenna_gain_dbi : numeric
        Transmit antenna gain. [dBi]
    feed_loss_db : numeric, optional
        Loss between transmitter and antenna (waveguide run, filters,
        couplers), >= 0 (default 0). [dB]

    Returns
    -------
    numeric
        EIRP = 10 log10(P / 1 W) + G_t - L_feed. [dBW]  NaN where power <= 0 or
        feed_loss_db < 0.

    Notes
    -----
    Definition (common practice). Losses are entered as positive numbers; a
    negative loss is refused, because sheets that list losses as negative
    numbers would otherwise have the sign applied twice.
    """
    p = np.asarray(power, dtype=float)
    g = np.asarray(antenna_gain_dbi, dtype=float)
    lf = np.asarray(feed_loss_db, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        level = _db10(p) + g - lf                      # EIRP = P[dBW] + G - L
    if p.min(initial=_INF) > 0 and lf.min(initial=_INF) >= 0:
        return level[()]
    return np.where((p > 0) & (lf >= 0), level, np.nan)[()]


def g_over_t(antenna_gain_dbi, system_temperature):
    """Figure of merit G/T of a receiving station.

    Parameters
    ----------
    antenna_gain_dbi : numeric
        Receive antenna gain, referred to the same point as the system
        noise temperature. [dBi]
    system_temperature : numeric
        System noise temperature, > 0. [K]

    Returns
    -------
    numeric
        G/T = G_r - 10 log10(T_sys / 1 K). [dB/K]  NaN where
        system_temperature <= 0.

    Notes
    -----
    Definition (common practice). Gain and temperature must be referred to
    the same reference plane (usually the low-noise amplifier input).
    """
    g = np.asarray(antenna_gain_dbi, dtype=float)
    t = np.asarray(system_temperature, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        level = g - _db10(t)                            # G/T = G - 10 log10 T
    if t.min(initial=_INF) > 0:
        return level[()]
    return np.where(t > 0, level, np.nan)[()]


def cn0(eirp_dbw, path_loss_db, g_over_t_dbk, other_losses_db=0.0):
    """Carrier-to-noise-density ratio at the receiver.

    Parameters
    ----------
    eirp_dbw : numeric
        EIRP of the transmitter. [dBW]
    path_loss_db : numeric
        Path loss (e.g. free-space loss), >= 0. [dB]
    g_over_t_dbk : numeric
        Receiver figure of merit G/T. [dB/K]
    other_losses_db : numeric, optional
        Further losses (atmosphere, rain, pointing, polarisation), >= 0
        (default 0). [dB]

    Returns
    -------
    numeric
        C/N0 = EIRP - L_path - L_other + G/T - 10 log10(k_B). [dB-Hz]
        NaN where a loss is negative.

    Notes
    -----
    10 log10(k_B) = -228.5992 dB(W/(K Hz)) with the exact SI value of the
    Boltzmann constant [3]; sheets using the rounded -228.6 differ by
    0.0008 dB. C/N in a bandwidth B follows as C/N0 - 10 log10(B / 1 Hz).
    Losses are positive numbers (see `eirp`).
    """
    e = np.asarray(eirp_dbw, dtype=float)
    lp = np.asarray(path_loss_db, dtype=float)
    g = np.asarray(g_over_t_dbk, dtype=float)
    lo = np.asarray(other_losses_db, dtype=float)
    level = e - lp - lo + g - BOLTZMANN_DB10            # link equation in dB
    if lp.min(initial=_INF) >= 0 and lo.min(initial=_INF) >= 0:
        return level[()]
    return np.where((lp >= 0) & (lo >= 0), level, np.nan)[()]


def saleh_amplitude(drive, alpha=SALEH_AMPLITUDE_ALPHA, beta=SALEH_AMPLITUDE_BETA):
    """Output amplitude of the Saleh amplifier model (AM/AM conversion).

    Parameters
    ----------
    drive : numeric
        Normalised input envelope amplitude r, >= 0. [1]
    alpha : numeric, optional
        Small-signal amplitude gain alpha_a, > 0 (default 2.1587). [1]
    beta : numeric, optional
        Compression coefficient beta_a, >= 0 (default 1.1517). [1]

    Returns
    -------
    numeric
        A(r) = alpha_a r / (1 + beta_a r^2) ([4]). [1]  NaN where an
        argument is out of range.

    Notes
    -----
    Amplitudes are normalised as in the fit that supplied alpha and beta.
    The output peaks at r_sat = 1/sqrt(beta_a) with A_max = alpha_a /
    (2 sqrt(beta_a)) and falls beyond it (over-driven tube).

    Two coefficient sets are in circulation. The defaults (2.1587, 1.1517;
    phase 4.0033, 9.1040) are the set most widely quoted as Saleh's fitted
    values [from memory for the attribution]; another set, (1.9638, 0.9945;
    phase 2.5293, 2.8168), is also quoted as fitted to the measured TWT data
    of [4] [from memory]. For a real tube, fit alpha and beta to its
    measured transfer curve.
    """
    r = np.asarray(drive, dtype=float)
    a = np.asarray(alpha, dtype=float)
    b = np.asarray(beta, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        amp = a * r / (1.0 + b * r * r)                 # [4]: A(r) = alpha r / (1 + beta r^2)
    if r.min(initial=_INF) >= 0 and a.min(initial=_INF) > 0 and b.min(initial=_INF) >= 0:
        return amp[()]
    return np.where((r >= 0) & (a > 0) & (b >= 0), amp, np.nan)[()]


def saleh_phase(drive, alpha=SALEH_PHASE_ALPHA, beta=SALEH_PHASE_BETA):
    """Output phase shift of the Saleh amplifier model (AM/PM conversion).

    Parameters
    ----------
    drive : numeric
        Normalised input envelope amplitude r, >= 0. [1]
    alpha : numeric, optional
        Phase coefficient alpha_phi (default 4.0033). [rad]
    beta : numeric, optional
        Phase compression coefficient beta_phi, >= 0 (default 9.1040). [1]

    Returns
    -------
    numeric
        Phi(r) = alpha_phi r^2 / (1 + beta_phi r^2) ([4]). [rad]  NaN
        where drive < 0 or beta < 0.

    Notes
    -----
    The phase shift grows as alpha_phi r^2 at small drive and tends to
    alpha_phi / beta_phi at large drive (0.4397 rad = 25.19 deg with the
    defaults). See `saleh_amplitude` for the two coefficient sets in
    circulation.
    """
    r = np.asarray(drive, dtype=float)
    a = np.asarray(alpha, dtype=float)
    b = np.asarray(beta, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        phase = a * (r * r) / (1.0 + b * (r * r))       # [4]: Phi(r) = alpha r^2 / (1 + beta r^2)
    if r.min(initial=_INF) >= 0 and b.min(initial=_INF) >= 0:
        return phase[()]
    return np.where((r >= 0) & (b >= 0), phase, np.nan)[()]
