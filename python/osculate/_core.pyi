# Type stubs of the compiled extension module. Arrays are validated by the Python layer first.
import numpy as np
import numpy.typing as npt

__version__: str

class InputError(ValueError):
    argument: str
    track: int | None
    row: int | None
    detail: str

def fd_kinematics(
    t: npt.NDArray[np.float64],
    positions: npt.NDArray[np.float64],
    offsets: npt.NDArray[np.int64],
    *,
    order: int,
    min_speed: float,
    min_curvature: float,
    gap_factor: float,
    up: tuple[float, float, float] | None = None,
) -> dict[str, npt.NDArray[np.float64] | npt.NDArray[np.uint8]]: ...
def polyline_arclength(
    t: npt.NDArray[np.float64],
    positions: npt.NDArray[np.float64],
    offsets: npt.NDArray[np.int64],
) -> npt.NDArray[np.float64]: ...
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
