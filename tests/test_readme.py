"""Every code block of the README runs: Python blocks with the names their snippets assume (a
fixture below), shell blocks as commands in a folder holding the files they name."""

from __future__ import annotations

import pathlib
import re
import shlex
import subprocess
import sys

import numpy as np
import pytest

README = pathlib.Path(__file__).resolve().parents[1] / "README.md"
TEXT = README.read_text(encoding="utf-8")
PYTHON = re.findall(r"```python\n(.*?)```", TEXT, re.S)
SHELL = re.findall(r"```bash\n(.*?)```", TEXT, re.S)
#: Self-contained blocks: run with nothing given.
RUNNABLE = [b for b in PYTHON if b.startswith("# runs as written")]
#: Commands not run here: installing the package (CI does it) and the test suite itself.
NOT_RUN = ("pip ", "pytest")


def names_the_snippets_assume() -> dict:
    """Invented data for every name the README's snippets use without defining it."""
    pd = pytest.importorskip("pandas")
    rng = np.random.default_rng(3)
    t = np.linspace(0.0, 20.0, 2001)
    xyz = np.column_stack([30 * np.cos(0.2 * t), 30 * np.sin(0.2 * t), 0.5 * t])
    n = len(t)
    t_all = np.concatenate([t, t + 0.005])
    xy_all = np.concatenate([xyz[:, :2], xyz[:, :2] + 5.0])
    order = np.argsort(t_all, kind="stable")  # two vehicles, rows interleaved in time
    gx, gy, gz = np.meshgrid(
        np.arange(-40, 40.5, 0.5),
        np.arange(-40, 40.5, 0.5),
        np.arange(-1, 11.5, 0.5),
        indexing="ij",
    )
    values = np.stack([-gy, gx, np.zeros_like(gz)], axis=-1)  # a swirl about the z axis
    a = np.linspace(0, 2 * np.pi, 361)[:-1]
    df = pd.DataFrame(
        {
            "t": t,
            "x": xyz[:, 0],
            "y": xyz[:, 1],
            "z": xyz[:, 2],
            "vehicle": np.repeat(["van-1", "van-2"], n // 2 + 1)[:n],
            "time": pd.Timestamp("2026-12-04T10:00:00Z") + pd.to_timedelta(t, unit="s"),
            "lat": 45.0 + xyz[:, 1] / 111_000,
            "lon": 9.0 + xyz[:, 0] / 78_000,
            "alt": 300.0 + xyz[:, 2],
            "drone": "d1",
        }
    )
    names = {
        "np": np,
        "t": t,
        "xyz": xyz,
        "noisy_xyz": xyz + rng.normal(0, 0.05, xyz.shape),
        "t_new": np.linspace(1.0, 19.0, 50),
        "t_all": t_all[order],
        "xy_all": xy_all[order],
        "vehicle_id": np.repeat(["a", "b"], n)[order],
        "v": np.full(n, 6.0),
        "drag_force": -0.5 * np.gradient(xyz, t, axis=0),
        "force": np.tile([0.0, 0.0, -9.81], (n, 1)),
        "ids": np.repeat([1, 2], [n // 2, n - n // 2]),
        "values": values,
        "grad_phi": lambda p: np.column_stack([0 * p[:, 0], 0 * p[:, 1], 9.81 + 0 * p[:, 2]]),
        "loop": np.column_stack([20 * np.cos(a), 20 * np.sin(a), np.full(len(a), 5.0)]),
        "df": df,
        "lat": df["lat"].to_numpy(),
        "lon": df["lon"].to_numpy(),
        "h": df["alt"].to_numpy(),
    }
    try:
        import dask.dataframe as dd

        names["ddf"] = dd.from_pandas(df, npartitions=2)
    except ImportError:  # pragma: no cover - the test extra installs dask
        pass
    return names


def test_there_are_blocks():
    assert RUNNABLE and PYTHON and SHELL


@pytest.mark.parametrize("block", PYTHON, ids=[f"python-{i}" for i in range(len(PYTHON))])
def test_python_block_runs(block):
    import osculate as osc

    ns = {} if block in RUNNABLE else {**names_the_snippets_assume(), "osc": osc}
    exec(compile(block, str(README), "exec"), ns)


@pytest.fixture(scope="module")
def files(tmp_path_factory):
    """The logs the shell examples name: log.parquet (a drone in WGS 84) and log.csv (vans)."""
    pytest.importorskip("pandas")
    pytest.importorskip("pyarrow")
    folder = tmp_path_factory.mktemp("readme")
    ns = names_the_snippets_assume()
    df = ns["df"]
    df[["t", "lat", "lon", "alt", "drone"]].to_parquet(folder / "log.parquet")
    noisy = df[["t", "x", "y", "vehicle"]].copy()
    noisy[["x", "y"]] += np.random.default_rng(4).normal(0, 0.05, (len(df), 2))
    noisy.to_csv(folder / "log.csv", index=False)
    return folder


def _commands() -> list[str]:
    out = []
    for block in SHELL:
        for line in block.splitlines():
            for part in line.split("#")[0].split("&&"):
                part = part.strip()
                if part and not part.startswith(NOT_RUN):
                    out.append(part)
    return out


@pytest.mark.parametrize("command", _commands())
def test_shell_command_runs(command, files):
    pytest.importorskip("matplotlib")  # the demo draws its figures
    args = shlex.split(command)
    assert args[0] == "osculate", command
    code = "import sys; from osculate.cli import main; sys.exit(main(sys.argv[1:]))"
    proc = subprocess.run(
        [sys.executable, "-c", code, *args[1:]],
        cwd=files,
        capture_output=True,
        text=True,
        timeout=300,
    )
    assert proc.returncode == 0, proc.stderr[-2000:]


def test_noisy_van_figures_match_the_readme():
    # The figures the README quotes beside the noisy-van example, to the digits it prints.
    # Truth from the scenario's construction: radius 25 m, turning = path length / 25 m.
    pytest.importorskip("pandas")
    ns: dict = {}
    exec(compile(RUNNABLE[0], str(README), "exec"), ns)
    s = ns["k"].summary_arrays()
    assert round(float(s["min_radius"][0]), 1) == 24.4
    assert round(float(s["min_radius_se"][0]), 1) == 0.9
    assert round(float(s["p5_radius"][0]), 1) == 23.2
    assert round(float(s["turning_angle"][0]), 2) == 17.71
    assert round(float(ns["s"][-1] / 25), 2) == 17.92
    assert int(s["stops"][0]) == 2
    assert np.isclose(ns["k"].fit_info["noise"][0], 0.05, rtol=0.1)
