"""The starter workbook written by ``tubefuncs excel-setup``.

An invented scenario (bench 4 of the fictional "Ulqathor RF lab": a pulsed
S-band klystron amplifier driving a water load) worked through with catalogue
functions, a column sweep as an array formula, one error shown on purpose, a
sheet listing every catalogue function, and an ``xlwings.conf`` sheet naming
the UDF module.  Written with openpyxl: the file holds formulas but no cached
values and no VBA; Excel computes the cells once the functions are imported.

Examples whose function is not (yet) in the catalogue are left out, so the
workbook never calls a function that does not exist.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from openpyxl import Workbook
from openpyxl.styles import Alignment, Font, PatternFill
from openpyxl.utils import get_column_letter
from openpyxl.worksheet.formula import ArrayFormula

from ..catalogue import CATALOGUE, CAUTION_HV
from .generate import UDF_MODULE

STARTER_SHEET = "Bench 4"
FUNCTIONS_SHEET = "Functions"
CONFIG_SHEET = "xlwings.conf"   # the sheet name the xlwings add-in looks for

TITLE = "Ulqathor RF lab, bench 4: pulsed S-band klystron on a water load (invented example)"
SCENARIO = ("All figures are illustrative inputs of an invented test stand, not data of any real "
            "tube or facility. Change the yellow cells; the formulas use tubefuncs worksheet "
            "functions (=TUBE_...) and ordinary Excel.")
HOWTO = ("Cells show #NAME? until the functions are imported: save as .xlsm, set the VBA "
         "reference to xlwings, click xlwings > Import Functions, press Ctrl+Alt+F9 "
         "(addin/README.md).")


@dataclass(frozen=True)
class Input:
    key: str
    label: str
    value: object
    note: str = ""


@dataclass(frozen=True)
class Result:
    key: str
    label: str
    function: str
    args: dict          # catalogue parameter name -> input key, result key or literal
    unit: str | None = None
    number_format: str | None = None
    note: str = ""


@dataclass(frozen=True)
class Literal:
    value: object


INPUTS = (
    Input("voltage", "Beam voltage", "95 kV", "text with a unit"),
    Input("current", "Beam current", 42, "plain number: the default unit, A"),
    Input("frequency", "Drive frequency", "2.998 GHz"),
    Input("beam_radius", "Beam radius", "5 mm"),
    Input("tunnel_radius", "Drift-tube radius", "7 mm"),
    Input("gap_length", "Gap length", "14 mm"),
    Input("cavity_radius", "Test cavity radius (pillbox)", "38 mm"),
    Input("cavity_length", "Test cavity length (pillbox)", "20 mm"),
    Input("conductivity", "Wall conductivity, copper", 5.8e7, "S/m"),
    Input("rf_output", "RF output, peak", "1.8 MW"),
    Input("pulse_width", "Pulse width", "4 us"),
    Input("prf", "Pulse repetition frequency", "100 Hz"),
    Input("temperature_rise", "Collector water temperature rise", "8 K"),
    Input("wg_width", "Waveguide broad wall", "72.14 mm"),
    Input("wg_height", "Waveguide narrow wall", "34.04 mm"),
    Input("wg_run", "Waveguide run to the load", "12 m"),
)

# Results in SI (no unit argument) where a later row uses them: a value shown
# in "MW" would be read as watts by the next function.  Their cells display a
# scaled number through the number format instead.
MEGA = '0.000,, "MW"'
KILO = '0.00, "kW"'
RESULTS = (
    Result("gamma", "Lorentz factor", "TUBE_GAMMA", {"voltage": "voltage"}),
    Result("beta", "v/c", "TUBE_BETA", {"voltage": "voltage"}),
    Result("velocity", "Electron velocity", "TUBE_VELOCITY", {"voltage": "voltage"}, "km/s"),
    Result("perveance", "Perveance", "TUBE_PERVEANCE",
           {"current": "current", "voltage": "voltage"}, "uperv"),
    Result("beam_power", "Beam power, peak", "TUBE_BEAM_POWER",
           {"voltage": "voltage", "current": "current"}, None, MEGA, "in W, shown in MW"),
    Result("plasma_freq", "Plasma frequency", "TUBE_PLASMA_FREQ",
           {"current": "current", "voltage": "voltage", "beam_radius": "beam_radius"}, "MHz"),
    Result("reduction", "Plasma reduction factor", "TUBE_REDUCTION_FACTOR",
           {"frequency": "frequency", "voltage": "voltage", "beam_radius": "beam_radius",
            "tunnel_radius": "tunnel_radius"}),
    Result("plasma_wavelength", "Reduced plasma wavelength", "TUBE_PLASMA_WAVELENGTH",
           {"frequency": "frequency", "current": "current", "voltage": "voltage",
            "beam_radius": "beam_radius", "tunnel_radius": "tunnel_radius"}, "m"),
    Result("optimum_drift", "Quarter plasma wavelength (drift estimate)", "TUBE_OPTIMUM_DRIFT",
           {"frequency": "frequency", "current": "current", "voltage": "voltage",
            "beam_radius": "beam_radius", "tunnel_radius": "tunnel_radius"}, "mm"),
    Result("brillouin", "Brillouin focusing field", "TUBE_BRILLOUIN_FIELD",
           {"current": "current", "voltage": "voltage", "beam_radius": "beam_radius"}, "mT"),
    Result("transit", "Gap transit angle", "TUBE_TRANSIT_ANGLE",
           {"frequency": "frequency", "length": "gap_length", "voltage": "voltage"}, "deg"),
    Result("coupling", "Gap coupling coefficient (gridless)", "TUBE_GAP_COUPLING",
           {"frequency": "frequency", "gap_length": "gap_length", "voltage": "voltage",
            "beam_radius": "beam_radius", "tunnel_radius": "tunnel_radius"}),
    Result("loading", "Beam-loading conductance of the gap (gridless)", "TUBE_BEAM_LOADING",
           {"frequency": "frequency", "gap_length": "gap_length", "voltage": "voltage",
            "current": "current", "beam_radius": "beam_radius",
            "tunnel_radius": "tunnel_radius"}, "uS"),
    Result("pillbox_freq", "Test cavity TM010 frequency", "TUBE_PILLBOX_FREQ",
           {"radius": "cavity_radius"}, "GHz"),
    Result("skin", "Skin depth in the walls", "TUBE_SKIN_DEPTH",
           {"frequency": "frequency", "conductivity": "conductivity"}, "um"),
    Result("q0", "Test cavity unloaded Q", "TUBE_PILLBOX_Q",
           {"radius": "cavity_radius", "length": "cavity_length",
            "conductivity": "conductivity"}),
    Result("r_over_q", "Test cavity R/Q with transit time (circuit)", "TUBE_PILLBOX_R_OVER_Q",
           {"radius": "cavity_radius", "length": "cavity_length", "voltage": "voltage"}, "ohm"),
    Result("rf_average", "RF output, average", "TUBE_AVERAGE_POWER",
           {"peak_power": "rf_output", "pulse_width": "pulse_width", "prf": "prf"}, "kW"),
    Result("collector_peak", "Collector power during the pulse, driven", "TUBE_COLLECTOR_POWER",
           {"beam_power": "beam_power", "rf_output": "rf_output"}, None, MEGA,
           "in W, shown in MW"),
    Result("collector_undriven", "Collector power during the pulse, no RF drive",
           "TUBE_COLLECTOR_POWER", {"beam_power": "beam_power", "rf_output": Literal(0)},
           None, MEGA, "in W, shown in MW; the whole beam lands on the collector: the worst case"),
    Result("collector_average", "Collector power, average, no RF drive", "TUBE_AVERAGE_POWER",
           {"peak_power": "collector_undriven", "pulse_width": "pulse_width", "prf": "prf"},
           None, KILO, "in W, shown in kW"),
    Result("coolant", "Collector cooling water flow (sized for no drive)", "TUBE_COOLANT_FLOW",
           {"power": "collector_average", "temperature_rise": "temperature_rise"}, "L/min",
           None, "the undriven case: the collector must survive loss of drive"),
    Result("cutoff", "Waveguide TE10 cutoff", "TUBE_WAVEGUIDE_CUTOFF",
           {"width": "wg_width"}, "GHz"),
    Result("wg_loss", "Waveguide loss to the load, dB", "TUBE_WAVEGUIDE_LOSS",
           {"frequency": "frequency", "width": "wg_width", "height": "wg_height",
            "length": "wg_run"}),
    Result("error_demo", "An error on purpose: zero cavity radius", "TUBE_PILLBOX_FREQ",
           {"radius": Literal(0)}, None, None,
           "shows how an error looks: text that starts with #NUM!"),
)

# Column sweep: one array formula per result column.
SWEEP_VOLTAGES = (60e3, 70e3, 80e3, 90e3, 100e3)
SWEEP = (
    ("v/c", "TUBE_BETA", {"voltage": "SWEEP"}, None),
    ("Perveance, uperv", "TUBE_PERVEANCE", {"current": "current", "voltage": "SWEEP"}, "uperv"),
    ("Velocity, km/s", "TUBE_VELOCITY", {"voltage": "SWEEP"}, "km/s"),
)

_HEAD = Font(bold=True)
_TITLE = Font(bold=True, size=14)
_INPUT_FILL = PatternFill("solid", fgColor="FFF2CC")
_WRAP = Alignment(wrap_text=True, vertical="top")


class ExampleError(ValueError):
    """An example does not fit its catalogue entry (a parameter name changed)."""


def _text(cell, value: str) -> None:
    """Store ``value`` as text even when it starts with '=' (openpyxl would make a formula)."""
    cell.value = value
    cell.data_type = "s"


def _literal(value) -> str:
    if isinstance(value, str):
        return '"' + value.replace('"', '""') + '"'
    if isinstance(value, bool):
        return "TRUE" if value else "FALSE"
    return f"{value:g}" if isinstance(value, float) else str(value)


def formula(function: str, args: dict, unit: str | None, refs: dict, catalogue=None) -> str:
    """Formula text ``=FUNCTION(...)`` for an example, checked against the catalogue.

    ``args`` maps catalogue parameter names to a key of ``refs`` (cell
    addresses) or a :class:`Literal`.  Raises :class:`ExampleError` when a
    required parameter is missing, a name is unknown or an optional argument
    would have to be skipped.
    """
    catalogue = CATALOGUE if catalogue is None else catalogue
    fn = catalogue[function]
    names = [p.name for p in fn.params]
    unknown = set(args) - set(names)
    if unknown:
        raise ExampleError(f"{function}: no parameter {sorted(unknown)} (has {names})")
    if unit is not None and not fn.takes_unit:
        raise ExampleError(f"{function}: takes no unit argument")
    # Arguments up to the last one given; an optional one in between is
    # written out with its default (never left empty as in "f(a,,c)").
    wanted = [i for i, p in enumerate(fn.params) if p.name in args]
    upto = len(fn.params) if unit is not None else (max(wanted) + 1 if wanted else 0)
    parts = []
    for p in fn.params[:upto]:
        if p.name in args:
            src = args[p.name]
            parts.append(_literal(src.value) if isinstance(src, Literal) else refs[src])
        elif p.required:
            raise ExampleError(f"{function}: required parameter {p.name!r} not given")
        elif p.default is None:
            raise ExampleError(f"{function}: optional {p.name!r} has no default to write out")
        else:
            parts.append(_literal(p.default))
    for p in fn.params[upto:]:
        if p.required:
            raise ExampleError(f"{function}: required parameter {p.name!r} not given")
    if unit is not None:
        parts.append(_literal(unit))
    return f"={function}({','.join(parts)})"


def build(path: Path, catalogue=None) -> dict:
    """Write the starter workbook to ``path``; return what went in and what was left out."""
    catalogue = CATALOGUE if catalogue is None else catalogue
    wb = Workbook()
    ws = wb.active
    ws.title = STARTER_SHEET
    ws.column_dimensions["A"].width = 44
    ws.column_dimensions["B"].width = 22
    ws.column_dimensions["C"].width = 10
    ws.column_dimensions["D"].width = 70

    ws["A1"] = TITLE
    ws["A1"].font = _TITLE
    ws["A2"] = SCENARIO
    ws["A3"] = "Caution: " + CAUTION_HV
    ws["A3"].font = Font(italic=True)
    ws["A4"] = HOWTO

    row = 6
    ws.cell(row, 1, "Inputs").font = _HEAD
    ws.cell(row, 4, "Note").font = _HEAD
    refs: dict[str, str] = {}
    for item in INPUTS:
        row += 1
        ws.cell(row, 1, item.label)
        cell = ws.cell(row, 2, item.value)
        if isinstance(item.value, str):
            _text(cell, item.value)
        cell.fill = _INPUT_FILL
        ws.cell(row, 4, item.note)
        refs[item.key] = f"$B${row}"

    row += 2
    ws.cell(row, 1, "Results").font = _HEAD
    ws.cell(row, 2, "Value").font = _HEAD
    ws.cell(row, 3, "Unit").font = _HEAD
    ws.cell(row, 4, "Formula (as text) and note").font = _HEAD
    placed, missing, broken = [], [], []
    for res in RESULTS:
        if res.function not in catalogue:
            missing.append(res.key)
            continue
        if any(not isinstance(v, Literal) and v not in refs for v in res.args.values()):
            missing.append(res.key)        # depends on a row that was left out
            continue
        try:
            text = formula(res.function, res.args, res.unit, refs, catalogue)
        except ExampleError as exc:
            broken.append(str(exc))
            continue
        row += 1
        ws.cell(row, 1, res.label)
        ws.cell(row, 2, text)
        if res.number_format:
            ws.cell(row, 2).number_format = res.number_format
        fn = catalogue[res.function]
        ws.cell(row, 3, res.unit if res.unit is not None else (fn.result_unit or "-"))
        _text(ws.cell(row, 4), text + (f"   ({res.note})" if res.note else ""))
        refs[res.key] = f"$B${row}"
        placed.append(res.key)

    sweep = [s for s in SWEEP if s[1] in catalogue]
    if sweep:
        row += 2
        ws.cell(row, 1, "Voltage sweep: one array formula fills each column").font = _HEAD
        row += 1
        ws.cell(row, 1, "Beam voltage, V").font = _HEAD
        first = row + 1
        last = row + len(SWEEP_VOLTAGES)
        for k, v in enumerate(SWEEP_VOLTAGES):
            c = ws.cell(first + k, 1, v)
            c.fill = _INPUT_FILL
        refs["SWEEP"] = f"$A${first}:$A${last}"
        for j, (label, function, args, unit) in enumerate(sweep):
            col = 2 + j
            ws.cell(row, col, label).font = _HEAD
            try:
                text = formula(function, args, unit, refs, catalogue)
            except ExampleError as exc:
                broken.append(str(exc))
                continue
            letter = get_column_letter(col)
            ref = f"{letter}{first}:{letter}{last}"
            ws.cell(first, col).value = ArrayFormula(ref, text)
            placed.append(f"sweep:{function}")
        note_row = last + 1
        ws.cell(note_row, 1, "In Excel 365 the same formula typed into one cell spills down "
                             "by itself.")

    _functions_sheet(wb.create_sheet(FUNCTIONS_SHEET), catalogue)
    _config_sheet(wb.create_sheet(CONFIG_SHEET))
    wb.active = 0
    path = Path(path)
    wb.save(path)
    return {"placed": placed, "missing": missing, "broken": broken}


def signature(fn) -> str:
    parts = [p.name if p.required else f"[{p.name}]" for p in fn.worksheet_params]
    return f"{fn.name}({', '.join(parts)})"


def _functions_sheet(ws, catalogue) -> None:
    heads = ("Function", "Arguments ([ ] optional)", "Result unit (SI default)", "What it gives",
             "Caution")
    widths = (30, 60, 14, 90, 40)
    for j, (head, width) in enumerate(zip(heads, widths), start=1):
        ws.cell(1, j, head).font = _HEAD
        ws.column_dimensions[get_column_letter(j)].width = width
    for i, fn in enumerate(catalogue.values(), start=2):
        _text(ws.cell(i, 1), fn.name)
        _text(ws.cell(i, 2), signature(fn))
        _text(ws.cell(i, 3), "text" if fn.returns_text else (fn.result_unit or "-"))
        _text(ws.cell(i, 4), fn.help)
        ws.cell(i, 4).alignment = _WRAP
        if fn.caution:
            _text(ws.cell(i, 5), fn.caution)
            ws.cell(i, 5).alignment = _WRAP


CONFIG_ROWS = (("UDF Modules", UDF_MODULE),)


def _config_sheet(ws) -> None:
    # The add-in reads keys from A1 downwards until the first empty cell, values
    # from column B; notes live in column D, out of its way.
    for i, (key, value) in enumerate(CONFIG_ROWS, start=1):
        ws.cell(i, 1, key)
        ws.cell(i, 2, value)
    ws.column_dimensions["A"].width = 16
    ws.column_dimensions["B"].width = 26
    ws["D1"] = ("Read by the xlwings add-in. Machine-specific settings (Interpreter_Win, "
                "Conda Path/Env) belong in the xlwings.conf file beside the workbook or in the "
                "ribbon, not here, so the workbook travels.")
