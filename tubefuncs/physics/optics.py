"""Beam optics and trade figures: space-charge limits, depression, focusing, cathode.

A solid round beam of radius b and current I0 in a grounded round tunnel of
radius a (confined flow, uniform density, all electrons with the same total
energy e V0 from the cathode).

- Potential depression: the beam's own space charge lowers the potential
  inside the tunnel.  Gauss's law with the line charge I0/u gives, for r <= b,
  phi(r) = (I0/(4 pi eps0 u)) [1 - r^2/b^2 + 2 ln(a/b)] below the tunnel
  potential [1]: on the axis the factor is g = 1 + 2 ln(a/b), averaged over
  the beam g_mean = 1/2 + 2 ln(a/b).  The electrons are slowed to the kinetic
  voltage V_k = V0 - phi, and u is the velocity at V_k, so the two are found
  together (self-consistently).
- Limiting current: in relativistic units that balance is
  gamma0 = gamma_k + (I0/I_A) g/beta_k, I_A = 4 pi eps0 m_e c^3/e = 17.045 kA.
  The current it allows is largest at gamma_k = gamma0^(1/3), which gives
  I_L = I_A (gamma0^(2/3) - 1)^(3/2)/(1 + 2 ln(a/b)) [2], [3]; a beam above I_L
  cannot be transported.  The non-relativistic limit is the perveance
  4 pi eps0 sqrt(eta) (2/3)^(3/2)/(1 + 2 ln(a/b)) = 25.4 uP/(1 + 2 ln(a/b)) [1].
- Confined-flow focusing: with cathode flux Psi_c threading the beam, Busch's
  theorem and the radial force balance of the edge electron give
  B^2 - (Psi_c/(pi b^2))^2 = B_B^2, B_B the Brillouin field [4]: a field
  m B_B needs the flux Psi_c = pi b^2 B_B sqrt(m^2 - 1).
- Cathode loading: J_c = I0/(pi b^2 C), C = (r_c/b)^2 the area convergence [4].
- Trade rules (common practice): efficiency against microperveance; the
  external Q that an output cavity needs to deliver P at gap voltage V.

References
----------
[1] J. R. Pierce, *Theory and Design of Electron Beams*, 2nd ed., Van
    Nostrand, 1954 (potential depression, maximum current in a drift tube)
    [from memory].
[2] L. S. Bogdankevich and A. A. Rukhadze, "Stability of relativistic
    electron beams in a plasma and the problem of critical currents", Sov.
    Phys. Usp. 14, 163, 1971 (limiting current) [from memory].
[3] M. Reiser, *Theory and Design of Charged Particle Beams*, 2nd ed.,
    Wiley-VCH, 2008, Sec. 4.2 (space-charge limiting current in a drift tube)
    [from memory for the section].
[4] A. S. Gilmour, *Principles of Traveling Wave Tubes*, Artech House, 1994,
    Ch. 7-9 (Brillouin and confined flow, area convergence) [from memory for
    the chapters].
[5] A. Yu. Baikov, C. Marrelli and I. Syratchev, "Toward high-power klystrons
    with RF power conversion efficiency on the order of 90 %", IEEE Trans.
    Electron Devices 62(10), 3406-3412, 2015 (efficiency against perveance of
    existing klystrons) [from memory; the trend line below is common practice].
"""

from __future__ import annotations

import numpy as np
from scipy import constants as sc

from .beam import REST_VOLTAGE, brillouin_field
from .cavity import convention_factor

#: Alfven-type current 4 pi eps0 m_e c^3 / e. [A]
ALFVEN_CURRENT = 4.0 * np.pi * sc.epsilon_0 * sc.m_e * sc.c**3 / sc.e

#: Efficiency-perveance trend line eta = 0.90 - 0.20 uK (common practice, see [5]).
EFFICIENCY_INTERCEPT = 0.90
EFFICIENCY_SLOPE = 0.20  # per microperveance


def _depression_factor(beam_radius, tunnel_radius, where="axis"):
    """g = 1 + 2 ln(a/b) on the axis, 1/2 + 2 ln(a/b) averaged over the beam."""
    b = np.asarray(beam_radius, dtype=float)
    a = np.asarray(tunnel_radius, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        log_term = 2.0 * np.log(a / b)
    return (1.0 if where == "axis" else 0.5) + log_term


def limiting_current(voltage, beam_radius, tunnel_radius):
    """Space-charge limiting current of a solid beam in its tunnel (confined flow).

    Parameters
    ----------
    voltage : numeric
        Beam voltage V0 (cathode to tunnel), > 0. [V]
    beam_radius : numeric
        Radius b of the uniform solid beam, 0 < b <= tunnel_radius. [m]
    tunnel_radius : numeric
        Tunnel radius a. [m]

    Returns
    -------
    numeric
        I_L = I_A (gamma0^(2/3) - 1)^(3/2)/(1 + 2 ln(a/b)), I_A = 17.045 kA. [A]
        NaN where voltage <= 0, beam_radius <= 0 or beam_radius > tunnel_radius.

    Notes
    -----
    Infinitely strong axial field (no radial motion), uniform density, the
    energy balance taken on the axis (the deepest potential) [2], [3]; see
    the module help for the derivation.  Non-relativistically this is the
    perveance 25.4 uP/(1 + 2 ln(a/b)) of [1].  A beam near I_L is far from
    any practical klystron design: tubes run at a small fraction of it.
    """
    v = np.asarray(voltage, dtype=float)
    g = _depression_factor(beam_radius, tunnel_radius)
    gamma0 = 1.0 + v / REST_VOLTAGE
    with np.errstate(invalid="ignore"):
        # (gamma^(2/3) - 1) without cancellation at low voltage: t = gamma - 1,
        # gamma^(2/3) - 1 = expm1((2/3) log1p(t))
        x = np.expm1(np.log1p(v / REST_VOLTAGE) * (2.0 / 3.0))
        il = ALFVEN_CURRENT * x * np.sqrt(x) / g  # [2]
    b = np.asarray(beam_radius, dtype=float)
    a = np.asarray(tunnel_radius, dtype=float)
    ok = (v > 0) & (b > 0) & (b <= a) & np.isfinite(gamma0)
    return np.where(ok, il, np.nan)[()]


def _kinetic_gamma(current, voltage, g):
    """gamma_k on the transported branch of gamma0 = gamma_k + (I/I_A) g/beta_k (NaN above I_L)."""
    i = np.asarray(current, dtype=float)
    gamma0 = 1.0 + np.asarray(voltage, dtype=float) / REST_VOLTAGE
    s = i * g / ALFVEN_CURRENT  # (I/I_A) g
    gamma0, s = np.broadcast_arrays(gamma0, s)
    # Bisection on [gamma0^(1/3), gamma0] (the function gamma_k + s/beta_k is
    # increasing there), 60 halvings: full double precision.
    lo = np.cbrt(gamma0)
    hi = gamma0.copy()
    with np.errstate(invalid="ignore", divide="ignore"):
        for _ in range(60):
            mid = 0.5 * (lo + hi)
            beta = np.sqrt((mid - 1.0) * (mid + 1.0)) / mid
            above = mid + s / beta > gamma0
            hi = np.where(above, mid, hi)
            lo = np.where(above, lo, mid)
        gk = 0.5 * (lo + hi)
        beta_lo = np.sqrt((np.cbrt(gamma0) - 1.0) * (np.cbrt(gamma0) + 1.0)) / np.cbrt(gamma0)
        possible = np.cbrt(gamma0) + s / beta_lo <= gamma0
    return np.where(possible, gk, np.nan)


def depressed_voltage(current, voltage, beam_radius, tunnel_radius, location="mean"):
    """Kinetic voltage of the beam after its space-charge depression.

    Parameters
    ----------
    current : numeric
        DC beam current I0, >= 0. [A]
    voltage : numeric
        Beam voltage V0 (cathode to tunnel), > 0. [V]
    beam_radius : numeric
        Radius b of the uniform solid beam, 0 < b <= tunnel_radius. [m]
    tunnel_radius : numeric
        Tunnel radius a. [m]
    location : str, optional
        "mean" (default): averaged over the beam cross-section,
        g = 1/2 + 2 ln(a/b); "axis": on the axis, g = 1 + 2 ln(a/b).

    Returns
    -------
    numeric
        V_k = (gamma_k - 1) m_e c^2/e with gamma0 = gamma_k + (I0/I_A) g/beta_k,
        on the transported branch. [V]  NaN where no solution exists (current
        above the limiting current for that g) or the inputs are out of domain.

    Notes
    -----
    Self-consistent: the depression is computed with the velocity at the
    depressed energy (module help, [1]).  For small currents
    V0 - V_k -> I0 g/(4 pi eps0 u0).
    """
    key = location.strip().lower() if isinstance(location, str) else None
    if key not in ("mean", "axis"):
        raise ValueError(f"location must be 'mean' or 'axis', got {location!r}")
    g = _depression_factor(beam_radius, tunnel_radius, key)
    gk = _kinetic_gamma(current, voltage, g)
    b = np.asarray(beam_radius, dtype=float)
    a = np.asarray(tunnel_radius, dtype=float)
    i = np.asarray(current, dtype=float)
    v = np.asarray(voltage, dtype=float)
    ok = (v > 0) & (i >= 0) & (b > 0) & (b <= a)
    return np.where(ok, (gk - 1.0) * REST_VOLTAGE, np.nan)[()]


def potential_depression(current, voltage, beam_radius, tunnel_radius):
    """Space-charge potential depression on the beam axis (self-consistent).

    Parameters
    ----------
    current : numeric
        DC beam current I0, >= 0. [A]
    voltage : numeric
        Beam voltage V0 (cathode to tunnel), > 0. [V]
    beam_radius : numeric
        Radius b of the uniform solid beam, 0 < b <= tunnel_radius. [m]
    tunnel_radius : numeric
        Tunnel radius a. [m]

    Returns
    -------
    numeric
        V0 - V_k on the axis = I0 (1 + 2 ln(a/b))/(4 pi eps0 u_k), u_k the
        velocity of the depressed electrons on the axis. [V]  NaN above the
        limiting current or out of domain.

    Notes
    -----
    See `depressed_voltage` (location="axis") and the module help [1].
    """
    v = np.asarray(voltage, dtype=float)
    return (v - depressed_voltage(current, voltage, beam_radius, tunnel_radius, "axis"))[()]


def confined_flow_field(current, voltage, beam_radius, ratio=2.0):
    """Axial focusing field of a confined-flow beam, a given multiple of the Brillouin field.

    Parameters
    ----------
    current, voltage, beam_radius : numeric
        DC beam current [A], beam voltage [V], beam radius [m].
    ratio : numeric, optional
        m = B/B_B >= 1 (default 2). [1]

    Returns
    -------
    numeric
        m B_B, B_B the relativistic Brillouin field (`brillouin_field`). [T]
    """
    m = np.asarray(ratio, dtype=float)
    out = m * brillouin_field(current, voltage, beam_radius)
    return np.where(m >= 1.0, out, np.nan)[()]


def cathode_flux(current, voltage, beam_radius, ratio=2.0):
    """Cathode flux that holds the beam at its radius in m times the Brillouin field.

    Parameters
    ----------
    current, voltage, beam_radius : numeric
        DC beam current [A], beam voltage [V], beam radius [m].
    ratio : numeric, optional
        m = B/B_B >= 1 (default 2). [1]

    Returns
    -------
    numeric
        Psi_c = pi b^2 B_B sqrt(m^2 - 1). [Wb]  0 for Brillouin flow (m = 1);
        NaN where m < 1.

    Notes
    -----
    Busch's theorem gives the rotation gamma m_e r^2 dtheta/dt =
    (e/2 pi)(Psi - Psi_c); radial balance of the edge electron in the axial
    field B, with the space-charge field reduced by the self-magnetic field
    (1/gamma^2), gives B^2 (1 - (Psi_c/Psi)^2) = B_B^2, Psi = pi b^2 B [4]
    (derived; the relativistic form keeps the relativistic B_B).  The
    cathode field follows as Psi_c/(pi r_c^2).
    """
    m = np.asarray(ratio, dtype=float)
    b = np.asarray(beam_radius, dtype=float)
    bb = brillouin_field(current, voltage, beam_radius)
    with np.errstate(invalid="ignore"):
        psi = np.pi * b * b * bb * np.sqrt((m - 1.0) * (m + 1.0))
    return np.where(m >= 1.0, psi, np.nan)[()]


def cathode_loading(current, beam_radius, convergence):
    """Emission current density at the cathode of a gun with a given area convergence.

    Parameters
    ----------
    current : numeric
        Beam current I0, >= 0. [A]
    beam_radius : numeric
        Radius b of the beam in the tunnel, > 0. [m]
    convergence : numeric
        Area convergence C = cathode area / beam area = (r_c/b)^2, >= 1. [1]

    Returns
    -------
    numeric
        J_c = I0/(pi b^2 C). [A/m^2]  NaN out of domain.

    Notes
    -----
    Uniform emission over a cathode of radius r_c = b sqrt(C) [4].  Long-life
    dispenser cathodes are commonly run at a few A/cm^2 (common practice).
    """
    i = np.asarray(current, dtype=float)
    b = np.asarray(beam_radius, dtype=float)
    c = np.asarray(convergence, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        j = i / (np.pi * b * b * c)
    return np.where((i >= 0) & (b > 0) & (c >= 1.0), j, np.nan)[()]


def efficiency_estimate(perveance):
    """Typical electronic efficiency of a conventional klystron of given perveance.

    Parameters
    ----------
    perveance : numeric
        Beam perveance K = I0/V0^1.5, 0 <= K <= 4e-6. [A/V^1.5]

    Returns
    -------
    numeric
        eta = 0.90 - 0.20 uK, uK = 1e6 K (common practice: a trend line through
        existing klystrons, cf. [5]). [1]  NaN outside 0 <= uK <= 4.

    Notes
    -----
    A trend, not a bound: single designs scatter by several points either
    side, and modern high-efficiency bunching schemes beat it.
    """
    uk = 1e6 * np.asarray(perveance, dtype=float)
    eta = EFFICIENCY_INTERCEPT - EFFICIENCY_SLOPE * uk
    return np.where((uk >= 0) & (uk <= 4.0), eta, np.nan)[()]


def optimum_qext(power, gap_voltage, r_over_q, convention="circuit"):
    """External Q of an output cavity that delivers a power at a given gap voltage.

    Parameters
    ----------
    power : numeric
        RF power into the load P, > 0. [W]
    gap_voltage : numeric
        Peak output-gap voltage V, > 0 (commonly 0.8-1 times the beam voltage
        at saturation). [V]
    r_over_q : numeric
        R/Q of the output cavity in ``convention``, > 0. [ohm]
    convention : str, optional
        "circuit" (default) or "accelerator"/"linac".

    Returns
    -------
    numeric
        Qext = V^2/(2 (R/Q)_circuit P): the load conductance that takes P at
        V (common practice: the output-cavity match). [1]
    """
    p = np.asarray(power, dtype=float)
    v = np.asarray(gap_voltage, dtype=float)
    rq = np.asarray(r_over_q, dtype=float) / convention_factor(convention)
    with np.errstate(divide="ignore", invalid="ignore"):
        q = v * v / (2.0 * rq * p)
    return np.where((p > 0) & (v > 0) & (rq > 0), q, np.nan)[()]
