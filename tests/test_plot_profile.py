"""osculate.plot.profile: panels, flag shading and the 95 % bands."""

import numpy as np
import osculate as osc
import pytest
from matplotlib.collections import FillBetweenPolyCollection, PolyCollection
from osculate import plot
from plot_cases import circle_2d, flagged_2d, helix_3d


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
