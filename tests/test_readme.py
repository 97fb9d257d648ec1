"""The README's self-contained examples (blocks that start with "# runs as written") run."""

import pathlib
import re

import numpy as np
import pytest

README = pathlib.Path(__file__).resolve().parents[1] / "README.md"
BLOCKS = [
    b
    for b in re.findall(r"```python\n(.*?)```", README.read_text(encoding="utf-8"), re.S)
    if b.startswith("# runs as written")
]


def test_there_are_runnable_blocks():
    assert BLOCKS


@pytest.mark.parametrize("block", BLOCKS)
def test_readme_block_runs(block):
    pytest.importorskip("pandas")
    ns: dict = {}
    exec(compile(block, str(README), "exec"), ns)


def test_noisy_van_figures_match_the_readme():
    # The figures the README quotes beside the noisy-van example, to the digits it prints.
    # Truth from the scenario's construction: radius 25 m, turning = path length / 25 m.
    pytest.importorskip("pandas")
    ns: dict = {}
    exec(compile(BLOCKS[0], str(README), "exec"), ns)
    s = ns["k"].summary_arrays()
    assert round(float(s["min_radius"][0]), 1) == 23.7
    assert round(float(s["min_radius_se"][0]), 1) == 0.8
    assert round(float(s["p5_radius"][0]), 1) == 23.2
    assert round(float(s["turning_angle"][0]), 2) == 17.71
    assert round(float(ns["s"][-1] / 25), 2) == 17.92
    assert int(s["stops"][0]) == 2
    assert np.isclose(ns["k"].fit_info["noise"][0], 0.05, rtol=0.1)
