"""tubefuncs worksheet functions for LibreOffice Calc: the extension's UNO component.

GENERATED FILE: do not edit.  Regenerate with: python -m tubefuncs.calc.generate
67 catalogue functions plus TUBE_ERROR_TEXT.  Each method only calls
tubefuncs.calc.adapter; this file runs inside LibreOffice's own Python, which
finds numpy and tubefuncs through tubefuncs_paths.json (written beside this
file by `tubefuncs calc-setup`) or the TUBEFUNCS_PYTHONPATH environment
variable (entries separated like PATH).
"""

import json
import os
import sys

import unohelper
from com.sun.star.lang import XServiceInfo, XServiceName
from org.tubefuncs.calc import XFunctions

IMPLEMENTATION = "org.tubefuncs.calc.Functions"
SERVICE = "org.tubefuncs.calc.FunctionsService"
SERVICES = (SERVICE, "com.sun.star.sheet.AddIn")
_STATE = {"adapter": None, "problem": None}


def _paths():
    here = os.path.dirname(os.path.abspath(globals().get("__file__", "") or "."))
    found = []
    try:
        with open(os.path.join(here, "tubefuncs_paths.json"), encoding="utf-8") as f:
            recorded = json.load(f)
        found += list(recorded.get("sys_path", []))
    except (OSError, ValueError):
        recorded = {}
    found += [p for p in os.environ.get("TUBEFUNCS_PYTHONPATH", "").split(os.pathsep) if p]
    return found, recorded


def _adapter():
    if _STATE["adapter"] is not None:
        return _STATE["adapter"]
    paths, recorded = _paths()
    for p in reversed(paths):
        if p not in sys.path:
            sys.path.insert(0, p)
    want = recorded.get("python", "")
    have = "{}.{}".format(*sys.version_info[:2])
    try:
        from tubefuncs.calc import adapter
    except Exception as exc:
        hint = ""
        if want and want != have:
            hint = (f" The recorded Python is {want} but LibreOffice runs Python {have}: "
                    f"install tubefuncs for a Python {have}.")
        _STATE["problem"] = (f"tubefuncs cannot be imported in LibreOffice's Python {have} "
                             f"({type(exc).__name__}: {exc}).{hint} Run `tubefuncs "
                             f"calc-setup` again or set TUBEFUNCS_PYTHONPATH.")
        raise RuntimeError(_STATE["problem"]) from None
    _STATE["adapter"] = adapter
    return adapter


def _out(value):
    # every method is declared to return sequence<sequence<any>> (see the IDL): a
    # single value goes back as a 1 x 1 array, which Calc shows as that value
    if isinstance(value, tuple):
        return value
    return ((value,),)


class Functions(unohelper.Base, XFunctions, XServiceName, XServiceInfo):
    def __init__(self, ctx=None):
        self.ctx = ctx

    # XServiceName, XServiceInfo
    def getServiceName(self):
        return SERVICE

    def getImplementationName(self):
        return IMPLEMENTATION

    def supportsService(self, name):
        return name in SERVICES

    def getSupportedServiceNames(self):
        return SERVICES

    def _call(self, name, args):
        adapter = _adapter()
        try:
            return _out(adapter.call(name, args))
        except adapter.CalcCallError as exc:
            raise RuntimeError(exc.message) from None
        except Exception:
            import traceback

            if sys.stderr is not None:  # LibreOffice's standard error, where there is one
                traceback.print_exc()
            raise

    def TUBE_ERROR_TEXT(self, functionName, arguments):
        try:
            adapter = _adapter()
        except RuntimeError as exc:
            return _out(str(exc)[:255])
        return _out(adapter.error_text(functionName, tuple(arguments)))

    def TUBE_GAMMA(self, voltage):
        return self._call("TUBE_GAMMA", (voltage,))

    def TUBE_BETA(self, voltage):
        return self._call("TUBE_BETA", (voltage,))

    def TUBE_VELOCITY(self, voltage, unit):
        return self._call("TUBE_VELOCITY", (voltage, unit,))

    def TUBE_PERVEANCE(self, current, voltage, unit):
        return self._call("TUBE_PERVEANCE", (current, voltage, unit,))

    def TUBE_BEAM_CURRENT(self, perveance, voltage, unit):
        return self._call("TUBE_BEAM_CURRENT", (perveance, voltage, unit,))

    def TUBE_BEAM_POWER(self, voltage, current, unit):
        return self._call("TUBE_BEAM_POWER", (voltage, current, unit,))

    def TUBE_CHILD_LANGMUIR(self, voltage, spacing, area, unit):
        return self._call("TUBE_CHILD_LANGMUIR", (voltage, spacing, area, unit,))

    def TUBE_BRILLOUIN_FIELD(self, current, voltage, beamRadius, unit):
        return self._call("TUBE_BRILLOUIN_FIELD", (current, voltage, beamRadius, unit,))

    def TUBE_PLASMA_FREQ(self, current, voltage, beamRadius, unit):
        return self._call("TUBE_PLASMA_FREQ", (current, voltage, beamRadius, unit,))

    def TUBE_REDUCTION_FACTOR(self, frequency, voltage, beamRadius, tunnelRadius):
        return self._call("TUBE_REDUCTION_FACTOR", (frequency, voltage, beamRadius, tunnelRadius,))

    def TUBE_REDUCED_PLASMA_FREQ(self, frequency, current, voltage, beamRadius, tunnelRadius, unit):
        return self._call("TUBE_REDUCED_PLASMA_FREQ", (frequency, current, voltage, beamRadius, tunnelRadius, unit,))

    def TUBE_PLASMA_WAVELENGTH(self, frequency, current, voltage, beamRadius, tunnelRadius, unit):
        return self._call("TUBE_PLASMA_WAVELENGTH", (frequency, current, voltage, beamRadius, tunnelRadius, unit,))

    def TUBE_OPTIMUM_DRIFT(self, frequency, current, voltage, beamRadius, tunnelRadius, unit):
        return self._call("TUBE_OPTIMUM_DRIFT", (frequency, current, voltage, beamRadius, tunnelRadius, unit,))

    def TUBE_TRANSIT_ANGLE(self, frequency, length, voltage, unit):
        return self._call("TUBE_TRANSIT_ANGLE", (frequency, length, voltage, unit,))

    def TUBE_GAP_COUPLING(self, frequency, gapLength, voltage, beamRadius, tunnelRadius):
        return self._call("TUBE_GAP_COUPLING", (frequency, gapLength, voltage, beamRadius, tunnelRadius,))

    def TUBE_BEAM_LOADING(self, frequency, gapLength, voltage, current, beamRadius, tunnelRadius, unit):
        return self._call("TUBE_BEAM_LOADING", (frequency, gapLength, voltage, current, beamRadius, tunnelRadius, unit,))

    def TUBE_BEAM_SUSCEPTANCE(self, frequency, gapLength, voltage, current, beamRadius, tunnelRadius, unit):
        return self._call("TUBE_BEAM_SUSCEPTANCE", (frequency, gapLength, voltage, current, beamRadius, tunnelRadius, unit,))

    def TUBE_BEAM_LOADED_FREQ(self, coldFrequency, rOverQ, gapLength, voltage, current, beamRadius, tunnelRadius, convention, unit):
        return self._call("TUBE_BEAM_LOADED_FREQ", (coldFrequency, rOverQ, gapLength, voltage, current, beamRadius, tunnelRadius, convention, unit,))

    def TUBE_BUNCHING_PARAM(self, gapVoltage, frequency, driftLength, voltage, coupling):
        return self._call("TUBE_BUNCHING_PARAM", (gapVoltage, frequency, driftLength, voltage, coupling,))

    def TUBE_HARMONIC_CURRENT(self, current, bunchingParam, harmonic, unit):
        return self._call("TUBE_HARMONIC_CURRENT", (current, bunchingParam, harmonic, unit,))

    def TUBE_PILLBOX_FREQ(self, radius, unit):
        return self._call("TUBE_PILLBOX_FREQ", (radius, unit,))

    def TUBE_SKIN_DEPTH(self, frequency, conductivity, unit):
        return self._call("TUBE_SKIN_DEPTH", (frequency, conductivity, unit,))

    def TUBE_SURFACE_RESISTANCE(self, frequency, conductivity, unit):
        return self._call("TUBE_SURFACE_RESISTANCE", (frequency, conductivity, unit,))

    def TUBE_PILLBOX_Q(self, radius, length, conductivity):
        return self._call("TUBE_PILLBOX_Q", (radius, length, conductivity,))

    def TUBE_PILLBOX_R_OVER_Q(self, radius, length, voltage, convention, unit):
        return self._call("TUBE_PILLBOX_R_OVER_Q", (radius, length, voltage, convention, unit,))

    def TUBE_LOADED_Q(self, q0, qext):
        return self._call("TUBE_LOADED_Q", (q0, qext,))

    def TUBE_CIRCUIT_EFFICIENCY(self, q0, qext):
        return self._call("TUBE_CIRCUIT_EFFICIENCY", (q0, qext,))

    def TUBE_COUPLING_BETA(self, q0, qext):
        return self._call("TUBE_COUPLING_BETA", (q0, qext,))

    def TUBE_GAP_VOLTAGE(self, power, rOverQ, qLoaded, convention, unit):
        return self._call("TUBE_GAP_VOLTAGE", (power, rOverQ, qLoaded, convention, unit,))

    def TUBE_SMALL_SIGNAL_GAIN(self, frequency, voltage, current, beamRadius, tunnelRadius, cavities, convention, resonance, depression):
        return self._call("TUBE_SMALL_SIGNAL_GAIN", (frequency, voltage, current, beamRadius, tunnelRadius, cavities, convention, resonance, depression,))

    def TUBE_SMALL_SIGNAL_PHASE(self, frequency, voltage, current, beamRadius, tunnelRadius, cavities, convention, resonance, depression, unit):
        return self._call("TUBE_SMALL_SIGNAL_PHASE", (frequency, voltage, current, beamRadius, tunnelRadius, cavities, convention, resonance, depression, unit,))

    def TUBE_SMALL_SIGNAL_BANDWIDTH(self, voltage, current, beamRadius, tunnelRadius, cavities, dropDb, convention, resonance, depression, unit):
        return self._call("TUBE_SMALL_SIGNAL_BANDWIDTH", (voltage, current, beamRadius, tunnelRadius, cavities, dropDb, convention, resonance, depression, unit,))

    def TUBE_PHASE_PER_VOLT(self, frequency, voltage, current, beamRadius, tunnelRadius, cavities, convention, resonance, depression, unit):
        return self._call("TUBE_PHASE_PER_VOLT", (frequency, voltage, current, beamRadius, tunnelRadius, cavities, convention, resonance, depression, unit,))

    def TUBE_PHASE_PER_AMPERE(self, frequency, voltage, current, beamRadius, tunnelRadius, cavities, convention, resonance, depression, unit):
        return self._call("TUBE_PHASE_PER_AMPERE", (frequency, voltage, current, beamRadius, tunnelRadius, cavities, convention, resonance, depression, unit,))

    def TUBE_AVERAGE_POWER(self, peakPower, pulseWidth, prf, unit):
        return self._call("TUBE_AVERAGE_POWER", (peakPower, pulseWidth, prf, unit,))

    def TUBE_COLLECTOR_POWER(self, beamPower, rfOutput, bodyLoss, unit):
        return self._call("TUBE_COLLECTOR_POWER", (beamPower, rfOutput, bodyLoss, unit,))

    def TUBE_COOLANT_FLOW(self, power, temperatureRise, fluid, unit):
        return self._call("TUBE_COOLANT_FLOW", (power, temperatureRise, fluid, unit,))

    def TUBE_WAVEGUIDE_CUTOFF(self, width, unit):
        return self._call("TUBE_WAVEGUIDE_CUTOFF", (width, unit,))

    def TUBE_WAVEGUIDE_LOSS(self, frequency, width, height, length, conductivity):
        return self._call("TUBE_WAVEGUIDE_LOSS", (frequency, width, height, length, conductivity,))

    def TUBE_FSPL(self, frequency, distance):
        return self._call("TUBE_FSPL", (frequency, distance,))

    def TUBE_DISH_GAIN(self, frequency, diameter, efficiency):
        return self._call("TUBE_DISH_GAIN", (frequency, diameter, efficiency,))

    def TUBE_EIRP(self, power, antennaGainDbi, feedLossDb):
        return self._call("TUBE_EIRP", (power, antennaGainDbi, feedLossDb,))

    def TUBE_G_OVER_T(self, antennaGainDbi, systemTemperature):
        return self._call("TUBE_G_OVER_T", (antennaGainDbi, systemTemperature,))

    def TUBE_CN0(self, eirpDbw, pathLossDb, gOverTDbk, otherLossesDb):
        return self._call("TUBE_CN0", (eirpDbw, pathLossDb, gOverTDbk, otherLossesDb,))

    def TUBE_SALEH_AMPLITUDE(self, drive, alpha, beta):
        return self._call("TUBE_SALEH_AMPLITUDE", (drive, alpha, beta,))

    def TUBE_SALEH_PHASE(self, drive, alpha, beta, unit):
        return self._call("TUBE_SALEH_PHASE", (drive, alpha, beta, unit,))

    def TUBE_IN(self, quantity, unit):
        return self._call("TUBE_IN", (quantity, unit,))

    def TUBE_HELP(self, functionName):
        return self._call("TUBE_HELP", (functionName,))

    def TUBE_VERSION(self):
        return self._call("TUBE_VERSION", ())

    def TUBE_OUTPUT_POWER(self, frequency, voltage, current, beamRadius, tunnelRadius, cavities, drivePower, convention, resonance, depression, unit):
        return self._call("TUBE_OUTPUT_POWER", (frequency, voltage, current, beamRadius, tunnelRadius, cavities, drivePower, convention, resonance, depression, unit,))

    def TUBE_EFFICIENCY(self, frequency, voltage, current, beamRadius, tunnelRadius, cavities, drivePower, convention, resonance, depression):
        return self._call("TUBE_EFFICIENCY", (frequency, voltage, current, beamRadius, tunnelRadius, cavities, drivePower, convention, resonance, depression,))

    def TUBE_LARGE_SIGNAL_GAIN(self, frequency, voltage, current, beamRadius, tunnelRadius, cavities, drivePower, convention, resonance, depression):
        return self._call("TUBE_LARGE_SIGNAL_GAIN", (frequency, voltage, current, beamRadius, tunnelRadius, cavities, drivePower, convention, resonance, depression,))

    def TUBE_OUTPUT_PHASE(self, frequency, voltage, current, beamRadius, tunnelRadius, cavities, drivePower, convention, resonance, depression, unit):
        return self._call("TUBE_OUTPUT_PHASE", (frequency, voltage, current, beamRadius, tunnelRadius, cavities, drivePower, convention, resonance, depression, unit,))

    def TUBE_OUTPUT_GAP_VOLTAGE(self, frequency, voltage, current, beamRadius, tunnelRadius, cavities, drivePower, convention, resonance, depression, unit):
        return self._call("TUBE_OUTPUT_GAP_VOLTAGE", (frequency, voltage, current, beamRadius, tunnelRadius, cavities, drivePower, convention, resonance, depression, unit,))

    def TUBE_SPENT_BEAM_MIN_ENERGY(self, frequency, voltage, current, beamRadius, tunnelRadius, cavities, drivePower, convention, resonance, depression, unit):
        return self._call("TUBE_SPENT_BEAM_MIN_ENERGY", (frequency, voltage, current, beamRadius, tunnelRadius, cavities, drivePower, convention, resonance, depression, unit,))

    def TUBE_SPENT_BEAM_MAX_ENERGY(self, frequency, voltage, current, beamRadius, tunnelRadius, cavities, drivePower, convention, resonance, depression, unit):
        return self._call("TUBE_SPENT_BEAM_MAX_ENERGY", (frequency, voltage, current, beamRadius, tunnelRadius, cavities, drivePower, convention, resonance, depression, unit,))

    def TUBE_SATURATED_POWER(self, frequency, voltage, current, beamRadius, tunnelRadius, cavities, convention, resonance, depression, unit):
        return self._call("TUBE_SATURATED_POWER", (frequency, voltage, current, beamRadius, tunnelRadius, cavities, convention, resonance, depression, unit,))

    def TUBE_SATURATION_DRIVE(self, frequency, voltage, current, beamRadius, tunnelRadius, cavities, convention, resonance, depression, unit):
        return self._call("TUBE_SATURATION_DRIVE", (frequency, voltage, current, beamRadius, tunnelRadius, cavities, convention, resonance, depression, unit,))

    def TUBE_SATURATED_EFFICIENCY(self, frequency, voltage, current, beamRadius, tunnelRadius, cavities, convention, resonance, depression):
        return self._call("TUBE_SATURATED_EFFICIENCY", (frequency, voltage, current, beamRadius, tunnelRadius, cavities, convention, resonance, depression,))

    def TUBE_LIMITING_CURRENT(self, voltage, beamRadius, tunnelRadius, unit):
        return self._call("TUBE_LIMITING_CURRENT", (voltage, beamRadius, tunnelRadius, unit,))

    def TUBE_POTENTIAL_DEPRESSION(self, current, voltage, beamRadius, tunnelRadius, unit):
        return self._call("TUBE_POTENTIAL_DEPRESSION", (current, voltage, beamRadius, tunnelRadius, unit,))

    def TUBE_DEPRESSED_VOLTAGE(self, current, voltage, beamRadius, tunnelRadius, location, unit):
        return self._call("TUBE_DEPRESSED_VOLTAGE", (current, voltage, beamRadius, tunnelRadius, location, unit,))

    def TUBE_CONFINED_FLOW_FIELD(self, current, voltage, beamRadius, ratio, unit):
        return self._call("TUBE_CONFINED_FLOW_FIELD", (current, voltage, beamRadius, ratio, unit,))

    def TUBE_CATHODE_FLUX(self, current, voltage, beamRadius, ratio, unit):
        return self._call("TUBE_CATHODE_FLUX", (current, voltage, beamRadius, ratio, unit,))

    def TUBE_CATHODE_LOADING(self, current, beamRadius, convergence, unit):
        return self._call("TUBE_CATHODE_LOADING", (current, beamRadius, convergence, unit,))

    def TUBE_EFFICIENCY_ESTIMATE(self, perveance):
        return self._call("TUBE_EFFICIENCY_ESTIMATE", (perveance,))

    def TUBE_OPTIMUM_QEXT(self, power, gapVoltage, rOverQ, convention):
        return self._call("TUBE_OPTIMUM_QEXT", (power, gapVoltage, rOverQ, convention,))


g_ImplementationHelper = unohelper.ImplementationHelper()
g_ImplementationHelper.addImplementation(Functions, IMPLEMENTATION, SERVICES)
