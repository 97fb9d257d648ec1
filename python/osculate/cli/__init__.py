"""The ``osculate`` command line: ``demo``, ``analyze`` and ``summary``.

:func:`main` is the console script's entry point (``osculate = "osculate.cli:main"``); the data
commands are in ``_commands``, the reading and atomic writing of tables in ``_files``.
"""

from __future__ import annotations

import argparse
import contextlib
import inspect
import signal
import sys
import threading
import traceback
import warnings
from collections.abc import Iterator, Sequence
from pathlib import Path
from types import FrameType
from typing import Any, Optional

from .. import __version__
from .._estimators import METHODS
from ..diagnose import SuspectDataWarning
from ._commands import (
    CAUTION,
    CLI_METHOD,
    EXIT_FAILURE,
    EXIT_INPUT,
    EXIT_INTERRUPTED,
    EXIT_OK,
    analyze,
    auto_or_float,
    summarize,
)
from ._files import UsageError, WriteError

__all__ = ["main"]


def run_demo(out: Path) -> Any:
    """Run the demo scenarios and write the report folder (see :func:`osculate.report.run`)."""
    from ..report import run

    return run(out)


def _demo(args: argparse.Namespace) -> int:
    """``osculate demo``: the key figures on stdout, the report folder on disk."""
    from ..report import text_table

    rep = run_demo(args.out)
    print(text_table(rep.checks))
    if not rep.figures:
        print("osculate demo: no figures (they need matplotlib): pip install 'osculate[plot]'")
    if rep.removed:
        names = ", ".join(p.name for p in rep.removed)
        print(f"osculate demo: removed {len(rep.removed)} files of the previous run: {names}")
    took = f"{len(rep.files)} files in {rep.seconds:.1f} s"
    print(f"osculate demo: {took}, report written to {rep.report}")
    print(CAUTION)
    if not rep.passed:
        print("osculate demo: some estimates are outside their stated tolerance", file=sys.stderr)
        return 1
    return 0


# The methods of osculate.kinematics; "linear" (resample / fit only) has no curvature.
KINEMATICS_METHODS = tuple(m for m in METHODS if m != "linear")
EXIT_STATUS = (
    "Exit status: 0 done, 1 failure, 2 bad arguments or input, 130 interrupted (Ctrl-C), "
    "143 terminated (SIGTERM)."
)
ATOMIC_NOTE = (
    "Each output is written to a hidden .part file in its folder and renamed into place when "
    "complete: an interrupted run leaves an earlier output as it was."
)


class _Terminated(BaseException):
    """Raised by the SIGTERM / SIGHUP handler so that ``finally`` clauses remove temporary files.

    Parameters
    ----------
    signum : int
        The signal received; the exit status is 128 + ``signum``.
    """

    def __init__(self, signum: int) -> None:
        super().__init__(signum)
        self.signum = signum


def _default_method() -> str:
    """Return the default ``method`` of :func:`osculate.kinematics` (what the CLI passes on)."""
    from ..intrinsic import kinematics

    return str(inspect.signature(kinematics).parameters["method"].default)


def _add_data_commands(sub: Any) -> None:
    """Add the ``analyze`` and ``summary`` subcommands."""
    common = argparse.ArgumentParser(add_help=False)
    common.add_argument("file", help="input table: .csv or .parquet")
    common.add_argument(
        "--time", required=True, metavar="COL", help="time column (seconds or dates)"
    )
    where = common.add_mutually_exclusive_group(required=True)
    where.add_argument("--position", metavar="X,Y[,Z]", help="Cartesian position columns")
    where.add_argument(
        "--geodetic",
        metavar="LAT,LON[,ALT]",
        help="WGS 84 latitude, longitude (degrees) and ellipsoidal height (m) columns; each "
        "track becomes east-north-up metres about its first fix",
    )
    common.add_argument(
        "--origin", metavar="LAT,LON,H", help="one origin for all tracks (geodetic)"
    )
    common.add_argument("--track", metavar="COL", help="track id column (default: one track)")
    common.add_argument(
        "--method",
        choices=KINEMATICS_METHODS,
        help=f"derivative estimator, as in osculate.kinematics (default: {CLI_METHOD}; logs are "
        f"noisy, and finite differences ({_default_method()}, the Python default, meant for exact "
        "or simulated paths) turn their noise into accelerations of several g)",
    )
    common.add_argument("--order", type=int, help="finite-difference order")
    common.add_argument("--smoothing", type=float, help="smoothing parameter of the estimator")
    common.add_argument(
        "--min-speed", type=auto_or_float, help="slower samples are STOPPED (or 'auto')"
    )
    common.add_argument(
        "--min-curvature", type=auto_or_float, help="flatter samples are STRAIGHT (or 'auto')"
    )
    common.add_argument(
        "--gap-factor", type=float, help="time steps this many medians long are gaps"
    )
    common.add_argument("--up", metavar="X,Y,Z", help="axis of the signed curvature (3-D paths)")
    common.add_argument("-q", "--quiet", action="store_true", help="no progress bar, no messages")
    common.add_argument("--debug", action="store_true", help="show the traceback of an error")
    analyze = sub.add_parser(
        "analyze",
        parents=[common],
        help="per-sample kinematics of a table of tracks, written next to the input columns",
        description="Read a CSV or Parquet table, compute the kinematics of every track, write the "
        "input columns followed by the results. Error rows are counted from 0, header excluded. "
        f"{EXIT_STATUS}",
        epilog=f"Lateral acceleration, jerk and radius are indicative, not a safety assessment. "
        f"{ATOMIC_NOTE}",
    )
    analyze.add_argument("-o", "--output", required=True, help="output table: .csv or .parquet")
    analyze.add_argument("--columns", metavar="A,B,...", help="keep only these results")
    summary = sub.add_parser(
        "summary",
        parents=[common],
        help="one line per track: length, duration, speeds, accelerations, radius",
        description="Print one line per track, then the intervals where a track stood still. "
        f"Columns and units: osculate.SUMMARY_COLUMNS. {EXIT_STATUS}",
        epilog=ATOMIC_NOTE,
    )
    summary.add_argument("-o", "--output", help="also write the table (.csv or .parquet)")
    summary.add_argument("--stops", help="also write the stop intervals (.csv or .parquet)")
    summary.add_argument(
        "--turns",
        help="also write one row per turn (.csv or .parquet): direction, heading change, "
        "smallest radius (a circle through the turn's core), peak lateral acceleration, speeds",
    )
    summary.add_argument(
        "--speed-changes",
        help="also write one row per speed-up or slow-down above 0.5 length units/time unit² "
        "(.csv or .parquet)",
    )
    summary.add_argument(
        "--elements",
        help="also write the path's straights, circular arcs and transition spirals, one row "
        "each (.csv or .parquet): reconstructions from the log, not design values",
    )
    summary.add_argument(
        "--recompute",
        action="store_true",
        help="given an output of `osculate analyze`, compute the results again from the "
        "positions instead of summarising the columns it holds",
    )


def _print_warnings(command: str, caught: list[warnings.WarningMessage]) -> None:
    """Print data warnings as one line each on stderr (once each, whatever the chunking)."""
    seen = set()
    for w in caught:
        if not issubclass(w.category, SuspectDataWarning):
            warnings.showwarning(w.message, w.category, w.filename, w.lineno)
            continue
        text = " ".join(str(w.message).split())
        if text not in seen:
            seen.add(text)
            print(f"osculate {command}: warning: {text}", file=sys.stderr)


def _run_data_command(args: argparse.Namespace) -> int:
    """Run analyze / summary; map errors to one line on stderr and an exit status."""
    from .._core import InputError

    run = analyze if args.command == "analyze" else summarize
    try:
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always", SuspectDataWarning)
            try:
                return run(args)
            finally:
                _print_warnings(args.command, caught)
    except Exception as err:  # one line on stderr; --debug adds the traceback
        if isinstance(err, (UsageError, InputError, TypeError, KeyError, FileNotFoundError)):
            code, message = EXIT_INPUT, str(err)
        elif isinstance(err, (ImportError, WriteError)):
            code, message = EXIT_FAILURE, str(err)
        elif isinstance(err, MemoryError):
            code, message = EXIT_FAILURE, "out of memory (try fewer rows, or --columns)"
        else:  # a bug or the environment: the class name helps, unless it is a library's own
            library = type(err).__module__.split(".")[0] in ("pandas", "pyarrow")
            name = "" if library else f"{type(err).__name__}: "
            code, message = EXIT_FAILURE, f"unexpected {name}{err} (--debug shows the traceback)"
        if args.debug:
            traceback.print_exception(type(err), err, err.__traceback__)
    print(f"osculate {args.command}: error: {' '.join(message.split())}", file=sys.stderr)
    return code


@contextlib.contextmanager
def _signals_raise() -> Iterator[None]:
    """While the command runs, SIGTERM and SIGHUP raise :class:`_Terminated`.

    Python's default for them is to die at once, leaving temporary files behind; as exceptions
    they unwind through the writers' cleanup. The earlier handlers are restored afterwards (in the
    main thread only: elsewhere handlers cannot be set, and nothing is changed).
    """

    def handler(signum: int, frame: Optional[FrameType]) -> None:
        raise _Terminated(signum)

    previous: dict[int, Any] = {}
    try:
        if threading.current_thread() is threading.main_thread():
            for name in ("SIGTERM", "SIGHUP"):
                if hasattr(signal, name):
                    number = getattr(signal, name)
                    previous[number] = signal.signal(number, handler)
        yield
    finally:
        for number, old in previous.items():
            signal.signal(number, old)


def main(argv: Sequence[str] | None = None) -> int:
    """Entry point of the ``osculate`` console script."""
    parser = argparse.ArgumentParser(
        prog="osculate", description="Intrinsic kinematics of recorded paths."
    )
    parser.add_argument("--version", action="version", version=f"osculate {__version__}")
    sub = parser.add_subparsers(dest="command", required=True)
    demo = sub.add_parser(
        "demo",
        help="run the whole job on invented scenarios and write a report folder",
        description="Generate three invented scenarios with known ground truth (a survey drone's "
        "GPS log, an electric vehicle on a loop with clothoid bends, tracer particles in a "
        "vortex), estimate their kinematics, frames, resampled points, work and circulation, and "
        "write per-sample tables, a per-track summary, figures (with matplotlib) and report.md "
        "comparing every key figure with the truth. Exit status 1 if one is out of tolerance.",
    )
    demo.add_argument(
        "--out",
        type=Path,
        default=Path("osculate-report"),
        help="report folder (default: %(default)s)",
    )
    _add_data_commands(sub)
    args = parser.parse_args(argv)
    try:
        with _signals_raise():
            if args.command in ("analyze", "summary"):
                return _run_data_command(args)
            if args.command == "demo":
                return _demo(args)
            return EXIT_OK
    except KeyboardInterrupt:
        if getattr(args, "debug", False):
            traceback.print_exc()
        print(f"osculate {args.command}: interrupted", file=sys.stderr)
        return EXIT_INTERRUPTED
    except _Terminated as stop:
        print(
            f"osculate {args.command}: stopped by {signal.Signals(stop.signum).name}",
            file=sys.stderr,
        )
        return 128 + stop.signum
