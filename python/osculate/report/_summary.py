"""The per-track summary of every scenario: the unit of each column, the table of report.md."""

from __future__ import annotations

import re

import numpy as np

from ..summary import COLUMNS as SUMMARY_COLUMNS

__all__ = [
    "DEMO_LENGTH",
    "DEMO_TIME",
    "FIT_INFO_UNITS",
    "LABEL_COLUMNS",
    "SUMMARY_SHOWN",
    "summary_table",
    "summary_units",
]

#: Units of the demo's input: every scenario is in metres and seconds (the drone after
#: ``geodetic_to_enu``), so "L" and "T" of ``osculate.SUMMARY_COLUMNS`` are m and s.
DEMO_LENGTH, DEMO_TIME = "m", "s"
#: Units of the entries of ``Kinematics.fit_info`` that the summary appends after the columns of
#: ``osculate.SUMMARY_COLUMNS`` (from the ``fit_info`` documentation of ``osculate.Kinematics``).
FIT_INFO_UNITS = {
    "smoothing": "1",  # dimensionless λ*
    "edf": "1",  # effective degrees of freedom
    "criterion": "L²",  # GCV score or unbiased risk: a mean squared position residual
    "window": "samples or T",  # "local": samples (window) or a time span (window_span)
    "length_error": "L",
    "jerk_smoothing": "1",  # dimensionless λ* of the fit r‴ comes from
    "bandwidth": "samples",  # of the smoothing spline's equivalent kernel
}
LABEL_COLUMNS = ("scenario", "track")  # no unit
_UNIT_HEAD = re.compile(r"1|rad|[LT][²³]?(?:/T[²³]?)?")
_LT = re.compile(r"(?<![A-Za-z])[LT](?![A-Za-z])")


def summary_units(
    columns: list[str], length: str = DEMO_LENGTH, time: str = DEMO_TIME
) -> dict[str, str]:
    """Return the unit of each summary column, with the input's length and time units filled in.

    Parameters
    ----------
    columns : list of str
        Column names of a per-track summary (``Kinematics.summary_arrays`` and a ``scenario``
        label).
    length, time : str
        The input's length and time units, for "L" and "T" of ``osculate.SUMMARY_COLUMNS``.

    Returns
    -------
    dict of str to str
        Column → unit: read from the start of the column's description in
        ``osculate.SUMMARY_COLUMNS`` (``"count"`` for numbers of rows or intervals), from
        :data:`FIT_INFO_UNITS` for the fit information, empty for the labels ``scenario`` and
        ``track`` and for a column of unknown unit.

    Examples
    --------
    >>> summary_units(["track", "length", "max_accel_normal", "samples", "smoothing"])
    {'track': '', 'length': 'm', 'max_accel_normal': 'm/s²', 'samples': 'count', 'smoothing': '1'}
    """
    units: dict[str, str] = {}
    for name in columns:  # a few dozen columns
        unit = ""
        if name in SUMMARY_COLUMNS:
            head = SUMMARY_COLUMNS[name].split(",", 1)[0].strip()
            if _UNIT_HEAD.fullmatch(head):
                unit = head
            elif head.startswith(("rows", "samples", "number")):
                unit = "count"
        elif name not in LABEL_COLUMNS:
            unit = FIT_INFO_UNITS.get(name, "")
        units[name] = _LT.sub(lambda m: length if m.group() == "L" else time, unit)
    return units


#: The summary columns shown in report.md (summary.csv has them all).
SUMMARY_SHOWN = (
    "samples",
    "length",
    "duration",
    "mean_speed",
    "max_speed",
    "max_accel_normal",
    "min_radius",
    "turning_angle",
    "stops",
    "stopped_time",
)


def summary_table(summary: dict[str, np.ndarray], units: dict[str, str], many: str) -> str:
    """Markdown table of a few summary columns, a units row under the header.

    Tracks of the scenario ``many`` are shown as one row of medians over its tracks.
    """
    few = summary["scenario"] != many
    cells = [summary["scenario"][few].astype(str), summary["track"][few].astype(str)]
    medians = [many, f"median of {int(np.sum(~few))} tracks"]
    for name in SUMMARY_SHOWN:  # a few columns
        values = np.asarray(summary[name], dtype=float)
        cells.append(np.char.mod("%.5g", values[few]))
        medians.append(f"{np.nanmedian(values[~few]):.5g}" if np.any(~few) else "")
    body = cells[0]
    for column in cells[1:]:  # a few columns; each row's cells joined at once
        body = np.char.add(np.char.add(body, " | "), column)
    header = ("scenario", "track", *SUMMARY_SHOWN)
    rows = [
        "| " + " | ".join(header) + " |",
        "|" + "---|" * len(header),
        "| *unit* | | " + " | ".join(units[n] for n in SUMMARY_SHOWN) + " |",
        *(f"| {line} |" for line in body.tolist()),  # a few rows of text
        "| " + " | ".join(medians) + " |",
    ]
    return "\n".join(rows)
