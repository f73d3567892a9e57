"""Catalogue: link budget (path loss, antenna gain, EIRP, G/T, C/N0, Saleh model)."""

from __future__ import annotations

from ..physics import link
from .spec import CAUTION_RF, FINITE, NONNEGATIVE, POSITIVE, Function, Param, between

REF_P525 = ("Recommendation ITU-R P.525-4 (08/2019), Calculation of free-space attenuation "
            "(version from memory; P.525-5 (11/2024) is current).")
REF_KRAUS = "J. D. Kraus, Antennas, 2nd ed., McGraw-Hill, 1988, Ch. 2 (from memory)."
REF_CODATA = "CODATA recommended values (Boltzmann constant, exact in the 2019 SI), via scipy."
REF_SALEH = ("A. A. M. Saleh, Frequency-independent and frequency-dependent nonlinear models "
             "of TWT amplifiers, IEEE Trans. Commun. 29(11), 1715-1720, 1981, "
             "doi:10.1109/TCOM.1981.1094911.")
REF_PRACTICE = "Link-budget definition, common practice."

CATEGORY = "Link budget"

FREQUENCY = Param("frequency", "Carrier frequency.", unit="Hz", domain=POSITIVE)
DRIVE = Param("drive", "Normalised input envelope amplitude r.", domain=NONNEGATIVE)
SALEH_NOTE = ("Default coefficients: the set most widely quoted as Saleh's fit (attribution "
              "from memory); a second set, amplitude 1.9638/0.9945 and phase 2.5293/2.8168, "
              "is also in circulation. Fit alpha and beta to your tube's measured curves.")

FUNCTIONS = [
    Function(
        name="TUBE_FSPL", func=link.fspl,
        params=(FREQUENCY,
                Param("distance", "Path length between the antennas.", unit="m",
                      domain=POSITIVE)),
        result_unit="",
        help="Free-space path loss 20 log10(4 pi d/lambda) in dB, exact form of ITU-R P.525 "
             "(its rounded 32.4 + 20log f[MHz] + 20log d[km] is 0.05 dB lower). Far field only.",
        references=(REF_P525,), category=CATEGORY,
    ),
    Function(
        name="TUBE_DISH_GAIN", func=link.dish_gain,
        params=(FREQUENCY,
                Param("diameter", "Aperture diameter of the dish.", unit="m", domain=POSITIVE),
                Param("efficiency", "Aperture efficiency, 0 < efficiency <= 1 (default 0.6).",
                      domain=between(0.0, 1.0, low_open=True), default=0.6)),
        result_unit="",
        help="Gain in dBi of a circular aperture (dish): 10 log10(efficiency (pi D/lambda)^2).",
        references=(REF_KRAUS,), category=CATEGORY,
        notes="The 0.6 default efficiency is common practice (0.55-0.70 for front-fed dishes); "
              "use the data-sheet value when known.",
    ),
    Function(
        name="TUBE_EIRP", func=link.eirp,
        params=(Param("power", "Transmitter output power.", unit="W", domain=POSITIVE),
                Param("antenna_gain_dbi", "Transmit antenna gain in dBi.", domain=FINITE),
                Param("feed_loss_db", "Feed loss in dB, a positive number (default 0).",
                      domain=NONNEGATIVE, default=0.0)),
        result_unit="",
        help="EIRP in dBW = 10 log10(power/1 W) + antenna gain (dBi) - feed loss (dB).",
        references=(REF_PRACTICE,), category=CATEGORY, caution=CAUTION_RF,
    ),
    Function(
        name="TUBE_G_OVER_T", func=link.g_over_t,
        params=(Param("antenna_gain_dbi", "Receive antenna gain in dBi.", domain=FINITE),
                Param("system_temperature", "System noise temperature.", unit="K",
                      domain=POSITIVE)),
        result_unit="",
        help="Receiver figure of merit G/T in dB/K = gain (dBi) - 10 log10(T_sys/1 K), both "
             "referred to the same plane.",
        references=(REF_PRACTICE,), category=CATEGORY,
    ),
    Function(
        name="TUBE_CN0", func=link.cn0,
        params=(Param("eirp_dbw", "Transmitter EIRP in dBW.", domain=FINITE),
                Param("path_loss_db", "Path loss in dB, a positive number.",
                      domain=NONNEGATIVE),
                Param("g_over_t_dbk", "Receiver G/T in dB/K.", domain=FINITE),
                Param("other_losses_db", "Further losses in dB, positive (default 0).",
                      domain=NONNEGATIVE, default=0.0)),
        result_unit="",
        help="Carrier to noise density C/N0 in dB-Hz = EIRP - path loss - other losses + G/T "
             "+ 228.5992 (-10 log10 of the Boltzmann constant).",
        references=(REF_CODATA, REF_PRACTICE), category=CATEGORY,
        notes="C/N in a bandwidth B is C/N0 - 10 log10(B/1 Hz). Sheets using 228.6 differ by "
              "0.0008 dB.",
    ),
    Function(
        name="TUBE_SALEH_AMPLITUDE", func=link.saleh_amplitude,
        params=(DRIVE,
                Param("alpha", "Small-signal gain coefficient alpha_a (default 2.1587).",
                      domain=POSITIVE, default=link.SALEH_AMPLITUDE_ALPHA),
                Param("beta", "Compression coefficient beta_a (default 1.1517).",
                      domain=NONNEGATIVE, default=link.SALEH_AMPLITUDE_BETA)),
        result_unit="",
        help="Saleh (1981) amplifier model, AM/AM: normalised output amplitude "
             "alpha r/(1 + beta r^2) for drive r; peaks at r = 1/sqrt(beta).",
        references=(REF_SALEH,), category=CATEGORY, notes=SALEH_NOTE,
    ),
    Function(
        name="TUBE_SALEH_PHASE", func=link.saleh_phase,
        params=(DRIVE,
                Param("alpha", "Phase coefficient alpha_phi in rad (default 4.0033).",
                      unit="rad", domain=FINITE, default=link.SALEH_PHASE_ALPHA),
                Param("beta", "Phase compression coefficient beta_phi (default 9.1040).",
                      domain=NONNEGATIVE, default=link.SALEH_PHASE_BETA)),
        result_unit="rad",
        help="Saleh (1981) amplifier model, AM/PM: output phase shift "
             "alpha r^2/(1 + beta r^2) in rad for drive r.",
        references=(REF_SALEH,), category=CATEGORY, result_units=("deg", "rad"),
        notes=SALEH_NOTE,
    ),
]
