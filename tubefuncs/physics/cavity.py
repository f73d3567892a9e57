"""Cavity figures: pillbox TM010 mode, skin effect, Q, R/Q and gap voltage.

The pillbox is a closed right circular cylinder of radius a and length L
(no beam holes, no re-entrant noses) with walls of conductivity sigma; its
TM010 mode has E_z = E0 J0(p01 r/a), H_phi = -j (E0/eta0) J1(p01 r/a),
p01 = 2.404825... the first zero of J0.

Shunt impedance has two conventions, both supported where it matters
(``convention`` argument):

- ``"circuit"`` (usual for tubes): R = V^2/(2 P), R/Q = V^2/(2 omega W);
- ``"accelerator"`` (``"linac"`` is a synonym): R = V^2/P, R/Q = V^2/(omega W);

so an accelerator R/Q is exactly twice the circuit R/Q of the same cavity.
V is the peak gap voltage, P the power dissipated, W the stored energy.

References
----------
[1] J. D. Jackson, *Classical Electrodynamics*, 3rd ed., Wiley, 1999,
    Sec. 8.1 (skin depth, surface impedance), Secs. 8.7-8.8 (cylindrical
    cavity modes, Q of a cavity) [from memory for the sections].
[2] T. P. Wangler, *RF Linear Accelerators*, 2nd ed., Wiley-VCH, 2008,
    Ch. 2 and 5 (pillbox TM010 fields, transit-time factor, shunt impedance
    and R/Q in the accelerator convention) [from memory for the chapters].
[3] M. Abramowitz and I. A. Stegun, *Handbook of Mathematical Functions*,
    NBS, 1964, Table 9.5 (zeros of J0) and Eq. 11.3.31 (integral of
    J0^2 r) [from memory for the table and equation numbers].
[4] IEC 60028:1925, International standard of resistance for copper
    (annealed copper, 1/58 ohm mm^2/m at 20 degC).
[5] D. M. Pozar, *Microwave Engineering*, 4th ed., Wiley, 2012, Sec. 6.7
    (coupling of resonators, coupling coefficient g = Q0/Qe) [from memory
    for the section number].
"""

from __future__ import annotations

import numpy as np
from scipy import constants as sc
from scipy import special

from ..materials import COPPER_CONDUCTIVITY
from ._domain import _domain_ok, _nan_where_invalid
from .beam import beta

#: First zero of J0, p01 [3]. [1]
P01 = float(special.jn_zeros(0, 1)[0])
#: J1(p01). [1]
J1_P01 = float(special.j1(P01))
#: Impedance of free space, mu0 c. [ohm]
ETA0 = sc.mu_0 * sc.c

# (R/Q)_circuit of a pillbox = ETA0 L T^2 / (pi p01 a J1(p01)^2); see pillbox_r_over_q.
_RQ_CIRCUIT = ETA0 / (np.pi * P01 * J1_P01**2)
# f = p01 c / (2 pi a)
_F_TIMES_RADIUS = P01 * sc.c / (2.0 * np.pi)
# a/delta = sqrt(a p01 c mu0 sigma / 2) at the TM010 frequency; see pillbox_q.
_Q_CONST = 0.5 * P01 * sc.c * sc.mu_0

_CONVENTION_FACTOR = {"circuit": 1.0, "accelerator": 2.0, "linac": 2.0}


def convention_factor(convention):
    """Ratio of R/Q (or shunt impedance) in ``convention`` to its circuit value.

    Parameters
    ----------
    convention : str
        ``"circuit"`` (R = V^2/2P), ``"accelerator"`` (R = V^2/P) or its
        synonym ``"linac"``; case and surrounding blanks are ignored.

    Returns
    -------
    float
        1.0 for circuit, 2.0 for accelerator. [1]

    Raises
    ------
    ValueError
        For any other value; the message names the allowed values.
    """
    key = convention.strip().lower() if isinstance(convention, str) else None
    if key not in _CONVENTION_FACTOR:
        raise ValueError(f"convention must be 'circuit' or 'accelerator' ('linac' is a "
                         f"synonym), got {convention!r}")
    return _CONVENTION_FACTOR[key]


def pillbox_freq(radius):
    """Resonant frequency of the TM010 mode of a pillbox cavity.

    Parameters
    ----------
    radius : numeric
        Inner radius a of the cylinder, > 0. [m]

    Returns
    -------
    numeric
        f = p01 c / (2 pi a), p01 = 2.404825... [Hz]  NaN where radius <= 0.

    Notes
    -----
    Independent of the length; exact for a closed, empty, perfectly
    conducting cylinder.  Wall losses shift f by a fraction ~1/(2 Q0),
    neglected.  Beam holes and noses (real klystron cavities) lower f.

    References
    ----------
    [1], Sec. 8.7; [3], Table 9.5 (p01).
    """
    a = np.asarray(radius, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        f = _F_TIMES_RADIUS / a  # [1]: omega = p01 c / a
    return _nan_where_invalid(f, _domain_ok(positive=(a,)))


def skin_depth(frequency, conductivity=COPPER_CONDUCTIVITY):
    """Skin depth of a good non-magnetic conductor.

    Parameters
    ----------
    frequency : numeric
        Frequency f, > 0. [Hz]
    conductivity : numeric, optional
        Electrical conductivity sigma, > 0; default annealed copper at 20 degC,
        5.8e7 S/m [4]. [S/m]

    Returns
    -------
    numeric
        delta = 1/sqrt(pi f mu0 sigma). [m]  NaN where frequency <= 0 or
        conductivity <= 0.

    Notes
    -----
    Good conductor (sigma >> omega eps0), permeability mu0, smooth surface,
    thickness >> delta.  Roughness and plating raise real losses.

    References
    ----------
    [1], Sec. 8.1 (delta = sqrt(2/(mu omega sigma))); [4] (copper).
    """
    f = np.asarray(frequency, dtype=float)
    s = np.asarray(conductivity, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        d = 1.0 / np.sqrt(np.pi * sc.mu_0 * f * s)  # [1]: delta = sqrt(2/(mu0 omega sigma))
    return _nan_where_invalid(d, _domain_ok(positive=(f, s)))


def surface_resistance(frequency, conductivity=COPPER_CONDUCTIVITY):
    """Surface resistance of a good non-magnetic conductor.

    Parameters
    ----------
    frequency : numeric
        Frequency f, > 0. [Hz]
    conductivity : numeric, optional
        Electrical conductivity sigma, > 0; default annealed copper at 20 degC,
        5.8e7 S/m [4]. [S/m]

    Returns
    -------
    numeric
        R_s = 1/(sigma delta) = sqrt(pi f mu0 / sigma). [ohm]  NaN where
        frequency <= 0 or conductivity <= 0.

    Notes
    -----
    Same assumptions as `skin_depth`.  The power lost per unit area is
    R_s |H_t|^2 / 2 for a peak tangential field H_t.

    References
    ----------
    [1], Sec. 8.1; [4] (copper).
    """
    f = np.asarray(frequency, dtype=float)
    s = np.asarray(conductivity, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        r = np.sqrt(np.pi * sc.mu_0 * f / s)  # R_s = 1/(sigma delta)
    return _nan_where_invalid(r, _domain_ok(positive=(f, s)))


def pillbox_q(radius, length, conductivity=COPPER_CONDUCTIVITY):
    """Unloaded quality factor of the TM010 mode of a pillbox cavity.

    Parameters
    ----------
    radius : numeric
        Inner radius a, > 0. [m]
    length : numeric
        Inner length L, > 0. [m]
    conductivity : numeric, optional
        Wall conductivity sigma, > 0; default annealed copper at 20 degC,
        5.8e7 S/m [4]. [S/m]

    Returns
    -------
    numeric
        Q0 = (a/delta) / (1 + a/L), delta the skin depth at the TM010
        frequency. [1]  NaN where radius, length or conductivity <= 0.

    Notes
    -----
    Q0 = omega W / P_wall.  With the TM010 fields (module docstring):
    W = (eps0/2) E0^2 pi a^2 L J1^2(p01) (using int_0^a J0^2(p01 r/a) r dr =
    a^2 J1^2(p01)/2, [3]); P_wall = (R_s/2)(E0/eta0)^2 J1^2(p01) 2 pi a (L + a)
    (side wall 2 pi a L, both end plates 2 pi a^2).  With omega mu0 = 2/(sigma
    delta^2) the ratio is Q0 = a L / (delta (a + L)).  At the TM010 frequency
    a/delta = sqrt(a p01 c mu0 sigma / 2), used directly.

    Closed cavity: beam holes, noses, couplers and joints lower the real Q0
    (often by 10-30 %, common practice); surfaces smooth, sigma at the
    operating temperature.

    References
    ----------
    [1], Sec. 8.8; [3] (Bessel integrals).
    """
    a = np.asarray(radius, dtype=float)
    ell = np.asarray(length, dtype=float)
    s = np.asarray(conductivity, dtype=float)
    with np.errstate(invalid="ignore", divide="ignore"):
        # Q0 = (a/delta) L/(L + a), a/delta = sqrt(a p01 c mu0 sigma/2)
        q = np.sqrt(_Q_CONST * a * s) * ell / (ell + a)
    return _nan_where_invalid(q, _domain_ok(positive=(a, ell, s)))


def pillbox_r_over_q(radius, length, voltage=None, convention="circuit"):
    """R/Q of the TM010 mode of a pillbox cavity, on axis.

    Parameters
    ----------
    radius : numeric
        Inner radius a, > 0. [m]
    length : numeric
        Inner length L (the gap), > 0. [m]
    voltage : numeric or None, optional
        Beam accelerating voltage V0, > 0.  When given, the gap voltage
        includes the transit-time factor T of a beam of that voltage.  None
        (default): geometric R/Q with T = 1 (V = E0 L). [V]
    convention : str, optional
        ``"circuit"`` (default; R/Q = V^2/(2 omega W)) or ``"accelerator"``
        (R/Q = V^2/(omega W); ``"linac"`` is a synonym).

    Returns
    -------
    numeric
        R/Q = k eta0 L T^2 / (pi p01 a J1^2(p01)), k = 1 (circuit) or 2
        (accelerator). [ohm]  NaN where radius <= 0, length <= 0 or
        voltage <= 0.

    Raises
    ------
    ValueError
        If ``convention`` is not one of the allowed texts.

    Notes
    -----
    On axis the gap voltage is V = int E0 cos(omega z/u0) dz = E0 L T over
    the length, with T = sin(theta/2)/(theta/2) and theta = omega L/u0 =
    p01 (L/a)/beta, beta from the relativistic beam velocity ([2]).  With the
    stored energy of `pillbox_q`,
    V^2/(2 omega W) = L T^2 /(omega eps0 pi a^2 J1^2) and omega eps0 =
    p01/(eta0 a) give the circuit value eta0 L T^2 / (pi p01 a J1^2(p01)),
    about 0.49111 eta0 (L/a) T^2.  The accelerator value is twice that.

    Closed cavity; the voltage is the on-axis value.  In the closed pillbox
    E_z falls off axis as J0(p01 r/a); in a real cavity with beam holes the
    gap field rises toward the tunnel wall instead (see
    `tubefuncs.physics.gap.gap_coupling`).

    References
    ----------
    [2] (transit-time factor, shunt impedance conventions); [1], Sec. 8.7
    (fields).
    """
    k = convention_factor(convention)
    a = np.asarray(radius, dtype=float)
    ell = np.asarray(length, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        rq = (k * _RQ_CIRCUIT) * ell / a  # k eta0 L / (pi p01 a J1^2)
        if voltage is not None:
            # theta = omega L / u0 = p01 (L/a) / beta;  T = sin(theta/2)/(theta/2)
            theta = P01 * ell / (a * beta(voltage))
            t = np.sinc(theta / (2.0 * np.pi))
            rq = rq * t * t
            ok = _domain_ok(positive=(a, ell, np.asarray(voltage, dtype=float)))
        else:
            ok = _domain_ok(positive=(a, ell))
    return _nan_where_invalid(rq, ok)


def loaded_q(q0, qext):
    """Loaded quality factor of a cavity with an external coupling.

    Parameters
    ----------
    q0 : numeric
        Unloaded (wall-loss) quality factor Q0, > 0. [1]
    qext : numeric
        External quality factor Qext of the coupling to the line or load,
        > 0; ``numpy.inf`` for an uncoupled (idler) cavity. [1]

    Returns
    -------
    numeric
        Q_L from 1/Q_L = 1/Q0 + 1/Qext. [1]  NaN where q0 <= 0 or
        qext <= 0.

    Notes
    -----
    Loss rates add: omega W/Q_L = omega W/Q0 + omega W/Qext.  The coupling
    factor is beta_c = Q0/Qext and Q_L = Q0/(1 + beta_c).  Beam loading
    (add 1/Q_B) is not included.

    References
    ----------
    [1], Sec. 8.8 (Q as stored energy over loss per radian) [from memory];
    common practice for the sum of loss rates.
    """
    q0 = np.asarray(q0, dtype=float)
    qe = np.asarray(qext, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        ql = 1.0 / (1.0 / q0 + 1.0 / qe)
    return _nan_where_invalid(ql, _domain_ok(positive=(q0, qe)))


def circuit_efficiency(q0, qext):
    """Output-circuit efficiency: the share of cavity power that reaches the load.

    Parameters
    ----------
    q0 : numeric
        Unloaded (wall-loss) quality factor Q0, > 0. [1]
    qext : numeric
        External quality factor Qext of the coupling to the load, > 0. [1]

    Returns
    -------
    numeric
        eta_c = Q_L/Qext = Q0/(Q0 + Qext). [1]  NaN where q0 <= 0 or qext <= 0.

    Notes
    -----
    The power the beam gives an output cavity divides between wall loss
    (rate omega W/Q0) and the external load (rate omega W/Qext) in proportion
    to the rates, so the load receives (1/Qext)/(1/Q0 + 1/Qext) of it.  A
    klystron's RF output is eta_c times the power the beam delivers to the
    output gap.  Beam loading of the output gap is not included.

    References
    ----------
    [1], Sec. 8.8 (Q as stored energy over loss per radian) [from memory];
    common practice for the division of power by loss rates.
    """
    q0 = np.asarray(q0, dtype=float)
    qe = np.asarray(qext, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        eta = q0 / (q0 + qe)
    return _nan_where_invalid(eta, _domain_ok(positive=(q0, qe)))


def coupling_beta(q0, qext):
    """Coupling factor beta_c = Q0/Qext of a cavity to its line.

    Parameters
    ----------
    q0 : numeric
        Unloaded quality factor Q0, > 0. [1]
    qext : numeric
        External quality factor Qext, > 0. [1]

    Returns
    -------
    numeric
        beta_c = Q0/Qext: < 1 under-coupled, 1 critically coupled, > 1
        over-coupled. [1]  NaN where q0 <= 0 or qext <= 0.

    Notes
    -----
    At resonance the cavity seen from the line reflects
    |Gamma| = |1 - beta_c|/(1 + beta_c) of the incident wave (VSWR beta_c or
    1/beta_c) [5].

    References
    ----------
    [5] of the module.
    """
    q0 = np.asarray(q0, dtype=float)
    qe = np.asarray(qext, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        beta_c = q0 / qe
    return _nan_where_invalid(beta_c, _domain_ok(positive=(q0, qe)))


def gap_voltage(power, r_over_q, q_loaded, convention="circuit"):
    """Peak gap voltage of a cavity that dissipates a given RF power.

    Parameters
    ----------
    power : numeric
        RF power P dissipated in the loaded cavity (wall loss plus power to
        the external load; e.g. the power a beam gives an output cavity),
        >= 0. [W]
    r_over_q : numeric
        R/Q of the cavity in the same ``convention``, > 0. [ohm]
    q_loaded : numeric
        Loaded quality factor Q_L, > 0. [1]
    convention : str, optional
        ``"circuit"`` (default; R/Q = V^2/(2 omega W)) or ``"accelerator"``
        (R/Q = V^2/(omega W); ``"linac"`` is a synonym).

    Returns
    -------
    numeric
        Peak gap voltage: circuit V = sqrt(2 (R/Q) Q_L P); accelerator
        V = sqrt((R/Q) Q_L P). [V]  NaN where power < 0, r_over_q <= 0 or
        q_loaded <= 0.

    Raises
    ------
    ValueError
        If ``convention`` is not one of the allowed texts.

    Notes
    -----
    At resonance Q_L = omega W/P and (circuit) R/Q = V^2/(2 omega W), so
    V^2 = 2 (R/Q) omega W = 2 (R/Q) Q_L P; in the accelerator convention
    V^2 = (R/Q) Q_L P.  Both give the same V for the same cavity.  P is
    omega W / Q_L, the total loss rate of the stored energy, not the power
    incident from a generator: a cavity driven through its coupler at
    critical coupling (Q0 = Qext) has P = 2 P_incident (the walls take
    P_incident, and the field it radiates back into the line cancels the
    reflection).

    References
    ----------
    [2] (shunt impedance and R/Q); common practice.
    """
    k = convention_factor(convention)
    p = np.asarray(power, dtype=float)
    rq = np.asarray(r_over_q, dtype=float)
    ql = np.asarray(q_loaded, dtype=float)
    with np.errstate(invalid="ignore"):
        v = np.sqrt((2.0 / k) * rq * ql * p)  # circuit: V^2 = 2 (R/Q) Q_L P
    return _nan_where_invalid(v, _domain_ok(nonnegative=(p,), positive=(rq, ql)))
