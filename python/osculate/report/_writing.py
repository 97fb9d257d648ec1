"""Writing the report folder: the sections, the summary, report.md and the manifest."""

from __future__ import annotations

import json
from typing import Any, Optional

import numpy as np

from ._checks import Check, Report, Section
from ._drone import drone_section
from ._figures import DEMO_LIMIT
from ._summary import DEMO_LENGTH, DEMO_TIME, summary_table, summary_units
from ._tables import write_csv
from ._tracers import tracers_section
from ._vehicle import vehicle_section

__all__ = ["CAUTION", "MANIFEST", "run"]

CAUTION = (
    "Values are indicative. Lateral acceleration, jerk and radius estimated from logged data are "
    "not a safety assessment: local codes and licensed engineers decide whether a road, track, "
    "ride or vehicle is acceptable."
)
#: The list of files a run wrote, read by the next run into the same folder.
MANIFEST = "manifest.json"


def _plain(name: str) -> bool:
    """Whether ``name`` is a bare file name (no folder part): all a manifest may delete."""
    import pathlib

    return (
        name not in ("", ".", "..")
        and "/" not in name
        and "\\" not in name
        and pathlib.PurePath(name).name == name
    )


def _previous_files(folder: Any) -> set[str]:
    """Names of the files the previous run into ``folder`` wrote (empty without a manifest)."""
    try:
        data = json.loads((folder / MANIFEST).read_text(encoding="utf-8"))
        names = data["files"] if isinstance(data, dict) else []
    except (OSError, ValueError, KeyError):
        return set()
    if not isinstance(names, list):
        return set()
    return {n for n in names if isinstance(n, str) and _plain(n)}


_DESCRIPTIONS = {
    "drone_samples": "the survey drone's per-sample estimates (east, north, up in metres) with the "
    "true speed and curvature",
    "ev_samples": "the electric vehicle's per-sample estimates with its lap (1 to 3), the logged "
    "force, power, cumulative work, and the true speed, curvature and cumulative work",
    "ev_resampled": "points every metre along each lap, with the force",
    "tracers_samples": "the tracer particles' per-sample estimates (track: particle id) with the "
    "true speed",
    "summary": "one row per track of every scenario",
    "summary_units": "the unit of every column of `summary.csv`",
    "checks": "the key figures: estimate, truth, signed error, tolerance",
    "report": "this report",
    "manifest": "the files this run wrote, so that the next run into this folder removes those "
    "it does not write again",
}


def _listing(names: list[str], captions: dict[str, str]) -> str:
    """Markdown list of the files, each a link with what it holds (a figure: its number)."""
    lines = []
    for name in names:  # a few files
        what = captions.get(name) or _DESCRIPTIONS.get(name.split(".")[0], "")
        lines.append(f"- [`{name}`]({name}): {what}" if what else f"- [`{name}`]({name})")
    return "\n".join(lines)


def run(out: Any, *, figures: Optional[bool] = None) -> Report:
    """Run the whole job on the three scenarios and write the report folder.

    Parameters
    ----------
    out : path-like
        The report folder (created if needed).
    figures : bool, optional
        Draw the PNG figures; by default when matplotlib is importable.

    Returns
    -------
    Report
        The files written, the files of a previous run removed, the key figures and the run
        time.

    Notes
    -----
    Writes ``report.md`` (the figures embedded); per-sample results ``drone_samples``,
    ``ev_samples``, ``tracers_samples`` and the resampled laps ``ev_resampled`` (Parquet with
    pyarrow, else CSV); ``summary.csv`` (one row per track of every scenario) and
    ``summary_units.json`` (the unit of each of its columns); ``checks.csv`` (the key figures);
    with matplotlib, the PNG figures; and ``manifest.json``, the list of these files.

    A run into a folder that holds a previous run's ``manifest.json`` deletes the files listed
    there that it did not write again (e.g. the figures, when this run draws none); it touches
    no other file of the folder.

    Examples
    --------
    >>> import tempfile, pathlib
    >>> from osculate.report import run
    >>> with tempfile.TemporaryDirectory() as tmp:
    ...     rep = run(pathlib.Path(tmp), figures=False)
    ...     rep.passed, rep.report.name, sorted(c.scenario for c in rep.checks)[0]
    (True, 'report.md', 'electric vehicle')
    """
    import pathlib
    import time

    from .. import __version__

    started = time.perf_counter()
    folder = pathlib.Path(out)
    folder.mkdir(parents=True, exist_ok=True)
    previous = _previous_files(folder)
    asked = figures
    if figures is None:
        try:
            import matplotlib  # noqa: F401
        except ImportError:
            figures = False
        else:
            figures = True
    files: list[Any] = []
    checks: list[Check] = []
    sections: list[Section] = []
    for part in (drone_section, vehicle_section, tracers_section):  # three scenarios
        section = part(folder, figures, files)
        checks += section.checks
        sections.append(section)
    # One row per track of every scenario: the summary of the kinematics each section reports.
    scenarios = ("survey drone", "electric vehicle", "tracer particles")
    rows: dict[str, list[np.ndarray]] = {}
    for scenario, section in zip(scenarios, sections):  # three scenarios
        arrays = section.kinematics.summary_arrays()
        rows.setdefault("scenario", []).append(np.full(len(arrays["track"]), scenario))
        for key, value in arrays.items():
            rows.setdefault(key, []).append(np.asarray(value))
    summary = {key: np.concatenate(v) for key, v in rows.items()}
    units = summary_units(list(summary))
    files.append(write_csv(folder / "summary.csv", summary))
    units_file = folder / "summary_units.json"
    units_file.write_text(json.dumps(units, ensure_ascii=False, indent=1) + "\n", "utf-8")
    files.append(units_file)
    files.append(
        write_csv(
            folder / "checks.csv",
            {
                "scenario": np.array([c.scenario for c in checks]),
                "figure": np.array([c.name for c in checks]),
                "unit": np.array([c.unit for c in checks]),
                "estimated": np.array([c.estimated for c in checks]),
                "true": np.array([c.true for c in checks]),
                "error": np.array([c.error for c in checks]),
                "tolerance": np.array([c.tolerance for c in checks]),
                "relative": np.array([c.relative for c in checks]),
                "within": np.array([c.passed for c in checks]),
            },
        )
    )
    report = folder / "report.md"
    manifest = folder / MANIFEST
    names = [p.name for p in [*files, report, manifest]]
    stale = sorted(previous - set(names))
    seconds = time.perf_counter() - started
    if figures:
        plots = (
            "The figures follow each scenario's key figures, the ground truth dashed wherever "
            "the scenario knows it."
        )
    elif asked is None:
        plots = "No figures: they need matplotlib, `pip install 'osculate[plot]'`."
    else:
        plots = "No figures: this run was asked not to draw them (`figures=False`)."
    verdict = (
        "Every key figure is within its stated tolerance."
        if all(c.passed for c in checks)
        else "SOME KEY FIGURES ARE OUTSIDE THEIR TOLERANCE (marked NO)."
    )
    body = []
    captions: dict[str, str] = {}
    for section in sections:  # three scenarios, a few figures each
        body.append(section.text)
        for fig in section.figures:
            captions[fig.path.name] = f"Figure {len(captions) + 1}"
            number = captions[fig.path.name]
            body.append(f"![{fig.caption}]({fig.path.name})\n\n*{number}. {fig.caption}*\n")
    cleanup = (
        "\n\nThis run removed the files of an earlier run into this folder that it did not write "
        f"again: {', '.join(f'`{n}`' for n in stale)}."
        if stale
        else ""
    )
    reference = (
        "- Reference values drawn on a figure are the caller's, each named with its source; this "
        f"demo's\n  only one ({DEMO_LIMIT[0]} g) is invented and comes from no code or standard.\n"
        if figures
        else ""
    )
    report.write_text(
        f"""# osculate demo report

Written by `osculate demo` (osculate {__version__}) in {seconds:.1f} s. The three scenarios are
invented: generated by `osculate.demo` with fixed seeds, so the ground truth is known exactly and
every estimate below is compared with it. {verdict}
{plots}

The key-figure tables give each estimate, the truth, the error and the tolerance. The error is
signed and relative, (estimated − true) / true, so −1 % means the estimate falls 1 % short of the
truth in size; figures that are themselves error percentages (the tracer particles' first two)
give the difference estimated − true instead.

{chr(10).join(body)}
## Per-track summary

`summary.csv` has one row per track of every scenario (the survey drone's one track, the electric
vehicle's laps 1 to 3, the tracer particles by id) with every column of `osculate.SUMMARY_COLUMNS`
and then the smoothing spline's fit information; it summarizes the kinematics each section above
reports on.

Units: `osculate.SUMMARY_COLUMNS` gives every column's unit in the input's length and time units,
L and T. The three scenarios are given in metres and seconds (the drone after
`osc.geodetic_to_enu`), so here L = {DEMO_LENGTH} and T = {DEMO_TIME}. `summary_units.json` maps
each column of `summary.csv` to its unit so read: `count` for numbers of rows or intervals, `1`
for dimensionless numbers, `samples` for a width in samples, empty for the labels `scenario` and
`track`. The table shows a few of the columns, with their units in the row under the header; the
tracer particles' row holds the median of each column over the tracks.

{summary_table(summary, units, "tracer particles")}

## Files

{_listing(names, captions)}

Per-sample tables hold the estimates on the logged rows (`flags` are bits of `osculate.Flag`:
1 STOPPED, 2 STRAIGHT, 4 EDGE, 8 GAP, 16 INVALID, 32 VAGUE) and, for comparison, the truth. In
`checks.csv` the `error` and `tolerance` of a relative check are fractions (0.01 is 1 %).{cleanup}

## Cautions

- {CAUTION}
{reference}- Smoothing trades noise for bias: corners of curvature (a straight meeting a circle) are
  rounded off over the smoothing bandwidth, and estimates within about one bandwidth of a track's
  ends (EDGE) are less accurate. Check estimates against the raw path before trusting them.
""",
        encoding="utf-8",
    )
    files.append(report)
    removed = []
    for name in stale:  # the previous run's few files
        path = folder / name
        if path.is_symlink() or path.is_file():
            path.unlink(missing_ok=True)
            removed.append(path)
    manifest.write_text(
        json.dumps({"written_by": "osculate demo", "files": names}, indent=1) + "\n", "utf-8"
    )
    files.append(manifest)
    return Report(folder, report, files, checks, seconds, bool(figures), removed)
