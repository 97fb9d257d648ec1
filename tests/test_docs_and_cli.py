"""Docstring examples run as doctests; the console script works end to end."""

import doctest
import importlib
import pkgutil
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
    "osculate.field",
    "osculate._results",
    "osculate._columns",
]


def with_submodules(name):
    """The module and, for a package (plot, demo, report), each of its modules."""
    module = importlib.import_module(name)
    found = [module]
    for info in pkgutil.iter_modules(getattr(module, "__path__", [])):
        if info.name != "__main__":  # runs the program when imported
            found.append(importlib.import_module(f"{name}.{info.name}"))
    return found


@pytest.mark.parametrize("name", MODULES)
def test_docstring_examples(name):
    results = [doctest.testmod(m, optionflags=doctest.ELLIPSIS) for m in with_submodules(name)]
    assert sum(r.attempted for r in results) > 0
    assert sum(r.failed for r in results) == 0


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
