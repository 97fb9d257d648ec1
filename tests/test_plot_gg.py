"""osculate.plot.gg: accelerations in g, reference circles with their sources."""

import numpy as np
import osculate as osc
import pytest
from matplotlib.figure import Figure
from matplotlib.patches import Circle
from osculate import plot
from plot_cases import G, circle_2d, flagged_2d, texts


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
