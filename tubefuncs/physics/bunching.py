"""Ballistic (kinematic) bunching of a velocity-modulated beam.

A thin gap of voltage V1 (peak) and coupling M modulates the velocity of a
beam of voltage V0; after a drift of DC transit angle theta0 the convection
current holds every harmonic of the signal frequency.  Space charge is
neglected.  Relativistic: the result reduces to Webster's non-relativistic
theory for V0 << m_e c^2/e = 511 kV.

References
----------
[1] D. L. Webster, "Cathode-ray bunching", J. Appl. Phys. 10, 501-508, 1939
    (bunching parameter and harmonic currents 2 I0 J_n(n X)) [from memory].
[2] S. Y. Liao, *Microwave Devices and Circuits*, 3rd ed., Prentice Hall,
    1990, Ch. 9 (two-cavity klystron, X = M V1 theta0 / (2 V0)) [from memory
    for the chapter].
[3] J. D. Jackson, *Classical Electrodynamics*, 3rd ed., Wiley, 1999,
    Sec. 11.5 (relativistic energy and momentum) [from memory].
[4] M. Abramowitz and I. A. Stegun, *Handbook of Mathematical Functions*,
    NBS, 1964, Eq. 9.1.41 (generating function, Jacobi-Anger expansion)
    [from memory for the equation number].
"""

from __future__ import annotations

import numpy as np
from scipy import constants as sc
from scipy import special

from ._domain import _domain_ok, _nan_where_invalid
from .beam import beta, gamma

_TWO_PI_OVER_C = 2.0 * np.pi / sc.c


def bunching_param(gap_voltage, frequency, drift_length, voltage, coupling=1.0):
    """Ballistic bunching parameter X after a drift.

    Parameters
    ----------
    gap_voltage : numeric
        Peak RF voltage V1 across the modulating gap, >= 0. [V]
    frequency : numeric
        Signal frequency f, >= 0. [Hz]
    drift_length : numeric
        Drift length L from the modulating gap, >= 0. [m]
    voltage : numeric
        Beam accelerating voltage V0, > 0. [V]
    coupling : numeric, optional
        Beam-coupling coefficient M of the modulating gap, -1 <= M <= 1
        (default 1: an ideal thin gap).  Its sign only shifts the phase of
        the bunch, so |M| is used. [1]

    Returns
    -------
    numeric
        Bunching parameter X = |M| V1 theta0 / (V0 gamma (gamma + 1)), with
        theta0 = 2 pi f L / u0. [1]  NaN where gap_voltage < 0, frequency < 0,
        drift_length < 0, voltage <= 0, |coupling| > 1, or |M| V1 >= V0 (the
        gap would stop electrons).

    Notes
    -----
    Velocity modulation, relativistic [3]: a gap voltage M V1 sin(wt) changes
    the energy by e M V1 sin(wt), and with d(gamma) = e dV/(m_e c^2),
    du/u0 = d(gamma)/(gamma^3 beta^2) = M V1/(V0 gamma (gamma + 1)) sin(wt),
    because e V0 = m_e c^2 (gamma - 1) and gamma^3 beta^2 = gamma (gamma^2 - 1).
    A drift of transit angle theta0 turns it into a phase swing
    X = theta0 du/u0.  For V0 << 511 kV, gamma (gamma + 1) -> 2 and X becomes
    Webster's M V1 theta0 / (2 V0) [1], [2].  Using the non-relativistic
    form at high voltage overstates X (by 2.95x at 500 kV with the same
    theta0).

    Validity: ballistic (no space charge; with space charge the bunching
    follows the reduced plasma wavelength instead), thin gap, first order
    in V1/V0 at fixed X (use V1/V0 <~ 0.05 for 1e-3 accuracy).  The
    fundamental current peaks at X = 1.841; larger X means overbunching
    (electrons overtake, the fundamental falls).

    References
    ----------
    [1], [2] (non-relativistic form); [3] (relativistic kinematics).
    """
    v1 = np.asarray(gap_voltage, dtype=float)
    f = np.asarray(frequency, dtype=float)
    ell = np.asarray(drift_length, dtype=float)
    v0 = np.asarray(voltage, dtype=float)
    m = np.abs(np.asarray(coupling, dtype=float))
    g = gamma(v0)
    with np.errstate(divide="ignore", invalid="ignore"):
        theta0 = _TWO_PI_OVER_C * f * ell / beta(v0)  # theta0 = omega L / u0
        # X = M V1 theta0 / (V0 gamma (gamma + 1))
        x = m * v1 * theta0 / (v0 * g * (g + 1.0))
    ok = _domain_ok(nonnegative=(v1, f, ell), positive=(v0,))
    if not (m.max(initial=0.0) <= 1 and np.all(m * v1 < v0)):
        ok = ok & (m <= 1) & (m * v1 < v0)
    return _nan_where_invalid(x, ok)


def harmonic_current(current, bunching_param, harmonic=1):
    """Ballistic harmonic convection current of a bunched beam.

    Parameters
    ----------
    current : numeric
        DC beam current I0, >= 0. [A]
    bunching_param : numeric
        Bunching parameter X, >= 0 (see `bunching_param`). [1]
    harmonic : numeric, optional
        Harmonic number n, a whole number >= 1 (default 1, the
        fundamental). [1]

    Returns
    -------
    numeric
        Peak amplitude of the n-th harmonic of the convection current,
        I_n = 2 I0 |J_n(n X)|. [A]  NaN where current < 0, bunching_param < 0,
        or harmonic is not a whole number >= 1.

    Notes
    -----
    Charge conservation across the drift and the Jacobi-Anger expansion [4]
    give I_n = 2 I0 J_n(n X) [1]; the magnitude is returned (the sign is a
    phase).  The fundamental peaks at X = 1.841 (first zero of J1') with
    I1 = 1.1637 I0; beyond it the beam is overbunched.  The induced current in
    a downstream gap is M_n I_n, with M_n the gap's coupling at harmonic n.

    Validity: as for `bunching_param`: ballistic (no space charge), thin
    gaps, small V1/V0.  The formula stays exact in that model for any X,
    overtaking included.

    References
    ----------
    [1] (harmonic currents); [4] (Bessel expansion).
    """
    i0 = np.asarray(current, dtype=float)
    x = np.asarray(bunching_param, dtype=float)
    n = np.asarray(harmonic, dtype=float)
    # I_n = 2 I0 |J_n(n X)|  ([1]); the integer-order routines j1 and jn are
    # several times faster than the real-order jv and agree with it.
    if n.ndim == 0 and n == 1:
        bessel = special.j1(x)
    elif n.ndim == 0 and n == np.floor(n) and 1 <= n <= 1e4:
        bessel = special.jn(int(n), n * x)
    else:
        bessel = special.jv(n, n * x)
    i_n = 2.0 * i0 * np.abs(bessel)
    ok = _domain_ok(nonnegative=(i0, x)) & (n >= 1) & (np.floor(n) == n)
    return _nan_where_invalid(i_n, ok)
