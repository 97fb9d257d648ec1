# Type stubs of the compiled extension module. Arrays are validated by the Python layer first.
from typing import Any, final

import numpy as np
import numpy.typing as npt

__version__: str
KINEMATICS_OUTPUTS: list[str]
ESTIMATOR_METHODS: list[str]
__all__ = [
    "ESTIMATOR_METHODS",
    "KINEMATICS_OUTPUTS",
    "FittedPaths",
    "InputError",
    "__version__",
    "check_estimator_options",
    "enu_to_geodetic",
    "find_elements",
    "find_speed_changes",
    "find_stops",
    "find_turns",
    "fit_paths",
    "fresnel",
    "geodetic_to_enu",
    "grid_eval",
    "group_rows",
    "kinematics",
    "line_integral_grid",
    "line_integral_sampled",
    "line_integral_values",
    "line_power",
    "polyline_arclength",
    "segment_nodes",
    "summarize",
    "take_rows",
]

class InputError(ValueError):
    argument: str
    track: int | None
    row: int | None
    detail: str

def group_rows(
    codes: npt.NDArray[np.int64],
    n_tracks: int,
    key: npt.NDArray[np.float64] | npt.NDArray[np.int64] | None = None,
) -> tuple[npt.NDArray[np.uintp] | None, npt.NDArray[np.uintp] | None, npt.NDArray[np.uintp]]: ...
def take_rows(a: npt.NDArray[Any], index: npt.NDArray[np.uintp]) -> npt.NDArray[Any]: ...
def kinematics(
    t: npt.NDArray[np.float64],
    positions: npt.NDArray[np.float64],
    offsets: npt.NDArray[np.int64],
    *,
    estimator: dict[str, Any],
    options: dict[str, Any] | None = None,
    min_stop: float | None = None,
    frame: str = "frenet",
    initial: tuple[float, float, float] | None = None,
    weights: npt.NDArray[np.float64] | None = None,
    order: npt.NDArray[np.uintp] | None = None,
    inverse: npt.NDArray[np.uintp] | None = None,
    t_kernel: bool = False,
    out: dict[str, npt.NDArray[np.float64]] | None = None,
    uncertainty: str | None = None,
) -> dict[str, Any]: ...
def find_turns(
    t: npt.NDArray[np.float64],
    s: npt.NDArray[np.float64],
    curvature: npt.NDArray[np.float64],
    curvature_se: npt.NDArray[np.float64] | None,
    speed: npt.NDArray[np.float64],
    accel_normal: npt.NDArray[np.float64],
    accel_tangential: npt.NDArray[np.float64],
    flags: npt.NDArray[np.uint8],
    xy: npt.NDArray[np.float64],
    vxy: npt.NDArray[np.float64],
    offsets: npt.NDArray[np.int64],
    *,
    z_on: float = 3.0,
    z_off: float = 1.0,
    min_curvature: float = 1e-6,
    merge_samples: int = 5,
    min_heading: float = 0.17453292519943295,
    core: float = 0.75,
    half: int = 1,
) -> dict[str, npt.NDArray[Any]]: ...
def find_speed_changes(
    t: npt.NDArray[np.float64],
    s: npt.NDArray[np.float64],
    speed: npt.NDArray[np.float64],
    accel_tangential: npt.NDArray[np.float64],
    accel_tangential_se: npt.NDArray[np.float64] | None,
    flags: npt.NDArray[np.uint8],
    offsets: npt.NDArray[np.int64],
    *,
    accel_on: float,
    accel_off: float,
    z_on: float = 3.0,
    z_off: float = 1.0,
    min_samples: int = 3,
) -> dict[str, npt.NDArray[Any]]: ...
def find_stops(
    t: npt.NDArray[np.float64],
    positions: npt.NDArray[np.float64],
    flags: npt.NDArray[np.uint8],
    offsets: npt.NDArray[np.int64],
    noise: npt.NDArray[np.float64],
    min_stop: float | None = None,
) -> tuple[npt.NDArray[np.int64], npt.NDArray[np.int64], npt.NDArray[np.int64]]: ...
def find_elements(
    t: npt.NDArray[np.float64],
    arclength: npt.NDArray[np.float64],
    curvature: npt.NDArray[np.float64],
    se: npt.NDArray[np.float64],
    flags: npt.NDArray[np.uint8],
    positions: npt.NDArray[np.float64],
    offsets: npt.NDArray[np.int64],
    *,
    penalty: float,
    min_length: npt.NDArray[np.float64],
    bandwidth: npt.NDArray[np.float64],
    significance: float,
    resolution: float,
    refine: bool,
    max_iterations: int,
) -> dict[str, npt.NDArray[Any]]: ...
def fresnel(
    x: npt.NDArray[np.float64],
) -> tuple[npt.NDArray[np.float64], npt.NDArray[np.float64]]: ...
def summarize(
    t: npt.NDArray[np.float64],
    flags: npt.NDArray[np.uint8],
    speed: npt.NDArray[np.float64],
    accel_tangential: npt.NDArray[np.float64],
    accel_normal: npt.NDArray[np.float64],
    curvature: npt.NDArray[np.float64],
    angular_speed: npt.NDArray[np.float64],
    arclength: npt.NDArray[np.float64],
    jerk: npt.NDArray[np.float64],
    se: list[npt.NDArray[np.float64] | None],
    offsets: npt.NDArray[np.int64],
    half: npt.NDArray[np.int64],
) -> dict[str, npt.NDArray[Any]]: ...
def polyline_arclength(
    t: npt.NDArray[np.float64],
    positions: npt.NDArray[np.float64],
    offsets: npt.NDArray[np.int64],
) -> npt.NDArray[np.float64]: ...
def check_estimator_options(
    options: dict[str, Any], *, fit_only: bool = False
) -> dict[str, Any]: ...
def fit_paths(
    t: npt.NDArray[np.float64],
    positions: npt.NDArray[np.float64],
    offsets: npt.NDArray[np.int64],
    *,
    options: dict[str, Any],
    weights: npt.NDArray[np.float64] | None = None,
    uncertainty: str | None = None,
) -> FittedPaths: ...

@final
class FittedPaths:
    def __len__(self) -> int: ...
    @property
    def dim(self) -> int: ...
    def kinematics(self, *, options: dict[str, Any] | None = None) -> dict[str, Any]: ...
    def kinematics_at(
        self,
        t: npt.NDArray[np.float64],
        query_offsets: npt.NDArray[np.int64],
        *,
        options: dict[str, Any] | None = None,
    ) -> dict[str, Any]: ...
    def evaluate(
        self, t: npt.NDArray[np.float64], query_offsets: npt.NDArray[np.int64], nu: int
    ) -> npt.NDArray[np.float64]: ...
    def resample(
        self,
        t: npt.NDArray[np.float64],
        extra: npt.NDArray[np.float64],
        *,
        step: float | None = None,
        count: int | None = None,
        at: npt.NDArray[np.float64] | None = None,
        endpoint: bool = True,
    ) -> dict[str, npt.NDArray[np.float64] | npt.NDArray[np.int64]]: ...
    def info(self) -> dict[str, npt.NDArray[np.float64]]: ...

def geodetic_to_enu(
    llh: npt.NDArray[np.float64],
    offsets: npt.NDArray[np.int64],
    *,
    origin: npt.NDArray[np.float64] | None = None,
) -> tuple[npt.NDArray[np.float64], npt.NDArray[np.float64]]: ...
def enu_to_geodetic(
    enu: npt.NDArray[np.float64],
    offsets: npt.NDArray[np.int64],
    *,
    origin: npt.NDArray[np.float64],
) -> npt.NDArray[np.float64]: ...

# Line integrals (osculate.work): dict keys total, error, cumulative (or None), skipped.
def line_integral_sampled(
    positions: npt.NDArray[np.float64],
    values: npt.NDArray[np.float64],
    offsets: npt.NDArray[np.int64],
    *,
    t: npt.NDArray[np.float64] | None = None,
    rule: str | None = None,
    nodes: int | None = None,
    kind: str,
    closed: bool,
    cumulative: bool,
    estimate: bool,
) -> dict[str, Any]: ...
def line_integral_grid(
    positions: npt.NDArray[np.float64],
    offsets: npt.NDArray[np.int64],
    values: npt.NDArray[np.float64],
    *,
    t: npt.NDArray[np.float64] | None = None,
    grid_ndim: int,
    origin: list[float],
    spacing: list[float],
    outside: str,
    rule: str | None = None,
    nodes: int | None = None,
    kind: str,
    closed: bool,
    cumulative: bool,
    estimate: bool,
) -> dict[str, Any]: ...
def segment_nodes(
    positions: npt.NDArray[np.float64],
    offsets: npt.NDArray[np.int64],
    *,
    t: npt.NDArray[np.float64] | None = None,
    rule: str | None = None,
    nodes: int | None = None,
    kind: str,
    closed: bool,
    estimate: bool,
) -> tuple[npt.NDArray[np.float64], npt.NDArray[np.float64] | None]: ...
def line_integral_values(
    positions: npt.NDArray[np.float64],
    offsets: npt.NDArray[np.int64],
    values: npt.NDArray[np.float64],
    *,
    rule: str | None = None,
    nodes: int | None = None,
    kind: str,
    closed: bool,
    cumulative: bool,
    estimate: bool,
) -> dict[str, Any]: ...
def line_power(
    positions: npt.NDArray[np.float64],
    offsets: npt.NDArray[np.int64],
    velocity: npt.NDArray[np.float64],
    *,
    force: npt.NDArray[np.float64] | None = None,
    returned: bool = False,
    grid_values: npt.NDArray[np.float64] | None = None,
    origin: list[float] | None = None,
    spacing: list[float] | None = None,
    outside: str | None = None,
) -> npt.NDArray[np.float64]: ...
def grid_eval(
    values: npt.NDArray[np.float64],
    points: npt.NDArray[np.float64],
    *,
    grid_ndim: int,
    origin: list[float],
    spacing: list[float],
    outside: str,
) -> npt.NDArray[np.float64]: ...
