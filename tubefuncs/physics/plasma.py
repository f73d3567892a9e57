"""Space-charge waves of a solid round beam: plasma frequency and its reduction.

The beam is a uniform solid round electron beam of radius b drifting at
velocity u0 on the axis of a round metal drift tube (tunnel) of radius a >= b.
The model is the small-signal, quasi-static space-charge wave of a beam in
confined flow (infinite axial magnetic field, electrons move only along the
axis), with no velocity spread.  Relativistic throughout: the longitudinal
mass gamma^3 m_e in the plasma frequency and the radial constant
beta_e / gamma in the Bessel arguments.  Each result reduces to the
textbook non-relativistic form at low voltage.

References
----------
[1] G. M. Branch and T. G. Mihran, "Plasma frequency reduction factors in
    electron beams", IRE Trans. Electron Devices ED-2(2), 3-11, 1955 (from
    memory).
[2] J. D. Jackson, *Classical Electrodynamics*, 3rd ed., Wiley, 1999,
    Sec. 12.2 (longitudinal mass gamma^3 m for a force along the velocity;
    section number from memory).
[3] M. Abramowitz and I. A. Stegun, *Handbook of Mathematical Functions*,
    NBS Applied Mathematics Series 55, 1964: Eqs. 9.6.10, 9.6.12, 9.6.13
    (ascending series of I1, I0, K0), Eq. 9.6.15 (Wronskian
    I0 K1 + I1 K0 = 1/z), Eq. 9.5.10 (product formula of J0) (equation
    numbers from memory).
[4] CODATA recommended values of the fundamental physical constants, via
    ``scipy.constants``.
"""

from __future__ import annotations

import math

import numpy as np
from scipy import constants as sc
from scipy import special

from ._domain import _masked
from .beam import ETA, REST_VOLTAGE

#: First zero of J0, j_{0,1} = 2.404826 (dimensionless).
J01 = float(special.jn_zeros(0, 1)[0])

# Initial guess of the eigenvalue equation (see `_solve_eigenvalue`): from the
# product formula of J0 ([3], Eq. 9.5.10), u J1(u)/J0(u) = sum_k 2u^2/(j_k^2 - u^2).
# The first term is kept exactly, the rest to first order in u^2; their sum of
# 2/j_k^2 (k >= 2) is 2 (1/4 - 1/j01^2), since sum_k 1/j_k^2 = 1/4 (compare the z^2
# terms of the product formula and of the series J0(z) = 1 - z^2/4 + ...).
_C_REST = 0.5 - 2.0 / J01**2
_TOL_STEP = 1e-7     # relative Halley step below which the root has ~1e-18 error
_MAX_ITER = 100      # bracketed fallback: bisection alone reaches 1e-16 in ~55 steps
_BLOCK = 16384       # elements per block in `reduction_factor`

# Ascending series ([3], Eqs. 9.6.10, 9.6.12, 9.6.13) in t = z^2/4, used for z <= 2 (t <= 1),
# where 14 terms leave a remainder below 1e-19:
#   I0(z) = sum_k t^k/(k!)^2,  I1(z) = (z/2) sum_k t^k/(k! (k+1)!),
#   K0(z) = -(ln(z/2) + gamma_E) I0(z) + sum_k H_k t^k/(k!)^2,  H_k = 1 + 1/2 + ... + 1/k.
_SERIES_MAX = 2.0
_SERIES_TERMS = 14
_I0_SERIES = [1.0 / math.factorial(k) ** 2 for k in range(_SERIES_TERMS)]
_I1_SERIES = [1.0 / (math.factorial(k) * math.factorial(k + 1)) for k in range(_SERIES_TERMS)]
_K0_SERIES = [sum(1.0 / j for j in range(1, k + 1)) / math.factorial(k) ** 2
              for k in range(_SERIES_TERMS)]

# Omega_p^2 = eta I0 / (pi eps0 b^2 u0 gamma^3) and gamma^3 u0 = c (gamma beta) gamma^2.
_WP2_CONST = ETA / (np.pi * sc.epsilon_0 * sc.c)


def _kinematics(v):
    """gamma and gamma*beta for voltage array ``v`` (no checks)."""
    t = v / REST_VOLTAGE
    with np.errstate(invalid="ignore"):
        bg = np.sqrt(t * (t + 2.0))
    return 1.0 + t, bg


def _plasma_omega(i, v, b):
    """omega_p [rad/s] of the beam (no checks). [4]; see `plasma_freq`."""
    g, bg = _kinematics(v)
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.sqrt(_WP2_CONST * i / (b * b * bg * g * g))


def plasma_freq(current, voltage, beam_radius):
    """Plasma frequency f_p = omega_p / 2 pi of a uniform solid beam.

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
        f_p = omega_p / (2 pi). [Hz]  NaN where current < 0, voltage <= 0 or
        beam_radius <= 0.

    Notes
    -----
    Longitudinal oscillations in the laboratory frame of an infinitely wide
    beam of charge density rho0 = I0 / (pi b^2 u0)::

        omega_p^2 = e rho0 / (eps0 m_e gamma^3)

    The gamma^3 is the longitudinal mass [2]; at low voltage gamma -> 1,
    u0 -> sqrt(2 e V0 / m_e) and this is the textbook non-relativistic
    plasma frequency.  The finite beam in its tunnel oscillates at the
    reduced plasma frequency, see `reduced_plasma_freq`.

    References
    ----------
    [1] Branch and Mihran, 1955 (definition of omega_p of the beam).
    [2] Jackson, Sec. 12.2 (longitudinal mass).
    """
    i = np.asarray(current, dtype=float)
    v = np.asarray(voltage, dtype=float)
    b = np.asarray(beam_radius, dtype=float)
    fp = _plasma_omega(i, v, b) / (2.0 * np.pi)
    return _masked((i >= 0) & (v > 0) & (b > 0), fp)


#: Below this many points the scaled scipy Bessel functions are used throughout.
_SERIES_MIN_SIZE = 64


def _boundary_terms(x, ratio):
    """Right-hand side N/D of the eigenvalue equation (see `_reduction`), normalised.

    ``x`` = tau b > 0, ``ratio`` = a/b >= 1, both finite.  Returns (n, d) with
    n > 0, d >= 0, n + d = 1 and n/d = x [I1(x) K0(y) + K1(x) I0(y)] /
    [K0(x) I0(y) - I0(x) K0(y)], y = x a/b.  Where y <= 2 (most klystron beams)
    the Bessel functions come from their power series, elsewhere from scipy's
    exponentially scaled functions, which stay finite for any x and y.
    """
    y = x * ratio
    if x.size < _SERIES_MIN_SIZE:
        # few points: scipy's functions cost less than the series' Python loop
        n, d = _terms_scaled(x, ratio)
        d = np.maximum(d, 0.0)
        total = n + d
        return n / total, d / total
    small = y <= _SERIES_MAX
    if small.all():
        n, d = _terms_series(x, y)
    elif not small.any():
        n, d = _terms_scaled(x, ratio)
    else:
        n = np.empty_like(x)
        d = np.empty_like(x)
        n[small], d[small] = _terms_series(x[small], y[small])
        large = ~small
        n[large], d[large] = _terms_scaled(x[large], ratio[large])
    d = np.maximum(d, 0.0)  # rounding at b = a (where `_reduction` sets u = j01)
    total = n + d
    return n / total, d / total


def _terms_scaled(x, ratio):
    """(N, D) times e^x / I0(y), from exponentially scaled Bessel functions."""
    y = x * ratio
    # q = e^{2x} K0(y) / I0(y) = e^{-2(y-x)} k0e(y)/i0e(y); y - x computed directly
    with np.errstate(over="ignore", under="ignore"):
        q = np.exp(-2.0 * x * (ratio - 1.0)) * (special.k0e(y) / special.i0e(y))
    i0x = special.i0e(x)
    # D e^x / I0(y) = k0e(x) - i0e(x) q
    d = special.k0e(x) - i0x * q
    # N e^x / I0(y) = x (i1e(x) q + k1e(x)); with the Wronskian x (i0e k1e + i1e k0e) = 1
    # ([3], Eq. 9.6.15) this is (1 - x i1e(x) d) / i0e(x), free of K1
    n = (1.0 - x * special.i1e(x) * d) / i0x
    return n, d


def _series(coefficients, t):
    """sum_k c_k t^k by Horner's rule, in place."""
    p = np.full_like(t, coefficients[-1])
    for c in coefficients[-2::-1]:
        p *= t
        p += c
    return p


def _terms_series(x, y):
    """(N, D) unscaled, for 0 < x <= y <= 2, from the ascending series of [3]:
    I0 (Eq. 9.6.12), I1 (Eq. 9.6.10) and K0 (Eq. 9.6.13), all in t = z^2/4 <= 1."""
    tx = 0.25 * x * x
    ty = 0.25 * y * y
    i0x = _series(_I0_SERIES, tx)
    i0y = _series(_I0_SERIES, ty)
    i1x = 0.5 * x * _series(_I1_SERIES, tx)
    k0x = _series(_K0_SERIES, tx) - (np.log(0.5 * x) + np.euler_gamma) * i0x
    k0y = _series(_K0_SERIES, ty) - (np.log(0.5 * y) + np.euler_gamma) * i0y
    d = k0x * i0y - i0x * k0y
    # N = x I1(x) K0(y) + x K1(x) I0(y) with x K1 = (1 - x I1 K0(x))/I0(x) ([3], Eq. 9.6.15)
    n = (i0y - x * i1x * d) / i0x
    return n, d


def _halley_step(u, n, d):
    """Halley step for h(u) = u J1(u) d - n J0(u); returns (step, h)."""
    j0 = special.j0(u)
    j1 = special.j1(u)
    uj1 = u * j1
    h = uj1 * d - n * j0
    dh = u * j0 * d + n * j1                       # (u J1)' = u J0, J0' = -J1
    d2h = d * (j0 - uj1) + n * (j0 - j1 / u)       # J1' = J0 - J1/u
    step = h / dh
    return step / (1.0 - 0.5 * step * d2h / dh), h


def _initial_guess(n, d):
    """Start for the root of h: exact as n/d -> 0 and n/d -> inf, within 0.3 % between."""
    # n/d = 2w/(j01^2 - w) + c w with w = u^2 (module comment), i.e.
    # c w^2 - (2 + c j01^2 + r) w + r j01^2 = 0; smaller root, written in n and d
    # in the cancellation-free form (d = 0 gives w = j01^2).
    bd = (2.0 + _C_REST * J01**2) * d + n
    return np.sqrt(2.0 * n * J01**2 / (bd + np.sqrt(bd * bd - 4.0 * _C_REST * J01**2 * n * d)))


def _solve_eigenvalue(n, d):
    """Root u in (0, j01] of h(u) = u J1(u) d - n J0(u), vectorised.

    h increases monotonically on (0, j01): h(0) = -n < 0, h(j01) = j01 J1 d >= 0.
    Fast path: two Halley steps from `_initial_guess` (cubic convergence: 3e-3 ->
    ~1e-8 -> ~1e-16).  Elements whose last step is not below 1e-7 relative (none
    are known) go to `_solve_bracketed`, which cannot fail.
    """
    u = _initial_guess(n, d)
    for _ in range(2):
        step, _ = _halley_step(u, n, d)
        u = u - step
    with np.errstate(invalid="ignore"):
        slow = ~((np.abs(step) <= _TOL_STEP * u) & (u < 1.001 * J01))
    if slow.any():
        u[slow] = _solve_bracketed(n[slow], d[slow])
    return np.minimum(u, J01)  # the root is <= j01; clips a rounding excess at d = 0


def _solve_bracketed(n, d):
    """Safeguarded Halley iteration: a bracket [lo, hi] shrinks with the sign of h and a
    step leaving it is replaced by bisection."""
    u = _initial_guess(n, d)
    lo = np.zeros_like(u)
    hi = np.full_like(u, J01)
    for _ in range(_MAX_ITER):
        step, h = _halley_step(u, n, d)
        lo = np.where(h < 0, u, lo)
        hi = np.where(h > 0, u, hi)
        un = u - step
        un = np.where((un >= lo) & (un <= hi), un, 0.5 * (lo + hi))
        done = np.abs(un - u) <= _TOL_STEP * un
        u = un
        if done.all():
            break
    return u


def _reduction(x, ratio):
    """R(x, a/b) for 1e-300 <= x <= 1e100 and 1 <= ratio <= 1e200 (no checks)."""
    n, d = _boundary_terms(x, ratio)
    u = _solve_eigenvalue(n, d)
    u = np.where(ratio == 1.0, J01, u)  # b = a: T a = j01 exactly
    # R = 1/sqrt(1 + (T/tau)^2) = x/sqrt(x^2 + u^2), T b = u, tau b = x (x <= 1e100 here,
    # so x^2 is finite; x^2 may underflow only where it is negligible against u^2)
    return x / np.sqrt(x * x + u * u)


def reduction_factor(frequency, voltage, beam_radius, tunnel_radius):
    """Plasma-frequency reduction factor R = omega_q / omega_p of a beam in a tunnel.

    Parameters
    ----------
    frequency : numeric
        Signal frequency f, > 0. [Hz]
    voltage : numeric
        Beam accelerating voltage V0, > 0. [V]
    beam_radius : numeric
        Radius b of the uniform solid beam, > 0. [m]
    tunnel_radius : numeric
        Radius a of the drift tube, >= beam_radius. [m]

    Returns
    -------
    numeric
        R = omega_q / omega_p, 0 < R < 1. [1]  NaN where an argument is not
        finite, frequency <= 0, voltage <= 0, beam_radius <= 0 or
        beam_radius > tunnel_radius.

    Notes
    -----
    Exact eigenvalue of the space-charge-wave dispersion relation [1] (not a
    fit).  With the potential perturbation ~ phi(r) exp(j(omega t - beta z)),
    beta close to beta_e = omega / u0 (beta_q << beta_e) and confined flow,
    the radial equation is (derived from the linearised Maxwell, continuity
    and force equations, with longitudinal mass gamma^3 m_e [2])::

        inside  (r < b):  phi'' + phi'/r + T^2 phi = 0,  phi = J0(T r)
        outside (r > b):  phi'' + phi'/r - tau^2 phi = 0, phi(a) = 0
        tau^2 = beta_e^2 - (omega/c)^2 = (beta_e / gamma)^2
        T^2 = tau^2 (omega_p^2 / omega_q^2 - 1)

    Matching phi'/phi at r = b (no surface charge in confined flow), with
    u = T b and x = tau b = omega b / (c gamma beta), y = x a / b::

        u J1(u) / J0(u) = x [I1(x) K0(y) + K1(x) I0(y)] / [K0(x) I0(y) - I0(x) K0(y)]

    u is the smallest root, 0 < u <= j01 = 2.404826, and
    R = 1 / sqrt(1 + (u/x)^2).  In the non-relativistic limit tau = beta_e
    and this is the formulation of [1].

    Numerics (all elements at once, no per-point loop): the right-hand side
    N/D comes from the ascending series of I0, I1, K0 [3] where y <= 2 and
    from exponentially scaled Bessel functions elsewhere (no overflow for any
    x or a/b).  Then h(u) = u J1(u) D - N J0(u), increasing on (0, j01], is
    solved by two Halley steps from a start built on the product formula of
    J0 [3], with a bracketed, bisection-safeguarded iteration for any element
    whose last step is not small.  u comes out to about 1e-15 relative; R
    agrees with 30-digit solutions to 1e-13 or better over 1e-4 <= b/a <= 1,
    1e-5 <= x <= 1e3 (tested to 1e-9).

    Limits: b = a gives u = j01 exactly; b/a -> 0 gives the beam in free
    space, u J1/J0 = x K1(x)/K0(x); x -> 0 gives R -> x / u* with
    u* J1(u*)/J0(u*) = 1 / ln(a/b); x -> infinity gives R -> 1.

    Validity: small signal, quasi-static (beam slower than light, tau real),
    confined flow, uniform beam with no velocity spread, beta_q << beta_e.
    Brillouin or partly confined flow (rippled beam edge) has different R
    curves [1].

    References
    ----------
    [1] Branch and Mihran, 1955.  [2] Jackson, Sec. 12.2.  [3] Abramowitz
    and Stegun, Eqs. 9.5.10, 9.6.10, 9.6.12, 9.6.13, 9.6.15.
    """
    f, v, b, a = np.broadcast_arrays(*(np.asarray(z, dtype=float)
                                       for z in (frequency, voltage, beam_radius, tunnel_radius)))
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        ok = (np.isfinite(f) & np.isfinite(v) & np.isfinite(b) & np.isfinite(a)
              & (f > 0) & (v > 0) & (b > 0) & (b <= a))
        _, bg = _kinematics(v)
        x = 2.0 * np.pi * f * b / (sc.c * bg)        # tau b = beta_e b / gamma
        ratio = a / b
        # Keep x and y = x a/b finite and nonzero even for absurd inputs; R changes by
        # less than 1e-15 (R = 1 to 1e-200 at x = 1e100, free space at a/b = 1e200)
        # except that R < 1e-300 comes out as about 1e-300.
        x = np.clip(x, 1e-300, 1e100)
        ratio = np.minimum(ratio, 1e200)
        if not ok.all():
            # invalid elements get a harmless stand-in: the iteration sees finite numbers only
            x = np.where(ok, x, 1.0)
            ratio = np.where(ok, ratio, 2.0)
        # blocks of _BLOCK elements keep the temporaries in cache (a loop over blocks,
        # not over points)
        r = np.empty(x.shape)
        flat_r, flat_x, flat_ratio = r.reshape(-1), x.reshape(-1), ratio.reshape(-1)
        for start in range(0, flat_x.size, _BLOCK):
            block = slice(start, start + _BLOCK)
            flat_r[block] = _reduction(flat_x[block], flat_ratio[block])
    return _masked(ok, r)


def _reduced_omega(f, i, v, b, a):
    """(omega_q, u0) for broadcast inputs; omega_q is NaN outside the domain."""
    r = reduction_factor(f, v, b, a)
    wq = r * _plasma_omega(i, v, b)
    g, bg = _kinematics(v)
    u0 = sc.c * bg / g
    # the model needs omega_q < omega: at omega_q >= omega the fast space-charge
    # wave (beta = beta_e - beta_q) no longer travels forward
    ok = (i >= 0) & (wq < 2.0 * np.pi * f)
    return np.where(ok, wq, np.nan), u0


def reduced_plasma_freq(frequency, current, voltage, beam_radius, tunnel_radius):
    """Reduced plasma frequency f_q = R f_p of a beam in its tunnel.

    Parameters
    ----------
    frequency : numeric
        Signal frequency f, > 0. [Hz]
    current : numeric
        DC beam current I0, >= 0. [A]
    voltage : numeric
        Beam accelerating voltage V0, > 0. [V]
    beam_radius : numeric
        Radius b of the uniform solid beam, > 0. [m]
    tunnel_radius : numeric
        Radius a of the drift tube, >= beam_radius. [m]

    Returns
    -------
    numeric
        f_q = omega_q / (2 pi) = R f_p. [Hz]  NaN where `reduction_factor` is
        NaN, current < 0, or f_q >= frequency (outside the model, see Notes).

    Notes
    -----
    R from `reduction_factor`, f_p from `plasma_freq` (relativistic).  The
    space-charge-wave model takes beta_q = omega_q / u0 small against
    beta_e = omega / u0; at f_q >= f the fast wave no longer propagates
    forward and the result is NaN.  Practical klystron beams have f_q/f of
    a few percent to about 0.15.  Same validity as `reduction_factor`.

    References
    ----------
    [1] Branch and Mihran, 1955.
    """
    f = np.asarray(frequency, dtype=float)
    i = np.asarray(current, dtype=float)
    wq, _ = _reduced_omega(f, i, voltage, beam_radius, tunnel_radius)
    return (wq / (2.0 * np.pi))[()]


def plasma_wavelength(frequency, current, voltage, beam_radius, tunnel_radius):
    """Reduced plasma wavelength lambda_q = u0 / f_q of a beam in its tunnel.

    Parameters
    ----------
    frequency : numeric
        Signal frequency f, > 0. [Hz]
    current : numeric
        DC beam current I0, > 0. [A]
    voltage : numeric
        Beam accelerating voltage V0, > 0. [V]
    beam_radius : numeric
        Radius b of the uniform solid beam, > 0. [m]
    tunnel_radius : numeric
        Radius a of the drift tube, >= beam_radius. [m]

    Returns
    -------
    numeric
        lambda_q = 2 pi u0 / omega_q = u0 / f_q. [m]  NaN where
        `reduced_plasma_freq` is NaN or current <= 0.

    Notes
    -----
    Distance along the beam over which the space-charge waves beat through
    one full cycle; the RF current of a velocity-modulated beam grows as
    sin(2 pi z / lambda_q) in the small-signal theory [1].  Same validity as
    `reduced_plasma_freq`.

    References
    ----------
    [1] Branch and Mihran, 1955.
    """
    f = np.asarray(frequency, dtype=float)
    i = np.asarray(current, dtype=float)
    wq, u0 = _reduced_omega(f, i, voltage, beam_radius, tunnel_radius)
    with np.errstate(divide="ignore"):
        lq = 2.0 * np.pi * u0 / wq
    return _masked(i > 0, lq)


def optimum_drift(frequency, current, voltage, beam_radius, tunnel_radius):
    """Quarter reduced plasma wavelength lambda_q / 4: drift for peak RF current.

    Parameters
    ----------
    frequency : numeric
        Signal frequency f, > 0. [Hz]
    current : numeric
        DC beam current I0, > 0. [A]
    voltage : numeric
        Beam accelerating voltage V0, > 0. [V]
    beam_radius : numeric
        Radius b of the uniform solid beam, > 0. [m]
    tunnel_radius : numeric
        Radius a of the drift tube, >= beam_radius. [m]

    Returns
    -------
    numeric
        lambda_q / 4 = pi u0 / (2 omega_q). [m]  NaN where `plasma_wavelength`
        is NaN.

    Notes
    -----
    In the small-signal space-charge-wave theory the RF convection current
    grows as sin(beta_q z) from a velocity-modulating gap and peaks at
    z = lambda_q / 4 [1].  Practical drift lengths are often shorter, trading
    gain for bandwidth (common practice).  Same validity as
    `reduced_plasma_freq`.

    References
    ----------
    [1] Branch and Mihran, 1955.
    """
    return (0.25 * np.asarray(plasma_wavelength(frequency, current, voltage, beam_radius,
                                                 tunnel_radius)))[()]
