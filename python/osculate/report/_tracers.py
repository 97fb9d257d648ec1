"""Section 3 of the report: tracer particles in a vortex, and the circulation of the grid."""

from __future__ import annotations

from typing import Any

import numpy as np

from ..demo import swirl_tracers
from ._checks import Check, Section, check_table
from ._figures import Figure, save_figure
from ._tables import kinematics_columns, median_by_track, smoothing_of, write_table

__all__ = ["tracers_section"]


def tracers_section(out: Any, figs: bool, files: list[Any]) -> Section:
    from ..intrinsic import kinematics
    from ..lineint import GridField
    from ..lineint import work as line_work

    d = swirl_tracers()
    k = kinematics(d.t, d.xy, method="smooth", tracks=d.particle)
    m = len(d.radius)
    radius = median_by_track(k.radius, d.particle, m)
    speed = median_by_track(k.speed, d.particle, m)
    true_speed = d.swirl_speed(d.radius)
    r_err = np.abs(radius / d.radius - 1.0)
    v_err = np.abs(speed / true_speed - 1.0)
    field = GridField(
        d.grid_velocity,
        origin=(d.grid_x[0], d.grid_y[0]),
        spacing=(d.grid_x[1] - d.grid_x[0], d.grid_y[1] - d.grid_y[0]),
    )
    rings = np.array([0.01, 0.02, 0.05])
    a = np.linspace(0.0, 2 * np.pi, 721)[:-1]
    circle = np.column_stack([np.cos(a), np.sin(a)])
    loops = (rings[:, None, None] * circle[None]).reshape(-1, 2)
    circ = line_work(loops, field, tracks=np.repeat(np.arange(len(rings)), len(a)), closed=True)
    name = "tracer particles"
    checks = [
        Check(
            name,
            "radius of curvature: median absolute relative error over tracks",
            "%",
            float(100 * np.median(r_err)),
            0.0,
            2.0,
            relative=False,
        ),
        Check(
            name,
            "speed: median absolute relative error over tracks",
            "%",
            float(100 * np.median(v_err)),
            0.0,
            1.0,
            relative=False,
        ),
    ] + [
        Check(
            name,
            f"circulation of the gridded field, circle r = {r * 1e3:.0f} mm",
            "m²/s",
            float(c),
            float(d.enclosed_circulation(r)),
            0.01,
        )
        for r, c in zip(rings, circ.total)  # three rings
    ]
    cols = kinematics_columns(k, ("x", "y"))
    cols.update(true_speed=d.speed)
    files.append(write_table(out / "tracers_samples", cols))
    text = f"""## 3. Tracer particles in a swirling flow

Scenario (invented, seed 3): {m} particles tracked at {d.fps:.0f} frames per second in a steady
Lamb–Oseen vortex (circulation Γ = {d.circulation} m²/s, core radius {d.core_radius * 1e3:.0f} mm),
tracks of 40 to 150 frames at radii 8 to 70 mm, tracking noise {d.noise * 1e6:.0f} µm per axis;
{len(d.t)} positions. Every particle runs round a circle, so its radius of curvature is its
distance from the centre and its speed is the swirl speed there. The velocity is also given on a
{len(d.grid_x)} × {len(d.grid_y)} grid ({(d.grid_x[1] - d.grid_x[0]) * 1e3:.0f} mm spacing).

Method: `osc.kinematics(t, xy, method="smooth", tracks=particle)`, one λ* per track (median
{np.median(smoothing_of(k)):.3g}); per-track medians of radius and speed against the
truth. Circulation ∮ u·dr of the gridded field round centred circles (720-gons) by
`osc.work(circle, osc.GridField(...), closed=True)` (bilinear interpolation, Gauss–Legendre
nodes), against Γ(1 − exp(−r²/r_c²)).

{check_table(checks)}

The worst track's radius is off by {100 * np.max(r_err):.1f} %: short tracks far from the centre
turn through a few degrees only, and curvature from a short arc is uncertain.
"""
    figures: list[Figure] = []
    if figs:
        from .. import plot

        p = plot.path(k, color="speed", title="Tracer particles: tracks coloured by speed")
        figures.append(
            Figure(
                save_figure(p, out / "tracers_path.png"),
                f"Tracer particles: the {m} tracks round the vortex centre, coloured by estimated "
                "speed.",
            )
        )
        files += [fig.path for fig in figures]
    return Section(checks, text, k, figures)
