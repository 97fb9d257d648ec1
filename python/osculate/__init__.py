"""osculate: intrinsic kinematics of recorded paths.

Speed, arc length, the Frenet frame, curvature, torsion, the tangential / normal split of
acceleration and turn rate of measured trajectories, one track or thousands, with Rust kernels.
"""

from __future__ import annotations

from ._core import InputError, __version__
from .flags import Flag
from .intrinsic import Derivatives, Kinematics, arclength, derivatives, kinematics

__all__ = [
    "Derivatives",
    "Flag",
    "InputError",
    "Kinematics",
    "__version__",
    "arclength",
    "derivatives",
    "kinematics",
]
