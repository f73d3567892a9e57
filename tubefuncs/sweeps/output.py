"""Outputs of a sweep: the table (Parquet, CSV, a workbook sheet when small) and
its summary (quantiles of each result, the fraction meeting the limits).

The table is streamed chunk by chunk from the chunk files into the outputs;
only the summary's quantiles read one result column whole (8 bytes a point).
"""

from __future__ import annotations

import json
import math
import os

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc
import pyarrow.csv as pacsv
import pyarrow.parquet as pq

from ..catalogue import lookup
from .study import Study


def _unit(study: Study, result) -> str:
    return result.unit or lookup(result.function).result_unit


def _meets(study: Study, table: pa.Table) -> tuple[np.ndarray, dict]:
    """Mask of rows meeting every limit (an error row meets none), and per result."""
    n = table.num_rows
    every = np.ones(n, dtype=bool)
    each = {}
    for name, (lo, hi) in study.limits.items():
        y = table.column(name).to_numpy(zero_copy_only=False).astype(float)
        ok = np.isfinite(y)
        with np.errstate(invalid="ignore"):
            if lo is not None:
                ok &= y >= lo
            if hi is not None:
                ok &= y <= hi
        each[name] = ok
        every &= ok
    return every, each


class _Counter:
    def __init__(self, study: Study):
        self.study = study
        self.rows = 0
        self.meeting = 0
        self.within = {name: 0 for name in study.limits}
        self.errors = {r.name: 0 for r in study.results}
        self.messages = {r.name: {} for r in study.results}

    def add(self, table: pa.Table) -> None:
        self.rows += table.num_rows
        every, each = _meets(self.study, table)
        self.meeting += int(every.sum())
        for name, ok in each.items():
            self.within[name] += int(ok.sum())
        for r in self.study.results:
            col = table.column(f"{r.name}_error")
            self.errors[r.name] += table.num_rows - col.null_count
            if col.null_count < table.num_rows:
                counts = pc.value_counts(col.drop_null()).to_pylist()
                seen = self.messages[r.name]
                for item in counts:
                    text = item["values"]
                    if text in seen or len(seen) < 5:
                        seen[text] = seen.get(text, 0) + item["counts"]


def _column_stats(study: Study, result, y: np.ndarray, counter: _Counter) -> dict:
    y = y[np.isfinite(y)]              # (the one copy; the quantiles then work in place)
    stats = {"unit": _unit(study, result), "function": result.function,
             "valid": int(y.size), "errors": counter.errors[result.name],
             "first_errors": counter.messages[result.name]}
    if y.size:
        stats.update(min=float(y.min()), max=float(y.max()), mean=float(y.mean()),
                     std=float(y.std(ddof=1)) if y.size > 1 else 0.0)
        qs = np.quantile(y, study.quantiles, overwrite_input=True)
        stats.update(quantiles={f"{q:g}": float(v) for q, v in zip(study.quantiles, qs)})
    if result.name in study.limits:
        lo, hi = study.limits[result.name]
        stats["limits"] = {"min": lo, "max": hi}
        stats["within_limits"] = counter.within[result.name] / max(counter.rows, 1)
    return stats


def _summary(study: Study, counter: _Counter, column) -> dict:
    out = {"points": counter.rows, "mode": study.mode,
           "seed": study.seed if study.mode == "sample" else None, "results": {}}
    for r in study.results:
        out["results"][r.name] = _column_stats(study, r, column(r.name), counter)
    if study.limits:
        out["meeting_all_limits"] = counter.meeting / max(counter.rows, 1)
        out["meeting_count"] = counter.meeting
    return out


def summarise(study: Study, tables: list[pa.Table]) -> dict:
    """Summary of results held in memory."""
    counter = _Counter(study)
    for t in tables:
        counter.add(t)

    def column(name):
        if not tables:
            return np.empty(0)
        return np.concatenate([t.column(name).to_numpy(zero_copy_only=False).astype(float)
                               for t in tables])
    return _summary(study, counter, column)


def summary_text(summary: dict) -> str:
    """The summary as a short plain-text table."""
    lines = [f"{summary['points']:,} points ({summary['mode']}"
             + (f", seed {summary['seed']}" if summary.get("seed") is not None else "") + ")"]
    for name, s in summary["results"].items():
        unit = f" [{s['unit']}]" if s["unit"] else ""
        lines.append(f"{name}{unit} = {s['function']}: {s['valid']:,} values, "
                     f"{s['errors']:,} error(s)")
        if "quantiles" in s:
            qs = "  ".join(f"q{k}={_g(v)}" for k, v in s["quantiles"].items())
            lines.append(f"  min={_g(s['min'])}  {qs}  max={_g(s['max'])}  "
                         f"mean={_g(s['mean'])}  std={_g(s['std'])}")
        if "within_limits" in s:
            lo, hi = s["limits"]["min"], s["limits"]["max"]
            lines.append(f"  within [{'' if lo is None else _g(lo)}, "
                         f"{'' if hi is None else _g(hi)}]: {100 * s['within_limits']:.2f}%")
        for text, count in list(s["first_errors"].items())[:3]:
            lines.append(f"  {count:,} x {text}")
    if "meeting_all_limits" in summary:
        lines.append(f"meeting every limit: {summary['meeting_count']:,} of "
                     f"{summary['points']:,} ({100 * summary['meeting_all_limits']:.2f}%)")
    return "\n".join(lines)


def _g(x) -> str:
    return f"{x:.6g}" if isinstance(x, float) and math.isfinite(x) else str(x)


def _chunk_file(folder: str, k: int) -> str:
    path = os.path.join(folder, "chunks", f"part-{k:06d}.parquet")
    failed = os.path.join(folder, "chunks", f"part-{k:06d}.failed.parquet")
    return failed if os.path.exists(failed) else path


def assemble(study: Study, folder: str, xlsx: bool | None = None) -> tuple[dict, dict]:
    """Stream the chunk files into the outputs; write the summary. Returns (files, summary)."""
    files = {"parquet": os.path.join(folder, "results.parquet"),
             "csv": os.path.join(folder, "results.csv"),
             "summary": os.path.join(folder, "summary.json"),
             "summary_text": os.path.join(folder, "summary.txt")}
    if xlsx is None:
        from .runner import XLSX_MAX_ROWS

        xlsx = study.n_points <= XLSX_MAX_ROWS
    tmp = {k: f"{v}.tmp" for k, v in files.items()}
    counter = _Counter(study)
    pw = cw = None
    try:
        for k in range(study.n_chunks):
            table = pq.read_table(_chunk_file(folder, k))
            if pw is None:
                pw = pq.ParquetWriter(tmp["parquet"], table.schema)
                cw = pacsv.CSVWriter(tmp["csv"], table.schema)
            table = table.cast(pw.schema)
            pw.write_table(table)
            cw.write_table(table)
            counter.add(table)
    finally:
        if pw is not None:
            pw.close()
            cw.close()
    os.replace(tmp["parquet"], files["parquet"])
    os.replace(tmp["csv"], files["csv"])
    pf = pq.ParquetFile(files["parquet"])

    def column(name):
        col = pf.read(columns=[name]).column(name)
        return col.to_numpy(zero_copy_only=False).astype(float, copy=False)

    summary = _summary(study, counter, column)
    with open(tmp["summary"], "w", encoding="utf-8") as fh:
        json.dump(summary, fh, indent=1)
    with open(tmp["summary_text"], "w", encoding="utf-8") as fh:
        fh.write(summary_text(summary) + "\n")
    os.replace(tmp["summary"], files["summary"])
    os.replace(tmp["summary_text"], files["summary_text"])
    if xlsx:
        files["xlsx"] = os.path.join(folder, "results.xlsx")
        write_xlsx(pf, summary, files["xlsx"])
    return files, summary


def write_xlsx(pf: pq.ParquetFile, summary: dict, path: str) -> None:
    """A workbook with the results sheet and the summary sheet (written atomically)."""
    from openpyxl import Workbook

    wb = Workbook(write_only=True)
    ws = wb.create_sheet("results")
    ws.append(pf.schema_arrow.names)
    for batch in pf.iter_batches(batch_size=5000):
        cols = [c.to_pylist() for c in batch.columns]
        for row in zip(*cols):
            ws.append(list(row))
    ss = wb.create_sheet("summary")
    for line in summary_text(summary).splitlines():
        ss.append([line])
    tmp = f"{path}.tmp.xlsx"
    wb.save(tmp)
    os.replace(tmp, path)
