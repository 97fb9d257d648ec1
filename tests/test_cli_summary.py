"""`osculate summary` on an output of `osculate analyze`: its results are summarised as they are."""

from __future__ import annotations

import numpy as np
import pytest
from test_trust import _stop_and_go

pd = pytest.importorskip("pandas")
pytest.importorskip("pyarrow")


@pytest.fixture(scope="module")
def log(tmp_path_factory):
    # Two invented stop-and-go vehicles (tests/test_trust.py), rows interleaved in time order.
    rows = []
    for vid, seed in (("a", 1), ("b", 2)):
        t, x, _, _ = _stop_and_go(np.random.default_rng(seed))
        rows.append(pd.DataFrame({"t": t, "x": x[:, 0], "y": x[:, 1], "vehicle": vid}))
    folder = tmp_path_factory.mktemp("summary")
    src = folder / "log.csv"
    pd.concat(rows).sort_values("t", kind="stable").to_csv(src, index=False)
    return folder, src


def test_summary_of_an_analyze_output_uses_its_columns(log, capsys):
    from osculate.cli import main

    folder, src = log
    where = ["--time", "t", "--position", "x,y", "--track", "vehicle"]
    out, done, raw = folder / "out.parquet", folder / "done.csv", folder / "raw.csv"
    assert main(["analyze", str(src), *where, "--method", "smooth", "-o", str(out), "-q"]) == 0
    assert main(["summary", str(out), *where, "-o", str(done)]) == 0
    assert "summarising the results already in" in capsys.readouterr().err
    assert main(["summary", str(src), *where, "--method", "smooth", "-o", str(raw), "-q"]) == 0
    a, b = pd.read_csv(done, index_col=0), pd.read_csv(raw, index_col=0)
    assert list(a.columns[: len(b.columns)]) == list(b.columns)[: len(a.columns)]
    # The same per-sample values go in: the turning angle (a sum over them) agrees to rounding
    # (1e-12 relative), the stop count exactly.
    np.testing.assert_allclose(a["turning_angle"], b["turning_angle"], rtol=1e-12)
    np.testing.assert_array_equal(a["stops"], b["stops"])
    # Extremes use 3-sample stretches instead of the bandwidth's: the smallest radius stays
    # within 5 % of the recomputed one (measured 1–2 %; the truth is 20 m).
    np.testing.assert_allclose(a["min_radius"], b["min_radius"], rtol=0.05)


def test_recompute_ignores_the_result_columns(log, capsys):
    from osculate.cli import main

    folder, src = log
    where = ["--time", "t", "--position", "x,y", "--track", "vehicle"]
    out, again, raw = folder / "out2.parquet", folder / "again.csv", folder / "raw2.csv"
    assert main(["analyze", str(src), *where, "--method", "smooth", "-o", str(out), "-q"]) == 0
    args = [*where, "--method", "smooth", "-q"]
    assert main(["summary", str(out), *args, "--recompute", "-o", str(again)]) == 0
    assert main(["summary", str(src), *args, "-o", str(raw)]) == 0
    # Recomputed from the same positions: the same table (to 1e-12; same kernels).
    a, b = pd.read_csv(again, index_col=0), pd.read_csv(raw, index_col=0)
    np.testing.assert_allclose(a["min_radius"], b["min_radius"], rtol=1e-12)
