"""Pictures of kinematics: paths, profiles, curvature diagrams, g-g diagrams, work.

Needs matplotlib: ``pip install 'osculate[plot]'``. Every function takes a :class:`Kinematics`
(or the DataFrame returned by ``df.osc.kinematics``), builds its own figure unless given an
``ax``, and returns a :class:`Plot` holding the matplotlib Figure and Axes; nothing here calls
``show()`` or touches pyplot's global state, so the functions are safe in scripts, servers and
notebooks (where a :class:`Plot` displays itself).

Units. Positions and times are taken as metres and seconds unless ``units`` says otherwise
(``units={"length": "km", "time": "h"}``, or a unit per quantity such as ``{"speed": "km/h"}``);
those are labels only, the data are not converted. With positions in metres, lengths (positions,
arc length, radius) are *shown* in the unit that keeps the ticks readable: millimetres when the
path's extent is below 0.5 m, kilometres above 50 km, else metres (``length_unit="auto"``; pass
``"mm"``, ``"m"``, ``"km"``, ... to choose). Only the tick labels change: the drawn data stay in
the caller's units, so curves added to the axes afterwards line up. Rates (speed, acceleration,
curvature) stay in the data's units. :func:`gg` needs SI accelerations since it divides by
standard gravity.

Cautions. Every figure that shows lateral (normal) acceleration, total acceleration, jerk or
radius of curvature carries :data:`CAUTION` in small muted type: such values estimated from
logged data are indicative, not a safety assessment. So does every curvature diagram (curvature
is one over the radius, the figure road and rail engineers judge an alignment by).
"""

from __future__ import annotations

try:
    import matplotlib  # noqa: F401
except ImportError as exc:  # pragma: no cover - depends on the environment
    raise ImportError(
        "osculate.plot needs matplotlib; install it with: pip install 'osculate[plot]'"
    ) from exc

# Besides __all__, the documented constants are re-exported ("X as X"): the flags gg draws hollow,
# the quantities that bring the caution, the bands' half-width, the length units, element legends.
from ._curvature import curvature
from ._elements import ELEMENT_TEXT as ELEMENT_TEXT
from ._figure import CAUTION, LIMITS_CAUTION, Plot
from ._figure import CAUTIONED as CAUTIONED
from ._gg import GG_DOUBTFUL as GG_DOUBTFUL
from ._gg import STANDARD_GRAVITY, gg
from ._layers import BAND_Z as BAND_Z
from ._path import path
from ._profile import profile
from ._units import LENGTH_UNITS as LENGTH_UNITS
from ._work import work

__all__ = [
    "CAUTION",
    "LIMITS_CAUTION",
    "STANDARD_GRAVITY",
    "Plot",
    "curvature",
    "gg",
    "path",
    "profile",
    "work",
]
