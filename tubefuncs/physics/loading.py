"""Beam loading of a gap: conductance, susceptance and the resonance shift.

A gap whose field velocity-modulates the beam also sees the current that the
modulation induces back in it: the beam acts as an admittance
Y_B = G_B + j B_B in parallel with the cavity.  G_B takes power (it lowers
the cavity Q); B_B detunes the cavity, so the beam-loaded ("hot") resonance
differs from the frequency a cold test measures.

Two models, chosen by whether the radii are given:

- gridded gap, no space charge (kinematic, today's `gap.beam_loading`):
  G_B/G0 = kappa M (M - cos(theta/2)) and
  B_B/G0 = kappa [2 sin theta - theta (1 + cos theta)]/theta^2 [1], [2];
- gridless gap with space charge (the two-wave form of the small-signal gain
  model): the gap launches a fast and a slow space-charge wave (wave numbers
  beta_e -/+ beta_q) and the beam admittance is

      Y_B = kappa G0 (beta_e/(2 beta_q)) [H(beta_e - beta_q) - H(beta_e + beta_q)],

  with H(beta) = P(beta)/2 - j S(beta), P(beta) = M(beta)^2 the (RMS over
  the beam) squared coupling at wave number beta and S its Hilbert transform
  S(beta) = (1/pi) PV int_0^inf P(k) beta/(beta^2 - k^2) dk [3], [4].

Here kappa = 1/(gamma (gamma + 1)) (1/2 non-relativistically), G0 = I0/V0,
phasors e^{j omega t}, and Y_B = I_induced/V with V the gap voltage that
accelerates electrons and I_induced the Ramo current in the direction of
electron flow, so that the power taken from the gap is |V|^2 G_B/2.  B_B > 0
is capacitive: it lowers the resonance.

Derivation of H: with a normalised gap-field profile f(z) (int f dz = 1), a
velocity kick at z' gives a current at z > z' through the space-charge-wave
Green's function, so the induced current per volt is
int int_{z' < z} f(z) f(z') Y(z - z') dz dz' with
Y(L) = kappa G0 (beta_e/(2 beta_q)) [e^{-j beta_f L} - e^{-j beta_s L}].
Writing C(u) for the autocorrelation of f, H(beta) = int_0^inf C(u)
e^{-j beta u} du; its real part is half the Fourier transform of C, i.e.
P(beta)/2, and its imaginary part -S(beta) follows from C(u) =
(1/pi) int_0^inf P(k) cos(k u) dk and int_0^inf sin(beta u) cos(k u) du =
beta/(beta^2 - k^2) (principal value) [4].  The gridded uniform field gives
H = -j/theta + (1 - e^{-j theta})/theta^2 in closed form, theta = beta d.

References
----------
[1] S. Y. Liao, *Microwave Devices and Circuits*, 3rd ed., Prentice Hall,
    1990, Ch. 9 (beam-loading conductance of a gridded gap) [from memory].
[2] A. H. W. Beck, *Space-Charge Waves and Slow Electromagnetic Waves*,
    Pergamon, 1958 (electronic admittance of a gap, conductance and
    susceptance) [from memory].
[3] G. Caryotakis, "High power klystrons: theory and practice at the
    Stanford Linear Accelerator Center", SLAC-PUB-10620, 2004, Ch. 3
    (space-charge beam loading (beta_e/8 beta_q)(M_-^2 - M_+^2)).
[4] E. C. Titchmarsh, *Introduction to the Theory of Fourier Integrals*,
    2nd ed., Oxford, 1948 (Hilbert transforms, Kramers-Kronig pairs)
    [from memory].
[5] D. M. Pozar, *Microwave Engineering*, 4th ed., Wiley, 2012, Ch. 6
    (parallel resonant circuit; a parallel susceptance shifts the
    resonance) [from memory for the chapter].
"""

from __future__ import annotations

import numpy as np
from scipy import constants as sc
from scipy import special

from .beam import beta as beta_of
from .beam import gamma
from .gap import P01, _sinc_minus_cos
from .plasma import reduced_plasma_freq

TWO_PI = 2.0 * np.pi

# Quadrature of the Hilbert transform: Gauss-Legendre panels of 16 nodes, two on
# [0, 2 beta_e] (the subtracted singularity at k = beta lies there, and k0 < beta_e)
# and 24 on [2 beta_e, K], K = 64 max(beta_e, 1/d) + 2 beta_e, so that a panel spans
# at most about 4 periods 2 pi/d of the sinc^2 factor for transit angles up to about
# 10 rad; beyond K the subtracted term is integrated analytically and the rest
# from the asymptote P ~ 2 R^2/(k d)^2 (mean of sin^2 = 1/2).
_NODES_PER_PANEL = 16
_PANELS_FAR = 24
_gl_x, _gl_w = np.polynomial.legendre.leggauss(_NODES_PER_PANEL)
_UNIT = 0.5 * (_gl_x + 1.0)           # nodes on [0, 1]
_NEAR_NODES = np.concatenate([_UNIT, 1.0 + _UNIT])          # on [0, 2], in t = k/beta_e
_NEAR_WEIGHTS = np.tile(0.5 * _gl_w, 2)
_FAR_NODES = (np.arange(_PANELS_FAR)[:, None] + _UNIT[None, :]).ravel() / _PANELS_FAR
_FAR_WEIGHTS = np.tile(0.5 * _gl_w, _PANELS_FAR) / _PANELS_FAR   # on [0, 1]
#: Elements handled per block (bounds the temporary arrays to a few MB).
_BLOCK = 4096
# Smallest beta_q/beta_e used (as in the gain model).
_MIN_WAVE_STEP = 1e-6


def _radial_factor(k, k0, b, a):
    """RMS over a uniform beam of radius b of the squared field ratio E(r)/E(a) at wave number k.

    k >= k0: [I0^2(x b) - I1^2(x b)]/I0^2(x a), x = sqrt(k^2 - k0^2);
    k < k0:  [J0^2(y b) + J1^2(y b)]/J0^2(y a), y = sqrt(k0^2 - k^2)
    ((2/b^2) int_0^b J0^2(y r) r dr = J0^2(yb) + J1^2(yb)).  Requires k0 a < P01.
    """
    slow = k >= k0
    with np.errstate(invalid="ignore", over="ignore", divide="ignore"):
        x = np.sqrt(np.where(slow, k * k - k0 * k0, 0.0))
        i0b = special.i0e(x * b)
        i1b = special.i1e(x * b)
        evanescent = (i0b - i1b) * (i0b + i1b) / special.i0e(x * a) ** 2 * np.exp(2.0 * x * (b - a))
        y = np.sqrt(np.where(slow, 0.0, k0 * k0 - k * k))
        j0a = special.j0(y * a)
        oscillating = (special.j0(y * b) ** 2 + special.j1(y * b) ** 2) / (j0a * j0a)
    return np.where(slow, evanescent, oscillating)


def _radial_factor_evanescent(k, k0, b, a):
    """`_radial_factor` for k >= k0 only (the I0 branch)."""
    with np.errstate(invalid="ignore", over="ignore"):
        x = np.sqrt((k - k0) * (k + k0))
        i0b = special.i0e(x * b)
        i1b = special.i1e(x * b)
        return (i0b - i1b) * (i0b + i1b) / special.i0e(x * a) ** 2 * np.exp(2.0 * x * (b - a))


def coupling_spectrum(wave_number, frequency, gap_length, beam_radius=None, tunnel_radius=None):
    """Squared gap coupling P(k) = M(k)^2 of a field component of axial wave number k.

    Parameters
    ----------
    wave_number : numeric
        Axial wave number k >= 0 of the component e^{j(omega t - k z)}. [rad/m]
    frequency : numeric
        Signal frequency. [Hz]
    gap_length : numeric
        Gap length d. [m]
    beam_radius, tunnel_radius : numeric or None
        Radii of a gridless gap (RMS over a uniform beam); None for a
        gridded gap. [m]

    Returns
    -------
    numeric
        sinc^2(k d/2) times the radial factor (1 for a gridded gap). [1]

    Notes
    -----
    Flat gap field E = V/d at the tunnel wall over the gap length, zero on
    the wall elsewhere (the model of `tubefuncs.physics.gap.gap_coupling`).
    A Fourier component k of the field satisfies the Helmholtz equation in
    the tunnel, so its radial profile is I0(sqrt(k^2 - k0^2) r), k0 = omega/c,
    or J0(sqrt(k0^2 - k^2) r) for k < k0; for k at the phase velocity of the
    beam this is the coupling coefficient of `gap_coupling`.
    """
    k = np.asarray(wave_number, dtype=float)
    d = np.asarray(gap_length, dtype=float)
    p = np.sinc(k * d / TWO_PI) ** 2  # sin(kd/2)/(kd/2), squared
    if beam_radius is None and tunnel_radius is None:
        return p
    k0 = TWO_PI * np.asarray(frequency, dtype=float) / sc.c
    return p * _radial_factor(k, k0, np.asarray(beam_radius, dtype=float),
                              np.asarray(tunnel_radius, dtype=float))


def _hilbert_gridless(betas, beta_e, k0, d, b, a):
    """S(beta) = (1/pi) PV int_0^inf P(k) beta/(beta^2 - k^2) dk for each beta in ``betas``.

    All arguments are 1-D arrays of one length; the nodes k = beta_e t are shared by
    every beta of one element, so differences between betas of one element are smooth.
    """
    out = np.empty((len(betas),) + beta_e.shape)
    for lo in range(0, beta_e.size, _BLOCK):
        sl = slice(lo, lo + _BLOCK)
        be, kk0, dd, bb, aa = (x[sl, None] for x in (beta_e, k0, d, b, a))
        span = 64.0 * np.maximum(be, 1.0 / dd)
        k_near = be * _NEAR_NODES[None, :]
        k_far = 2.0 * be + span * _FAR_NODES[None, :]     # all above k0 (k0 < beta_e)
        k = np.concatenate([k_near, k_far], axis=1)
        w = np.concatenate([be * _NEAR_WEIGHTS[None, :],
                            span * _FAR_WEIGHTS[None, :]], axis=1)
        radial = np.concatenate([_radial_factor(k_near, kk0, bb, aa),
                                 _radial_factor_evanescent(k_far, kk0, bb, aa)], axis=1)
        pk = np.sinc(k * dd / TWO_PI) ** 2 * radial
        k_max = (2.0 * be + span)[:, 0]
        r_far = _radial_factor_evanescent(k_max[:, None], kk0, bb, aa)[:, 0]
        for n, beta in enumerate(betas):
            bt = beta[sl, None]
            pb = np.sinc(bt * dd / TWO_PI) ** 2 * _radial_factor(bt, kk0, bb, aa)
            with np.errstate(divide="ignore", invalid="ignore"):
                integrand = (pk - pb) * bt / ((bt - k) * (bt + k))
            # removable singularity at k = beta: a node that falls on it adds nothing
            integrand = np.where(np.isfinite(integrand), integrand, 0.0)
            body = (integrand * w).sum(axis=1)
            btv = bt[:, 0]
            # beyond K: -P(beta) int_K^inf beta/(beta^2 - k^2) dk, analytic, and
            # int_K^inf P(k) beta/(beta^2 - k^2) dk ~ -2 beta R^2/(3 d^2 K^3)
            tail = (pb[:, 0] * 0.5 * np.log((k_max + btv) / (k_max - btv))
                    - 2.0 * btv * r_far / (3.0 * dd[:, 0] ** 2 * k_max ** 3))
            out[n, sl] = (body + tail) / np.pi
    return out


def _hilbert_gridded(beta, d):
    """S(beta) = (theta - sin theta)/theta^2 of the uniform gridded field, theta = beta d."""
    theta = beta * d
    small = np.abs(theta) < 0.1
    with np.errstate(divide="ignore", invalid="ignore"):
        direct = (theta - np.sin(theta)) / (theta * theta)
    # series theta/6 - theta^3/120 + theta^5/5040
    t2 = theta * theta
    series = theta * (1.0 / 6.0 - t2 * (1.0 / 120.0 - t2 / 5040.0))
    return np.where(small, series, direct)


def _broadcast(*args):
    return np.broadcast_arrays(*(np.asarray(x, dtype=float) for x in args))


def beam_admittance(frequency, gap_length, voltage, current, beam_radius=None,
                    tunnel_radius=None):
    """Complex beam-loading admittance Y_B = G_B + j B_B of a gap.

    Parameters
    ----------
    frequency : numeric
        Signal frequency f, >= 0 (> 0 for a gridless gap). [Hz]
    gap_length : numeric
        Gap length d along the beam, >= 0 (> 0 for a gridless gap). [m]
    voltage : numeric
        Beam voltage V0 (kinetic voltage of the beam at the gap), > 0. [V]
    current : numeric
        DC beam current I0, >= 0 (> 0 for a gridless gap). [A]
    beam_radius, tunnel_radius : numeric or None, optional
        Both given: gridless gap with space charge (two-wave form), solid
        beam 0 < b <= a.  Both None: gridded gap, kinematic. [m]

    Returns
    -------
    complex numeric
        Y_B [S]; NaN where the inputs are outside the model (see Notes).

    Notes
    -----
    See the module help for the models and the sign convention.  The gridless
    form needs the reduced plasma frequency f_q (`reduced_plasma_freq`) and
    is NaN where f_q >= f, where the fast space-charge wave is faster than
    light, or where the tunnel propagates at f (2 pi f a/c >= 2.405, above the
    TM01 cutoff: the gap field then radiates down the tunnel).  The Hilbert
    transform is a composite Gauss-Legendre quadrature (416 nodes) with the
    removable singularity subtracted and the tail beyond the last node
    integrated from its asymptote; for transit angles up to about 10 rad its
    error is below about 1e-5 of S (checked against the closed gridded form).
    """
    if (beam_radius is None) != (tunnel_radius is None):
        raise ValueError("give both beam_radius and tunnel_radius (gridless gap) or "
                         "neither (gridded gap)")
    gridless = beam_radius is not None
    if gridless:
        f, d, v, i, b, a = _broadcast(frequency, gap_length, voltage, current, beam_radius,
                                      tunnel_radius)
    else:
        f, d, v, i = _broadcast(frequency, gap_length, voltage, current)
    g = gamma(v)
    with np.errstate(divide="ignore", invalid="ignore"):
        u0 = sc.c * beta_of(v)
        kg0 = i / v / (g * (g + 1.0))  # kappa G0, relativistic velocity modulation
        beta_e = TWO_PI * f / u0
    if not gridless:
        theta = beta_e * d
        # kinematic: G_B/(kappa G0) = M^2 - M cos(theta/2) ([1], relativistic factor);
        # B_B/(kappa G0) = beta_e dS/dbeta = [2 sin theta - theta (1 + cos theta)]/theta^2
        x = 0.5 * theta
        m = np.sinc(theta / TWO_PI)
        with np.errstate(divide="ignore", invalid="ignore"):
            g_b = kg0 * m * _sinc_minus_cos(np.abs(x), m)
            b_b = kg0 * (2.0 * np.sin(theta) - theta * (1.0 + np.cos(theta))) / (theta * theta)
        # small theta: the series sum_{n>=1} (-1)^(n+1) (2n-1) theta^(2n-1)/(2n+1)!
        # (the direct difference cancels); the next term is below 1e-9 of the sum
        t2 = theta * theta
        b_series = kg0 * theta * (1.0 / 6.0 - t2 * (1.0 / 40.0 - t2 * (5.0 / 5040.0
                                                                     - t2 * 7.0 / 362880.0)))
        b_b = np.where(np.abs(theta) < 0.25, b_series, b_b)
        ok = (f >= 0) & (d >= 0) & (v > 0) & (i >= 0)
        return np.where(ok, g_b + 1j * b_b, np.nan + 0j)[()]
    k0 = TWO_PI * f / sc.c
    with np.errstate(divide="ignore", invalid="ignore"):
        f_q = np.asarray(reduced_plasma_freq(f, i, v, b, a), dtype=float)
        beta_q = np.maximum(TWO_PI * f_q / u0, _MIN_WAVE_STEP * beta_e)
    ok = ((f > 0) & (d > 0) & (v > 0) & (i > 0) & (b > 0) & (b <= a) & (f_q < f)
          & (beta_e - beta_q > k0) & (k0 * a < P01))
    out = np.full(f.shape, np.nan + 0j)
    if not np.any(ok):
        return out[()]
    sel = [x[ok] for x in (f, d, b, a, beta_e, beta_q, kg0, k0)]
    fs, ds, bs, as_, bes, bqs, kgs, k0s = sel
    beta_f, beta_s = bes - bqs, bes + bqs
    p_f = coupling_spectrum(beta_f, fs, ds, bs, as_)
    p_s = coupling_spectrum(beta_s, fs, ds, bs, as_)
    s_f, s_s = _hilbert_gridless((beta_f, beta_s), bes, k0s, ds, bs, as_)
    scale = kgs * bes / (2.0 * bqs)
    # Y_B = scale [H(beta_f) - H(beta_s)], H = P/2 - j S
    out[ok] = scale * (0.5 * (p_f - p_s) + 1j * (s_s - s_f))
    return out[()]


def beam_loading(frequency, gap_length, voltage, current, beam_radius=None, tunnel_radius=None):
    """Beam-loading conductance G_B of a gap (gridded, or gridless with space charge).

    Parameters
    ----------
    frequency, gap_length, voltage, current, beam_radius, tunnel_radius
        As in `beam_admittance`. [Hz, m, V, A, m, m]

    Returns
    -------
    numeric
        G_B = Re Y_B [S]; Q_B = 1/((R/Q) G_B) in the circuit convention.  NaN
        outside the model (see `beam_admittance`).

    Notes
    -----
    Without the radii this is the kinematic gridded-gap result
    (I0/V0)(M^2 - M cos(theta/2))/(gamma(gamma+1)) [1]; with them it is the
    space-charge form kappa G0 beta_e (M_f^2 - M_s^2)/(4 beta_q) that the
    small-signal gain model uses [3].
    """
    return np.real(beam_admittance(frequency, gap_length, voltage, current, beam_radius,
                                   tunnel_radius))[()]


def beam_susceptance(frequency, gap_length, voltage, current, beam_radius=None,
                     tunnel_radius=None):
    """Beam-loading susceptance B_B of a gap (gridded, or gridless with space charge).

    Parameters
    ----------
    frequency, gap_length, voltage, current, beam_radius, tunnel_radius
        As in `beam_admittance`. [Hz, m, V, A, m, m]

    Returns
    -------
    numeric
        B_B = Im Y_B [S], > 0 capacitive (lowers the resonance).  NaN outside
        the model (see `beam_admittance`).

    Notes
    -----
    Gridded, kinematic: B_B = kappa G0 [2 sin theta - theta(1 + cos theta)]/theta^2,
    theta/12 G0 for small theta non-relativistically [2].  Gridless with space
    charge: kappa G0 (beta_e/(2 beta_q)) [S(beta_s) - S(beta_f)] (module help).
    """
    return np.imag(beam_admittance(frequency, gap_length, voltage, current, beam_radius,
                                   tunnel_radius))[()]


def beam_loaded_freq(cold_frequency, r_over_q, gap_length, voltage, current, beam_radius=None,
                     tunnel_radius=None, convention="circuit"):
    """Beam-loaded ("hot") resonant frequency of a cavity from its cold-test frequency.

    Parameters
    ----------
    cold_frequency : numeric
        Resonant frequency without beam (cold test), > 0. [Hz]
    r_over_q : numeric
        R/Q of the cavity in ``convention``, > 0. [ohm]
    gap_length, voltage, current, beam_radius, tunnel_radius
        As in `beam_admittance`. [m, V, A, m, m]
    convention : str, optional
        "circuit" (default, R = V^2/2P) or "accelerator"/"linac" (V^2/P).

    Returns
    -------
    numeric
        Frequency f at which the cavity's susceptance and B_B(f) cancel. [Hz]
        NaN outside the beam-loading model.

    Notes
    -----
    A parallel resonator of circuit R/Q has the admittance
    (1/(R/Q)) [1/Q + j (f/f_c - f_c/f)] [5]; the beam adds j B_B, so the
    resonance moves to f/f_c - f_c/f = -(R/Q) B_B(f), i.e.
    f = f_c (x + sqrt(x^2 + 4))/2 with x = -(R/Q) B_B(f), solved by fixed-point
    iteration (B_B changes slowly with f: four passes reach 1e-12).  A
    capacitive beam (B_B > 0) lowers the resonance.
    """
    from .cavity import convention_factor
    fc = np.asarray(cold_frequency, dtype=float)
    rq = np.asarray(r_over_q, dtype=float) / convention_factor(convention)
    f = fc
    for _ in range(4):
        x = -rq * beam_susceptance(f, gap_length, voltage, current, beam_radius, tunnel_radius)
        f = fc * 0.5 * (x + np.sqrt(x * x + 4.0))
    ok = (fc > 0) & (rq > 0)
    return np.where(ok, f, np.nan)[()]
