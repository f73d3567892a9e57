"""The demo workbooks, built with openpyxl (scenarios invented for tubefuncs).

``workbooks/make_workbooks.py`` writes them into ``workbooks/``;
``tubefuncs demo`` builds the station budget here when the checked-in copy is
not at hand (an installed package).  Every name, site and figure below is
fictional: plausible numbers for a pulsed S-band accelerator station, a
Ku-band uplink and a small test klystron, not data of any real machine.

Each workbook mixes catalogue functions called with plain numbers, unit text
(``"2.998 GHz"``, ``"72.14 mm"``) and cell references; standard Excel
functions; a second sheet read through cross-sheet references; and named
ranges.
"""

from __future__ import annotations

import openpyxl
from openpyxl.styles import Font
from openpyxl.workbook.defined_name import DefinedName
from openpyxl.worksheet.formula import ArrayFormula

BOLD = Font(bold=True)
TITLE = Font(bold=True, size=13)

SAFETY_LINES = (
    "Safety: beam supplies and modulators store lethal energy; the gun and collector emit "
    "X-rays; RF leaks burn and exposure injures; collector cooling water runs under pressure "
    "near high voltage.",
    "These are design estimates, not ratings: follow local codes, the tube maker's data and "
    "licensed practice.",
)


def _name(wb, name: str, ref: str) -> None:
    wb.defined_names[name] = DefinedName(name, attr_text=ref)


def _rows(ws, start: int, rows) -> None:
    """Write (label, value, unit, note) rows from ``start``; a str row is a header."""
    r = start
    for row in rows:
        if isinstance(row, str):
            ws.cell(r, 1, row).font = BOLD
        elif row is not None:
            for c, v in enumerate(row, 1):
                if v is not None and v != "":
                    ws.cell(r, c, v)
        r += 1


def _widths(ws, widths) -> None:
    for letter, w in widths.items():
        ws.column_dimensions[letter].width = w


# --------------------------------------------------------------------------- station

#: The invented six-cavity S-band klystron of the Ulqathor station (demo data): position
#: (m), hot resonant frequency (Hz), R/Q (ohm, circuit), Q0, Qext (None = idle), gap (m).
TUBE_CAVITIES = (
    (0.000, 2.998e9, 50, 3000, 150, 0.018),
    (0.100, 3.051964e9, 50, 3000, None, 0.018),
    (0.210, 3.051964e9, 50, 3000, None, 0.018),
    (0.330, 3.051964e9, 50, 3000, None, 0.018),
    (0.450, 3.081944e9, 50, 3000, None, 0.018),
    (0.560, 2.998e9, 47.5, 3000, 20, 0.022),
)
TUBE_TABLE_ROW = 9
_TUBE_ARGS = "rf_frequency, beam_voltage, beam_current, beam_radius, tunnel_radius, cavity_table"
_AT_SAT = _TUBE_ARGS + ", Station!$B$9"
#: The options of the gain and large-signal functions, written out before a result unit.
_OPTS = '"circuit", "hot", "none"'


def _tube_sheet(wb) -> None:
    """The station klystron: beam geometry, cavity table, large-signal figures."""
    tube = wb.create_sheet("Tube")
    tube["A1"] = "Station 3 klystron (invented six-cavity S-band tube, demo data)"
    tube["A1"].font = TITLE
    tube["A2"] = ("Beam voltage, current and frequency come from the Station sheet. The "
                  "large-signal figures are design estimates of a 1-D disk model, not ratings.")
    _rows(tube, 4, [
        ("Beam radius", "6 mm", "", "solid round beam, confined flow"),          # 4
        ("Tunnel radius", "9.5 mm", ""),                                          # 5
        None,
        "Cavities (input first): position (m), hot frequency (Hz), R/Q (ohm, circuit), "
        "Q0, Qext (empty = idle), gap length (m)",                               # 7
        ("Position (m)", "Frequency (Hz)", "R/Q (ohm)", "Q0", "Qext", "Gap (m)"),  # 8
    ])
    for c in range(1, 7):
        tube.cell(8, c).font = BOLD
    for r, row in enumerate(TUBE_CAVITIES, start=TUBE_TABLE_ROW):
        for c, v in enumerate(row, 1):
            if v is not None:
                tube.cell(r, c, v)
    first = TUBE_TABLE_ROW + len(TUBE_CAVITIES) + 1                               # 16
    _rows(tube, first, [
        "Large-signal figures at saturation",                                    # 16
        ("Saturated efficiency", f"=TUBE_SATURATED_EFFICIENCY({_TUBE_ARGS})", ""),  # 17
        ("Gain at saturation", f"=TUBE_LARGE_SIGNAL_GAIN({_AT_SAT})", "dB"),       # 18
        ("Small-signal gain", f"=TUBE_SMALL_SIGNAL_GAIN({_TUBE_ARGS})", "dB"),    # 19
        ("Output-gap voltage", f'=TUBE_OUTPUT_GAP_VOLTAGE({_AT_SAT}, {_OPTS}, "kV")', "kV"),  # 20
        ("Slowest spent electrons", f'=TUBE_SPENT_BEAM_MIN_ENERGY({_AT_SAT}, {_OPTS}, "keV")',
         "keV", "limits collector depression"),                                  # 21
        ("Fastest spent electrons", f'=TUBE_SPENT_BEAM_MAX_ENERGY({_AT_SAT}, {_OPTS}, "keV")',
         "keV", "above e*V0: size the collector X-ray shielding for it"),        # 22
        ("Output power 3 dB below saturation drive",
         f'=TUBE_OUTPUT_POWER({_TUBE_ARGS}, Station!$B$9/2, {_OPTS}, "MW")', "MW"),        # 23
        ("AM/PM: phase change over the last 3 dB",
         f"=MOD(TUBE_OUTPUT_PHASE({_AT_SAT})-TUBE_OUTPUT_PHASE({_TUBE_ARGS}, "
         "Station!$B$9/2)+180, 360)-180",
         "deg"),                                                                 # 24
    ])
    _widths(tube, {"A": 40, "B": 16, "C": 10, "D": 10, "E": 10, "F": 10})


def station_budget() -> openpyxl.Workbook:
    """RF station budget of the (fictional) Ulqathor test linac, station 3."""
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Station"
    ws["A1"] = "Ulqathor test linac (fictional) - RF station 3 budget"
    ws["A1"].font = TITLE
    ws["A2"] = ("Pulsed S-band klystron station; every figure is invented for the tubefuncs "
                "demo. Design estimates, not ratings.")
    _rows(ws, 4, [
        "Inputs",
        ("Beam voltage", 285000, "V", "cathode to anode"),                       # 5
        ("Beam current", 265, "A"),                                               # 6
        ("RF frequency", "2.998 GHz", "", "unit text read by the TUBE_ functions"),  # 7
        ("RF output, saturated (peak)", f"=TUBE_SATURATED_POWER({_TUBE_ARGS})", "W",
         "large-signal model of the tube on the Tube sheet"),                     # 8
        ("RF drive (peak)", f"=TUBE_SATURATION_DRIVE({_TUBE_ARGS})", "W",
         "drive that saturates the tube"),                                        # 9
        ("Pulse width", 4.5e-6, "s"),                                             # 10
        ("Pulse repetition rate", 50, "Hz"),                                      # 11
        ("Body interception", 0.02, "", "fraction of average beam power"),        # 12
        ("Collector water temperature rise", 12, "K"),                            # 13
        None,
        "Beam",                                                                   # 15
        ("Perveance", '=TUBE_PERVEANCE(beam_current, beam_voltage, "uperv")', "uperv"),  # 16
        ("Electron speed v/c", "=TUBE_BETA(beam_voltage)", ""),                  # 17
        ("Beam power (peak)", "=TUBE_BEAM_POWER(beam_voltage, beam_current)", "W"),  # 18
        ("Beam power (peak)", "=ROUND(B18/1E+6, 2)", "MW"),                       # 19
        ("Voltage back from perveance", "=(B6/(B16*1E-6))^(2/3)", "V", "equals B5"),  # 20
        None,
        "RF",                                                                     # 22
        ("Efficiency", "=rf_output_peak/B18", "", '=TEXT(B23, "0.0%")'),          # 23
        ("Gain", "=10*LOG10(rf_output_peak/B9)", "dB"),                           # 24
        ("Duty factor", "=B10*B11", ""),                                          # 25
        ("Average beam power", "=TUBE_AVERAGE_POWER(B18, B10, B11)", "W"),        # 26
        ("Average RF output", '=TUBE_AVERAGE_POWER(rf_output_peak, B10, B11, "kW")', "kW"),  # 27
        ("Waveguide run loss", "=Waveguide!F14", "dB", "from the Waveguide sheet"),  # 28
        ("Power at the structure (peak)", "=rf_output_peak*10^(-B28/10)", "W"),   # 29
        ("Power at the structure (peak)", "=ROUND(B29/1E+6, 2)", "MW"),           # 30
        ("Lossiest waveguide segment",
         "=INDEX(Waveguide!A5:A9, MATCH(MAX(Waveguide!F5:F9), Waveguide!F5:F9, 0))", ""),  # 31
        None,
        "Collector and cooling (average powers)",                                 # 33
        ("Body loss", "=B12*B26", "W"),                                           # 34
        ("Collector power, saturated drive", "=TUBE_COLLECTOR_POWER(B26, B27*1000, B34)", "W"),
        ("Collector power, no drive", "=TUBE_COLLECTOR_POWER(B26, 0, B34)", "W"),  # 36
        ("Collector design load", "=MAX(B35, B36)", "W", "no drive is the worst case"),  # 37
        ("Collector water flow", '=TUBE_COOLANT_FLOW(B37, B13, "water", "L/min")', "L/min"),
        ("Available collector flow", "=Cooling!B5", "L/min", "from the Cooling sheet"),  # 39
        ("Flow check", '=IF(B39>=B38, "OK", "INSUFFICIENT")', ""),               # 40
        ("Flow margin", "=ROUND(100*(B39-B38)/B38, 1)", "%"),                     # 41
        None,
        (SAFETY_LINES[0],),                                                       # 43
        (SAFETY_LINES[1],),                                                       # 44
    ])
    _widths(ws, {"A": 36, "B": 18, "C": 8, "D": 40})

    wg = wb.create_sheet("Waveguide")
    wg["A1"] = "WR-284 run from the klystron to the accelerating structure (fictional layout)"
    wg["A1"].font = TITLE
    wg["A2"] = "Guide dimensions as unit text; the frequency comes from Station!B7."
    _rows(wg, 4, [
        ("Segment", "Length (m)", "Width", "Height", "Conductivity (S/m)", "Loss (dB)"),
        ("Klystron to circulator", 3.2, "72.14 mm", "34.04 mm", 5.8e7),
        ("Circulator to coupler", 1.5, "72.14 mm", "34.04 mm", 5.8e7),
        ("Shaft to tunnel (aluminium)", 18.0, "72.14 mm", "34.04 mm", 3.5e7),
        ("Tunnel run (aluminium)", 24.5, "72.14 mm", "34.04 mm", 3.5e7),
        ("Coupler to structure", 2.1, "72.14 mm", "34.04 mm", 5.8e7),
        ("Guide total", "=SUM(B5:B9)", None, None, None, "=SUM(F5:F9)"),                # 10
        ("Circulator insertion loss", None, None, None, None, 0.15),                    # 11
        ("Windows and flanges", None, None, None, None, 0.08),                          # 12
        ("Directional coupler", None, None, None, None, 0.05),                          # 13
        ("Run total", None, None, None, None, "=F10+SUM(F11:F13)"),                     # 14
        None,
        ("TE10 cut-off", '=TUBE_WAVEGUIDE_CUTOFF("72.14 mm", "GHz")', "GHz"),           # 16
        ("Operating / cut-off", "=2.998/B16", ""),                                      # 17
    ])
    for r in range(5, 10):
        wg.cell(r, 6, f"=TUBE_WAVEGUIDE_LOSS(Station!$B$7, C{r}, D{r}, B{r}, E{r})")
    for c in range(1, 7):
        wg.cell(4, c).font = BOLD
    _widths(wg, {"A": 30, "B": 12, "C": 12, "D": 12, "E": 18, "F": 12})

    _tube_sheet(wb)

    cool = wb.create_sheet("Cooling")
    cool["A1"] = "Collector cooling loop (fictional plant)"
    cool["A1"].font = TITLE
    _rows(cool, 4, [
        "Plant",
        ("Available collector flow", 30, "L/min"),                 # 5
        ("Supply pressure", 6, "bar", "pressurised: see the safety notes"),
        ("Inlet temperature", 30, "degC"),                          # 7
        ("Outlet temperature (estimate)", "=B7+Station!B13", "degC"),  # 8
        ("Heat removed", "=Station!B37/1000", "kW"),                # 9
    ])
    _widths(cool, {"A": 32, "B": 12, "C": 8, "D": 36})

    for name, ref in {
        "beam_voltage": "Station!$B$5", "beam_current": "Station!$B$6",
        "rf_frequency": "Station!$B$7", "rf_output_peak": "Station!$B$8",
        "perveance_uperv": "Station!$B$16", "beam_power_peak": "Station!$B$18",
        "efficiency": "Station!$B$23", "average_beam_power": "Station!$B$26",
        "average_rf_output_kw": "Station!$B$27", "run_loss_db": "Station!$B$28",
        "structure_power": "Station!$B$29", "collector_saturated": "Station!$B$35",
        "collector_no_drive": "Station!$B$36", "coolant_flow_lpm": "Station!$B$38",
        "coolant_available_lpm": "Station!$B$39", "flow_check": "Station!$B$40",
        "coolant_rise_k": "Station!$B$13",
        "beam_radius": "Tube!$B$4", "tunnel_radius": "Tube!$B$5",
        "cavity_table": f"Tube!$A${TUBE_TABLE_ROW}:$F${TUBE_TABLE_ROW + len(TUBE_CAVITIES) - 1}",
        "saturated_efficiency": "Tube!$B$17", "rf_drive": "Station!$B$9",
        "spent_max_kev": "Tube!$B$22",
    }.items():
        _name(wb, name, ref)
    return wb


# --------------------------------------------------------------------------- uplink

SALEH_BETA = 1.1517  # the published default of the Saleh model (amplitude beta)


def uplink_budget() -> openpyxl.Workbook:
    """Ku-band uplink budget of the (fictional) Tarnside teleport to FICTSAT-2."""
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Uplink"
    ws["A1"] = "Tarnside teleport (fictional) - Ku-band uplink to FICTSAT-2 (fictional)"
    ws["A1"].font = TITLE
    ws["A2"] = "Klystron power amplifier, Saleh-model back-off; invented figures."
    _rows(ws, 4, [
        "Inputs",
        ("Uplink frequency", "14.25 GHz", ""),                       # 5
        ("HPA saturated output", 1500, "W"),                          # 6
        ("Input back-off", 4, "dB", "a row of the Amplifier sheet"),  # 7
        ("Feed and waveguide loss", 1.2, "dB"),                       # 8
        ("Dish diameter", "9 m", ""),                                 # 9
        ("Aperture efficiency", 0.65, ""),                            # 10
        ("Slant range", "38500 km", ""),                              # 11
        ("Satellite G/T", 3.5, "dB/K"),                               # 12
        ("Atmosphere and pointing losses", 0.9, "dB"),                # 13
        ("Required C/N0", 108, "dB-Hz"),                               # 14
        None,
        "Budget",                                                     # 16
        ("Output back-off",
         "=INDEX(Amplifier!D6:D31, MATCH(ibo_db, Amplifier!A6:A31, 0))", "dB"),  # 17
        ("HPA output", "=10*LOG10(B6)-B17", "dBW"),                   # 18
        ("HPA output", "=10^(B18/10)", "W"),                          # 19
        ("Dish gain", "=TUBE_DISH_GAIN(up_frequency, B9, B10)", "dBi"),  # 20
        ("EIRP", "=B18-B8+B20", "dBW", "=TUBE_EIRP(B19, B20, B8)"),   # 21
        ("Free-space path loss", "=TUBE_FSPL(up_frequency, B11)", "dB"),  # 22
        ("C/N0", "=TUBE_CN0(B21, B22, B12, B13)", "dB-Hz"),           # 23
        ("Margin", "=B23-B14", "dB"),                                 # 24
        ("Status", '=IF(B24>=3, "OK (3 dB margin or more)", "LOW MARGIN")', ""),  # 25
        ("AM/PM at the operating point",
         "=INDEX(Amplifier!E6:E31, MATCH(ibo_db, Amplifier!A6:A31, 0))", "deg"),  # 26
        ("Path loss check", "=20*LOG10(4*PI()*38500000*1.425E+10/299792458)", "dB"),  # 27
        None,
        (SAFETY_LINES[0],),
        (SAFETY_LINES[1],),
    ])
    _widths(ws, {"A": 32, "B": 18, "C": 8, "D": 30})

    amp = wb.create_sheet("Amplifier")
    amp["A1"] = "Saleh model of the HPA (published default parameters), normalised drive"
    amp["A1"].font = TITLE
    amp["A2"] = "Drive at saturation"
    amp["B2"] = f"=1/SQRT({SALEH_BETA})"
    amp["A3"] = "Output at saturation"
    amp["B3"] = "=TUBE_SALEH_AMPLITUDE(B2)"
    _rows(amp, 5, [("Input back-off (dB)", "Drive", "Output", "Output back-off (dB)",
                    "AM/PM (deg)")])
    for c in range(1, 6):
        amp.cell(5, c).font = BOLD
    for i in range(26):
        r = 6 + i
        amp.cell(r, 1, i)
        amp.cell(r, 2, f"=$B$2*10^(-A{r}/20)")
        amp.cell(r, 3, f"=TUBE_SALEH_AMPLITUDE(B{r})")
        amp.cell(r, 4, f"=-20*LOG10(C{r}/$B$3)")
        amp.cell(r, 5, f'=TUBE_SALEH_PHASE(B{r}, , , "deg")')
    _widths(amp, {"A": 22, "B": 12, "C": 12, "D": 20, "E": 12})

    _name(wb, "up_frequency", "Uplink!$B$5")
    _name(wb, "ibo_db", "Uplink!$B$7")
    _name(wb, "eirp_dbw", "Uplink!$B$21")
    _name(wb, "cn0_dbhz", "Uplink!$B$23")
    return wb


# --------------------------------------------------------------------------- sweep

SWEEP_POINTS = 201
SWEEP_FIRST_ROW = 5


def frequency_sweep(points: int = SWEEP_POINTS) -> openpyxl.Workbook:
    """201-point sweep of a (fictional) 80 kV test klystron's gap and guide figures."""
    wb = openpyxl.Workbook()
    setup = wb.active
    setup.title = "Setup"
    setup["A1"] = "Wrenfield test klystron (fictional) - 2.9 to 3.1 GHz sweep"
    setup["A1"].font = TITLE
    last = SWEEP_FIRST_ROW + points - 1
    _rows(setup, 3, [
        "Inputs",
        ("First frequency", 2.9e9, "Hz"),             # 4
        ("Frequency step", 0.2e9 / (points - 1), "Hz"),  # 5
        ("Beam voltage", "80 kV", ""),                # 6
        ("Beam current", 28, "A"),                    # 7
        ("Gap length", "10 mm", ""),                  # 8
        ("Beam radius", "4 mm", ""),                  # 9
        ("Tunnel radius", "6 mm", ""),                # 10
        ("Guide width", "72.14 mm", ""),              # 11
        ("Guide height", "34.04 mm", ""),             # 12
        None,
        "Summary of the sweep",                       # 14
        ("Points", f"=COUNT(Sweep!A{SWEEP_FIRST_ROW}:A{last})", ""),                # 15
        ("Last frequency", "=MAX(Sweep!A:A)", "Hz"),                               # 16
        ("Coupling, gridless: min", f"=MIN(Sweep!C{SWEEP_FIRST_ROW}:C{last})", ""),  # 17
        ("Coupling, gridless: max", f"=MAX(Sweep!C{SWEEP_FIRST_ROW}:C{last})", ""),  # 18
        ("Guide loss per 10 m: mean", f"=AVERAGE(Sweep!E{SWEEP_FIRST_ROW}:E{last})", "dB"),
        ("Peak small-signal gain", f"=MAX(Sweep!G{SWEEP_FIRST_ROW}:G{last})", "dB"),  # 20
        ("Frequency of peak gain",
         f"=INDEX(Sweep!A{SWEEP_FIRST_ROW}:A{last}, "
         f"MATCH(B20, Sweep!G{SWEEP_FIRST_ROW}:G{last}, 0))",
         "Hz"),                                                                      # 21
        ("Optimum drift at 2.998 GHz",
         '=TUBE_OPTIMUM_DRIFT("2.998 GHz", beam_i, v_beam, beam_radius, tunnel_radius, "mm")',
         "mm"),                                                                      # 22
        ("Transit angle check at 2.998 GHz",
         "=DEGREES(2*PI()*2.998E+9*0.01/(TUBE_BETA(80000)*299792458))", "deg"),     # 23
    ])
    _widths(setup, {"A": 34, "B": 18, "C": 8})

    cav = wb.create_sheet("Cavities")
    cav["A1"] = ("Cavity table for TUBE_SMALL_SIGNAL_GAIN: position (m), frequency (Hz), "
                 "R/Q (ohm), Q0, Qext, gap length (m); Qext 1E+9 = idler (no external load)")
    for r, row in enumerate([
        (0.0, 2.998e9, 90, 3000, 200, 0.010),
        (0.12, 3.006e9, 90, 3000, 1e9, 0.010),
        (0.24, 3.030e9, 90, 3000, 1e9, 0.010),
        (0.36, 2.998e9, 90, 3000, 35, 0.010),
    ], start=3):
        for c, v in enumerate(row, 1):
            cav.cell(r, c, v)

    sw = wb.create_sheet("Sweep")
    sw["A1"] = "Sweep (inputs on the Setup sheet)"
    sw["A1"].font = TITLE
    heads = ("Frequency (Hz)", "Transit angle (deg)", "Coupling, gridless",
             "Coupling, gridded (array)", "Guide loss per 10 m (dB)", "Reduction factor",
             "Small-signal gain (dB)")
    for c, h in enumerate(heads, 1):
        sw.cell(4, c, h).font = BOLD
    first = SWEEP_FIRST_ROW
    for r in range(first, last + 1):
        sw.cell(r, 1, "=f_start" if r == first else f"=A{r - 1}+f_step")
        sw.cell(r, 2, f'=TUBE_TRANSIT_ANGLE(A{r}, gap_length, v_beam, "deg")')
        sw.cell(r, 3, f"=TUBE_GAP_COUPLING(A{r}, gap_length, v_beam, beam_radius, tunnel_radius)")
        sw.cell(r, 5, f"=TUBE_WAVEGUIDE_LOSS(A{r}, Setup!$B$11, Setup!$B$12, 10)")
        sw.cell(r, 6, f"=TUBE_REDUCTION_FACTOR(A{r}, v_beam, beam_radius, tunnel_radius)")
        sw.cell(r, 7, f"=TUBE_SMALL_SIGNAL_GAIN(A{r}, v_beam, beam_i, beam_radius, "
                      f"tunnel_radius, cavity_table)")
    ref = f"D{first}:D{last}"
    sw.cell(first, 4).value = ArrayFormula(
        ref, f"=TUBE_GAP_COUPLING(A{first}:A{last}, gap_length, v_beam)")
    _widths(sw, {c: 22 for c in "ABCDEFG"})
    _transfer_sheet(wb)

    for name, ref in {
        "f_start": "Setup!$B$4", "f_step": "Setup!$B$5", "v_beam": "Setup!$B$6",
        "beam_i": "Setup!$B$7", "gap_length": "Setup!$B$8", "beam_radius": "Setup!$B$9",
        "tunnel_radius": "Setup!$B$10", "cavity_table": "Cavities!$A$3:$F$6",
        "transfer_frequency": "Transfer!$B$3",
    }.items():
        _name(wb, name, ref)
    return wb


TRANSFER_POINTS = 21
TRANSFER_FIRST_ROW = 8


def _transfer_sheet(wb) -> None:
    """Transfer curve of the sweep's test klystron: one batch over 21 drive powers."""
    tr = wb.create_sheet("Transfer")
    tr["A1"] = ("Transfer curve at 2.998 GHz (large-signal disk model; design estimate, not "
                "a rating)")
    tr["A1"].font = TITLE
    first, last = TRANSFER_FIRST_ROW, TRANSFER_FIRST_ROW + TRANSFER_POINTS - 1
    args = "transfer_frequency, v_beam, beam_i, beam_radius, tunnel_radius, cavity_table"
    _rows(tr, 3, [
        ("Frequency", "2.998 GHz", ""),                                           # 3
        ("Saturated power", f'=TUBE_SATURATED_POWER({args}, {_OPTS}, "kW")', "kW"),         # 4
        ("Saturation drive", f"=TUBE_SATURATION_DRIVE({args})", "W"),              # 5
        ("Efficiency at saturation", f"=TUBE_SATURATED_EFFICIENCY({args})", ""),   # 6
    ])
    heads = ("Drive (W)", "Output power (kW)", "Efficiency", "Gain (dB)",
             "Output phase (deg)")
    for c, h in enumerate(heads, 1):
        tr.cell(first - 1, c, h).font = BOLD
    for k, r in enumerate(range(first, last + 1)):
        tr.cell(r, 1, round(0.1 * 10 ** (k / 10), 6))  # 0.1 W to 10 W in 1 dB steps
    drives = f"A{first}:A{last}"
    tr.cell(first, 2).value = ArrayFormula(
        f"B{first}:B{last}", f'=TUBE_OUTPUT_POWER({args}, {drives}, {_OPTS}, "kW")')
    tr.cell(first, 3).value = ArrayFormula(
        f"C{first}:C{last}", f"=TUBE_EFFICIENCY({args}, {drives})")
    tr.cell(first, 4).value = ArrayFormula(
        f"D{first}:D{last}", f"=TUBE_LARGE_SIGNAL_GAIN({args}, {drives})")
    tr.cell(first, 5).value = ArrayFormula(
        f"E{first}:E{last}", f"=TUBE_OUTPUT_PHASE({args}, {drives})")
    _widths(tr, {"A": 26, "B": 18, "C": 12, "D": 12, "E": 18})


BUILDERS = {
    "station_budget.xlsx": station_budget,
    "uplink_budget.xlsx": uplink_budget,
    "frequency_sweep.xlsx": frequency_sweep,
}
