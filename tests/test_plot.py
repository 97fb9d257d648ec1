"""osculate.plot: every function on 2-D, 3-D and flagged results; figures say what they show."""

import matplotlib

matplotlib.use("Agg")  # set here, in the test, not in the package

import numpy as np
import osculate as osc
import pytest
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.collections import FillBetweenPolyCollection, LineCollection, PolyCollection
from matplotlib.figure import Figure
from matplotlib.patches import Circle
from matplotlib.quiver import Quiver
from osculate import plot

G = 9.80665  # standard gravity, m/s² (SI brochure; 3rd CGPM 1901)


def circle_2d():
    # Uniform circular motion, radius 50 m at 0.3 rad/s: v = 15 m/s, a_n = v²/r = 4.5 m/s².
    t = np.linspace(0.0, 20.0, 401)
    xy = 50.0 * np.column_stack([np.cos(0.3 * t), np.sin(0.3 * t)])
    return osc.kinematics(t, xy, order=4)


def helix_3d():
    # Helix (a cos t, a sin t, c t), a = 2, c = 0.5: κ = a/(a²+c²) = 0.4706, τ = c/(a²+c²).
    t = np.linspace(0.0, 12.0, 600)
    xyz = np.column_stack([2 * np.cos(t), 2 * np.sin(t), 0.5 * t])
    return osc.kinematics(t, xyz, up=(0, 0, 1), order=4)


def flagged_2d():
    """Two tracks: a stop, a straight, a long time step, a NaN row; EDGE at the ends."""
    t = np.linspace(0.0, 10.0, 201)
    t = np.concatenate([t[:120], t[120:] + 4.0])  # a 4 s hole: GAP
    x = np.where(t < 3, 0.0, (t - 3) ** 3 / 3.0)  # at rest, then moving off: STOPPED
    y = np.where(t > 8, 0.5 * (t - 8) ** 2, 0.0)  # straight until t = 8: STRAIGHT
    xy = np.column_stack([x, y])
    xy[60] = np.nan  # INVALID
    u = np.linspace(0.0, 6.0, 80)
    other = np.column_stack([10 * np.cos(0.4 * u), 10 * np.sin(0.4 * u)])
    k = osc.kinematics(
        np.concatenate([t, u]),
        np.vstack([xy, other]),
        tracks=np.repeat(["a", "b"], [len(t), len(u)]),
        method="smooth",
        min_speed=0.05,
    )
    return k


def flagged_3d():
    t = np.linspace(0.0, 8.0, 161)
    z = np.where(t < 2, 0.0, (t - 2) ** 3)  # a vertical take-off from rest
    xyz = np.column_stack([np.where(t > 5, (t - 5) ** 3, 0.0), 0 * t, z])
    xyz[100] = np.nan
    return osc.kinematics(t, xyz, min_speed=0.05)


RESULTS = {
    "2d": circle_2d,
    "3d": helix_3d,
    "2d-flagged": flagged_2d,
    "3d-flagged": flagged_3d,
}


@pytest.fixture(params=list(RESULTS), ids=list(RESULTS))
def result(request):
    return RESULTS[request.param]()


def pixels(fig):
    canvas = FigureCanvasAgg(fig)
    canvas.draw()
    return np.asarray(canvas.buffer_rgba())


def assert_png(p, path):
    p.savefig(path)
    data = path.read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n" and len(data) > 10_000
    img = pixels(p.figure)
    assert (img[..., :3] < 200).any(), "the figure is blank"


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


# -- path ---------------------------------------------------------------------------------------


def test_path_labels_and_colour_bar_units():
    p = plot.path(circle_2d(), color="curvature")
    assert (p.axes.get_xlabel(), p.axes.get_ylabel()) == ("x [m]", "y [m]")
    cbar = p.figure.axes[-1]
    assert cbar.get_ylabel() == "curvature κ [1/m]"
    p = plot.path(helix_3d(), color="speed", units={"length": "km", "time": "h"})
    assert p.axes.get_zlabel().startswith("z [km]")
    assert p.figure.axes[-1].get_ylabel() == "speed v [km/h]"
    p = plot.path(helix_3d(), color="torsion", units={"torsion": "rad/m"})
    assert p.figure.axes[-1].get_ylabel() == "torsion τ [rad/m]"


def test_path_colour_limits_are_robust_and_say_so():
    k = circle_2d()
    values = np.linspace(1.0, 2.0, len(k))
    values[200:202] = 1e3  # an isolated spike, as curvature shows near a stop
    p = plot.path(k, color=values, label="value")
    lc = p.axes.collections[0]
    assert 1.9 < lc.norm.vmax < 2.0  # clipped at the 99th percentile of the segments ...
    assert lc.colorbar.extend == "max"  # ... and the colour bar says so with an arrow
    exact = plot.path(k, color="speed")  # constant speed: nothing to clip, a narrow band
    norm = exact.axes.collections[0].norm
    assert exact.axes.collections[0].colorbar.extend == "neither"
    assert norm.vmin < 15.0 < norm.vmax and norm.vmax - norm.vmin < 0.2


def test_path_frame_glyphs_every_n_metres():
    k = circle_2d()  # arc length 50 · 0.3 · 20 = 300 m; the polyline through the samples is
    assert 299.9 < k.arclength[-1] < 300.0  # inscribed, a little shorter
    p = plot.path(k, frames_every=50.0)
    quivers = [c for c in p.axes.collections if isinstance(c, Quiver)]
    assert len(quivers) == 2  # T and N in 2-D
    # Glyphs at the first sample past s = 0, 50, ..., 250 m: 6 places.
    assert {len(q.X) for q in quivers} == {6}
    legend = [t.get_text() for t in p.figure.legends[0].get_texts()]
    assert "Frenet frame every 50 m" in legend and "N (normal)" in legend
    p3 = plot.path(helix_3d(), frames_every=5.0)
    labels = [t.get_text() for t in p3.figure.legends[0].get_texts()]
    assert {"T (tangent)", "N (normal)", "B (binormal)"} <= set(labels)
    with pytest.raises(osc.InputError, match="frames_every"):
        plot.path(k, frames_every=-1.0)


def test_path_tangent_glyphs_point_along_the_motion():
    k = circle_2d()
    p = plot.path(k, frames_every=100.0)
    t_glyph = next(c for c in p.axes.collections if isinstance(c, Quiver))
    got = np.column_stack([t_glyph.U, t_glyph.V])
    got /= np.linalg.norm(got, axis=1)[:, None]
    s = k.arclength
    rows = [int(np.argmax(s >= m)) for m in (0.0, 100.0, 200.0)]
    assert np.allclose(got, k.tangent[rows], atol=1e-12)


def test_path_undefined_values_are_grey_and_named():
    p = plot.path(flagged_2d(), color="torsion")  # planar: torsion NaN where no normal
    labels = [t.get_text() for t in p.figure.legends[0].get_texts()]
    assert "undefined" in labels


def test_path_colour_by_array_and_errors():
    k = circle_2d()
    p = plot.path(k, color=np.arange(len(k)), label="sample number")
    assert p.figure.axes[-1].get_ylabel() == "sample number"
    with pytest.raises(osc.InputError, match="color: expected 401 values"):
        plot.path(k, color=np.arange(3))
    with pytest.raises(osc.InputError, match="unknown or unavailable result 'colour'"):
        plot.path(k, color="colour")
    with pytest.raises(TypeError, match="Kinematics or a pandas DataFrame"):
        plot.path(np.zeros((3, 2)))


# -- profile ------------------------------------------------------------------------------------


def test_profile_panels_share_x_and_carry_units():
    p = plot.profile(helix_3d(), quantities=["speed", "curvature", "torsion", "jerk"])
    labels = [a.get_ylabel() for a in p.axes]
    assert labels == ["speed v [m/s]", "curvature κ [1/m]", "torsion τ [1/m]", "|jerk| [m/s³]"]
    assert p.axes[-1].get_xlabel() == "arc length s [m]"
    assert all(a.get_shared_x_axes().joined(a, p.axes[0]) for a in p.axes)
    p = plot.profile(helix_3d(), x="time", units={"time": "min"})
    assert p.axes[-1].get_xlabel() == "time t [min]"
    assert p.axes[0].get_ylabel() == "speed v [m/min]"


def test_profile_shades_flags_and_names_them():
    k = flagged_2d()
    p = plot.profile(k, x="time")
    names = {t.get_text().split(":")[0] for t in p.figure.legends[0].get_texts()}
    assert {"STOPPED", "STRAIGHT", "EDGE", "GAP", "INVALID", "track a", "track b"} <= names
    # One shading layer per flag named in the legend; the 95 % band is a fill of its own.
    flag_names = names & {f.name for f in osc.Flag}
    shades = [
        c
        for c in p.axes[0].collections
        if isinstance(c, PolyCollection) and not isinstance(c, FillBetweenPolyCollection)
    ]
    assert len(shades) == len(flag_names)
    # The STOPPED shading covers the rest at the start, 0 ≤ t < 3 s, and nothing past t = 3.5.
    stopped = shades[0].get_paths()
    xs = np.concatenate([path.vertices[:, 0] for path in stopped])
    assert xs.min() <= 0.0 + 1e-9 and 2.5 < xs.max() < 3.5
    only = plot.profile(k, flags=osc.Flag.GAP)
    names = {t.get_text().split(":")[0] for t in only.figure.legends[0].get_texts()}
    assert "GAP" in names and "STOPPED" not in names
    bare = plot.profile(k, flags=False, bands=False)
    assert not [c for c in bare.axes[0].collections if isinstance(c, PolyCollection)]
    banded = plot.profile(k, flags=False)  # the standard-error band stays without flags
    fills = [c for c in banded.axes[0].collections if isinstance(c, FillBetweenPolyCollection)]
    assert len(fills) == 1


def test_profile_errors():
    with pytest.raises(osc.InputError, match="x: expected 'arclength' or 'time'"):
        plot.profile(circle_2d(), x="distance")
    with pytest.raises(osc.InputError, match="quantities: expected at least one"):
        plot.profile(circle_2d(), quantities=[])


# -- g-g ----------------------------------------------------------------------------------------


def test_gg_values_in_standard_gravity():
    # Uniform circular motion: a_n = v²/r = 15²/50 = 4.5 m/s² (closed form), a_t = 0, left turn.
    p = plot.gg(circle_2d())
    xy = np.asarray(p.axes.collections[0].get_offsets())
    assert np.allclose(np.median(xy[:, 0]), 4.5 / G, rtol=1e-6)
    assert np.allclose(xy[:, 1], 0.0, atol=1e-6)
    assert p.axes.get_xlabel() == "lateral acceleration, left turn + [g]"
    assert p.axes.get_ylabel() == "longitudinal acceleration a_t, speeding up + [g]"


def test_gg_right_turn_is_negative_and_unsigned_without_up():
    t = np.linspace(0.0, 20.0, 401)
    xy = 50.0 * np.column_stack([np.cos(-0.3 * t), np.sin(-0.3 * t)])  # clockwise: right turn
    p = plot.gg(osc.kinematics(t, xy, order=4))
    assert np.allclose(
        np.median(np.asarray(p.axes.collections[0].get_offsets())[:, 0]), -4.5 / G, rtol=1e-6
    )
    t = np.linspace(0.0, 12.0, 600)
    k = osc.kinematics(t, np.column_stack([2 * np.cos(t), 2 * np.sin(t), 0.5 * t]))  # no up
    assert plot.gg(k).axes.get_xlabel() == "|a_n| = κv² (unsigned) [g]"


def texts(fig):
    import matplotlib.text

    return " ".join(t.get_text() for t in fig.findobj(matplotlib.text.Text))


def test_gg_limits_need_a_source_and_carry_the_caution():
    k = circle_2d()
    # Lateral acceleration is always shown: the caution is there with or without limits.
    words = " ".join(texts(plot.gg(k).figure).split())
    assert plot.CAUTION in words and "Reference circles" not in words
    p = plot.gg(k, limits=[(0.3, "source A"), (0.5, "source B")])
    circles = [c for c in p.axes.patches if isinstance(c, Circle)]
    assert sorted(c.get_radius() for c in circles) == [0.3, 0.5]
    words = " ".join(texts(p.figure).split())
    assert "indicative only" in words and "local codes and licensed engineers decide" in words
    assert "0.3 g from source A" in words and "0.5 g from source B" in words
    p = plot.gg(k, limits={"source C": 0.4}, ax=Figure().add_subplot())
    words = " ".join(texts(p.figure).split())
    assert "licensed engineers decide" in words and "0.4 g from source C" in words
    for bad in ([(0.3, "")], [(0.3, None)], [0.3], [(-1.0, "x")], [{"value": 0.2}]):
        with pytest.raises(osc.InputError, match="limits"):
            plot.gg(k, limits=bad)
    with pytest.raises(osc.InputError, match="needs metres and seconds"):
        plot.gg(k, units={"length": "km"})


def test_gg_marks_less_reliable_samples():
    k = flagged_2d()
    p = plot.gg(k)
    labels = [t.get_text() for t in p.figure.legends[0].get_texts()]
    flagged = [lab for lab in labels if lab.startswith("flagged")]
    assert len(flagged) == 1
    # Every flag that greys a sample or hides it is named, INVALID included.
    named = {f.name for f in osc.Flag if f.name in flagged[0]}
    assert named == {"EDGE", "GAP", "STOPPED", "INVALID"}
    assert {f.name for f in osc.Flag if f & plot.GG_DOUBTFUL} == named
    # The hollow rings are exactly the finite samples carrying one of those flags.
    rings = p.axes.collections[1]
    doubtful = (k.flags & int(plot.GG_DOUBTFUL)) != 0
    finite = np.isfinite(k.accel_tangential) & np.isfinite(k.accel_normal)
    assert len(rings.get_offsets()) == int((doubtful & finite).sum())
    assert (k.flagged(osc.Flag.INVALID) & ~finite).any()  # INVALID rows: no values to draw


# -- work ---------------------------------------------------------------------------------------


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


def tick_values(axis):
    """(tick location, number its label shows) for the visible ticks, after drawing."""
    fig = axis.axes.figure
    pixels(fig)
    lo, hi = sorted(axis.get_view_interval())
    out = []
    for tick in axis.get_major_ticks():
        loc, text = tick.get_loc(), tick.label1.get_text()
        if lo <= loc <= hi and text:
            out.append((loc, float(text.replace("\N{MINUS SIGN}", "-"))))
    assert len(out) >= 2
    return out


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


# -- pandas input -------------------------------------------------------------------------------


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


# -- the first hour of a new user: titles, frames, units, cautions ------------------------------


def window_boxes(fig):
    """Drawn extents of every visible, non-empty text of a figure, by text."""
    import matplotlib.text

    pixels(fig)
    renderer = fig.canvas.get_renderer()
    out = {}
    for t in fig.findobj(matplotlib.text.Text):
        if t.get_visible() and t.get_text().strip():
            out[t] = t.get_window_extent(renderer)
    return out


def caution_text(fig):
    import matplotlib.text

    found = [
        t
        for t in fig.findobj(matplotlib.text.Text)
        if plot.CAUTION in " ".join(t.get_text().split())
    ]
    return found


def rmf_helix():
    t = np.linspace(0.0, 12.0, 600)
    xyz = np.column_stack([2 * np.cos(t), 2 * np.sin(t), 0.5 * t])
    return osc.kinematics(t, xyz, up=(0, 0, 1), order=4, frame="rotation-minimizing")


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


def test_glyph_legend_names_the_frame_drawn():
    frenet = [t.get_text() for t in plot.path(helix_3d(), frames_every=5.0).figure.legends[0].texts]
    assert {"T (tangent)", "N (normal)", "B (binormal)"} <= set(frenet)
    k = rmf_helix()
    assert k.frame == "rotation-minimizing"
    labels = [t.get_text() for t in plot.path(k, frames_every=5.0).figure.legends[0].texts]
    assert "N (normal)" not in labels and "B (binormal)" not in labels
    assert {"T (tangent)", "U (rotation-minimizing normal)", "V (T × U)"} <= set(labels)
    assert "rotation-minimizing frame every 5 m" in labels
    # In the plane too, and for a frame of df.osc.kinematics results (a twist column).
    t = np.linspace(0.0, 20.0, 401)
    xy = 50.0 * np.column_stack([np.cos(0.3 * t), np.sin(0.3 * t)])
    k2 = osc.kinematics(t, xy, frame="rotation-minimizing")
    labels = [t.get_text() for t in plot.path(k2, frames_every=50.0).figure.legends[0].texts]
    assert "U (rotation-minimizing normal)" in labels and "N (normal)" not in labels
    import pandas as pd

    df = pd.DataFrame({"t": t, "x": xy[:, 0], "y": xy[:, 1]})
    res = df.osc.kinematics(time="t", position=["x", "y"], keep=True, frame="rotation-minimizing")
    labels = [t.get_text() for t in plot.path(res, frames_every=50.0).figure.legends[0].texts]
    assert "U (rotation-minimizing normal)" in labels and "N (normal)" not in labels


def scaled_circle(radius, n=201):
    u = np.linspace(0.0, 6.0, n)  # most of a turn, at no more than 10 m/s
    t = u * max(1.0, radius / 10.0)
    return osc.kinematics(t, radius * np.column_stack([np.cos(u), np.sin(u)]))


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


# -- the curvature diagram and the fitted elements ------------------------------------------------


def clothoid_chain(spacing=0.5, grade=None):
    """A straight of 60 m along +x, a left spiral of 50 m into R = 80 m, 70 m of that arc.

    Exact positions: the clothoid from the straight is x = a·C(u/a), y = a·S(u/a) with
    a = sqrt(π R L) (Fresnel integrals, scipy.special.fresnel's convention); it ends turned by
    L/(2R), and the arc goes on about the centre R to its left. With ``grade`` the path climbs
    z = grade·s (a 3-D path whose plan view is the chain). Returns t (10 m/s), positions, s.
    """
    from scipy.special import fresnel

    straight, spiral, radius, arc = 60.0, 50.0, 80.0, 70.0
    s = np.arange(0.0, straight + spiral + arc, spacing)
    a = np.sqrt(np.pi * radius * spiral)
    fs, fc = fresnel(np.clip(s - straight, 0.0, spiral) / a)
    sx, sy = straight + a * fc, a * fs
    end = straight + spiral
    turn = spiral / (2 * radius)
    ex, ey = sx[s >= end][0], sy[s >= end][0]  # the spiral's end (u clipped to L)
    cx, cy = ex - radius * np.sin(turn), ey + radius * np.cos(turn)
    phi = turn + np.clip(s - end, 0.0, None) / radius
    x = np.where(s < straight, s, np.where(s < end, sx, cx + radius * np.sin(phi)))
    y = np.where(s < straight, 0.0, np.where(s < end, sy, cy - radius * np.cos(phi)))
    pos = np.column_stack([x, y] if grade is None else [x, y, grade * s])
    return s / 10.0, pos, s


def chain_elements(grade=None):
    from osculate.elements import elements_of

    t, pos, _ = clothoid_chain(grade=grade)
    up = None if grade is None else (0.0, 0.0, 1.0)
    k = osc.kinematics(t, pos, method="smooth", up=up)
    return k, elements_of(k, up=up), pos


def by_gid(fig, prefix):
    return [c for c in fig.findobj() if str(c.get_gid() or "").startswith(prefix)]


def distance_to_polyline(points, a, b):
    """Smallest distance of each point to the segments a[j]–b[j] (any dimension)."""
    ab = b - a
    w = points[:, None, :] - a[None, :, :]
    f = np.clip(np.einsum("ijk,jk->ij", w, ab) / np.einsum("jk,jk->j", ab, ab), 0.0, 1.0)
    return np.linalg.norm(w - f[..., None] * ab[None], axis=2).min(axis=1)


def test_curvature_diagram_draws_one_segment_per_element_and_names_the_kinds():
    from osculate import _palette as palette
    from osculate.elements import KINDS

    k, el, _ = chain_elements()
    assert [KINDS[c] for c in el.kind] == ["straight", "spiral", "arc"]  # the construction
    p = plot.curvature(k, el)
    (model,) = by_gid(p.figure, "elements:model")
    segs = np.asarray(model.get_segments())
    assert len(segs) == len(el)
    # Each segment runs from (start s, start κ) to (end s, end κ): straights on 0, the arc flat.
    assert np.allclose(segs[:, 0, 0], el.start_arclength) and np.allclose(
        segs[:, 1, 0], el.end_arclength
    )
    assert np.allclose(segs[:, 0, 1], el.start_curvature) and np.allclose(
        segs[:, 1, 1], el.end_curvature
    )
    assert np.all(segs[0, :, 1] == 0.0) and segs[2, 0, 1] == segs[2, 1, 1]
    # One shading per kind present, a span per element, in the kind's tint; named in the legend.
    for name in KINDS:
        (shade,) = [
            c for c in by_gid(p.figure, f"elements:{name}") if isinstance(c, PolyCollection)
        ]
        assert len(shade.get_paths()) == int(np.sum(el.kind_name == name))
        assert np.allclose(shade.get_facecolor()[0][:3], palette.to_rgb(palette.ELEMENTS[name]))
    legend = [t.get_text() for t in p.figure.legends[0].get_texts()]
    for name in KINDS:
        assert any(text.startswith(name) or f" {name} " in f" {text} " for text in legend), name
    assert any(text.startswith("fitted elements (3)") for text in legend)
    # The estimate with its 95 % band (k.se has the curvature), the caution, the axis units.
    assert any(isinstance(c, FillBetweenPolyCollection) for c in p.axes.collections)
    assert len(caution_text(p.figure)) == 1
    assert p.axes.get_ylabel() == "signed curvature (left +) [1/m]"
    assert p.axes.get_xlabel() == "arc length s [m]"


def test_curvature_diagram_signs_3d_paths_about_up():
    # A helix climbing anticlockwise about +z turns left about +z: κ = a/(a² + c²) > 0, and
    # negative about −z. Without up the kinematics' own signed curvature (computed with up).
    t = np.linspace(0.0, 12.0, 600)
    xyz = np.column_stack([2 * np.cos(t), 2 * np.sin(t), 0.5 * t])
    unsigned = osc.kinematics(t, xyz, order=4)
    kappa = 2.0 / (2.0**2 + 0.5**2)

    def drawn(p):
        lc = [
            c for c in p.axes.collections if isinstance(c, LineCollection) and c.get_gid() is None
        ]
        return np.concatenate([np.asarray(s)[:, 1] for s in lc[0].get_segments()])

    inner = slice(100, -100)  # away from the EDGE samples
    assert np.allclose(drawn(plot.curvature(unsigned, up=(0, 0, 1)))[inner], kappa, rtol=1e-3)
    assert np.allclose(drawn(plot.curvature(unsigned, up=(0, 0, -2)))[inner], -kappa, rtol=1e-3)
    # The kinematics' own 3-D signed curvature is (v × a)·up / |v|³ (src/frame.rs): for this
    # helix v × a · z = a²ω³ = 4 and |v| = sqrt(a² + c²) = sqrt(4.25) (ω = 1).
    signed = osc.kinematics(t, xyz, order=4, up=(0, 0, 1))
    own = 4.0 / 4.25**1.5
    assert np.allclose(drawn(plot.curvature(signed))[inner], own, rtol=1e-3)
    with pytest.raises(osc.InputError, match="up"):
        plot.curvature(unsigned)
    with pytest.raises(osc.InputError, match="up"):
        plot.curvature(circle_2d(), up=(0, 0, 1))


def test_curvature_diagram_of_chosen_tracks():
    from osculate.elements import elements_of

    k = flagged_2d()
    el = elements_of(k)
    p = plot.curvature(k, el, tracks=["b"])
    (model,) = by_gid(p.figure, "elements:model")
    assert len(model.get_segments()) == int(np.sum(el.track == "b"))
    assert p.axes.get_xlim()[1] == pytest.approx(np.nanmax(k.arclength[k.tracks == "b"]))
    legend = [t.get_text() for t in p.figure.legends[0].get_texts()]
    assert "track b" in legend and "track a" not in legend
    with pytest.raises(osc.InputError, match="tracks"):
        plot.curvature(k, tracks=["c"])
    with pytest.raises(osc.InputError, match="tracks"):
        plot.curvature(circle_2d(), tracks=[0])
    with pytest.raises(TypeError, match="Elements"):
        plot.curvature(k, elements=el.to_pandas())


@pytest.mark.parametrize("grade", [None, 0.03], ids=["2d", "3d"])
def test_path_draws_the_fitted_chain_within_1_cm_of_the_exact_one(grade):
    # Noise-free samples of the exact chain (clothoid_chain: Fresnel integrals); the drawn
    # chain is rebuilt from each element's start, heading, curvatures and length.
    from osculate.elements import KINDS

    k, el, pos = chain_elements(grade)
    p = plot.path(k, color=None, elements=el)
    drawn = {c.get_gid().split(":")[1]: c for c in by_gid(p.figure, "elements:")}
    assert set(drawn) == set(KINDS)
    lines = []
    for name, lc in drawn.items():
        segs = lc._segments3d if grade is not None else lc.get_segments()
        lines += [np.asarray(s, dtype=float) for s in segs]
        assert len(segs) == int(np.sum(el.kind_name == name))
    a = np.concatenate([s[:-1] for s in lines])
    b = np.concatenate([s[1:] for s in lines])
    # Every sample within 1 cm of the drawn chain (the brief's tolerance) ...
    assert distance_to_polyline(pos, a, b).max() < 0.01
    # ... and every drawn point within 1 cm of the exact path (sampled every 2 cm: chords of the
    # 80 m arc then stray 0.02² / (8·80) m, nothing against 1 cm).
    _, fine, _ = clothoid_chain(spacing=0.02, grade=grade)
    vertices = np.concatenate(lines)
    assert distance_to_polyline(vertices, fine[:-1], fine[1:]).max() < 0.01
    legend = [t.get_text() for t in p.figure.legends[0].get_texts()]
    assert "fitted spiral (clothoid, κ linear in s)" in legend
    # Dash patterns tell the kinds apart besides colour.
    styles = {name: str(lc.get_linestyle()) for name, lc in drawn.items()}
    assert len(set(styles.values())) == 3


def test_path_refuses_elements_of_another_dimension():
    k2, el2, _ = chain_elements()
    k3, el3, _ = chain_elements(0.03)
    with pytest.raises(osc.InputError, match="3-D"):
        plot.path(k2, elements=el3)
    with pytest.raises(osc.InputError, match="planar"):
        plot.path(k3, elements=el2)


def test_band_does_not_set_the_axis_limits():
    # A vehicle with stops (tests/test_trust.py): next to each stop the standard error of κ is
    # hundreds of times the value; the curvature panel's limits follow the estimates (the turn's
    # κ = 1/20 m, construction), not the band, which used to stretch them to about ±20 1/m.
    from test_trust import _stop_and_go

    t, x, _, _ = _stop_and_go(np.random.default_rng(1))
    k = osc.kinematics(t, x, method="smooth")
    assert np.nanmax(k.se["curvature"]) > 1.0  # the wide band is there
    p = osc.plot.profile(k, quantities=["curvature"])
    lo, hi = (
        p.axes[0].get_ylim() if isinstance(p.axes, (list, tuple, np.ndarray)) else p.axes.get_ylim()
    )
    assert hi < 0.2 and lo > -0.2, (lo, hi)
