"""osculate.plot.path: colours, frame glyphs and the fitted chain of elements."""

import numpy as np
import osculate as osc
import pytest
from matplotlib.quiver import Quiver
from osculate import plot
from plot_cases import (
    by_gid,
    chain_elements,
    circle_2d,
    clothoid_chain,
    distance_to_polyline,
    flagged_2d,
    helix_3d,
    rmf_helix,
)


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
