"""The ``osculate demo`` report: every demo scenario through the whole job, estimates against truth.

:func:`run` computes kinematics with smoothing, frames, resampling, work and summaries on the
invented scenarios of :mod:`osculate.demo`, checks each key figure against the scenario's ground
truth, and writes per-sample tables, a per-track summary, the figures (with matplotlib) and
``report.md`` to a folder. A second run into the same folder removes the files of the first that
it does not write again (and nothing else), by the list of files the first left in
``manifest.json``.
"""

from __future__ import annotations

from ._checks import TABLE_HEADER as TABLE_HEADER
from ._checks import Check, Report, text_table
from ._figures import DEMO_LIMIT as DEMO_LIMIT
from ._summary import DEMO_LENGTH as DEMO_LENGTH
from ._summary import DEMO_TIME as DEMO_TIME
from ._summary import FIT_INFO_UNITS as FIT_INFO_UNITS
from ._summary import LABEL_COLUMNS as LABEL_COLUMNS
from ._summary import SUMMARY_SHOWN as SUMMARY_SHOWN
from ._summary import summary_units
from ._writing import CAUTION, MANIFEST, run

__all__ = ["CAUTION", "MANIFEST", "Check", "Report", "run", "summary_units", "text_table"]
