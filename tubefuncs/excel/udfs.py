"""Excel worksheet functions of tubefuncs, as classic xlwings user-defined functions.

GENERATED FILE: do not edit.  Regenerate after any catalogue change with

    python -m tubefuncs.excel.generate

then click Import Functions on Excel's xlwings tab (see addin/README.md).
67 functions, generated from tubefuncs.catalogue.  This is the only module
of tubefuncs that imports xlwings.  Every argument is declared ndim=2 (a cell
arrives as [[x]], a column keeps its orientation) with err_to_str=True (an
error cell arrives as its text, e.g. "#DIV/0!", never as a number); optional
arguments default to None.  The bodies only call tubefuncs.excel.adapter.call.
"""

# ruff: noqa: E501  (help texts are long lines)

import xlwings as xw

from tubefuncs.excel.adapter import call as _call

__all__ = [
    "TUBE_AVERAGE_POWER",
    "TUBE_BEAM_CURRENT",
    "TUBE_BEAM_LOADED_FREQ",
    "TUBE_BEAM_LOADING",
    "TUBE_BEAM_POWER",
    "TUBE_BEAM_SUSCEPTANCE",
    "TUBE_BETA",
    "TUBE_BRILLOUIN_FIELD",
    "TUBE_BUNCHING_PARAM",
    "TUBE_CATHODE_FLUX",
    "TUBE_CATHODE_LOADING",
    "TUBE_CHILD_LANGMUIR",
    "TUBE_CIRCUIT_EFFICIENCY",
    "TUBE_CN0",
    "TUBE_COLLECTOR_POWER",
    "TUBE_CONFINED_FLOW_FIELD",
    "TUBE_COOLANT_FLOW",
    "TUBE_COUPLING_BETA",
    "TUBE_DEPRESSED_VOLTAGE",
    "TUBE_DISH_GAIN",
    "TUBE_EFFICIENCY",
    "TUBE_EFFICIENCY_ESTIMATE",
    "TUBE_EIRP",
    "TUBE_FSPL",
    "TUBE_GAMMA",
    "TUBE_GAP_COUPLING",
    "TUBE_GAP_VOLTAGE",
    "TUBE_G_OVER_T",
    "TUBE_HARMONIC_CURRENT",
    "TUBE_HELP",
    "TUBE_IN",
    "TUBE_LARGE_SIGNAL_GAIN",
    "TUBE_LIMITING_CURRENT",
    "TUBE_LOADED_Q",
    "TUBE_OPTIMUM_DRIFT",
    "TUBE_OPTIMUM_QEXT",
    "TUBE_OUTPUT_GAP_VOLTAGE",
    "TUBE_OUTPUT_PHASE",
    "TUBE_OUTPUT_POWER",
    "TUBE_PERVEANCE",
    "TUBE_PHASE_PER_AMPERE",
    "TUBE_PHASE_PER_VOLT",
    "TUBE_PILLBOX_FREQ",
    "TUBE_PILLBOX_Q",
    "TUBE_PILLBOX_R_OVER_Q",
    "TUBE_PLASMA_FREQ",
    "TUBE_PLASMA_WAVELENGTH",
    "TUBE_POTENTIAL_DEPRESSION",
    "TUBE_REDUCED_PLASMA_FREQ",
    "TUBE_REDUCTION_FACTOR",
    "TUBE_SALEH_AMPLITUDE",
    "TUBE_SALEH_PHASE",
    "TUBE_SATURATED_EFFICIENCY",
    "TUBE_SATURATED_POWER",
    "TUBE_SATURATION_DRIVE",
    "TUBE_SKIN_DEPTH",
    "TUBE_SMALL_SIGNAL_BANDWIDTH",
    "TUBE_SMALL_SIGNAL_GAIN",
    "TUBE_SMALL_SIGNAL_PHASE",
    "TUBE_SPENT_BEAM_MAX_ENERGY",
    "TUBE_SPENT_BEAM_MIN_ENERGY",
    "TUBE_SURFACE_RESISTANCE",
    "TUBE_TRANSIT_ANGLE",
    "TUBE_VELOCITY",
    "TUBE_VERSION",
    "TUBE_WAVEGUIDE_CUTOFF",
    "TUBE_WAVEGUIDE_LOSS",
]


@xw.func(category="tubefuncs")
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam accelerating voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
def TUBE_GAMMA(voltage):
    'Lorentz factor gamma = 1 + eV/(m_e c^2) of electrons accelerated from rest through the beam voltage.'
    return _call("TUBE_GAMMA", (voltage,))


@xw.func(category="tubefuncs")
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam accelerating voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
def TUBE_BETA(voltage):
    'Normalised velocity v/c of electrons accelerated from rest through the beam voltage (relativistic).'
    return _call("TUBE_BETA", (voltage,))


@xw.func(category="tubefuncs")
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam accelerating voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default m/s). Optional. E.g. "km/s", "m/s".')
def TUBE_VELOCITY(voltage, unit=None):
    'DC velocity u0 = beta c of electrons accelerated from rest through the beam voltage (relativistic).'
    return _call("TUBE_VELOCITY", (voltage, unit))


@xw.func(category="tubefuncs")
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam accelerating voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default A/V**1.5). Optional. E.g. "uperv", "perv", "A/V**1.5".')
def TUBE_PERVEANCE(current, voltage, unit=None):
    "Perveance K = I/V^1.5 of a beam or gun, in A/V^1.5; ask for 'uperv' to get microperveance."
    return _call("TUBE_PERVEANCE", (current, voltage, unit))


@xw.func(category="tubefuncs")
@xw.arg("perveance", ndim=2, err_to_str=True,
        doc="Gun perveance K = I/V^1.5 (text such as '1.2 uperv' accepted). Number in A/V**1.5, or text with a unit. A range gives a range.")
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam accelerating voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default A). Optional. E.g. "A", "mA", "kA".')
def TUBE_BEAM_CURRENT(perveance, voltage, unit=None):
    'DC beam current I = K V^1.5 of a space-charge-limited gun of perveance K at the beam voltage. Caution: design estimate, not a rating (see TUBE_HELP / docs).'
    return _call("TUBE_BEAM_CURRENT", (perveance, voltage, unit))


@xw.func(category="tubefuncs")
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam accelerating voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default W). Optional. E.g. "W", "kW", "MW".')
def TUBE_BEAM_POWER(voltage, current, unit=None):
    'DC beam power P = V I drawn from the beam supply; with no RF drive all of it reaches the collector. Caution: design estimate, not a rating (see TUBE_HELP / docs).'
    return _call("TUBE_BEAM_POWER", (voltage, current, unit))


@xw.func(category="tubefuncs")
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Anode-to-cathode voltage. Number in V, or text with a unit. A range gives a range.')
@xw.arg("spacing", ndim=2, err_to_str=True,
        doc='Cathode-to-anode spacing of the planar diode. Number in m, or text with a unit. A range gives a range.')
@xw.arg("area", ndim=2, err_to_str=True,
        doc='Emitting cathode area. Number in m**2, or text with a unit. A range gives a range.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default A). Optional. E.g. "A", "mA", "kA".')
def TUBE_CHILD_LANGMUIR(voltage, spacing, area, unit=None):
    'Space-charge-limited current of a planar diode, Child-Langmuir law (4 eps0/9) sqrt(2e/m) V^1.5 S/d^2; non-relativistic. Caution: design estimate, not a rating (see TUBE_HELP / docs).'
    return _call("TUBE_CHILD_LANGMUIR", (voltage, spacing, area, unit))


@xw.func(category="tubefuncs")
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam accelerating voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the uniform solid round beam. Number in m, or text with a unit. A range gives a range.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default T). Optional. E.g. "T", "mT".')
def TUBE_BRILLOUIN_FIELD(current, voltage, beam_radius, unit=None):
    'Brillouin field B_B = sqrt(2I/(pi eps0 eta gamma u0 b^2)) that balances the space charge of a solid round beam (relativistic; no cathode flux).'
    return _call("TUBE_BRILLOUIN_FIELD", (current, voltage, beam_radius, unit))


@xw.func(category="tubefuncs")
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam accelerating voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the uniform solid round beam. Number in m, or text with a unit. A range gives a range.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default Hz). Optional. E.g. "MHz", "GHz", "Hz".')
def TUBE_PLASMA_FREQ(current, voltage, beam_radius, unit=None):
    'Plasma frequency f_p = omega_p/2pi of a uniform solid beam, longitudinal (gamma^3), relativistic; multiply by TUBE_REDUCTION_FACTOR for f_q.'
    return _call("TUBE_PLASMA_FREQ", (current, voltage, beam_radius, unit))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam accelerating voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the uniform solid round beam. Number in m, or text with a unit. A range gives a range.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Radius of the drift tube (tunnel), >= beam_radius. Number in m, or text with a unit. A range gives a range.')
def TUBE_REDUCTION_FACTOR(frequency, voltage, beam_radius, tunnel_radius):
    'Plasma-frequency reduction factor R = omega_q/omega_p of a solid beam in a round tunnel, from the exact space-charge-wave dispersion relation (confined flow).'
    return _call("TUBE_REDUCTION_FACTOR", (frequency, voltage, beam_radius, tunnel_radius))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam accelerating voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the uniform solid round beam. Number in m, or text with a unit. A range gives a range.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Radius of the drift tube (tunnel), >= beam_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default Hz). Optional. E.g. "MHz", "GHz", "Hz".')
def TUBE_REDUCED_PLASMA_FREQ(frequency, current, voltage, beam_radius, tunnel_radius, unit=None):
    'Reduced plasma frequency f_q = R f_p of a solid beam in a round tunnel (confined flow, small signal, relativistic).'
    return _call("TUBE_REDUCED_PLASMA_FREQ", (frequency, current, voltage, beam_radius, tunnel_radius, unit))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam accelerating voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the uniform solid round beam. Number in m, or text with a unit. A range gives a range.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Radius of the drift tube (tunnel), >= beam_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default m). Optional. E.g. "m", "mm", "cm".')
def TUBE_PLASMA_WAVELENGTH(frequency, current, voltage, beam_radius, tunnel_radius, unit=None):
    'Reduced plasma wavelength lambda_q = u0/f_q of a solid beam in a round tunnel (confined flow, small signal, relativistic).'
    return _call("TUBE_PLASMA_WAVELENGTH", (frequency, current, voltage, beam_radius, tunnel_radius, unit))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam accelerating voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the uniform solid round beam. Number in m, or text with a unit. A range gives a range.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Radius of the drift tube (tunnel), >= beam_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default m). Optional. E.g. "mm", "cm", "m".')
def TUBE_OPTIMUM_DRIFT(frequency, current, voltage, beam_radius, tunnel_radius, unit=None):
    'Drift length lambda_q/4 at which the small-signal RF current of a velocity-modulated beam peaks (confined flow, relativistic).'
    return _call("TUBE_OPTIMUM_DRIFT", (frequency, current, voltage, beam_radius, tunnel_radius, unit))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("length", ndim=2, err_to_str=True,
        doc='Gap or drift length along the beam. Number in m, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam accelerating voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default rad). Optional. E.g. "deg", "rad".')
def TUBE_TRANSIT_ANGLE(frequency, length, voltage, unit=None):
    'Transit angle omega*length/u0 of the beam across a gap or drift, with the relativistic beam velocity.'
    return _call("TUBE_TRANSIT_ANGLE", (frequency, length, voltage, unit))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("gap_length", ndim=2, err_to_str=True,
        doc='Gap length along the beam. Number in m, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam accelerating voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the solid round beam; omit with tunnel_radius for a gridded gap. Number in m, or text with a unit. A range gives a range. Optional.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Drift-tube radius at the gap; omit with beam_radius for a gridded gap. Number in m, or text with a unit. A range gives a range. Optional.')
def TUBE_GAP_COUPLING(frequency, gap_length, voltage, beam_radius=None, tunnel_radius=None):
    "Beam-coupling coefficient M of a gap: gridded sin(x)/x, x = half the transit angle; with both radii, a gridless gap's RMS M over the beam (relativistic)."
    return _call("TUBE_GAP_COUPLING", (frequency, gap_length, voltage, beam_radius, tunnel_radius))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("gap_length", ndim=2, err_to_str=True,
        doc='Gap length along the beam. Number in m, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam accelerating voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current (> 0 with the radii). Number in A, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the solid round beam; omit with tunnel_radius for a gridded gap without space charge. Number in m, or text with a unit. A range gives a range. Optional.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Drift-tube radius at the gap; omit with beam_radius for a gridded gap. Number in m, or text with a unit. A range gives a range. Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default S). Optional. E.g. "uS", "mS", "S".')
def TUBE_BEAM_LOADING(frequency, gap_length, voltage, current, beam_radius=None, tunnel_radius=None, unit=None):
    'Beam-loading conductance G_B of a gap: gridded, kinematic without the radii; with both radii a gridless gap with space charge (two-wave form of the gain model). Q_B = 1/((R/Q) G_B), circuit R/Q.'
    return _call("TUBE_BEAM_LOADING", (frequency, gap_length, voltage, current, beam_radius, tunnel_radius, unit))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("gap_length", ndim=2, err_to_str=True,
        doc='Gap length along the beam. Number in m, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam accelerating voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current (> 0 with the radii). Number in A, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the solid round beam; omit with tunnel_radius for a gridded gap without space charge. Number in m, or text with a unit. A range gives a range. Optional.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Drift-tube radius at the gap; omit with beam_radius for a gridded gap. Number in m, or text with a unit. A range gives a range. Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default S). Optional. E.g. "uS", "mS", "S".')
def TUBE_BEAM_SUSCEPTANCE(frequency, gap_length, voltage, current, beam_radius=None, tunnel_radius=None, unit=None):
    "Beam-loading susceptance B_B of a gap (same models and arguments as TUBE_BEAM_LOADING); positive = capacitive, lowering the cavity's resonance."
    return _call("TUBE_BEAM_SUSCEPTANCE", (frequency, gap_length, voltage, current, beam_radius, tunnel_radius, unit))


@xw.func(category="tubefuncs")
@xw.arg("cold_frequency", ndim=2, err_to_str=True,
        doc='Resonant frequency measured without beam (cold test). Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("r_over_q", ndim=2, err_to_str=True,
        doc='R/Q of the cavity, in the given convention. Number in ohm, or text with a unit. A range gives a range.')
@xw.arg("gap_length", ndim=2, err_to_str=True,
        doc='Gap length along the beam. Number in m, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam accelerating voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current (> 0 with the radii). Number in A, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the solid round beam; omit with tunnel_radius for a gridded gap without space charge. Number in m, or text with a unit. A range gives a range. Optional.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Drift-tube radius at the gap; omit with beam_radius for a gridded gap. Number in m, or text with a unit. A range gives a range. Optional.')
@xw.arg("convention", ndim=2, err_to_str=True,
        doc='R/Q convention: "circuit" (default) or "accelerator" ("linac" accepted). One of: "circuit", "accelerator", "linac". Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default Hz). Optional. E.g. "GHz", "MHz".')
def TUBE_BEAM_LOADED_FREQ(cold_frequency, r_over_q, gap_length, voltage, current, beam_radius=None, tunnel_radius=None, convention=None, unit=None):
    'Beam-loaded (hot) resonant frequency of a cavity from its cold-test frequency: the beam-loading susceptance B_B detunes it, f/fc - fc/f = -(R/Q) B_B(f).'
    return _call("TUBE_BEAM_LOADED_FREQ", (cold_frequency, r_over_q, gap_length, voltage, current, beam_radius, tunnel_radius, convention, unit))


@xw.func(category="tubefuncs")
@xw.arg("gap_voltage", ndim=2, err_to_str=True,
        doc='Peak RF voltage across the modulating gap. Number in V, or text with a unit. A range gives a range.')
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("drift_length", ndim=2, err_to_str=True,
        doc='Drift length from the modulating gap. Number in m, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam accelerating voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("coupling", ndim=2, err_to_str=True,
        doc='Beam-coupling coefficient M of the modulating gap (default 1). Number. A range gives a range. Optional.')
def TUBE_BUNCHING_PARAM(gap_voltage, frequency, drift_length, voltage, coupling=None):
    "Ballistic bunching parameter X = M V1 theta0/(V0 gamma(gamma+1)) (Webster's M V1 theta0/(2 V0) at low voltage). No space charge; X > 1.84 is overbunched."
    return _call("TUBE_BUNCHING_PARAM", (gap_voltage, frequency, drift_length, voltage, coupling))


@xw.func(category="tubefuncs")
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("bunching_param", ndim=2, err_to_str=True,
        doc='Bunching parameter X. Number. A range gives a range.')
@xw.arg("harmonic", ndim=2, err_to_str=True,
        doc='Harmonic number, a whole number >= 1 (default 1). Number. A range gives a range. Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default A). Optional. E.g. "mA", "A".')
def TUBE_HARMONIC_CURRENT(current, bunching_param, harmonic=None, unit=None):
    'Ballistic harmonic convection current 2 I0 |J_n(n X)| (peak). Fundamental maximum 1.164 I0 at X = 1.841. No space charge.'
    return _call("TUBE_HARMONIC_CURRENT", (current, bunching_param, harmonic, unit))


@xw.func(category="tubefuncs")
@xw.arg("radius", ndim=2, err_to_str=True,
        doc='Inner radius of the pillbox. Number in m, or text with a unit. A range gives a range.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default Hz). Optional. E.g. "GHz", "MHz".')
def TUBE_PILLBOX_FREQ(radius, unit=None):
    'Resonant frequency of the TM010 mode of a closed pillbox cavity, 2.405 c/(2 pi radius).'
    return _call("TUBE_PILLBOX_FREQ", (radius, unit))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("conductivity", ndim=2, err_to_str=True,
        doc='Electrical conductivity of the wall (default annealed copper, 5.8e7 S/m). Number in S/m, or text with a unit. A range gives a range. Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default m). Optional. E.g. "um", "mm".')
def TUBE_SKIN_DEPTH(frequency, conductivity=None, unit=None):
    'Skin depth 1/sqrt(pi f mu0 sigma) of a non-magnetic conductor, default copper.'
    return _call("TUBE_SKIN_DEPTH", (frequency, conductivity, unit))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("conductivity", ndim=2, err_to_str=True,
        doc='Electrical conductivity of the wall (default annealed copper, 5.8e7 S/m). Number in S/m, or text with a unit. A range gives a range. Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default ohm). Optional. E.g. "mohm", "ohm".')
def TUBE_SURFACE_RESISTANCE(frequency, conductivity=None, unit=None):
    'Surface resistance sqrt(pi f mu0/sigma) of a non-magnetic conductor, default copper.'
    return _call("TUBE_SURFACE_RESISTANCE", (frequency, conductivity, unit))


@xw.func(category="tubefuncs")
@xw.arg("radius", ndim=2, err_to_str=True,
        doc='Inner radius of the pillbox. Number in m, or text with a unit. A range gives a range.')
@xw.arg("length", ndim=2, err_to_str=True,
        doc='Inner length of the pillbox (the gap). Number in m, or text with a unit. A range gives a range.')
@xw.arg("conductivity", ndim=2, err_to_str=True,
        doc='Electrical conductivity of the wall (default annealed copper, 5.8e7 S/m). Number in S/m, or text with a unit. A range gives a range. Optional.')
def TUBE_PILLBOX_Q(radius, length, conductivity=None):
    'Unloaded Q of the TM010 mode of a closed pillbox (side wall and end plates, no beam holes): (radius/delta)/(1 + radius/length).'
    return _call("TUBE_PILLBOX_Q", (radius, length, conductivity))


@xw.func(category="tubefuncs")
@xw.arg("radius", ndim=2, err_to_str=True,
        doc='Inner radius of the pillbox. Number in m, or text with a unit. A range gives a range.')
@xw.arg("length", ndim=2, err_to_str=True,
        doc='Inner length of the pillbox (the gap). Number in m, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam voltage; when given, R/Q includes the transit-time factor T^2, else T = 1 (geometric). Number in V, or text with a unit. A range gives a range. Optional.')
@xw.arg("convention", ndim=2, err_to_str=True,
        doc='Shunt-impedance convention: "circuit" (R = V^2/2P, default) or "accelerator" (R = V^2/P; "linac" accepted). One of: "circuit", "accelerator", "linac". Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default ohm). Optional.')
def TUBE_PILLBOX_R_OVER_Q(radius, length, voltage=None, convention=None, unit=None):
    'On-axis R/Q of a pillbox TM010 mode; with T^2 when the beam voltage is given. convention: "circuit" V^2/(2 omega W) (default) or "accelerator" V^2/(omega W), twice as large.'
    return _call("TUBE_PILLBOX_R_OVER_Q", (radius, length, voltage, convention, unit))


@xw.func(category="tubefuncs")
@xw.arg("q0", ndim=2, err_to_str=True,
        doc='Unloaded quality factor Q0. Number. A range gives a range.')
@xw.arg("qext", ndim=2, err_to_str=True,
        doc='External quality factor of the coupling. Number. A range gives a range.')
def TUBE_LOADED_Q(q0, qext):
    'Loaded quality factor from 1/QL = 1/Q0 + 1/Qext (beam loading not included).'
    return _call("TUBE_LOADED_Q", (q0, qext))


@xw.func(category="tubefuncs")
@xw.arg("q0", ndim=2, err_to_str=True,
        doc='Unloaded quality factor Q0 of the output cavity. Number. A range gives a range.')
@xw.arg("qext", ndim=2, err_to_str=True,
        doc='External quality factor of its coupling to the load. Number. A range gives a range.')
def TUBE_CIRCUIT_EFFICIENCY(q0, qext):
    'Output-circuit efficiency Q0/(Q0 + Qext) = QL/Qext: the share of the power the beam gives the output cavity that reaches the load (the rest heats the walls).'
    return _call("TUBE_CIRCUIT_EFFICIENCY", (q0, qext))


@xw.func(category="tubefuncs")
@xw.arg("q0", ndim=2, err_to_str=True,
        doc='Unloaded quality factor Q0. Number. A range gives a range.')
@xw.arg("qext", ndim=2, err_to_str=True,
        doc='External quality factor of the coupling. Number. A range gives a range.')
def TUBE_COUPLING_BETA(q0, qext):
    'Coupling factor Q0/Qext of a cavity to its line (1 = critical coupling; the reflection at resonance is |1 - beta|/(1 + beta)).'
    return _call("TUBE_COUPLING_BETA", (q0, qext))


@xw.func(category="tubefuncs")
@xw.arg("power", ndim=2, err_to_str=True,
        doc='RF power dissipated in the loaded cavity (walls plus load). Number in W, or text with a unit. A range gives a range.')
@xw.arg("r_over_q", ndim=2, err_to_str=True,
        doc='R/Q of the cavity, in the same convention. Number in ohm, or text with a unit. A range gives a range.')
@xw.arg("q_loaded", ndim=2, err_to_str=True,
        doc='Loaded quality factor QL. Number. A range gives a range.')
@xw.arg("convention", ndim=2, err_to_str=True,
        doc='Shunt-impedance convention: "circuit" (R = V^2/2P, default) or "accelerator" (R = V^2/P; "linac" accepted). One of: "circuit", "accelerator", "linac". Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default V). Optional. E.g. "kV", "V".')
def TUBE_GAP_VOLTAGE(power, r_over_q, q_loaded, convention=None, unit=None):
    'Peak gap voltage: circuit sqrt(2 (R/Q) QL P) (default) or accelerator sqrt((R/Q) QL P); convention must match that of r_over_q. Caution: design estimate, not a rating (see TUBE_HELP / docs).'
    return _call("TUBE_GAP_VOLTAGE", (power, r_over_q, q_loaded, convention, unit))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency; a range gives one result per frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the solid round beam, <= tunnel_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Radius of the drift tube (tunnel). Number in m, or text with a unit. A range gives a range.')
@xw.arg("cavities", ndim=2, err_to_str=True,
        doc='Range, one row per cavity from input to output, 6 columns: position along the beam (m), resonant frequency (Hz), R/Q (ohm, circuit), Q0, Qext (empty = idle cavity), gap length (m). Used whole, not cell by cell.')
@xw.arg("convention", ndim=2, err_to_str=True,
        doc='R/Q column convention: "circuit" (V^2/(2 omega W), default) or "accelerator" (V^2/(omega W), as eigenmode solvers often report; "linac" accepted). One of: "circuit", "accelerator", "linac". Optional.')
@xw.arg("resonance", ndim=2, err_to_str=True,
        doc='What the frequency column holds: "hot" (beam-loaded, default) or "cold" (cold-test; the beam-loading susceptance is then applied). One of: "hot", "cold". Optional.')
@xw.arg("depression", ndim=2, err_to_str=True,
        doc='Beam kinematics from the cathode voltage ("none", default) or from the beam-averaged kinetic voltage after space-charge depression ("mean"). One of: "none", "mean". Optional.')
def TUBE_SMALL_SIGNAL_GAIN(frequency, voltage, current, beam_radius, tunnel_radius, cavities, convention=None, resonance=None, depression=None):
    "Small-signal gain (dB) of a multi-cavity klystron: output power into the output cavity's load over the available power of a matched driver at the input port; space-charge-wave theory."
    return _call("TUBE_SMALL_SIGNAL_GAIN", (frequency, voltage, current, beam_radius, tunnel_radius, cavities, convention, resonance, depression))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency; a range gives one result per frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the solid round beam, <= tunnel_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Radius of the drift tube (tunnel). Number in m, or text with a unit. A range gives a range.')
@xw.arg("cavities", ndim=2, err_to_str=True,
        doc='Range, one row per cavity from input to output, 6 columns: position along the beam (m), resonant frequency (Hz), R/Q (ohm, circuit), Q0, Qext (empty = idle cavity), gap length (m). Used whole, not cell by cell.')
@xw.arg("convention", ndim=2, err_to_str=True,
        doc='R/Q column convention: "circuit" (V^2/(2 omega W), default) or "accelerator" (V^2/(omega W), as eigenmode solvers often report; "linac" accepted). One of: "circuit", "accelerator", "linac". Optional.')
@xw.arg("resonance", ndim=2, err_to_str=True,
        doc='What the frequency column holds: "hot" (beam-loaded, default) or "cold" (cold-test; the beam-loading susceptance is then applied). One of: "hot", "cold". Optional.')
@xw.arg("depression", ndim=2, err_to_str=True,
        doc='Beam kinematics from the cathode voltage ("none", default) or from the beam-averaged kinetic voltage after space-charge depression ("mean"). One of: "none", "mean". Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default deg). Optional. E.g. "deg", "rad".')
def TUBE_SMALL_SIGNAL_PHASE(frequency, voltage, current, beam_radius, tunnel_radius, cavities, convention=None, resonance=None, depression=None, unit=None):
    'Small-signal phase of the output-gap voltage relative to the drive, in degrees (-180 to 180], transit delay included; same model and arguments as TUBE_SMALL_SIGNAL_GAIN.'
    return _call("TUBE_SMALL_SIGNAL_PHASE", (frequency, voltage, current, beam_radius, tunnel_radius, cavities, convention, resonance, depression, unit))


@xw.func(category="tubefuncs")
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the solid round beam, <= tunnel_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Radius of the drift tube (tunnel). Number in m, or text with a unit. A range gives a range.')
@xw.arg("cavities", ndim=2, err_to_str=True,
        doc='Range, one row per cavity from input to output, 6 columns: position along the beam (m), resonant frequency (Hz), R/Q (ohm, circuit), Q0, Qext (empty = idle cavity), gap length (m). Used whole, not cell by cell.')
@xw.arg("drop_db", ndim=2, err_to_str=True,
        doc='Drop below the peak gain that bounds the band (dB); 1 dB by default. Number. A range gives a range. Optional.')
@xw.arg("convention", ndim=2, err_to_str=True,
        doc='R/Q column convention: "circuit" (V^2/(2 omega W), default) or "accelerator" (V^2/(omega W), as eigenmode solvers often report; "linac" accepted). One of: "circuit", "accelerator", "linac". Optional.')
@xw.arg("resonance", ndim=2, err_to_str=True,
        doc='What the frequency column holds: "hot" (beam-loaded, default) or "cold" (cold-test; the beam-loading susceptance is then applied). One of: "hot", "cold". Optional.')
@xw.arg("depression", ndim=2, err_to_str=True,
        doc='Beam kinematics from the cathode voltage ("none", default) or from the beam-averaged kinetic voltage after space-charge depression ("mean"). One of: "none", "mean". Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default Hz). Optional. E.g. "MHz", "kHz", "GHz".')
def TUBE_SMALL_SIGNAL_BANDWIDTH(voltage, current, beam_radius, tunnel_radius, cavities, drop_db=None, convention=None, resonance=None, depression=None, unit=None):
    'Width of the band around the small-signal gain peak in which the gain stays within drop_db (1 dB by default) of the peak; same model and cavity table as TUBE_SMALL_SIGNAL_GAIN.'
    return _call("TUBE_SMALL_SIGNAL_BANDWIDTH", (voltage, current, beam_radius, tunnel_radius, cavities, drop_db, convention, resonance, depression, unit))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency; a range gives one result per frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the solid round beam, <= tunnel_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Radius of the drift tube (tunnel). Number in m, or text with a unit. A range gives a range.')
@xw.arg("cavities", ndim=2, err_to_str=True,
        doc='Range, one row per cavity from input to output, 6 columns: position along the beam (m), resonant frequency (Hz), R/Q (ohm, circuit), Q0, Qext (empty = idle cavity), gap length (m). Used whole, not cell by cell.')
@xw.arg("convention", ndim=2, err_to_str=True,
        doc='R/Q column convention: "circuit" (V^2/(2 omega W), default) or "accelerator" (V^2/(omega W), as eigenmode solvers often report; "linac" accepted). One of: "circuit", "accelerator", "linac". Optional.')
@xw.arg("resonance", ndim=2, err_to_str=True,
        doc='What the frequency column holds: "hot" (beam-loaded, default) or "cold" (cold-test; the beam-loading susceptance is then applied). One of: "hot", "cold". Optional.')
@xw.arg("depression", ndim=2, err_to_str=True,
        doc='Beam kinematics from the cathode voltage ("none", default) or from the beam-averaged kinetic voltage after space-charge depression ("mean"). One of: "none", "mean". Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default rad/V). Optional. E.g. "deg/V", "deg/kV".')
def TUBE_PHASE_PER_VOLT(frequency, voltage, current, beam_radius, tunnel_radius, cavities, convention=None, resonance=None, depression=None, unit=None):
    'Phase pushing: change of the small-signal output phase per volt of beam voltage at constant current, from the gain model (for a modulator ripple budget).'
    return _call("TUBE_PHASE_PER_VOLT", (frequency, voltage, current, beam_radius, tunnel_radius, cavities, convention, resonance, depression, unit))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency; a range gives one result per frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the solid round beam, <= tunnel_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Radius of the drift tube (tunnel). Number in m, or text with a unit. A range gives a range.')
@xw.arg("cavities", ndim=2, err_to_str=True,
        doc='Range, one row per cavity from input to output, 6 columns: position along the beam (m), resonant frequency (Hz), R/Q (ohm, circuit), Q0, Qext (empty = idle cavity), gap length (m). Used whole, not cell by cell.')
@xw.arg("convention", ndim=2, err_to_str=True,
        doc='R/Q column convention: "circuit" (V^2/(2 omega W), default) or "accelerator" (V^2/(omega W), as eigenmode solvers often report; "linac" accepted). One of: "circuit", "accelerator", "linac". Optional.')
@xw.arg("resonance", ndim=2, err_to_str=True,
        doc='What the frequency column holds: "hot" (beam-loaded, default) or "cold" (cold-test; the beam-loading susceptance is then applied). One of: "hot", "cold". Optional.')
@xw.arg("depression", ndim=2, err_to_str=True,
        doc='Beam kinematics from the cathode voltage ("none", default) or from the beam-averaged kinetic voltage after space-charge depression ("mean"). One of: "none", "mean". Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default rad/A). Optional. E.g. "deg/A".')
def TUBE_PHASE_PER_AMPERE(frequency, voltage, current, beam_radius, tunnel_radius, cavities, convention=None, resonance=None, depression=None, unit=None):
    'Phase pushing: change of the small-signal output phase per ampere of beam current at constant voltage, from the gain model.'
    return _call("TUBE_PHASE_PER_AMPERE", (frequency, voltage, current, beam_radius, tunnel_radius, cavities, convention, resonance, depression, unit))


@xw.func(category="tubefuncs")
@xw.arg("peak_power", ndim=2, err_to_str=True,
        doc='Peak (in-pulse) power. Number in W, or text with a unit. A range gives a range.')
@xw.arg("pulse_width", ndim=2, err_to_str=True,
        doc='Pulse length (energy-equivalent flat top). Number in s, or text with a unit. A range gives a range.')
@xw.arg("prf", ndim=2, err_to_str=True,
        doc='Pulse repetition frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default W). Optional. E.g. "kW", "W", "MW".')
def TUBE_AVERAGE_POWER(peak_power, pulse_width, prf, unit=None):
    'Average power = peak power x duty cycle (pulse_width x prf); the duty cycle must not exceed 1 (1 = CW). Caution: design estimate, not a rating (see TUBE_HELP / docs).'
    return _call("TUBE_AVERAGE_POWER", (peak_power, pulse_width, prf, unit))


@xw.func(category="tubefuncs")
@xw.arg("beam_power", ndim=2, err_to_str=True,
        doc='DC beam power V0 x I0 (average for pulsed tubes). Number in W, or text with a unit. A range gives a range.')
@xw.arg("rf_output", ndim=2, err_to_str=True,
        doc='RF output power; 0 for the no-drive case. Number in W, or text with a unit. A range gives a range.')
@xw.arg("body_loss", ndim=2, err_to_str=True,
        doc='Power lost on the body (interception, cavity walls). Number in W, or text with a unit. A range gives a range. Optional, default 0 W.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default W). Optional. E.g. "kW", "W", "MW".')
def TUBE_COLLECTOR_POWER(beam_power, rf_output, body_loss=None, unit=None):
    'Collector heat = beam power - RF output - body loss. With no RF drive the collector takes the FULL beam power: size collector and coolant for the beam power. Caution: design estimate, not a rating (see TUBE_HELP / docs).'
    return _call("TUBE_COLLECTOR_POWER", (beam_power, rf_output, body_loss, unit))


@xw.func(category="tubefuncs")
@xw.arg("power", ndim=2, err_to_str=True,
        doc='Heat load to carry away. Number in W, or text with a unit. A range gives a range.')
@xw.arg("temperature_rise", ndim=2, err_to_str=True,
        doc='Coolant temperature rise, outlet minus inlet. Number in K, or text with a unit. A range gives a range.')
@xw.arg("fluid", ndim=2, err_to_str=True,
        doc='Coolant at its mean temperature: water, water 10C, water 20C, water 25C, water 30C, water 40C, water 50C, water 60C, water 70C, water 80C. Optional, default "water".')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default m**3/s). Optional. E.g. "L/min", "L/s", "m**3/h".')
def TUBE_COOLANT_FLOW(power, temperature_rise, fluid=None, unit=None):
    'Volumetric coolant flow P/(rho cp dT) for a heat load and temperature rise; water properties from IAPWS-95 at 1 atm. Size a collector for the full beam power (no RF drive). Caution: design estimate, not a rating (see TUBE_HELP / docs).'
    return _call("TUBE_COOLANT_FLOW", (power, temperature_rise, fluid, unit))


@xw.func(category="tubefuncs")
@xw.arg("width", ndim=2, err_to_str=True,
        doc='Inside width of the broad wall of a rectangular guide. Number in m, or text with a unit. A range gives a range.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default Hz). Optional. E.g. "GHz", "MHz".')
def TUBE_WAVEGUIDE_CUTOFF(width, unit=None):
    'Cutoff frequency c/(2 width) of the TE10 mode of an empty rectangular waveguide.'
    return _call("TUBE_WAVEGUIDE_CUTOFF", (width, unit))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency, above the TE10 cutoff. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("width", ndim=2, err_to_str=True,
        doc='Inside width of the broad wall. Number in m, or text with a unit. A range gives a range.')
@xw.arg("height", ndim=2, err_to_str=True,
        doc='Inside height of the narrow wall (<= width). Number in m, or text with a unit. A range gives a range.')
@xw.arg("length", ndim=2, err_to_str=True,
        doc='Length of the waveguide run. Number in m, or text with a unit. A range gives a range.')
@xw.arg("conductivity", ndim=2, err_to_str=True,
        doc='Wall conductivity; default annealed copper 5.8e7 S/m. Number in S/m, or text with a unit. A range gives a range. Optional.')
def TUBE_WAVEGUIDE_LOSS(frequency, width, height, length, conductivity=None):
    'Conductor loss in dB of the TE10 mode over a length of rectangular waveguide, smooth walls; real guides lose about 10-30 % more.'
    return _call("TUBE_WAVEGUIDE_LOSS", (frequency, width, height, length, conductivity))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Carrier frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("distance", ndim=2, err_to_str=True,
        doc='Path length between the antennas. Number in m, or text with a unit. A range gives a range.')
def TUBE_FSPL(frequency, distance):
    'Free-space path loss 20 log10(4 pi d/lambda) in dB, exact form of ITU-R P.525 (its rounded 32.4 + 20log f[MHz] + 20log d[km] is 0.05 dB lower). Far field only.'
    return _call("TUBE_FSPL", (frequency, distance))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Carrier frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("diameter", ndim=2, err_to_str=True,
        doc='Aperture diameter of the dish. Number in m, or text with a unit. A range gives a range.')
@xw.arg("efficiency", ndim=2, err_to_str=True,
        doc='Aperture efficiency, 0 < efficiency <= 1 (default 0.6). Number. A range gives a range. Optional.')
def TUBE_DISH_GAIN(frequency, diameter, efficiency=None):
    'Gain in dBi of a circular aperture (dish): 10 log10(efficiency (pi D/lambda)^2).'
    return _call("TUBE_DISH_GAIN", (frequency, diameter, efficiency))


@xw.func(category="tubefuncs")
@xw.arg("power", ndim=2, err_to_str=True,
        doc='Transmitter output power. Number in W, or text with a unit. A range gives a range.')
@xw.arg("antenna_gain_dbi", ndim=2, err_to_str=True,
        doc='Transmit antenna gain in dBi. Number. A range gives a range.')
@xw.arg("feed_loss_db", ndim=2, err_to_str=True,
        doc='Feed loss in dB, a positive number (default 0). Number. A range gives a range. Optional.')
def TUBE_EIRP(power, antenna_gain_dbi, feed_loss_db=None):
    'EIRP in dBW = 10 log10(power/1 W) + antenna gain (dBi) - feed loss (dB). Caution: design estimate, not a rating (see TUBE_HELP / docs).'
    return _call("TUBE_EIRP", (power, antenna_gain_dbi, feed_loss_db))


@xw.func(category="tubefuncs")
@xw.arg("antenna_gain_dbi", ndim=2, err_to_str=True,
        doc='Receive antenna gain in dBi. Number. A range gives a range.')
@xw.arg("system_temperature", ndim=2, err_to_str=True,
        doc='System noise temperature. Number in K, or text with a unit. A range gives a range.')
def TUBE_G_OVER_T(antenna_gain_dbi, system_temperature):
    'Receiver figure of merit G/T in dB/K = gain (dBi) - 10 log10(T_sys/1 K), both referred to the same plane.'
    return _call("TUBE_G_OVER_T", (antenna_gain_dbi, system_temperature))


@xw.func(category="tubefuncs")
@xw.arg("eirp_dbw", ndim=2, err_to_str=True,
        doc='Transmitter EIRP in dBW. Number. A range gives a range.')
@xw.arg("path_loss_db", ndim=2, err_to_str=True,
        doc='Path loss in dB, a positive number. Number. A range gives a range.')
@xw.arg("g_over_t_dbk", ndim=2, err_to_str=True,
        doc='Receiver G/T in dB/K. Number. A range gives a range.')
@xw.arg("other_losses_db", ndim=2, err_to_str=True,
        doc='Further losses in dB, positive (default 0). Number. A range gives a range. Optional.')
def TUBE_CN0(eirp_dbw, path_loss_db, g_over_t_dbk, other_losses_db=None):
    'Carrier to noise density C/N0 in dB-Hz = EIRP - path loss - other losses + G/T + 228.5992 (-10 log10 of the Boltzmann constant).'
    return _call("TUBE_CN0", (eirp_dbw, path_loss_db, g_over_t_dbk, other_losses_db))


@xw.func(category="tubefuncs")
@xw.arg("drive", ndim=2, err_to_str=True,
        doc='Normalised input envelope amplitude r. Number. A range gives a range.')
@xw.arg("alpha", ndim=2, err_to_str=True,
        doc='Small-signal gain coefficient alpha_a (default 2.1587). Number. A range gives a range. Optional.')
@xw.arg("beta", ndim=2, err_to_str=True,
        doc='Compression coefficient beta_a (default 1.1517). Number. A range gives a range. Optional.')
def TUBE_SALEH_AMPLITUDE(drive, alpha=None, beta=None):
    'Saleh (1981) amplifier model, AM/AM: normalised output amplitude alpha r/(1 + beta r^2) for drive r; peaks at r = 1/sqrt(beta).'
    return _call("TUBE_SALEH_AMPLITUDE", (drive, alpha, beta))


@xw.func(category="tubefuncs")
@xw.arg("drive", ndim=2, err_to_str=True,
        doc='Normalised input envelope amplitude r. Number. A range gives a range.')
@xw.arg("alpha", ndim=2, err_to_str=True,
        doc='Phase coefficient alpha_phi in rad (default 4.0033). Number in rad, or text with a unit. A range gives a range. Optional.')
@xw.arg("beta", ndim=2, err_to_str=True,
        doc='Phase compression coefficient beta_phi (default 9.1040). Number. A range gives a range. Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default rad). Optional. E.g. "deg", "rad".')
def TUBE_SALEH_PHASE(drive, alpha=None, beta=None, unit=None):
    'Saleh (1981) amplifier model, AM/PM: output phase shift alpha r^2/(1 + beta r^2) in rad for drive r.'
    return _call("TUBE_SALEH_PHASE", (drive, alpha, beta, unit))


@xw.func(category="tubefuncs")
@xw.arg("quantity", ndim=2, err_to_str=True,
        doc="A number in SI, or text with a number and a unit, e.g. '4.5 us', '2 kW', '43 dBm'. Number. A range gives a range.")
@xw.arg("unit", ndim=2, err_to_str=True,
        doc="Unit wanted, e.g. 'ns', 'dBm', 'MHz'; omitted: the SI unit (a plain number quantity is read in the SI unit of this unit's dimension). Optional.")
def TUBE_IN(quantity, unit=None):
    "A quantity as a number in the unit wanted (omitted: SI), so that text such as '4.5 us' can be used in arithmetic; dBm and dBW work for power (plain tested conversions). A unit of another dimension is #VALUE! naming both units."
    return _call("TUBE_IN", (quantity, unit))


@xw.func(category="tubefuncs")
@xw.arg("function_name", ndim=2, err_to_str=True,
        doc="Worksheet name of a tubefuncs function, e.g. 'TUBE_TRANSIT_ANGLE'.")
def TUBE_HELP(function_name):
    'One-line help of a tubefuncs worksheet function: its arguments and what it returns.'
    return _call("TUBE_HELP", (function_name,))


@xw.func(category="tubefuncs")
def TUBE_VERSION():
    'Version of the tubefuncs library that computes this workbook.'
    return _call("TUBE_VERSION", ())


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency; a range gives one result per frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the solid round beam, <= tunnel_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Radius of the drift tube (tunnel). Number in m, or text with a unit. A range gives a range.')
@xw.arg("cavities", ndim=2, err_to_str=True,
        doc='Range, one row per cavity from input to output, 6 columns: position along the beam (m), resonant frequency (Hz), R/Q (ohm, circuit), Q0, Qext (empty = idle cavity), gap length (m). Used whole, not cell by cell.')
@xw.arg("drive_power", ndim=2, err_to_str=True,
        doc='Available power of the matched drive generator at the input port; a range gives the transfer curve. Number in W, or text with a unit. A range gives a range.')
@xw.arg("convention", ndim=2, err_to_str=True,
        doc='R/Q column convention: "circuit" (V^2/(2 omega W), default) or "accelerator" (V^2/(omega W), as eigenmode solvers often report; "linac" accepted). One of: "circuit", "accelerator", "linac". Optional.')
@xw.arg("resonance", ndim=2, err_to_str=True,
        doc='What the frequency column holds: "hot" (beam-loaded, default) or "cold" (cold-test; the beam-loading susceptance is then applied). One of: "hot", "cold". Optional.')
@xw.arg("depression", ndim=2, err_to_str=True,
        doc='Beam kinematics from the cathode voltage ("none", default) or from the beam-averaged kinetic voltage after space-charge depression ("mean"). One of: "none", "mean". Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default W). Optional. E.g. "MW", "kW", "dBm".')
def TUBE_OUTPUT_POWER(frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power, convention=None, resonance=None, depression=None, unit=None):
    'RF output power of a multi-cavity klystron at the given drive power: large-signal relativistic disk model, same beam arguments and cavity table as TUBE_SMALL_SIGNAL_GAIN. Design estimate. Caution: design estimate, not a rating (see TUBE_HELP / docs).'
    return _call("TUBE_OUTPUT_POWER", (frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power, convention, resonance, depression, unit))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency; a range gives one result per frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the solid round beam, <= tunnel_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Radius of the drift tube (tunnel). Number in m, or text with a unit. A range gives a range.')
@xw.arg("cavities", ndim=2, err_to_str=True,
        doc='Range, one row per cavity from input to output, 6 columns: position along the beam (m), resonant frequency (Hz), R/Q (ohm, circuit), Q0, Qext (empty = idle cavity), gap length (m). Used whole, not cell by cell.')
@xw.arg("drive_power", ndim=2, err_to_str=True,
        doc='Available power of the matched drive generator at the input port; a range gives the transfer curve. Number in W, or text with a unit. A range gives a range.')
@xw.arg("convention", ndim=2, err_to_str=True,
        doc='R/Q column convention: "circuit" (V^2/(2 omega W), default) or "accelerator" (V^2/(omega W), as eigenmode solvers often report; "linac" accepted). One of: "circuit", "accelerator", "linac". Optional.')
@xw.arg("resonance", ndim=2, err_to_str=True,
        doc='What the frequency column holds: "hot" (beam-loaded, default) or "cold" (cold-test; the beam-loading susceptance is then applied). One of: "hot", "cold". Optional.')
@xw.arg("depression", ndim=2, err_to_str=True,
        doc='Beam kinematics from the cathode voltage ("none", default) or from the beam-averaged kinetic voltage after space-charge depression ("mean"). One of: "none", "mean". Optional.')
def TUBE_EFFICIENCY(frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power, convention=None, resonance=None, depression=None):
    'Overall efficiency of a multi-cavity klystron at the given drive: RF power to the load over beam power V0 I0 (large-signal disk model). Design estimate. Caution: design estimate, not a rating (see TUBE_HELP / docs).'
    return _call("TUBE_EFFICIENCY", (frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power, convention, resonance, depression))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency; a range gives one result per frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the solid round beam, <= tunnel_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Radius of the drift tube (tunnel). Number in m, or text with a unit. A range gives a range.')
@xw.arg("cavities", ndim=2, err_to_str=True,
        doc='Range, one row per cavity from input to output, 6 columns: position along the beam (m), resonant frequency (Hz), R/Q (ohm, circuit), Q0, Qext (empty = idle cavity), gap length (m). Used whole, not cell by cell.')
@xw.arg("drive_power", ndim=2, err_to_str=True,
        doc='Available power of the matched drive generator at the input port; a range gives the transfer curve. Number in W, or text with a unit. A range gives a range.')
@xw.arg("convention", ndim=2, err_to_str=True,
        doc='R/Q column convention: "circuit" (V^2/(2 omega W), default) or "accelerator" (V^2/(omega W), as eigenmode solvers often report; "linac" accepted). One of: "circuit", "accelerator", "linac". Optional.')
@xw.arg("resonance", ndim=2, err_to_str=True,
        doc='What the frequency column holds: "hot" (beam-loaded, default) or "cold" (cold-test; the beam-loading susceptance is then applied). One of: "hot", "cold". Optional.')
@xw.arg("depression", ndim=2, err_to_str=True,
        doc='Beam kinematics from the cathode voltage ("none", default) or from the beam-averaged kinetic voltage after space-charge depression ("mean"). One of: "none", "mean". Optional.')
def TUBE_LARGE_SIGNAL_GAIN(frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power, convention=None, resonance=None, depression=None):
    'Gain in dB, output power over drive power, at the given drive (large-signal disk model); the small-signal gain at low drive, compressed near saturation. Caution: design estimate, not a rating (see TUBE_HELP / docs).'
    return _call("TUBE_LARGE_SIGNAL_GAIN", (frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power, convention, resonance, depression))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency; a range gives one result per frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the solid round beam, <= tunnel_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Radius of the drift tube (tunnel). Number in m, or text with a unit. A range gives a range.')
@xw.arg("cavities", ndim=2, err_to_str=True,
        doc='Range, one row per cavity from input to output, 6 columns: position along the beam (m), resonant frequency (Hz), R/Q (ohm, circuit), Q0, Qext (empty = idle cavity), gap length (m). Used whole, not cell by cell.')
@xw.arg("drive_power", ndim=2, err_to_str=True,
        doc='Available power of the matched drive generator at the input port; a range gives the transfer curve. Number in W, or text with a unit. A range gives a range.')
@xw.arg("convention", ndim=2, err_to_str=True,
        doc='R/Q column convention: "circuit" (V^2/(2 omega W), default) or "accelerator" (V^2/(omega W), as eigenmode solvers often report; "linac" accepted). One of: "circuit", "accelerator", "linac". Optional.')
@xw.arg("resonance", ndim=2, err_to_str=True,
        doc='What the frequency column holds: "hot" (beam-loaded, default) or "cold" (cold-test; the beam-loading susceptance is then applied). One of: "hot", "cold". Optional.')
@xw.arg("depression", ndim=2, err_to_str=True,
        doc='Beam kinematics from the cathode voltage ("none", default) or from the beam-averaged kinetic voltage after space-charge depression ("mean"). One of: "none", "mean". Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default deg). Optional. E.g. "deg", "rad".')
def TUBE_OUTPUT_PHASE(frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power, convention=None, resonance=None, depression=None, unit=None):
    'Phase of the output-gap voltage relative to the drive at the given drive, degrees (-180, 180] (large-signal disk model); its change with drive is the AM/PM conversion. Caution: design estimate, not a rating (see TUBE_HELP / docs).'
    return _call("TUBE_OUTPUT_PHASE", (frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power, convention, resonance, depression, unit))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency; a range gives one result per frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the solid round beam, <= tunnel_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Radius of the drift tube (tunnel). Number in m, or text with a unit. A range gives a range.')
@xw.arg("cavities", ndim=2, err_to_str=True,
        doc='Range, one row per cavity from input to output, 6 columns: position along the beam (m), resonant frequency (Hz), R/Q (ohm, circuit), Q0, Qext (empty = idle cavity), gap length (m). Used whole, not cell by cell.')
@xw.arg("drive_power", ndim=2, err_to_str=True,
        doc='Available power of the matched drive generator at the input port; a range gives the transfer curve. Number in W, or text with a unit. A range gives a range.')
@xw.arg("convention", ndim=2, err_to_str=True,
        doc='R/Q column convention: "circuit" (V^2/(2 omega W), default) or "accelerator" (V^2/(omega W), as eigenmode solvers often report; "linac" accepted). One of: "circuit", "accelerator", "linac". Optional.')
@xw.arg("resonance", ndim=2, err_to_str=True,
        doc='What the frequency column holds: "hot" (beam-loaded, default) or "cold" (cold-test; the beam-loading susceptance is then applied). One of: "hot", "cold". Optional.')
@xw.arg("depression", ndim=2, err_to_str=True,
        doc='Beam kinematics from the cathode voltage ("none", default) or from the beam-averaged kinetic voltage after space-charge depression ("mean"). One of: "none", "mean". Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default V). Optional. E.g. "kV", "MV".')
def TUBE_OUTPUT_GAP_VOLTAGE(frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power, convention=None, resonance=None, depression=None, unit=None):
    'Peak RF voltage across the output gap at the given drive (large-signal disk model): what the output cavity and window must hold off. Caution: design estimate, not a rating (see TUBE_HELP / docs).'
    return _call("TUBE_OUTPUT_GAP_VOLTAGE", (frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power, convention, resonance, depression, unit))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency; a range gives one result per frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the solid round beam, <= tunnel_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Radius of the drift tube (tunnel). Number in m, or text with a unit. A range gives a range.')
@xw.arg("cavities", ndim=2, err_to_str=True,
        doc='Range, one row per cavity from input to output, 6 columns: position along the beam (m), resonant frequency (Hz), R/Q (ohm, circuit), Q0, Qext (empty = idle cavity), gap length (m). Used whole, not cell by cell.')
@xw.arg("drive_power", ndim=2, err_to_str=True,
        doc='Available power of the matched drive generator at the input port; a range gives the transfer curve. Number in W, or text with a unit. A range gives a range.')
@xw.arg("convention", ndim=2, err_to_str=True,
        doc='R/Q column convention: "circuit" (V^2/(2 omega W), default) or "accelerator" (V^2/(omega W), as eigenmode solvers often report; "linac" accepted). One of: "circuit", "accelerator", "linac". Optional.')
@xw.arg("resonance", ndim=2, err_to_str=True,
        doc='What the frequency column holds: "hot" (beam-loaded, default) or "cold" (cold-test; the beam-loading susceptance is then applied). One of: "hot", "cold". Optional.')
@xw.arg("depression", ndim=2, err_to_str=True,
        doc='Beam kinematics from the cathode voltage ("none", default) or from the beam-averaged kinetic voltage after space-charge depression ("mean"). One of: "none", "mean". Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default eV). Optional. E.g. "keV", "MeV".')
def TUBE_SPENT_BEAM_MIN_ENERGY(frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power, convention=None, resonance=None, depression=None, unit=None):
    'Kinetic energy of the slowest electrons leaving the output gap at the given drive (large-signal disk model); limits collector depression. Caution: design estimate, not a rating (see TUBE_HELP / docs).'
    return _call("TUBE_SPENT_BEAM_MIN_ENERGY", (frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power, convention, resonance, depression, unit))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency; a range gives one result per frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the solid round beam, <= tunnel_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Radius of the drift tube (tunnel). Number in m, or text with a unit. A range gives a range.')
@xw.arg("cavities", ndim=2, err_to_str=True,
        doc='Range, one row per cavity from input to output, 6 columns: position along the beam (m), resonant frequency (Hz), R/Q (ohm, circuit), Q0, Qext (empty = idle cavity), gap length (m). Used whole, not cell by cell.')
@xw.arg("drive_power", ndim=2, err_to_str=True,
        doc='Available power of the matched drive generator at the input port; a range gives the transfer curve. Number in W, or text with a unit. A range gives a range.')
@xw.arg("convention", ndim=2, err_to_str=True,
        doc='R/Q column convention: "circuit" (V^2/(2 omega W), default) or "accelerator" (V^2/(omega W), as eigenmode solvers often report; "linac" accepted). One of: "circuit", "accelerator", "linac". Optional.')
@xw.arg("resonance", ndim=2, err_to_str=True,
        doc='What the frequency column holds: "hot" (beam-loaded, default) or "cold" (cold-test; the beam-loading susceptance is then applied). One of: "hot", "cold". Optional.')
@xw.arg("depression", ndim=2, err_to_str=True,
        doc='Beam kinematics from the cathode voltage ("none", default) or from the beam-averaged kinetic voltage after space-charge depression ("mean"). One of: "none", "mean". Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default eV). Optional. E.g. "keV", "MeV".')
def TUBE_SPENT_BEAM_MAX_ENERGY(frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power, convention=None, resonance=None, depression=None, unit=None):
    "Kinetic energy of the fastest electrons leaving the output gap at the given drive (large-signal disk model): sets the collector's X-ray shielding. Caution: design estimate, not a rating (see TUBE_HELP / docs)."
    return _call("TUBE_SPENT_BEAM_MAX_ENERGY", (frequency, voltage, current, beam_radius, tunnel_radius, cavities, drive_power, convention, resonance, depression, unit))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency; a range gives one result per frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the solid round beam, <= tunnel_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Radius of the drift tube (tunnel). Number in m, or text with a unit. A range gives a range.')
@xw.arg("cavities", ndim=2, err_to_str=True,
        doc='Range, one row per cavity from input to output, 6 columns: position along the beam (m), resonant frequency (Hz), R/Q (ohm, circuit), Q0, Qext (empty = idle cavity), gap length (m). Used whole, not cell by cell.')
@xw.arg("convention", ndim=2, err_to_str=True,
        doc='R/Q column convention: "circuit" (V^2/(2 omega W), default) or "accelerator" (V^2/(omega W), as eigenmode solvers often report; "linac" accepted). One of: "circuit", "accelerator", "linac". Optional.')
@xw.arg("resonance", ndim=2, err_to_str=True,
        doc='What the frequency column holds: "hot" (beam-loaded, default) or "cold" (cold-test; the beam-loading susceptance is then applied). One of: "hot", "cold". Optional.')
@xw.arg("depression", ndim=2, err_to_str=True,
        doc='Beam kinematics from the cathode voltage ("none", default) or from the beam-averaged kinetic voltage after space-charge depression ("mean"). One of: "none", "mean". Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default W). Optional. E.g. "MW", "kW", "dBm".')
def TUBE_SATURATED_POWER(frequency, voltage, current, beam_radius, tunnel_radius, cavities, convention=None, resonance=None, depression=None, unit=None):
    'Saturated RF output power of a multi-cavity klystron: the first maximum of the transfer curve (large-signal disk model, cavity table as TUBE_SMALL_SIGNAL_GAIN). Needs a small-signal gain of at least 3 dB. Design estimate.'
    return _call("TUBE_SATURATED_POWER", (frequency, voltage, current, beam_radius, tunnel_radius, cavities, convention, resonance, depression, unit))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency; a range gives one result per frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the solid round beam, <= tunnel_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Radius of the drift tube (tunnel). Number in m, or text with a unit. A range gives a range.')
@xw.arg("cavities", ndim=2, err_to_str=True,
        doc='Range, one row per cavity from input to output, 6 columns: position along the beam (m), resonant frequency (Hz), R/Q (ohm, circuit), Q0, Qext (empty = idle cavity), gap length (m). Used whole, not cell by cell.')
@xw.arg("convention", ndim=2, err_to_str=True,
        doc='R/Q column convention: "circuit" (V^2/(2 omega W), default) or "accelerator" (V^2/(omega W), as eigenmode solvers often report; "linac" accepted). One of: "circuit", "accelerator", "linac". Optional.')
@xw.arg("resonance", ndim=2, err_to_str=True,
        doc='What the frequency column holds: "hot" (beam-loaded, default) or "cold" (cold-test; the beam-loading susceptance is then applied). One of: "hot", "cold". Optional.')
@xw.arg("depression", ndim=2, err_to_str=True,
        doc='Beam kinematics from the cathode voltage ("none", default) or from the beam-averaged kinetic voltage after space-charge depression ("mean"). One of: "none", "mean". Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default W). Optional. E.g. "W", "kW", "dBm".')
def TUBE_SATURATION_DRIVE(frequency, voltage, current, beam_radius, tunnel_radius, cavities, convention=None, resonance=None, depression=None, unit=None):
    'Drive power (available from a matched generator) that saturates a multi-cavity klystron: the drive of the first maximum of the transfer curve. Caution: design estimate, not a rating (see TUBE_HELP / docs).'
    return _call("TUBE_SATURATION_DRIVE", (frequency, voltage, current, beam_radius, tunnel_radius, cavities, convention, resonance, depression, unit))


@xw.func(category="tubefuncs")
@xw.arg("frequency", ndim=2, err_to_str=True,
        doc='Signal frequency; a range gives one result per frequency. Number in Hz, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam voltage (cathode to anode). Number in V, or text with a unit. A range gives a range.')
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the solid round beam, <= tunnel_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Radius of the drift tube (tunnel). Number in m, or text with a unit. A range gives a range.')
@xw.arg("cavities", ndim=2, err_to_str=True,
        doc='Range, one row per cavity from input to output, 6 columns: position along the beam (m), resonant frequency (Hz), R/Q (ohm, circuit), Q0, Qext (empty = idle cavity), gap length (m). Used whole, not cell by cell.')
@xw.arg("convention", ndim=2, err_to_str=True,
        doc='R/Q column convention: "circuit" (V^2/(2 omega W), default) or "accelerator" (V^2/(omega W), as eigenmode solvers often report; "linac" accepted). One of: "circuit", "accelerator", "linac". Optional.')
@xw.arg("resonance", ndim=2, err_to_str=True,
        doc='What the frequency column holds: "hot" (beam-loaded, default) or "cold" (cold-test; the beam-loading susceptance is then applied). One of: "hot", "cold". Optional.')
@xw.arg("depression", ndim=2, err_to_str=True,
        doc='Beam kinematics from the cathode voltage ("none", default) or from the beam-averaged kinetic voltage after space-charge depression ("mean"). One of: "none", "mean". Optional.')
def TUBE_SATURATED_EFFICIENCY(frequency, voltage, current, beam_radius, tunnel_radius, cavities, convention=None, resonance=None, depression=None):
    'Efficiency at saturation of a multi-cavity klystron: saturated output power over beam power V0 I0 (large-signal disk model). Design estimate. Caution: design estimate, not a rating (see TUBE_HELP / docs).'
    return _call("TUBE_SATURATED_EFFICIENCY", (frequency, voltage, current, beam_radius, tunnel_radius, cavities, convention, resonance, depression))


@xw.func(category="tubefuncs")
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam voltage (cathode to tunnel). Number in V, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the uniform solid round beam, <= tunnel_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Radius of the drift tube (tunnel). Number in m, or text with a unit. A range gives a range.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default A). Optional. E.g. "A", "kA".')
def TUBE_LIMITING_CURRENT(voltage, beam_radius, tunnel_radius, unit=None):
    'Space-charge limiting current of a solid beam in its tunnel (confined flow): 17.045 kA (gamma^(2/3) - 1)^1.5/(1 + 2 ln(a/b)).'
    return _call("TUBE_LIMITING_CURRENT", (voltage, beam_radius, tunnel_radius, unit))


@xw.func(category="tubefuncs")
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam voltage (cathode to tunnel). Number in V, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the uniform solid round beam, <= tunnel_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Radius of the drift tube (tunnel). Number in m, or text with a unit. A range gives a range.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default V). Optional. E.g. "V", "kV".')
def TUBE_POTENTIAL_DEPRESSION(current, voltage, beam_radius, tunnel_radius, unit=None):
    'Space-charge potential depression on the beam axis, I0 (1 + 2 ln(a/b))/(4 pi eps0 u), self-consistent; TUBE_DEPRESSED_VOLTAGE gives the kinetic voltage.'
    return _call("TUBE_POTENTIAL_DEPRESSION", (current, voltage, beam_radius, tunnel_radius, unit))


@xw.func(category="tubefuncs")
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam voltage (cathode to tunnel). Number in V, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the uniform solid round beam, <= tunnel_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("tunnel_radius", ndim=2, err_to_str=True,
        doc='Radius of the drift tube (tunnel). Number in m, or text with a unit. A range gives a range.')
@xw.arg("location", ndim=2, err_to_str=True,
        doc='"mean" (default): averaged over the beam; "axis": on the axis. One of: "mean", "axis". Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default V). Optional. E.g. "V", "kV".')
def TUBE_DEPRESSED_VOLTAGE(current, voltage, beam_radius, tunnel_radius, location=None, unit=None):
    'Kinetic voltage of the beam after its space-charge depression (beam average by default, or on the axis); what the gain functions use with depression "mean".'
    return _call("TUBE_DEPRESSED_VOLTAGE", (current, voltage, beam_radius, tunnel_radius, location, unit))


@xw.func(category="tubefuncs")
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam voltage (cathode to tunnel). Number in V, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the uniform solid round beam, <= tunnel_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("ratio", ndim=2, err_to_str=True,
        doc='Focusing field over the Brillouin field, >= 1 (default 2). Number. A range gives a range. Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default T). Optional. E.g. "T", "mT".')
def TUBE_CONFINED_FLOW_FIELD(current, voltage, beam_radius, ratio=None, unit=None):
    'Axial focusing field of a confined-flow beam, ratio times the relativistic Brillouin field; TUBE_CATHODE_FLUX gives the cathode flux it needs.'
    return _call("TUBE_CONFINED_FLOW_FIELD", (current, voltage, beam_radius, ratio, unit))


@xw.func(category="tubefuncs")
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("voltage", ndim=2, err_to_str=True,
        doc='Beam voltage (cathode to tunnel). Number in V, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the uniform solid round beam, <= tunnel_radius. Number in m, or text with a unit. A range gives a range.')
@xw.arg("ratio", ndim=2, err_to_str=True,
        doc='Focusing field over the Brillouin field, >= 1 (default 2). Number. A range gives a range. Optional.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default Wb). Optional. E.g. "Wb", "mWb", "uWb".')
def TUBE_CATHODE_FLUX(current, voltage, beam_radius, ratio=None, unit=None):
    'Magnetic flux through the cathode that holds the beam at its radius in a field ratio times the Brillouin field: pi b^2 B_B sqrt(ratio^2 - 1).'
    return _call("TUBE_CATHODE_FLUX", (current, voltage, beam_radius, ratio, unit))


@xw.func(category="tubefuncs")
@xw.arg("current", ndim=2, err_to_str=True,
        doc='DC beam current. Number in A, or text with a unit. A range gives a range.')
@xw.arg("beam_radius", ndim=2, err_to_str=True,
        doc='Radius of the beam in the tunnel. Number in m, or text with a unit. A range gives a range.')
@xw.arg("convergence", ndim=2, err_to_str=True,
        doc='Area convergence: cathode area over beam area, >= 1. Number. A range gives a range.')
@xw.arg("unit", ndim=2, err_to_str=True,
        doc='Unit of the result (default A/m**2). Optional. E.g. "A/cm**2", "A/m**2".')
def TUBE_CATHODE_LOADING(current, beam_radius, convergence, unit=None):
    'Current density at the cathode, I0/(pi b^2 C), of a gun with area convergence C = cathode area / beam area.'
    return _call("TUBE_CATHODE_LOADING", (current, beam_radius, convergence, unit))


@xw.func(category="tubefuncs")
@xw.arg("perveance", ndim=2, err_to_str=True,
        doc="Beam perveance (text such as '1.2 uperv' accepted), 0 to 4 uperv. Number in A/V**1.5, or text with a unit. A range gives a range.")
def TUBE_EFFICIENCY_ESTIMATE(perveance):
    'Typical efficiency of a conventional klystron, 0.90 - 0.20 x microperveance (common practice: a trend line through existing tubes, not a bound).'
    return _call("TUBE_EFFICIENCY_ESTIMATE", (perveance,))


@xw.func(category="tubefuncs")
@xw.arg("power", ndim=2, err_to_str=True,
        doc='RF output power into the load. Number in W, or text with a unit. A range gives a range.')
@xw.arg("gap_voltage", ndim=2, err_to_str=True,
        doc='Peak output-gap voltage (commonly 0.8 to 1 times the beam voltage at saturation). Number in V, or text with a unit. A range gives a range.')
@xw.arg("r_over_q", ndim=2, err_to_str=True,
        doc='R/Q of the output cavity, in the given convention. Number in ohm, or text with a unit. A range gives a range.')
@xw.arg("convention", ndim=2, err_to_str=True,
        doc='R/Q convention: "circuit" (default) or "accelerator" ("linac" accepted). One of: "circuit", "accelerator", "linac". Optional.')
def TUBE_OPTIMUM_QEXT(power, gap_voltage, r_over_q, convention=None):
    'External Q of the output cavity that delivers the power at the gap voltage: Qext = V^2/(2 (R/Q) P) in the circuit convention (common practice). Caution: design estimate, not a rating (see TUBE_HELP / docs).'
    return _call("TUBE_OPTIMUM_QEXT", (power, gap_voltage, r_over_q, convention))
