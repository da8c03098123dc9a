"""Writing line-list results: per-line rows, failed rows and a totals row to CSV, atomically and formula-safe."""
from __future__ import annotations

import csv
import io
from typing import TYPE_CHECKING

import numpy as np

from .files import write_atomic
from .linelist_read import csv_cell, inert_cells
from .units import from_si

if TYPE_CHECKING:
    from .linelist import LineListResult

__all__ = ["OUTPUT_COLUMNS", "write_results_csv"]


#: Output columns after ``row, tag, status``: header (unit in brackets), attribute, display unit.
OUTPUT_COLUMNS = (
    ("location", "location", None), ("layers", "layer_count", None), ("length[m]", "length", None),
    ("equivalent_length[m]", "equivalent_length", None), ("outer_diameter[mm]", "outer_diameter", ("length", "mm")),
    *((f"{name}[degC]", name, ("temperature", "degC"))
      for name in ("fluid_temperature", "air_temperature", "surface_temperature", "dew_point")),
    ("q_per_length[W/m]", "q_per_length", None), ("q_total[W]", "q_total", None),
    ("bare_fittings_heat[W]", "bare_fittings_heat", None),
    ("heat_lost[W]", "q_lost", None), ("heat_gained[W]", "q_gained", None),
    ("operating_hours[h]", "operating_hours", None), ("annual_heat[kWh]", "heat_kwh", None),
    ("annual_heat_lost[kWh]", "heat_lost_kwh", None), ("annual_heat_gained[kWh]", "heat_gained_kwh", None),
    ("purchased_energy[kWh]", "purchased_kwh", None), ("cost", "cost", None), ("co2[kg]", "co2_kg", None),
    ("touch_flag", "touch_flag", None), ("condensation_flag", "condensation_flag", None),
    ("outlet_temperature[degC]", "outlet_temperature", ("temperature", "degC")),
    ("freezing_position[m]", "freezing_position", None),
    ("tracing_duty[W/m]", "tracing_duty_per_length", None), ("tracing_duty_total[W]", "tracing_duty", None),
    ("condensate[kg/h]", "condensate", ("mass_flow", "kg/h")),
    ("cool_down_time[h]", "cool_down_time", ("time", "h")), ("warm_up_condensate[kg]", "warm_up_condensate", None),
)


def write_results_csv(result: LineListResult, path) -> None:
    """Write per-line results, failed rows and a totals row to CSV atomically (:func:`convlib.files.write_atomic`).

    Text cells starting with ``=``, ``+``, ``-``, ``@``, tab or CR (tags, notes, reasons quoting a cell)
    are written with a leading ``'`` so that a spreadsheet shows them instead of running them as formulas;
    numbers in the numeric columns stay numbers (``-12.5``).

    Columns: ``row, tag, status`` (``ok`` or ``error``), :data:`OUTPUT_COLUMNS` (units in brackets
    as in the input; temperatures in degC; ``annual_heat`` is ``heat_kwh``, ``co2`` is ``co2_kg``)
    and ``notes`` (warnings, or why a row failed). Rows in file order; the last row has ``row`` =
    ``TOTAL``, the sums of the summed columns and the number of flagged lines in the flag columns.
    Heat is never netted across lines: the TOTAL row leaves the signed ``q_total`` and ``annual_heat``
    empty and sums ``heat_lost`` (hot lines) and ``heat_gained`` (cold lines) separately; its notes carry
    :attr:`LineListResult.warnings`.
    """
    columns = [getattr(result, a) if conv is None else from_si(np.asarray(getattr(result, a), dtype=float), *conv)
               for _, a, conv in OUTPUT_COLUMNS]  # whole columns converted at once
    body = [(int(r), [str(r), t, "ok", *(csv_cell(c[i]) for c in columns), result.notes[i]])
            for i, (r, t) in enumerate(zip(result.row, result.tag))]
    body += [(e.row, [str(e.row), e.tag, "error", *[""] * len(OUTPUT_COLUMNS), e.reason]) for e in result.errors]
    from .linelist import SUMMED  # the result's own module (it imports this one)

    totals = result.totals
    total = ["TOTAL", f"{len(result)} lines", "totals"]
    for _, attribute, _ in OUTPUT_COLUMNS:
        total.append(csv_cell(totals[attribute]) if attribute in SUMMED else
                     str(totals[attribute + "s"]) if attribute.endswith("_flag") else "")
    total.append(" ".join([f"sums over the {len(result)} computed lines; {len(result.errors)} row(s) with errors not "
                           f"included; heat lost by hot lines and gained by cold lines summed apart, never netted; "
                           f"flag columns count flagged lines (flags for review, not verdicts).", *result.warnings]))
    text = io.StringIO(newline="")
    writer = csv.writer(text)
    writer.writerow(["row", "tag", "status", *(c[0] for c in OUTPUT_COLUMNS), "notes"])
    numeric = [False, False, False, *(True for _ in OUTPUT_COLUMNS), False]
    for _, cells in sorted(body, key=lambda b: b[0]):
        writer.writerow(inert_cells(cells, numeric))
    writer.writerow(inert_cells(total, numeric))
    write_atomic(path, text.getvalue().encode("utf-8"))
