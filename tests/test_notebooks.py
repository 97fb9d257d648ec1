"""The demo notebooks run from top to bottom without error, and are stored without outputs."""

import os
import time
from pathlib import Path

import nbclient
import nbformat
import pytest

NOTEBOOKS = sorted((Path(__file__).resolve().parents[1] / "notebooks-demo").glob("*.ipynb"))


def test_there_are_notebooks():
    assert len(NOTEBOOKS) >= 2, NOTEBOOKS


@pytest.mark.parametrize("path", NOTEBOOKS, ids=lambda p: p.name)
def test_notebook_is_stored_stripped(path):
    book = nbformat.read(path, as_version=4)
    nbformat.validate(book)
    code = [c for c in book.cells if c.cell_type == "code"]
    assert code, "a notebook without code"
    assert all(c.outputs == [] and c.execution_count is None for c in code)


@pytest.mark.parametrize("path", NOTEBOOKS, ids=lambda p: p.name)
def test_notebook_executes(path, tmp_path, monkeypatch):
    # The kernel is a child process: it inherits this environment (no display needed).
    monkeypatch.setenv("MPLBACKEND", "module://matplotlib_inline.backend_inline")
    monkeypatch.setenv("PYDEVD_DISABLE_FILE_VALIDATION", "1")
    book = nbformat.read(path, as_version=4)
    client = nbclient.NotebookClient(
        book,
        timeout=120,
        kernel_name="python3",
        resources={"metadata": {"path": str(tmp_path)}},
    )
    started = time.perf_counter()
    client.execute()  # raises CellExecutionError on the first failing cell
    took = time.perf_counter() - started
    errors = [o for c in book.cells for o in c.get("outputs", []) if o.output_type == "error"]
    assert errors == []
    # Every cell that draws shows its picture (a Plot displays itself as PNG).
    drawing = [c for c in book.cells if c.cell_type == "code" and "plot" in c.source]
    shown = [c for c in drawing if any("image/png" in o.get("data", {}) for o in c.outputs)]
    assert len(drawing) >= 2
    assert len(shown) == len(drawing), f"{path.name}: {len(shown)} of {len(drawing)} shown"
    assert took < 40, f"{path.name} took {took:.1f} s"
    assert os.listdir(tmp_path) == [], "notebooks must not write into their folder"
