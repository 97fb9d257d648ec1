"""osculate: intrinsic kinematics of recorded paths.

Speed, arc length, the Frenet frame, curvature, torsion, the tangential / normal split of
acceleration and turn rate of measured trajectories, one track or thousands, with Rust kernels.
"""

from __future__ import annotations

from . import _pandas_hook
from ._core import InputError, __version__
from .diagnose import SuspectDataWarning
from .elements import Elements, elements
from .field import GridField
from .flags import Flag
from .geodesy import enu_to_geodetic, geodetic_to_enu
from .intrinsic import (
    Derivatives,
    Frames,
    Kinematics,
    arclength,
    derivatives,
    frames,
    kinematics,
)
from .lineint import LineIntegral, line_integral, power, work
from .paths import Path, fit
from .reparam import Resampled, resample
from .stops import Stops
from .summary import COLUMNS as SUMMARY_COLUMNS
from .turns import SpeedChanges, Turns

# The DataFrame.osc accessor: registered now if pandas is imported, else as soon as it is;
# ``import osculate`` itself does not import pandas (see _pandas_hook).
_pandas_hook.install()

__all__ = [
    "SUMMARY_COLUMNS",
    "Derivatives",
    "Elements",
    "Flag",
    "Frames",
    "GridField",
    "InputError",
    "Kinematics",
    "LineIntegral",
    "Path",
    "Resampled",
    "SpeedChanges",
    "Stops",
    "SuspectDataWarning",
    "Turns",
    "__version__",
    "arclength",
    "derivatives",
    "elements",
    "enu_to_geodetic",
    "fit",
    "frames",
    "geodetic_to_enu",
    "kinematics",
    "line_integral",
    "power",
    "resample",
    "work",
]

# Optional submodules that need an extra, imported on first use: ``osculate.dask`` needs
# ``pip install 'osculate[dask]'``, ``osculate.plot`` needs ``pip install 'osculate[plot]'``,
# ``osculate.accessor`` (imported by itself once pandas is) needs ``'osculate[pandas]'``.
_LAZY_SUBMODULES = ("accessor", "dask", "plot")


def __getattr__(name: str) -> object:
    if name in _LAZY_SUBMODULES:
        import importlib

        return importlib.import_module(f".{name}", __name__)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
