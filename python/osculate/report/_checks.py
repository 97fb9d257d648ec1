"""Key figures: an estimate against the scenario's truth, and the tables that show them."""

from __future__ import annotations

import dataclasses
from typing import Any

import numpy as np

from ._figures import Figure

__all__ = ["TABLE_HEADER", "Check", "Report", "Section", "check_table", "text_table"]


@dataclasses.dataclass(frozen=True)
class Check:
    """One key figure of the demo: an estimate against the scenario's ground truth.

    Attributes
    ----------
    scenario, name, unit : str
        Where, what, and in which unit.
    estimated, true : float
        The estimate and the ground truth of the generator.
    tolerance : float
        Allowed relative error (``relative=True``) or absolute difference.
    relative : bool
        Whether ``tolerance`` is relative to ``true``.
    """

    scenario: str
    name: str
    unit: str
    estimated: float
    true: float
    tolerance: float
    relative: bool = True

    @property
    def error(self) -> float:
        """Signed relative error (estimated − true) / true, or estimated − true if not relative.

        A negative relative error means the estimate falls short of the truth in proportion
        (it is ``estimated / true − 1``, also when the truth is negative).
        """
        diff = self.estimated - self.true
        return diff / self.true if self.relative else diff

    @property
    def passed(self) -> bool:
        """Whether the estimate is within the tolerance."""
        return bool(np.isfinite(self.error) and abs(self.error) <= self.tolerance)

    def cells(self) -> tuple[str, str, str, str, str]:
        """Return the estimate, truth, error, tolerance and verdict as report text.

        Returns
        -------
        tuple of str
            ``(estimated, true, error, tolerance, within)``, with units; a relative error and
            tolerance in percent.

        Examples
        --------
        >>> Check("s", "x", "m", estimated=29.7, true=30.0, tolerance=0.02).cells()
        ('29.7 m', '30 m', '-1.00 %', '2 %', 'yes')
        """
        if self.relative:
            err, tol = f"{100 * self.error:+.2f} %", f"{100 * self.tolerance:g} %"
        else:
            err, tol = f"{self.error:+.3g} {self.unit}", f"{self.tolerance:g} {self.unit}"
        return (
            f"{_fmt(self.estimated)} {self.unit}",
            f"{_fmt(self.true)} {self.unit}",
            err,
            tol,
            "yes" if self.passed else "NO",
        )


@dataclasses.dataclass(frozen=True)
class Report:
    """What :func:`run` wrote.

    Attributes
    ----------
    folder, report : pathlib.Path
        The report folder and its ``report.md``.
    files : list of pathlib.Path
        Every file written.
    checks : list of Check
        The key figures.
    seconds : float
        Wall time of the run.
    figures : bool
        Whether PNG figures were drawn (matplotlib present).
    removed : list of pathlib.Path
        Files of a previous run into the folder that this run did not write again, deleted.
    """

    folder: Any
    report: Any
    files: list[Any]
    checks: list[Check]
    seconds: float
    figures: bool
    removed: list[Any] = dataclasses.field(default_factory=list)

    @property
    def passed(self) -> bool:
        """Whether every key figure is within its tolerance."""
        return all(c.passed for c in self.checks)


def _fmt(x: float) -> str:
    return f"{x:.5g}"


@dataclasses.dataclass(frozen=True)
class Section:
    """What one scenario adds to the report."""

    checks: list[Check]
    text: str
    kinematics: Any  # the Kinematics whose per-track summary goes to summary.csv
    figures: list[Figure]


TABLE_HEADER = ("key figure", "estimated", "true", "error", "tolerance", "within")


def check_table(checks: list[Check]) -> str:
    rows = ["| " + " | ".join(TABLE_HEADER) + " |", "|---|---|---|---|---|---|"]
    rows += [f"| {c.name} | " + " | ".join(c.cells()) + " |" for c in checks]  # a few figures
    return "\n".join(rows)


def text_table(checks: list[Check]) -> str:
    """Return the key figures as a plain-text table with a header row, columns aligned.

    Parameters
    ----------
    checks : list of Check
        The key figures.

    Returns
    -------
    str
        A header row, a rule, then one row per key figure: the scenario and the figure's name
        left-aligned, the numbers and the verdict right-aligned.

    Examples
    --------
    >>> print(text_table([Check("drone", "radius", "m", 29.7, 30.0, 0.02)]))
    scenario  key figure  estimated  true    error  tolerance  within
    --------  ----------  ---------  ----  -------  ---------  ------
    drone     radius         29.7 m  30 m  -1.00 %        2 %     yes
    """
    header = ("scenario", *TABLE_HEADER)
    rows = [(c.scenario, c.name, *c.cells()) for c in checks]  # a few key figures
    widths = [max(len(r[j]) for r in [header, *rows]) for j in range(len(header))]

    def line(cells: tuple[str, ...]) -> str:
        left = [cells[j].ljust(widths[j]) for j in range(2)]
        right = [cells[j].rjust(widths[j]) for j in range(2, len(cells))]
        return "  ".join(left + right)

    return "\n".join([line(header), line(tuple("-" * w for w in widths)), *map(line, rows)])
