"""``tubefuncs demo``: recalculate the bundled RF-station budget and print it.

Uses ``workbooks/station_budget.xlsx`` of a source checkout; an installed
package without it builds the same workbook (``demo_books.station_budget``)
in a temporary folder.  The budget is read through the workbook's named cells,
so the summary does not depend on the sheet's layout.
"""

from __future__ import annotations

import os
import tempfile

from . import values as V
from .run import recalculate, write_recalculated

CAUTIONS = (
    "High voltage: beam supplies and modulators store lethal energy; interlock and earth "
    "before any access.",
    "X-rays: the gun and collector emit X-rays when the beam is on; keep the shielding "
    "in place and survey it.",
    "RF: keep waveguide runs closed and interlocked; RF burns, and exposure above the limits "
    "injures.",
    "Cooling water runs under pressure near high voltage; a flow or temperature fault "
    "destroys a collector in seconds.",
    "These are design estimates, not ratings: defer to local codes, the tube maker's data "
    "sheet and licensed practice.",
)


def bundled_station_workbook(folder: str | None = None) -> str:
    here = os.path.dirname(os.path.abspath(__file__))
    checked_in = os.path.normpath(os.path.join(here, "..", "..", "workbooks",
                                               "station_budget.xlsx"))
    if os.path.exists(checked_in):
        return checked_in
    from .demo_books import station_budget

    path = os.path.join(folder or tempfile.mkdtemp(prefix="tubefuncs-demo-"),
                        "station_budget.xlsx")
    station_budget().save(path)
    return path


def _named(recalc, name: str):
    """Value of a single-cell defined name of the book (computed or constant)."""
    from .references import parse_area, split_sheet

    text = recalc.book.names.get((None, name.upper()))
    if text is None:
        raise KeyError(name)
    sheet_name, body = split_sheet(text.lstrip("="))
    sheet = recalc.book.sheet(sheet_name)
    area = parse_area(body.replace("$", ""), sheet.name)
    key = (sheet.index, area.r1, area.c1)
    if key in recalc.values:
        return recalc.values[key]
    return sheet.constants.get((area.r1, area.c1), V.EMPTY)


def _num(value, scale=1.0, digits=3) -> str:
    if isinstance(value, float):
        return f"{value / scale:,.{digits}f}"
    return V.display(value)


def summary_lines(recalc) -> list:
    n = lambda name: _named(recalc, name)  # noqa: E731
    flow, available = n("coolant_flow_lpm"), n("coolant_available_lpm")
    rows = [
        ("Beam voltage", _num(n("beam_voltage"), 1e3, 1), "kV"),
        ("Beam current", _num(n("beam_current"), 1, 1), "A"),
        ("Perveance", _num(n("perveance_uperv"), 1, 3), "uA/V^1.5"),
        ("Beam power (peak)", _num(n("beam_power_peak"), 1e6, 2), "MW"),
        ("RF output, saturated (peak)", _num(n("rf_output_peak"), 1e6, 2),
         "MW (large-signal model of the station tube)"),
        ("RF drive at saturation", _num(n("rf_drive"), 1, 0), "W"),
        ("Efficiency", _num(n("efficiency"), 0.01, 1), "%"),
        ("Fastest spent electrons", _num(n("spent_max_kev"), 1, 0),
         "keV: the collector's X-ray shielding must take them"),
        ("Waveguide run loss", _num(n("run_loss_db"), 1, 2), "dB"),
        ("Power at the structure (peak)", _num(n("structure_power"), 1e6, 2), "MW"),
        ("Average beam power", _num(n("average_beam_power"), 1e3, 2), "kW"),
        ("Collector dissipation, saturated drive", _num(n("collector_saturated"), 1e3, 2),
         "kW (average)"),
        ("Collector dissipation, no drive", _num(n("collector_no_drive"), 1e3, 2),
         "kW (average): size the collector for this"),
        (f"Collector water flow ({_num(n('coolant_rise_k'), 1, 0)} K rise)", _num(flow, 1, 1),
         f"L/min (available {_num(available, 1, 1)} L/min: {n('flow_check')})"),
    ]
    width = max(len(r[0]) for r in rows)
    vwidth = max(len(r[1]) for r in rows)
    return [f"  {label:<{width}}  {value:>{vwidth}} {unit}" for label, value, unit in rows]


def run_demo(output: str, out) -> int:
    with tempfile.TemporaryDirectory(prefix="tubefuncs-demo-") as tmp:
        book = bundled_station_workbook(tmp)
        recalc = recalculate(book)
        written = write_recalculated(recalc, output)
    print("Ulqathor test linac (fictional), RF station 3: budget recalculated headless by "
          "tubefuncs", file=out)
    print(f"  ({recalc.formula_cells} formula cells; workbook {os.path.basename(book)})",
          file=out)
    print("", file=out)
    for line in summary_lines(recalc):
        print(line, file=out)
    errors = [(k, v) for k, v in recalc.values.items() if V.is_error(v)]
    if errors:
        print("", file=out)
        print(f"  {len(errors)} cell(s) show an error value:", file=out)
        for key, value in errors[:10]:
            print(f"    {recalc.cell_name(key)}: {value} {recalc.messages.get(key, '')}",
                  file=out)
    print("", file=out)
    print("Safety:", file=out)
    for line in CAUTIONS:
        print(f"  - {line}", file=out)
    print("", file=out)
    print(f"Wrote the recalculated copy to {os.path.abspath(written)}", file=out)
    return 0
