"""Element and turn tables after the smoothing fit: what they add to it, same run.

    python benches/segments_case.py [--quick] [--out FILE.json]

Invented road-like tracks (straight → clothoid → circular arc → clothoid → straight, then the
same bend the other way; radii 30–120 m, 1.5 m between samples, 3 cm noise), 1,000 tracks of
1,000 samples (``--quick``: 40 × 500). Timed: ``osc.kinematics(method="smooth")`` (the fit the
tables need), then ``k.elements()`` and ``k.turns()`` on its result. Target (from the project's
element issue): the element table in under 10× the time of the smoothing fit itself. There is no
NumPy/SciPy implementation of the same segmentation to time against; the reference is the fit
that every caller runs first. The element kinds are checked against the construction before
timing (share of tracks with the right sequence of kinds).

``run(quick) -> dict`` is the entry point for a driver; ``main`` prints the dict as JSON.
"""

from __future__ import annotations

import argparse
import json
import time
from typing import Any

import numpy as np
import osculate as osc

SIZES = {False: (1000, 1000), True: (40, 500)}
TARGET = 10.0
#: The kinds of every track, in order (construction below).
KINDS = ["straight", "spiral", "arc", "spiral", "straight", "spiral", "arc", "spiral", "straight"]


def tracks(m: int, n: int, seed: int = 12) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Times, positions and track ids of ``m`` invented tracks of ``n`` samples each."""
    rng = np.random.default_rng(seed)
    step = 1.5
    s = np.arange(n) * step
    total = s[-1]
    radius = rng.uniform(30.0, 120.0, m)[:, None]
    # Nine pieces: straight, spiral, arc, spiral, straight, spiral, arc (other hand), spiral,
    # straight, in proportions of the track length.
    cuts = np.array([0.0, 0.16, 0.24, 0.34, 0.42, 0.58, 0.66, 0.76, 0.84, 1.0]) * total
    k = np.zeros((m, n))
    for j, (a, b) in enumerate(zip(cuts[:-1], cuts[1:])):
        inside = (s >= a) & (s < b)
        u = (s[inside] - a) / (b - a)
        hand = 1.0 if j < 4 else -1.0
        shape = {1: u, 2: np.ones_like(u), 3: 1.0 - u, 5: u, 6: np.ones_like(u), 7: 1.0 - u}
        if j in shape:
            k[:, inside] = hand * shape[j] / radius
    theta = np.concatenate(
        [np.zeros((m, 1)), np.cumsum(0.5 * (k[:, 1:] + k[:, :-1]) * step, axis=1)], axis=1
    )
    x = np.concatenate(
        [
            np.zeros((m, 1)),
            np.cumsum(0.5 * step * (np.cos(theta[:, 1:]) + np.cos(theta[:, :-1])), axis=1),
        ],
        axis=1,
    )
    y = np.concatenate(
        [
            np.zeros((m, 1)),
            np.cumsum(0.5 * step * (np.sin(theta[:, 1:]) + np.sin(theta[:, :-1])), axis=1),
        ],
        axis=1,
    )
    speed = rng.uniform(8.0, 25.0, m)[:, None]
    t = s[None, :] / speed + rng.uniform(0.0, 3600.0, m)[:, None]
    xy = np.stack([x, y], axis=-1).reshape(-1, 2) + rng.normal(0.0, 0.03, (m * n, 2))
    return t.reshape(-1), xy, np.repeat(np.arange(m), n)


def run(quick: bool) -> dict[str, Any]:
    """The one case."""
    m, n = SIZES[quick]
    t, xy, ids = tracks(m, n)
    t0 = time.perf_counter()
    k = osc.kinematics(t, xy, tracks=ids, method="smooth")
    fit_s = time.perf_counter() - t0
    t0 = time.perf_counter()
    el = k.elements()
    elements_s = time.perf_counter() - t0
    t0 = time.perf_counter()
    turns = k.turns()
    turns_s = time.perf_counter() - t0
    names = el.kind_name
    right = sum(list(names[el.track == j]) == KINDS for j in range(m))
    ratio = elements_s / fit_s
    return {
        "segments": {
            "tracks": m,
            "samples_per_track": n,
            "smoothing_fit_s": fit_s,
            "elements_s": elements_s,
            "turns_s": turns_s,
            "elements_over_fit": ratio,
            "turns_per_track": len(turns) / m,
            "tracks_with_the_right_kinds": right / m,
            "target": f"elements <= {TARGET}x the smoothing fit",
            "measured": ratio,
            "verdict": "PASS" if ratio <= TARGET else "MISS",
            "status": "PASS" if ratio <= TARGET else "MISS",
        }
    }


def main() -> None:
    """Command line entry point."""
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true")
    ap.add_argument("--out", default=None)
    args = ap.parse_args()
    text = json.dumps(run(args.quick), indent=2)
    print(text)
    if args.out:
        with open(args.out, "w") as fh:
            fh.write(text)


if __name__ == "__main__":
    main()
