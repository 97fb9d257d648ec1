"""osculate.plot.curvature: the curvature diagram and its element model."""

import numpy as np
import osculate as osc
import pytest
from matplotlib.collections import FillBetweenPolyCollection, LineCollection, PolyCollection
from osculate import plot
from plot_cases import by_gid, caution_text, chain_elements, circle_2d, flagged_2d


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
