"""Interaction of an electron beam with a cavity gap.

Transit angle, beam-coupling coefficient of a gridded or gridless gap, and the
electronic beam-loading conductance of a gridded gap.  Small-signal,
relativistic kinematics: the beam velocity comes from `tubefuncs.physics.beam`
and every result reduces to the textbook non-relativistic form for
V0 << m_e c^2/e = 511 kV.

References
----------
[1] S. Y. Liao, *Microwave Devices and Circuits*, 3rd ed., Prentice Hall,
    1990, Ch. 9 (beam-coupling coefficient sin(x)/x of a gridded gap;
    beam-loading conductance) [from memory for the chapter].
[2] G. M. Branch, "Electron beam coupling in interaction gaps of cylindrical
    symmetry", IRE Trans. Electron Devices ED-8(3), 193-207, 1961 (coupling of
    a gridless gap with a prescribed field at the tunnel wall) [from memory].
[3] M. Abramowitz and I. A. Stegun, *Handbook of Mathematical Functions*,
    NBS, 1964, Eq. 9.6.3 and Sec. 9.6 (modified Bessel functions I0, I1)
    [from memory for the equation number].
[4] J. D. Jackson, *Classical Electrodynamics*, 3rd ed., Wiley, 1999,
    Sec. 11.5 (relativistic energy and momentum) [from memory].
"""

from __future__ import annotations

import numpy as np
from scipy import constants as sc
from scipy import special

from ._domain import _domain_ok, _nan_where_invalid
from .beam import beta, beta_gamma, gamma

TWO_PI = 2.0 * np.pi
#: First zero of J0: the TM01 cutoff of a round tunnel is at 2 pi f a / c = P01.
P01 = 2.404825557695773
_TWO_PI_OVER_C = TWO_PI / sc.c


def transit_angle(frequency, length, voltage):
    """Transit angle of the beam across a gap or drift length.

    Parameters
    ----------
    frequency : numeric
        Signal frequency f, >= 0. [Hz]
    length : numeric
        Gap or drift length along the beam, >= 0. [m]
    voltage : numeric
        Beam accelerating voltage V0, > 0. [V]

    Returns
    -------
    numeric
        Transit angle theta = 2 pi f length / u0. [rad]  NaN where frequency
        < 0, length < 0 or voltage <= 0.

    Notes
    -----
    u0 is the relativistic DC velocity of electrons accelerated from rest
    through V0 (`tubefuncs.physics.beam.velocity`).  For V0 << 511 kV it
    reduces to the non-relativistic u0 = sqrt(2 e V0 / m_e).  The electron is
    taken to cross at constant velocity (small signal).

    References
    ----------
    [1], Ch. 9 (theta = omega d / v0); [4] for the velocity.
    """
    f = np.asarray(frequency, dtype=float)
    d = np.asarray(length, dtype=float)
    v = np.asarray(voltage, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        theta = _TWO_PI_OVER_C * f * d / beta(v)  # theta = omega d / u0, u0 = beta c
    return _nan_where_invalid(theta, _domain_ok(nonnegative=(f, d), positive=(v,)))


def _sinc_half(theta):
    """sin(theta/2)/(theta/2), equal to 1 at theta = 0."""
    return np.sinc(theta / TWO_PI)  # np.sinc(x) = sin(pi x)/(pi x)


#: Below this |x| the difference sin(x)/x - cos(x) is taken from its series.
_SERIES_X = 0.25
#: sin(x)/x - cos(x) = sum_{n>=1} (-1)^(n+1) 2n x^(2n) / (2n+1)!, n = 1..6, as
#: coefficients of y = x^2 for np.polyval (highest power first); the next
#: term is below 1e-17 of the sum for |x| < 0.25.
_SINC_MINUS_COS = [(-1) ** (n + 1) * 2 * n / float(np.prod(np.arange(1, 2 * n + 2)))
                   for n in range(6, 0, -1)] + [0.0]


def _sinc_minus_cos(x, m):
    """sin(x)/x - cos(x) for x >= 0, given m = sin(x)/x, without cancellation.

    The direct difference loses about -log10(x^2/3) digits as x -> 0; there
    the Taylor series (a sum of decreasing terms) replaces it.
    """
    out = m - np.cos(x)
    small = x < _SERIES_X
    if np.any(small):
        series = np.polyval(_SINC_MINUS_COS, x * x)
        if np.ndim(out) == 0:
            return series
        out[small] = series[small]
    return out


def gap_coupling(frequency, gap_length, voltage, beam_radius=None, tunnel_radius=None):
    """Beam-coupling coefficient M of a gap.

    Parameters
    ----------
    frequency : numeric
        Signal frequency f, >= 0. [Hz]
    gap_length : numeric
        Gap length d along the beam, >= 0. [m]
    voltage : numeric
        Beam accelerating voltage V0, > 0. [V]
    beam_radius : numeric or None, optional
        Radius b of the solid round beam, 0 <= b <= tunnel_radius.  None
        (default, together with ``tunnel_radius``) means a gridded gap. [m]
    tunnel_radius : numeric or None, optional
        Radius a of the drift tube at the gap, > 0.  None (default, together
        with ``beam_radius``) means a gridded gap. [m]

    Returns
    -------
    numeric
        Coupling coefficient M. [1]  Gridded gap: M = sin(theta/2)/(theta/2),
        theta the gap transit angle; it changes sign beyond theta = 2 pi.
        Gridless gap: the RMS coefficient over the beam cross-section, with the
        sign of the gridded factor.  NaN where frequency < 0, gap_length < 0,
        voltage <= 0, beam_radius < 0, tunnel_radius <= 0,
        beam_radius > tunnel_radius, or (gridless) a tunnel that propagates at
        the frequency, 2 pi f a/c >= 2.405 (above the TM01 cutoff).

    Raises
    ------
    ValueError
        If only one of ``beam_radius`` and ``tunnel_radius`` is given.

    Notes
    -----
    Gridded gap ([1], Ch. 9): a uniform field E = V/d across a gap of length
    d, crossed at constant velocity u0, gives M = sin(x)/x with x = theta/2,
    theta = omega d/u0.

    Gridless gap ([2]): the axial field is uniform across the gap at the
    tunnel wall r = a and zero on the tunnel wall elsewhere.  Inside the
    tunnel, the field component moving with the beam (phase velocity u0) obeys
    the wave equation with the radial constant

        gamma_r = sqrt(beta_e^2 - k^2) = beta_e / gamma,   beta_e = omega/u0,

    so an electron at radius r sees M(r) = M_grid I0(gamma_r r)/I0(gamma_r a).
    The relativistic 1/gamma in gamma_r is exact; the non-relativistic
    gamma_r = beta_e follows for V0 << 511 kV.

    Averaging over a uniform solid beam of radius b, this function returns the
    RMS value,

        M^2 = M_grid^2 [I0^2(gamma_r b) - I1^2(gamma_r b)] / I0^2(gamma_r a),

    from (2/b^2) int_0^b I0^2(k r) r dr = I0^2(k b) - I1^2(k b), a Lommel-type
    integral (differentiate (x^2/2)(I0^2 - I1^2) with I0' = I1 and
    I1' = I0 - I1/x, [3], Sec. 9.6, to get x I0^2).  The RMS value, not the plain mean, is
    the one a gap-to-gap calculation needs: an electron at radius r is
    velocity-modulated in proportion to M(r) at one gap and induces current
    in proportion to M(r) at the next, so gain, the transadmittance and the
    beam loading all go with M^2 averaged over the electrons.  In confined
    flow every gap of a tube at one frequency has the same radial profile
    I0(gamma_r r), so <M_k M_n> = M_k,rms M_n,rms exactly.  The plain mean
    2 I1(gamma_r b)/(gamma_r b) M_grid/I0(gamma_r a) is slightly lower.

    Exponentially scaled Bessel functions (``scipy.special.i0e``, ``i1e``)
    keep large arguments finite: the ratio is formed as
    sqrt(i0e(gb)^2 - i1e(gb)^2)/i0e(ga) * exp(gamma_r (b - a)).

    Validity: small signal, no space charge, electrons at fixed radius
    (confined flow), the flat-field-at-the-wall gap model; real gap fields
    (rounded noses) give somewhat different M.  beam_radius = 0 gives the
    on-axis coupling M_grid/I0(gamma_r a).

    References
    ----------
    [1] (gridded gap), [2] (gridless gap), [3] (Bessel functions),
    [4] (relativistic velocity).
    """
    theta = transit_angle(frequency, gap_length, voltage)
    m_grid = _sinc_half(theta)  # [1]: M = sin(theta/2)/(theta/2)
    if beam_radius is None and tunnel_radius is None:
        return m_grid
    if beam_radius is None or tunnel_radius is None:
        raise ValueError("give both beam_radius and tunnel_radius (gridless gap) or "
                         "neither (gridded gap)")
    b = np.asarray(beam_radius, dtype=float)
    a = np.asarray(tunnel_radius, dtype=float)
    # gamma_r = beta_e / gamma = omega / (u0 gamma) = omega / (c gamma beta)
    with np.errstate(divide="ignore", invalid="ignore"):
        gamma_r = _TWO_PI_OVER_C * np.asarray(frequency, dtype=float) / beta_gamma(voltage)
    gb = gamma_r * b
    ga = gamma_r * a
    i0b = special.i0e(gb)
    i1b = special.i1e(gb)
    # M^2/M_grid^2 = [I0^2(gb) - I1^2(gb)] / I0^2(ga), with I(x) = ie(x) e^x
    with np.errstate(invalid="ignore", over="ignore"):
        ratio = np.sqrt((i0b - i1b) * (i0b + i1b)) / special.i0e(ga) * np.exp(gb - ga)
    # the gridless model needs a tunnel below the TM01 cutoff at f:
    # 2 pi f a / c < 2.405 (above it the gap field propagates down the tunnel)
    with np.errstate(invalid="ignore"):
        below_cutoff = _TWO_PI_OVER_C * np.asarray(frequency, dtype=float) * a < P01
    ok = _domain_ok(nonnegative=(b,), positive=(a,)) & (b <= a) & below_cutoff
    return _nan_where_invalid(m_grid * ratio, ok)


def beam_loading(frequency, gap_length, voltage, current):
    """Electronic beam-loading conductance of a gridded gap.

    Parameters
    ----------
    frequency : numeric
        Signal frequency f, >= 0. [Hz]
    gap_length : numeric
        Gap length d along the beam, >= 0. [m]
    voltage : numeric
        Beam accelerating voltage V0, > 0. [V]
    current : numeric
        DC beam current I0, >= 0. [A]

    Returns
    -------
    numeric
        Beam-loading conductance G_B, the conductance in parallel with the
        cavity that accounts for the RF power the beam takes from the gap
        field. [S]  NaN where frequency < 0, gap_length < 0, voltage <= 0 or
        current < 0.

    Notes
    -----
    Kinematic small-signal result for a uniform gap field, x = theta/2,
    M = sin(x)/x, G0 = I0/V0:

        G_B / G0 = (M^2 - M cos x) / (gamma (gamma + 1))

    which is the non-relativistic ([1], Ch. 9) G_B/G0 = (M^2 - M cos x)/2
    times the relativistic factor 2/(gamma(gamma+1)).  That factor comes from
    the longitudinal mass: a voltage dV changes the velocity by
    du/u0 = e dV/(m_e gamma^3 u0^2) = dV/(V0 gamma (gamma+1)), using
    e V0 = m_e c^2 (gamma - 1) and gamma^3 beta^2 = gamma (gamma^2 - 1) [4].
    The same quantity is -(theta/4) d(M^2)/d(theta) times 2/(gamma(gamma+1))
    (differentiate M = sin(x)/x).  For small theta, G_B/G0 -> theta^2 /
    (12 gamma (gamma + 1)), i.e. theta^2/24 non-relativistically.

    G_B is negative for transit angles between 2 pi and about 2.86 pi (and
    in narrower bands beyond 4 pi): a negative conductance, the beam gives
    power to the gap.

    Validity: small signal (gap voltage << V0), no space charge, gridded gap
    with a uniform field, electrons entering unmodulated.  For a gridless gap
    and strong space charge, G_B differs; this function does not model it.
    Small transit angles: M - cos x is taken from its Taylor series for
    theta < 0.5 rad, so G_B keeps full precision down to theta -> 0.

    References
    ----------
    [1], Ch. 9 (non-relativistic form); [4] (relativistic kinematics).
    """
    theta = transit_angle(frequency, gap_length, voltage)
    v = np.asarray(voltage, dtype=float)
    i = np.asarray(current, dtype=float)
    x = 0.5 * theta
    m = _sinc_half(theta)
    g = gamma(v)
    with np.errstate(divide="ignore", invalid="ignore"):
        # G_B = (I0/V0) M (M - cos x) / (gamma (gamma + 1))
        gb = i / v * m * _sinc_minus_cos(x, m) / (g * (g + 1.0))
    return _nan_where_invalid(gb, _domain_ok(nonnegative=(i,)))
