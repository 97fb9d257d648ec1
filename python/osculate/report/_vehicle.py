"""Section 2 of the report: the electric vehicle's laps, elements, work and power."""

from __future__ import annotations

from typing import Any

import numpy as np
import numpy.typing as npt

from ..demo import spiral_loop
from ._checks import Check, Section, check_table
from ._figures import DEMO_LIMIT, Figure, lap_legends, overlay_truth, save_figure
from ._tables import kinematics_columns, middle_rows, smoothing_of, undefined, write_table

__all__ = ["vehicle_section"]


def vehicle_section(out: Any, figs: bool, files: list[Any]) -> Section:
    from ..demo import STANDARD_GRAVITY
    from ..elements import elements_of
    from ..intrinsic import kinematics
    from ..lineint import power as line_power
    from ..lineint import work as line_work
    from ..reparam import resample

    e = spiral_loop()
    lap = e.lap + 1  # laps are numbered from 1 in the report, its tables and figures
    k = kinematics(e.t, e.xy, method="smooth", tracks=lap)
    laps = len(e.lap_distance)
    lap_len = e.lap_length
    u = np.mod(e.distance, lap_len)
    half = np.mod(u, 0.5 * lap_len)  # position within each half of the loop
    arc = e.segment == "arc"
    arc_id = (u >= 0.5 * lap_len).astype(np.int64) + 2 * e.lap
    centre = middle_rows(arc, arc_id, 1.0 / 3.0)
    s0 = 0.5 * e.straight_length  # the entry clothoids start half a straight into each half
    entry = (half > s0 + 0.1 * e.spiral_length) & (half < s0 + 0.9 * e.spiral_length)
    slope = np.polyfit(half[entry] - s0, k.signed_curvature[entry], 1)[0]
    summary = k.summary_arrays()
    bends = k.turns()
    worst_bend = int(np.argmax(np.abs(bends.min_radius - e.bend_radius))) if len(bends) else 0
    lap_err = (summary["length"] - e.lap_distance) / e.lap_distance
    worst = int(np.argmax(np.abs(lap_err)))  # an index: lap worst + 1
    w = line_work(e.xy, e.force, t=e.t, tracks=lap, cumulative=True)
    w_err = (w.total - e.drag_work) / np.abs(e.drag_work)
    w_worst = int(np.argmax(np.abs(w_err)))
    power = line_power(e.t, e.xy, e.force, method="smooth", tracks=lap)
    # The element table of every lap: straights, circular arcs and clothoids.
    el = elements_of(k)
    design = _design_kinds()
    laps_in_order = sum(
        int(np.array_equal(el.kind[el.track == n], design)) for n in range(1, laps + 1)
    )  # three laps
    per_lap = np.stack(
        [np.bincount(el.kind[el.track == n], minlength=3) for n in range(1, laps + 1)]
    )
    arcs_off = int(np.argmax(np.abs(per_lap[:, 1] - 2)))  # an index: lap arcs_off + 1
    spirals_off = int(np.argmax(np.abs(per_lap[:, 2] - 4)))
    el_arc, el_spiral = el.kind == 1, el.kind == 2
    spacing = float(np.median(np.diff(k.arclength)[np.diff(lap) == 0]))
    spiral_tol = max(0.05, 2.0 * spacing / e.spiral_length)
    name = "electric vehicle"
    checks = [
        Check(
            name,
            "bend radius (median over the circular arcs)",
            "m",
            float(np.median(k.radius[arc])),
            e.bend_radius,
            0.02,
        ),
        Check(
            name,
            "bends found (turn table, two per lap)",
            "",
            float(len(bends)),
            float(2 * laps),
            0.0,
            relative=False,
        ),
        Check(
            name,
            "bend radius from the turn table (circle through the core, worst bend)",
            "m",
            float(bends.min_radius[worst_bend]) if len(bends) else float("nan"),
            e.bend_radius,
            0.02,
        ),
        Check(
            name,
            "clothoid rate dκ/ds (fit over the entry spirals)",
            "1/m²",
            float(slope),
            e.spiral_rate,
            0.05,
        ),
        Check(
            name,
            "a_n mid-bend (median, middle third of each arc)",
            "m/s²",
            float(np.median(k.accel_normal[centre])),
            float(np.median(e.accel_normal[centre])),
            0.03,
        ),
        Check(
            name,
            f"length of lap {worst + 1} (the worst lap)",
            "m",
            float(summary["length"][worst]),
            float(e.lap_distance[worst]),
            0.005,
        ),
        Check(
            name,
            f"work of the resistance force, lap {w_worst + 1} (the worst lap)",
            "J",
            float(w.total[w_worst]),
            float(e.drag_work[w_worst]),
            0.01,
        ),
        Check(
            name,
            f"circular arcs per lap (element table, lap {arcs_off + 1}: the worst)",
            "",
            float(per_lap[arcs_off, 1]),
            2.0,
            0.0,
            relative=False,
        ),
        Check(
            name,
            f"transition spirals per lap (element table, lap {spirals_off + 1}: the worst)",
            "",
            float(per_lap[spirals_off, 2]),
            4.0,
            0.0,
            relative=False,
        ),
        Check(
            name,
            "laps whose elements run straight, spiral, arc, spiral, straight (twice)",
            "",
            float(laps_in_order),
            float(laps),
            0.0,
            relative=False,
        ),
        Check(
            name,
            "arc radius (median over the element table's arcs)",
            "m",
            float(np.median(el.radius[el_arc])) if el_arc.any() else float("nan"),
            e.bend_radius,
            0.02,
        ),
        Check(
            name,
            "spiral parameter A (median over the element table's spirals; A² = RL)",
            "m",
            float(np.median(el.spiral_parameter[el_spiral])) if el_spiral.any() else float("nan"),
            float(np.sqrt(e.bend_radius * e.spiral_length)),
            0.05,
        ),
        Check(
            name,
            "spiral length (median over the element table's spirals)",
            "m",
            float(np.median(el.length[el_spiral])) if el_spiral.any() else float("nan"),
            e.spiral_length,
            spiral_tol,
        ),
    ]
    cols = kinematics_columns(k, ("x", "y"), track="lap")
    cols.update(
        force_x=e.force[:, 0],
        force_y=e.force[:, 1],
        power=power,
        work=np.asarray(w.cumulative, dtype=float),
        true_speed=e.speed,
        true_curvature=e.curvature,
        true_work=e.cumulative_drag_work,
    )
    files.append(write_table(out / "ev_samples", cols))
    r = resample(
        e.t,
        e.xy,
        step=1.0,
        method="smooth",
        tracks=lap,
        extra={"force_x": e.force[:, 0], "force_y": e.force[:, 1]},
    )
    rcols: dict[str, np.ndarray] = {"lap": np.asarray(r.tracks), "s": r.s, "t": r.t}
    rcols.update(x=r.position[:, 0], y=r.position[:, 1], **(r.extra or {}))
    files.append(write_table(out / "ev_resampled", rcols))
    # ∫ P dt per lap (trapezoid), a consistency check of power against work.
    same = e.lap[1:] == e.lap[:-1]
    seg = np.where(same, 0.5 * (power[1:] + power[:-1]) * np.diff(e.t), 0.0)
    energy = np.bincount(e.lap[1:], weights=seg, minlength=laps)
    # The laps are cut at the start/finish line, mid-straight at the top speed: the crossing
    # falls between two logged rows, so each lap's rows span a little less than the loop.
    first = np.searchsorted(e.lap, np.arange(laps), side="left")
    crossing = e.speed[first] * float(np.median(np.diff(e.t)))
    straight = e.segment == "straight"
    frenet_gone = undefined(k.normal, straight)
    text = f"""## 2. Electric vehicle: a loop with clothoid transitions

Scenario (invented, seed 5): a {e.mass:.0f} kg vehicle laps a {lap_len:.1f} m loop {laps} times:
{e.straight_length:.0f} m straights, clothoids (Euler spirals, curvature linear in arc length) of
{e.spiral_length:.0f} m, and circular arcs of radius {e.bend_radius:.0f} m, at 9 to 14 m/s. The
heading is the exact integral of the curvature and the positions are integrated from it
numerically (exact to about 1e-12 m). Positions are logged at about 20 Hz with clock jitter and
{e.noise * 100:.0f} cm noise per axis, and the resistance force (drag with CdA = {e.drag_area} m²
plus rolling resistance Crr = {e.rolling}) with {e.force_noise:.0f} N noise. {len(e.t)} samples,
one track per lap; laps are numbered 1 to {laps} here and in the tables (column `lap`; the `track`
of `summary.csv`){" and figures" if figs else ""}.

Lap lengths: the loop is {lap_len:.3f} m long by design, 2 × (straight + clothoid + πR). A lap's
true length below is the distance driven between its first and last logged rows,
{", ".join(f"{x:.2f}" for x in e.lap_distance)} m for laps 1 to {laps}. It is shorter because laps
start and end at the start/finish line in the middle of a straight, where the vehicle does
{e.speed[first].max():.0f} m/s and the log's rows are about {crossing.max():.1f} m apart: the part
of each crossing that falls between the last row of one lap and the first of the next belongs to
neither.

Method: `osc.kinematics(t, xy, method="smooth", tracks=lap)` (λ* for laps 1 to {laps}:
{", ".join(f"{x:.3g}" for x in smoothing_of(k))}); work of the logged force by
`osc.work(xy, force, t=t, tracks=lap, cumulative=True)` (trapezoid rule; estimated quadrature error
{", ".join(f"{x:.2g}" for x in w.error)} J per lap); power F·v by `osc.power(..., method="smooth")`,
whose time integral per lap ({", ".join(f"{x / 1e3:.2f}" for x in energy)} kJ) agrees with the work
({", ".join(f"{x / 1e3:.2f}" for x in w.total)} kJ; true
{", ".join(f"{x / 1e3:.2f}" for x in e.drag_work)} kJ); points every metre along each lap by
`osc.resample(t, xy, step=1.0, method="smooth", tracks=lap, extra=force)` ({len(r)} points).

{check_table(checks)}

Frames: the Frenet normal is undefined at {frenet_gone} of the {int(straight.sum())} samples on
the straights, where the curvature is within the noise of zero (STRAIGHT); where the noise lets it
be defined there, it may point to either side.

Elements: `osculate.elements.elements_of(k)` cuts each lap's curvature diagram into straights,
circular arcs and clothoids and fits the chain to the logged positions ({len(el)} elements over
the {laps} laps; RMS distance of the samples from the chain {100 * float(np.median(el.rms)):.1f} cm,
median over the elements, against the {e.noise * 100:.0f} cm noise). By construction each lap
runs half a straight, then twice spiral → arc → spiral → straight, the last straight halved:
2 arcs and 4 spirals per lap, counted exactly. The arcs' radius is checked against the
{e.bend_radius:.0f} m of the design to 2 %, the spirals' parameter A against √(R·L) =
{np.sqrt(e.bend_radius * e.spiral_length):.3f} m (A² = R·L, the clothoid's usual parameter) to
5 %, and their length against {e.spiral_length:.0f} m to the larger of 5 % and two sample
spacings (2 × {spacing:.2f} m = {100 * 2 * spacing / e.spiral_length:.1f} %): where a spiral
ends is blurred by the smoothing, which rounds the corners of the curvature diagram. Element
tables are reconstructions from logged data, describing how the loop was driven: design values
(radii, spiral parameters, lengths) are decided by local codes and licensed engineers.
"""
    figures: list[Figure] = []
    if figs:
        from .. import plot

        lap1 = e.lap == 0
        p = plot.path(
            k,
            color="curvature",
            frames_every=40.0,
            title="Electric vehicle: loop coloured by estimated curvature",
        )
        lap_legends(p.figure)
        figures.append(
            Figure(
                save_figure(p, out / "ev_path.png"),
                "Electric vehicle: the loop coloured by estimated curvature, with the Frenet "
                "frame every 40 m (none where the normal is undefined).",
            )
        )
        p = plot.profile(
            k,
            quantities=["speed", "curvature", "accel_tangential", "accel_normal"],
            title="Electric vehicle: profiles along each lap",
        )
        s_lap = e.distance[lap1] - e.distance[lap1][0]
        overlay_truth(p.axes[0], s_lap, e.speed[lap1], "true v (lap 1)")
        overlay_truth(p.axes[1], s_lap, np.abs(e.curvature[lap1]), "true κ (lap 1)")
        overlay_truth(p.axes[2], s_lap, e.accel_tangential[lap1], "true a_t (lap 1)")
        overlay_truth(p.axes[3], s_lap, e.accel_normal[lap1], "true a_n (lap 1)")
        lap_legends(p.figure)
        figures.append(
            Figure(
                save_figure(p, out / "ev_profile.png"),
                f"Electric vehicle: speed, curvature, a_t and a_n along laps 1 to {laps} with "
                "95 % bands, the truth of lap 1 dashed; shaded: flagged samples.",
            )
        )
        p = plot.curvature(
            k,
            el,
            tracks=[1],
            title="Electric vehicle: curvature diagram of lap 1 and its fitted elements",
        )
        overlay_truth(p.axes, s_lap, e.curvature[lap1], "true κ (lap 1)", loc="upper right")
        lap_legends(p.figure)
        figures.append(
            Figure(
                save_figure(p, out / "ev_curvature.png"),
                "Electric vehicle: signed curvature along lap 1 with its 95 % band, the fitted "
                "elements over it (straights at 0, arcs constant, spirals linear; spans shaded "
                "by kind) and the truth dashed.",
            )
        )
        p = plot.gg(k, limits=[DEMO_LIMIT], title="Electric vehicle: acceleration share")
        # The truth of lap 1: lateral acceleration v²κ (signed, left turns positive) and a_t, in g.
        lateral = e.speed[lap1] ** 2 * e.curvature[lap1] / STANDARD_GRAVITY
        overlay_truth(
            p.axes,
            lateral,
            e.accel_tangential[lap1] / STANDARD_GRAVITY,
            "truth (lap 1)",
            loc="lower left",
        )
        lap_legends(p.figure)
        figures.append(
            Figure(
                save_figure(p, out / "ev_gg.png"),
                "Electric vehicle: g-g diagram, longitudinal a_t against lateral acceleration in "
                f"g, the truth of lap 1 dashed, with one reference circle at {DEMO_LIMIT[0]} g "
                "drawn only to show how a limit is labelled.",
            )
        )
        p = plot.work(
            k,
            values=w.cumulative,
            truth=e.cumulative_drag_work,  # the true cumulative work at every row, dashed
            title="Electric vehicle: work of the logged resistance force, per lap",
        )
        lap_legends(p.figure)
        figures.append(
            Figure(
                save_figure(p, out / "ev_work.png"),
                f"Electric vehicle: cumulative work of the logged resistance force along laps 1 to "
                f"{laps}, with each lap's total, and the true work dashed.",
            )
        )
        files += [fig.path for fig in figures]
    return Section(checks, text, k, figures)


def _design_kinds() -> npt.NDArray[np.int8]:
    """Element kinds of one lap of the loop by construction, as codes of ``elements.KINDS``.

    Half a straight, then twice spiral, arc, spiral, straight, the last straight halved.
    """
    from ..elements import KINDS

    names = ["straight", *(["spiral", "arc", "spiral", "straight"] * 2)]
    return np.array([KINDS.index(n) for n in names], dtype=np.int8)
