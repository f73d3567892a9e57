"""Power budget of a tube: average power, collector dissipation, coolant flow.

Steady-state energy bookkeeping of a linear-beam tube (common practice):
the DC beam power V0 I0 leaves the tube as RF output, as losses on the body
(beam interception, cavity wall losses) and as heat in the collector; the heat
is carried away by a coolant whose temperature rises by dT.

References
----------
[1] W. Wagner and A. Pruss, "The IAPWS formulation 1995 for the thermodynamic
    properties of ordinary water substance for general and scientific use",
    J. Phys. Chem. Ref. Data 31(2), 387-535, 2002 (water properties, tabulated
    in :mod:`tubefuncs.physics.water`).
"""

from __future__ import annotations

import numpy as np

from .water import fluid_properties

# Domain tests: a min/max reduction per argument is cheaper than building masks,
# so the masks (and np.where) are only built when some element is out of range.
# NaN makes a reduction NaN, which fails the test and takes the masked path.
_INF = np.inf


def average_power(peak_power, pulse_width, prf):
    """Average power of a pulsed transmitter.

    Parameters
    ----------
    peak_power : numeric
        Power during the pulse, >= 0. [W]
    pulse_width : numeric
        Pulse length (flat-top equivalent), >= 0. [s]
    prf : numeric
        Pulse repetition frequency, >= 0. [Hz]

    Returns
    -------
    numeric
        P_avg = P_peak * D with the duty cycle D = pulse_width * prf. [W]
        NaN where an argument is negative or the duty cycle exceeds 1.

    Notes
    -----
    Rectangular pulses: for a pulse with slow edges use the energy-equivalent
    width (pulse energy / peak power). D = 1 is CW operation, where the
    average power equals the peak power. Common practice.
    """
    p = np.asarray(peak_power, dtype=float)
    tau = np.asarray(pulse_width, dtype=float)
    f = np.asarray(prf, dtype=float)
    duty = tau * f                                   # D = tau * PRF
    fine = (p.min(initial=_INF) >= 0 and tau.min(initial=_INF) >= 0
            and f.min(initial=_INF) >= 0 and np.max(duty, initial=-_INF) <= 1.0)
    if not fine:
        ok = (duty <= 1.0) & (p >= 0) & (tau >= 0) & (f >= 0)
        return np.where(ok, p * duty, np.nan)[()]
    if isinstance(duty, np.ndarray) and duty.shape == np.broadcast_shapes(duty.shape, p.shape):
        return np.multiply(p, duty, out=duty)        # P_avg = P_peak * D, in place
    return (p * duty)[()]                            # P_avg = P_peak * D


def collector_power(beam_power, rf_output, body_loss=0.0):
    """Heat dissipated in the collector: beam power not converted nor lost elsewhere.

    Parameters
    ----------
    beam_power : numeric
        DC beam power V0 I0, >= 0. [W]
    rf_output : numeric
        RF output power, >= 0. [W]
    body_loss : numeric, optional
        Power deposited on the body: beam interception and cavity wall
        losses, >= 0 (default 0). [W]

    Returns
    -------
    numeric
        P_coll = P_beam - P_rf - P_body. [W]  NaN where an argument is
        negative or rf_output + body_loss > beam_power.

    Notes
    -----
    **With no RF drive the collector takes the full beam power** (P_rf = 0),
    and a tube can lose its drive at any time, so the collector and its
    coolant must be sized for P_beam, not for the saturated operating point.
    Pass rf_output = 0 for that case.

    The RF drive power is neglected (it is tens of dB below the output) and
    the beam power is taken at the cathode voltage; for a depressed collector
    use the collector current times the collector voltage instead. Pulsed
    tubes: pass average powers. Common practice (energy conservation).
    """
    pb = np.asarray(beam_power, dtype=float)
    prf_ = np.asarray(rf_output, dtype=float)
    pw = np.asarray(body_loss, dtype=float)
    pc = pb - prf_ - pw                               # P_coll = P_beam - P_rf - P_body
    # pc >= 0 with P_rf, P_body >= 0 also makes P_beam >= 0
    if (prf_.min(initial=_INF) >= 0 and pw.min(initial=_INF) >= 0
            and np.min(pc, initial=_INF) >= 0):
        return pc[()]
    ok = (pc >= 0) & (prf_ >= 0) & (pw >= 0)
    return np.where(ok, pc, np.nan)[()]


def coolant_flow(power, temperature_rise, fluid="water"):
    """Volumetric coolant flow that carries away a heat load.

    Parameters
    ----------
    power : numeric
        Heat load to remove, >= 0. [W]
    temperature_rise : numeric
        Coolant temperature rise from inlet to outlet, > 0 (a temperature
        difference). [K]
    fluid : str, optional
        Coolant name, one of :data:`tubefuncs.physics.water.FLUID_CHOICES`:
        ``"water"`` (25 degC mean, the default) or ``"water 40C"`` and the
        like, the mean coolant temperature.

    Returns
    -------
    numeric
        Volumetric flow V = P / (rho c_p dT). [m^3/s]  NaN where power < 0
        or temperature_rise <= 0.

    Raises
    ------
    ValueError
        For an unknown fluid name.

    Notes
    -----
    The heat balance is m = P/(c_p dT) for the mass flow and V = m/rho for
    the volumetric flow, which is what a flow meter in litres per minute
    reads (common practice). Both rho and c_p are taken at the named
    temperature, from IAPWS-95 [1] at 0.101325 MPa. Size for the worst case:
    for a collector that is the full beam power with no RF drive (see
    `collector_power`). With 25 degC water, 1 L/min carries 69.5 W per kelvin
    of temperature rise.
    """
    rho, cp = fluid_properties(fluid)
    p = np.asarray(power, dtype=float)
    dt = np.asarray(temperature_rise, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        flow = p / ((rho * cp) * dt)                  # V = P / (rho c_p dT)
    if p.min(initial=_INF) >= 0 and dt.min(initial=_INF) > 0:
        return flow[()]
    return np.where((p >= 0) & (dt > 0), flow, np.nan)[()]
