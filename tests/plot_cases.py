"""Results and figure helpers shared by the tests of osculate.plot (test_plot*.py)."""

import matplotlib

matplotlib.use("Agg")  # set here, in the tests, not in the package

import numpy as np
import osculate as osc
from matplotlib.backends.backend_agg import FigureCanvasAgg
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


def texts(fig):
    import matplotlib.text

    return " ".join(t.get_text() for t in fig.findobj(matplotlib.text.Text))


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


def scaled_circle(radius, n=201):
    u = np.linspace(0.0, 6.0, n)  # most of a turn, at no more than 10 m/s
    t = u * max(1.0, radius / 10.0)
    return osc.kinematics(t, radius * np.column_stack([np.cos(u), np.sin(u)]))


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
