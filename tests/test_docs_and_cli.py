"""Docstring examples run as doctests; the console script works end to end."""

import doctest
import importlib
import subprocess
import sys

import pytest

MODULES = [
    "osculate.intrinsic",
    "osculate.paths",
    "osculate.reparam",
    "osculate.lineint",
    "osculate.flags",
    "osculate.demo",
    "osculate.report",
    "osculate.geodesy",
    "osculate.accessor",
    "osculate.dask",
    "osculate.plot",
    "osculate.elements",
    "osculate.turns",
]


@pytest.mark.parametrize("name", MODULES)
def test_docstring_examples(name):
    result = doctest.testmod(importlib.import_module(name), optionflags=doctest.ELLIPSIS)
    assert result.attempted > 0
    assert result.failed == 0


def test_demo_command_is_wired():
    # The full run of `osculate demo` (files, ground truth, timing) is in tests/test_demo.py.
    proc = subprocess.run(
        [sys.executable, "-m", "osculate.cli", "demo", "--help"],
        capture_output=True,
        text=True,
        check=True,
        timeout=120,
    )
    assert "--out" in proc.stdout and "report.md" in proc.stdout
