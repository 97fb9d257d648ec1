"""osculate.plot as a whole: every plot on 2-D, 3-D and flagged results; titles, units, cautions."""

import numpy as np
import osculate as osc
import pytest
from matplotlib.figure import Figure
from osculate import plot
from plot_cases import (
    RESULTS,
    G,
    assert_png,
    caution_text,
    circle_2d,
    flagged_2d,
    flagged_3d,
    helix_3d,
    rmf_helix,
    scaled_circle,
    texts,
    tick_values,
    window_boxes,
)


@pytest.fixture(params=list(RESULTS), ids=list(RESULTS))
def result(request):
    return RESULTS[request.param]()


def test_flagged_fixtures_carry_every_flag():
    k = flagged_2d()
    for flag in osc.Flag:
        assert k.flagged(flag).any(), flag
    assert flagged_3d().flagged(osc.Flag.STOPPED | osc.Flag.INVALID).any()


def call(name, k):
    if name == "work":
        # Constant 2 N along x: W(s) along the path is 2·(x − x₀) (∫F·dr of a constant force).
        x = k.position[:, 0]
        return plot.work(k, values=2.0 * (x - x[0]))
    return getattr(plot, name)(k)


@pytest.mark.parametrize("name", ["path", "profile", "gg", "work"])
def test_every_function_draws_a_figure(name, result, tmp_path):
    p = call(name, result)
    assert isinstance(p, plot.Plot)
    assert isinstance(p.figure, Figure)
    fig, axes = p  # unpacks like (fig, ax)
    assert fig is p.figure and axes is p.axes
    assert_png(p, tmp_path / f"{name}.png")


def test_no_pyplot_state(tmp_path):
    import matplotlib.pyplot as plt

    before = plt.get_fignums()
    for name in ("path", "profile", "gg", "work"):
        call(name, circle_2d())
    assert plt.get_fignums() == before


def test_lazy_attribute_and_png_repr():
    assert osc.plot is plot
    png = plot.gg(circle_2d())._repr_png_()
    assert png[:4] == b"\x89PNG"


def test_draws_into_given_axes():
    fig = Figure()
    ax = fig.add_subplot()
    p = plot.path(circle_2d(), ax=ax)
    assert p.figure is fig and p.axes is ax
    axes = Figure().subplots(2, 1)
    p = plot.profile(circle_2d(), quantities=["speed", "curvature"], ax=axes)
    assert list(p.axes) == list(axes)
    with pytest.raises(osc.InputError, match="ax: expected 3 axes"):
        plot.profile(circle_2d(), quantities=["speed", "curvature", "torsion"], ax=axes)


def test_accessor_frames_plot_like_kinematics(tmp_path):
    import pandas as pd

    t = np.linspace(0.0, 20.0, 401)
    df = pd.DataFrame(
        {
            "car": np.repeat(["p", "q"], [200, 201]),
            "time": pd.Timestamp("2026-01-01", tz="UTC") + pd.to_timedelta(t, unit="s"),
            "x": 50 * np.cos(0.3 * t),
            "y": 50 * np.sin(0.3 * t),
        }
    )
    res = df.osc.kinematics(time="time", position=["x", "y"], by="car", keep=True)
    p = plot.path(res, color="speed", by="car", frames_every=40.0)
    assert p.axes.get_xlabel() == "x [m]"
    assert_png(p, tmp_path / "df_path.png")
    p = plot.profile(res, x="time", by="car")
    assert p.axes[-1].get_xlabel() == "time t [s]"
    names = {t.get_text() for t in p.figure.legends[0].get_texts()}
    assert {"track p", "track q"} <= names
    p = plot.gg(res, by="car")
    assert np.allclose(
        np.median(np.asarray(p.axes.collections[0].get_offsets())[:, 0]), 4.5 / G, rtol=1e-3
    )
    plot.work(res, values=res["arclength"].to_numpy(), by="car", time="time")
    with pytest.raises(osc.InputError, match="position: no column 'z'"):
        plot.path(res, position=["x", "z"])
    only = res.drop(columns=["x", "y"])
    with pytest.raises(osc.InputError, match="name the position columns"):
        plot.path(only)


@pytest.mark.parametrize(
    "make",
    [
        lambda: plot.path(circle_2d(), title="A rather long title of a circle " * 2),
        lambda: plot.path(rmf_helix(), color="speed", frames_every=5.0, title="Drone-like"),
        lambda: plot.gg(circle_2d(), limits=[(0.5, "source A")]),
        lambda: plot.work(circle_2d(), values=circle_2d().arclength),
        lambda: plot.profile(helix_3d()),
        lambda: plot.curvature(helix_3d(), title="A curvature diagram with a long title " * 2),
    ],
    ids=["path-2d", "path-3d", "gg", "work", "profile", "curvature"],
)
def test_title_sits_above_the_subtitle_without_touching_it(make):
    p = make()
    boxes = window_boxes(p.figure)
    ax = p.axes if not isinstance(p.axes, np.ndarray) else p.axes[0]
    sub = next(t for t in boxes if t.get_text().startswith("estimator:") or "=" in t.get_text())
    title = next(t for t in boxes if t.get_fontweight() == "bold")
    b_title, b_sub = boxes[title], boxes[sub]
    assert not b_title.overlaps(b_sub)
    assert b_title.y0 >= b_sub.y1 - 0.5  # stacked: title above
    assert abs(b_title.x0 - b_sub.x0) < 2.0  # and left-aligned together
    # Both inside the figure, above the axes.
    width, height = p.figure.bbox.width, p.figure.bbox.height
    assert 0 <= b_sub.x0 and b_title.x1 <= width + 1 and b_title.y1 <= height + 1
    assert b_sub.y0 >= ax.get_window_extent().y1 - 1


@pytest.mark.parametrize(
    "radius, unit, factor",
    [(0.025, "mm", 1e3), (0.2, "mm", 1e3), (0.3, "m", 1.0), (2e4, "m", 1.0), (3e4, "km", 1e-3)],
)
def test_length_unit_follows_the_extent(radius, unit, factor):
    # Extent = the circle's diameter (nearly all of it is drawn): 5 cm, 40 cm, 60 cm, 40 km, 60 km.
    k = scaled_circle(radius)
    p = plot.path(k, color="radius")
    assert (p.axes.get_xlabel(), p.axes.get_ylabel()) == (f"x [{unit}]", f"y [{unit}]")
    assert p.figure.axes[-1].get_ylabel() == f"radius of curvature ρ [{unit}]"
    for axis in (p.axes.xaxis, p.axes.yaxis, p.figure.axes[-1].yaxis):
        for loc, value in tick_values(axis):  # the numbers are in the labelled unit
            assert np.isclose(value, loc * factor, rtol=1e-9, atol=1e-9 * factor * radius)
    # The data stay in metres.
    segs = np.concatenate(p.axes.collections[0].get_segments())
    assert np.isclose(np.abs(segs).max(), radius, rtol=1e-9)
    prof = plot.profile(k, quantities=["speed", "radius"])
    assert prof.axes[-1].get_xlabel() == f"arc length s [{unit}]"
    assert " ".join(prof.axes[1].get_ylabel().split()) == f"radius of curvature ρ [{unit}]"
    assert prof.axes[0].get_ylabel() == "speed v [m/s]"  # rates stay in SI
    assert plot.work(k, values=k.arclength).axes.get_xlabel() == f"arc length s [{unit}]"


def test_length_unit_override_and_caller_units():
    k = scaled_circle(0.025)
    p = plot.path(k, frames_every=0.01, length_unit="m")
    assert p.axes.get_xlabel() == "x [m]"
    assert "Frenet frame every 0.01 m" in [t.get_text() for t in p.figure.legends[0].texts]
    p = plot.path(k, frames_every=0.01)
    assert "Frenet frame every 10 mm" in [t.get_text() for t in p.figure.legends[0].texts]
    p = plot.path(k, length_unit="cm")
    assert p.axes.get_xlabel() == "x [cm]"
    assert all(np.isclose(v, loc * 100) for loc, v in tick_values(p.axes.xaxis))
    # Positions in the caller's own unit are labelled so, never rescaled by "auto".
    p = plot.path(k, units={"length": "px"})
    assert p.axes.get_xlabel() == "x [px]"
    assert all(np.isclose(v, loc) for loc, v in tick_values(p.axes.xaxis))
    p = plot.path(scaled_circle(30.0), units={"length": "km"}, length_unit="m")
    assert p.axes.get_xlabel() == "x [m]"
    assert all(np.isclose(v, loc * 1e3) for loc, v in tick_values(p.axes.xaxis))
    with pytest.raises(osc.InputError, match="length_unit"):
        plot.path(k, units={"length": "px"}, length_unit="mm")
    with pytest.raises(osc.InputError, match="length_unit"):
        plot.path(k, length_unit="furlong")


CAUTIONED_FIGURES = {
    "path a_n": lambda k: plot.path(k, color="accel_normal"),
    "path jerk": lambda k: plot.path(k, color="jerk"),
    "path radius": lambda k: plot.path(k, color="radius"),
    "path |a|": lambda k: plot.path(k, color="acceleration"),
    "profile default": lambda k: plot.profile(k),
    "profile a_n": lambda k: plot.profile(k, quantities=["speed", "accel_normal"]),
    "profile jerk": lambda k: plot.profile(k, quantities=["jerk"]),
    "profile radius": lambda k: plot.profile(k, quantities=["curvature", "radius"]),
    "gg": lambda k: plot.gg(k),
    "gg limits": lambda k: plot.gg(k, limits=[(0.4, "source A")]),
    "gg no colour": lambda k: plot.gg(k, color=None),
    "curvature": lambda k: plot.curvature(k),
}


PLAIN_FIGURES = {
    "path speed": lambda k: plot.path(k, color="speed"),
    "path curvature": lambda k: plot.path(k),
    "path plain": lambda k: plot.path(k, color=None),
    "profile speed": lambda k: plot.profile(k, quantities=["speed", "curvature"]),
    "work": lambda k: plot.work(k, values=k.arclength),
}


@pytest.mark.parametrize("name", list(CAUTIONED_FIGURES))
@pytest.mark.parametrize("kind", ["2d", "3d"])
def test_figures_of_a_n_jerk_or_radius_carry_the_caution(name, kind):
    from osculate import _palette as palette

    p = CAUTIONED_FIGURES[name](RESULTS[kind]())
    found = caution_text(p.figure)
    assert len(found) == 1, name
    note = found[0]
    assert note.get_color() == palette.MUTED and note.get_fontsize() <= 8
    # It overlaps no other text (titles, tick labels, axis labels, legends, colour bars).
    boxes = window_boxes(p.figure)
    mine = boxes.pop(note)
    clash = [t.get_text() for t, b in boxes.items() if b.overlaps(mine)]
    assert not clash, clash
    # Nor the plotting area of a 2-D axes or the legend, and it stays inside the figure.
    for ax in p.figure.axes:
        if not hasattr(ax, "zaxis"):
            assert not ax.get_window_extent().overlaps(mine), name
    for legend in p.figure.legends:
        assert not legend.get_window_extent().overlaps(mine)
    assert mine.x0 >= 0 and mine.y0 >= 0 and mine.x1 <= p.figure.bbox.width + 1


@pytest.mark.parametrize("name", list(PLAIN_FIGURES))
def test_figures_without_them_carry_none(name):
    p = PLAIN_FIGURES[name](circle_2d())
    assert not caution_text(p.figure)
    assert "licensed engineers" not in texts(p.figure)


def test_caution_in_the_callers_axes():
    fig = Figure(layout="constrained")
    axes = fig.subplots(2, 1)
    plot.gg(circle_2d(), ax=axes[0])
    plot.path(circle_2d(), color="speed", ax=axes[1])
    found = caution_text(fig)
    assert len(found) == 1  # the g-g panel's; the speed path has none
    boxes = window_boxes(fig)
    mine = boxes.pop(found[0])
    assert not [t.get_text() for t, b in boxes.items() if b.overlaps(mine)]
    assert not axes[1].get_window_extent().overlaps(mine)
    axes = Figure(layout="constrained").subplots(2, 1)
    p = plot.profile(circle_2d(), quantities=["speed", "accel_normal"], ax=axes)
    assert len(caution_text(p.figure)) == 1


def test_tick_labels_are_plain_numbers_without_an_offset():
    # A 25 mm circle at constant speed: a_n = v²/r = 0.025 m/s², constant, so the colour scale
    # is narrow; matplotlib's default would print "6, 7, 8" and an offset "1e-8+2.4998e-2".
    p = plot.path(scaled_circle(0.025), color="accel_normal")
    cbar = p.figure.axes[-1]
    values = tick_values(cbar.yaxis)
    assert all(np.isclose(v, loc, rtol=1e-12) for loc, v in values)
    assert all(0.02499 < v < 0.02501 for _, v in values)
    assert cbar.yaxis.get_offset_text().get_text() == ""
    p = plot.profile(scaled_circle(0.025), quantities=["speed", "accel_normal"])
    for ax in p.axes:
        assert all(np.isclose(v, loc, rtol=1e-12) for loc, v in tick_values(ax.yaxis))
        assert ax.yaxis.get_offset_text().get_text() == ""
