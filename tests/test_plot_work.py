"""osculate.plot.work: cumulative work, totals in one unit, the truth dashed."""

import numpy as np
import osculate as osc
import pytest
from osculate import plot
from plot_cases import flagged_2d, tick_values


def test_work_from_values_and_from_a_force():
    # A constant force F = (2, 1) N along a straight path from (0, 0) to (20, 0): W = 40 J.
    t = np.linspace(0.0, 10.0, 21)
    xy = np.column_stack([2 * t, 0 * t])
    k = osc.kinematics(t, xy)
    force = np.tile([2.0, 1.0], (21, 1))
    p = plot.work(k, force)
    assert p.axes.get_legend().get_texts()[0].get_text() == "total 40.0 J"
    assert p.axes.get_ylabel() == "cumulative work W [J]"
    line = p.axes.collections[0]
    ys = np.concatenate([seg[:, 1] for seg in line.get_segments()])
    assert np.isclose(ys.max(), 40.0) and np.isclose(ys.min(), 0.0)
    # Values already in kJ (the caller says so): labelled kJ, not rescaled again.
    p = plot.work(k, values=2 * k.arclength, x="time", units={"energy": "kJ"})
    assert p.axes.get_xlabel() == "time t [s]" and p.axes.get_ylabel() == "cumulative work W [kJ]"
    assert p.axes.get_legend().get_texts()[0].get_text() == "total 40.0 kJ"
    with pytest.raises(osc.InputError, match="values, force"):
        plot.work(k)
    with pytest.raises(osc.InputError, match="values: expected 21 values"):
        plot.work(k, values=[1.0, 2.0])


@pytest.mark.parametrize(
    "force, unit, factor",
    [(2.0, "J", 1.0), (3.1e3, "kJ", 1e-3), (2.6e6, "MJ", 1e-6)],
)
def test_work_axis_and_legend_share_one_unit(force, unit, factor):
    # A constant force F along x over 20 m: W(s) = F·s, total 20 F (closed form).
    t = np.linspace(0.0, 10.0, 21)
    k = osc.kinematics(t, np.column_stack([2 * t, 0 * t]))
    p = plot.work(k, values=force * k.arclength)
    assert p.axes.get_ylabel() == f"cumulative work W [{unit}]"
    legend = p.axes.get_legend().get_texts()[0].get_text()
    number, shown = legend.removeprefix("total ").split(" ")
    assert shown == unit
    assert np.isclose(float(number) / factor, 20 * force, rtol=1e-3)
    # The tick labels are in the same unit as the legend: label = location × factor.
    for loc, value in tick_values(p.axes.yaxis):
        assert np.isclose(value, loc * factor, rtol=1e-9, atol=1e-9), (loc, value)
    # The drawn data stay in joules, so a caller's own overlay in joules lines up.
    ys = np.concatenate([seg[:, 1] for seg in p.axes.collections[0].get_segments()])
    assert np.isclose(ys.max(), 20 * force)


def test_work_truth_is_drawn_dashed_per_sample_or_per_track():
    from osculate import _palette as palette

    k = flagged_2d()
    w = 1e3 * np.where(np.isfinite(k.arclength), k.arclength, np.nan)  # 1 kN along the path
    # Per sample: a dashed line per track, in the truth colour, named in the legend.
    true_w = 1.05 * w
    p = plot.work(k, values=w, truth=true_w)
    dashed = [c for c in p.axes.collections if c.get_linestyle()[0][1] is not None]
    assert len(dashed) == 1
    assert np.allclose(dashed[0].get_colors()[0][:3], palette.to_rgb(palette.TRUTH))
    ys = np.concatenate([seg[:, 1] for seg in dashed[0].get_segments()])
    assert np.isclose(np.nanmax(ys), np.nanmax(true_w))
    labels = [t.get_text() for t in p.axes.get_legend().get_texts()]
    assert labels[-1] == "true work (dashed)"
    totals = k.summary_arrays()["length"] * 1e3
    for lab, total in zip(labels[:2], totals):  # "track a: total 444 kJ (true 466 kJ)"
        est, true = (float(x.split(" ")[0]) for x in lab.split("total ")[1].split("(true "))
        # One number of decimals for all: three significant digits of the largest (466 kJ).
        assert abs(est - total / 1e3) <= 0.5 and abs(true - 1.05 * total / 1e3) <= 0.5
    # Per track: each track's true total as a dashed level across its x-range.
    p = plot.work(k, values=w, truth=[1.0e4, 2.0e4])
    levels = [c for c in p.axes.collections if c.get_linestyle()[0][1] is not None]
    assert len(levels) == 1
    segs = levels[0].get_segments()
    assert sorted(float(seg[0, 1]) for seg in segs) == [1.0e4, 2.0e4]
    labels = [t.get_text() for t in p.axes.get_legend().get_texts()]
    assert labels[0].endswith("(true 10 kJ)") and labels[1].endswith("(true 20 kJ)")
    assert labels[-1] == "true totals (dashed)"
    with pytest.raises(osc.InputError, match=r"truth: expected 281 values .* or 2"):
        plot.work(k, values=w, truth=[1.0, 2.0, 3.0])


def test_work_totals_per_track():
    k = flagged_2d()
    # W = 1 N along the arc length of each track: totals are the track lengths.
    p = plot.work(k, values=k.arclength)
    labels = [t.get_text() for t in p.axes.get_legend().get_texts()]
    summary = k.summary_arrays()
    assert [lab.split(":")[0] for lab in labels] == ["track a", "track b"]
    unit = p.axes.get_ylabel().split("[")[1].rstrip("]")
    for lab, length in zip(labels, summary["length"]):
        number, shown = lab.split("total ")[1].split(" ")
        assert shown == unit == "J"
        assert np.isclose(float(number), length, rtol=2e-3)  # three significant digits
