"""Relativistic kinematics of an electron beam, perveance, beam power, focusing.

Electrons start at rest at the cathode and gain kinetic energy e*V0 through
the beam voltage V0.  Constants come from ``scipy.constants`` (CODATA).

References
----------
[1] CODATA recommended values of the fundamental physical constants, via
    ``scipy.constants``.
[2] J. D. Jackson, *Classical Electrodynamics*, 3rd ed., Wiley, 1999, Sec. 11.5
    (energy and momentum of a relativistic particle).
[3] C. D. Child, "Discharge from hot CaO", Phys. Rev. (Series I) 32, 492-511,
    1911 (from memory).
[4] I. Langmuir, "The effect of space charge and residual gases on thermionic
    currents in high vacuum", Phys. Rev. 2, 450-486, 1913 (from memory).
[5] H. R. Jory and A. W. Trivelpiece, "Exact relativistic solution for the
    one-dimensional diode", J. Appl. Phys. 40, 3924-3926, 1969 (from memory).
[6] L. Brillouin, "A theorem of Larmor and its importance for electrons in
    magnetic fields", Phys. Rev. 67, 260-266, 1945 (title from memory).
"""

from __future__ import annotations

import numpy as np
from scipy import constants as sc

from ._domain import _masked

#: Electron rest energy over the elementary charge, m_e c^2 / e. [V]
REST_VOLTAGE = sc.m_e * sc.c**2 / sc.e


def gamma(voltage):
    """Lorentz factor of electrons accelerated from rest through ``voltage``.

    Parameters
    ----------
    voltage : numeric
        Beam accelerating voltage V0, >= 0. [V]

    Returns
    -------
    numeric
        gamma = 1 + e V0 / (m_e c^2). [1]  NaN where voltage < 0.

    References
    ----------
    [2], Eq. 11.55 (kinetic energy (gamma - 1) m c^2).
    """
    v = np.asarray(voltage, dtype=float)
    g = 1.0 + v / REST_VOLTAGE
    return _masked(v >= 0, g)


def beta(voltage):
    """Normalised velocity v/c of electrons accelerated through ``voltage``.

    Parameters
    ----------
    voltage : numeric
        Beam accelerating voltage V0, >= 0. [V]

    Returns
    -------
    numeric
        beta = sqrt(1 - 1/gamma^2), computed as sqrt(t(t+2))/(t+1) with
        t = V0 / (m_e c^2/e) to keep precision at low voltage. [1]  NaN where
        voltage < 0.
    """
    v = np.asarray(voltage, dtype=float)
    t = v / REST_VOLTAGE
    with np.errstate(invalid="ignore"):
        b = np.sqrt(t * (t + 2.0)) / (t + 1.0)
    return _masked(v >= 0, b)


def velocity(voltage):
    """DC velocity u0 of electrons accelerated through ``voltage``.

    Parameters
    ----------
    voltage : numeric
        Beam accelerating voltage V0, >= 0. [V]

    Returns
    -------
    numeric
        u0 = beta c. [m/s]  Reduces to sqrt(2 e V0 / m_e) for V0 << 511 kV.
        NaN where voltage < 0.
    """
    return beta(voltage) * sc.c


#: Charge-to-mass ratio of the electron, e / m_e. [C/kg]
ETA = sc.e / sc.m_e

#: Child-Langmuir constant (4 eps0 / 9) sqrt(2 e / m_e), see `child_langmuir`. [A/V^1.5]
CHILD_CONSTANT = 4.0 * sc.epsilon_0 / 9.0 * np.sqrt(2.0 * ETA)


def beta_gamma(voltage):
    """Normalised momentum gamma*beta of electrons accelerated through ``voltage``.

    Parameters
    ----------
    voltage : numeric
        Beam accelerating voltage V0, >= 0. [V]

    Returns
    -------
    numeric
        gamma beta = sqrt(t (t + 2)) with t = V0 / (m_e c^2/e). [1]  NaN where
        voltage < 0.

    Notes
    -----
    gamma * u0 = c * gamma beta is the combination that enters the
    longitudinal plasma frequency, the relativistic radial constant
    beta_e / gamma = omega / (c gamma beta) and the Brillouin field; computing
    it in one step keeps full precision at low voltage, where it tends to
    sqrt(2 e V0 / m_e) / c.

    References
    ----------
    [2], Eq. 11.55 (with p = gamma m v, (gamma beta)^2 = gamma^2 - 1).
    """
    v = np.asarray(voltage, dtype=float)
    t = v / REST_VOLTAGE
    with np.errstate(invalid="ignore"):
        bg = np.sqrt(t * (t + 2.0))  # gamma^2 - 1 = t (t + 2)
    return _masked(v >= 0, bg)


def perveance(current, voltage):
    """Perveance K = I0 / V0^(3/2) of a beam or gun.

    Parameters
    ----------
    current : numeric
        DC beam current I0, >= 0. [A]
    voltage : numeric
        Beam accelerating voltage V0, > 0. [V]

    Returns
    -------
    numeric
        K = I0 / V0^1.5. [A/V^1.5]  Multiply by 1e6 for microperveance.  NaN
        where current < 0 or voltage <= 0.

    Notes
    -----
    A property of the gun geometry for a space-charge-limited (Child-law) gun:
    it stays constant as the voltage is varied.  Klystron guns run at about
    0.2 to 3 micro-A/V^1.5 (common practice).

    References
    ----------
    [3], [4]: the V^1.5 law of a space-charge-limited diode, which makes K a
    constant of the gun geometry.
    """
    i = np.asarray(current, dtype=float)
    v = np.asarray(voltage, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        k = i / (v * np.sqrt(v))
    return _masked((i >= 0) & (v > 0), k)


def beam_current(perveance, voltage):
    """DC beam current I0 = K V0^(3/2) of a gun of perveance K.

    Parameters
    ----------
    perveance : numeric
        Gun perveance K, >= 0. [A/V^1.5]
    voltage : numeric
        Beam accelerating voltage V0, >= 0. [V]

    Returns
    -------
    numeric
        I0 = K V0^1.5. [A]  NaN where perveance < 0 or voltage < 0.

    Notes
    -----
    Assumes a space-charge-limited gun (emission not temperature limited).

    References
    ----------
    [3], [4]: the V^1.5 law of a space-charge-limited diode.
    """
    k = np.asarray(perveance, dtype=float)
    v = np.asarray(voltage, dtype=float)
    with np.errstate(invalid="ignore"):
        i = k * (v * np.sqrt(v))
    return _masked((k >= 0) & (v >= 0), i)


def beam_power(voltage, current):
    """DC beam power P = V0 I0.

    Parameters
    ----------
    voltage : numeric
        Beam accelerating voltage V0, >= 0. [V]
    current : numeric
        DC beam current I0, >= 0. [A]

    Returns
    -------
    numeric
        P = V0 I0. [W]  NaN where voltage < 0 or current < 0.

    Notes
    -----
    The power drawn from the beam supply (cathode voltage times cathode
    current).  With no RF drive all of it reaches the collector (common
    practice), so collector and cooling are sized for it.
    """
    v = np.asarray(voltage, dtype=float)
    i = np.asarray(current, dtype=float)
    return _masked((v >= 0) & (i >= 0), v * i)


def child_langmuir(voltage, spacing, area):
    """Space-charge-limited current of a planar diode (Child-Langmuir law).

    Parameters
    ----------
    voltage : numeric
        Anode-to-cathode voltage, >= 0. [V]
    spacing : numeric
        Cathode-to-anode spacing d, > 0. [m]
    area : numeric
        Emitting area S, >= 0. [m^2]

    Returns
    -------
    numeric
        I = (4 eps0 / 9) sqrt(2 e / m_e) V^1.5 S / d^2. [A]  NaN where voltage
        < 0, spacing <= 0 or area < 0.

    Notes
    -----
    Non-relativistic, one-dimensional (infinite parallel planes, d^2 << S),
    electrons emitted at zero velocity, emission not temperature limited [3],
    [4].  The constant is 2.33395e-6 A/V^1.5 (CODATA).  Relativistic motion
    lowers the current; by quadrature of the 1-D relativistic planar diode
    equation the law is high by 0.2 % at 10 kV, 2.1 % at 100 kV, 9.5 % at
    500 kV and 17.6 % at 1 MV, i.e. the exact current is 0.2 %, 2.0 %, 8.7 %
    and 14.9 % lower than the law (computed; exact relativistic treatment in
    [5]).

    References
    ----------
    [3] Child, Phys. Rev. 32, 1911.  [4] Langmuir, Phys. Rev. 2, 1913.
    [5] Jory and Trivelpiece, J. Appl. Phys. 40, 1969.
    """
    v = np.asarray(voltage, dtype=float)
    d = np.asarray(spacing, dtype=float)
    s = np.asarray(area, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        i = CHILD_CONSTANT * (v * np.sqrt(v)) * s / (d * d)  # [3], [4]
    return _masked((v >= 0) & (d > 0) & (s >= 0), i)


def brillouin_field(current, voltage, beam_radius):
    """Brillouin magnetic field of a solid round beam (relativistic).

    Parameters
    ----------
    current : numeric
        DC beam current I0, >= 0. [A]
    voltage : numeric
        Beam accelerating voltage V0, > 0. [V]
    beam_radius : numeric
        Radius b of the uniform solid beam, > 0. [m]

    Returns
    -------
    numeric
        B_B = sqrt(2 I0 / (pi eps0 eta gamma u0 b^2)). [T]  NaN where
        current < 0, voltage <= 0 or beam_radius <= 0.

    Notes
    -----
    Brillouin flow [6]: uniform axial field, no magnetic flux at the
    cathode, electrons rotate at the Larmor frequency omega_L = eta B /
    (2 gamma) (Busch's theorem with the relativistic mass).  Radial balance of
    the electron at the beam edge, with the space-charge field E_r, the
    self-magnetic pinch (which cancels a fraction beta^2 of E_r), the
    centrifugal force gamma m omega_L^2 r and the rotation in B::

        e E_r / gamma^2 = e^2 B^2 r / (4 gamma m_e)

    with E_r = rho0 r / (2 eps0) and rho0 = I0 / (pi b^2 u0) gives
    B^2 = 2 rho0 / (eta eps0 gamma) (derived; the standard result).  The
    magnetic field of the beam's own rotation (diamagnetism) is neglected.
    At low voltage (gamma -> 1, u0 -> sqrt(2 eta V0)) this is the
    textbook B_B = 8.30218e-4 sqrt(I0) / (b V0^0.25) T (b in m) [6].
    Solenoid-focused klystrons run at about 1.5 to 3 times B_B in confined or
    partly confined flow (from memory; a design default, not a rule).

    References
    ----------
    [6] Brillouin, Phys. Rev. 67, 1945.
    """
    i = np.asarray(current, dtype=float)
    v = np.asarray(voltage, dtype=float)
    b = np.asarray(beam_radius, dtype=float)
    t = v / REST_VOLTAGE
    with np.errstate(divide="ignore", invalid="ignore"):
        # gamma u0 = c gamma beta = c sqrt(t (t + 2)); B b = sqrt(2 I0 / (pi eps0 eta gamma u0))
        bb = np.sqrt(2.0 * i / (np.pi * sc.epsilon_0 * ETA * sc.c * np.sqrt(t * (t + 2.0)))) / b
    return _masked((i >= 0) & (v > 0) & (b > 0), bb)
