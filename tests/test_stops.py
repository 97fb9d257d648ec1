"""osculate.stops: the rules that turn STOPPED samples into stop intervals.

Synthetic flags on a 1 s clock make each rule visible: runs of STOPPED samples, moving gaps of
at most two samples bridged (MERGE_SAMPLES), a shortest stop of five mean time steps
(MIN_STOP_STEPS) unless ``min_stop`` says otherwise, tracks kept apart, INVALID rows never
stopped, and ends trimmed to samples within three noise levels of the stop's centre
(HOLD_NOISE). Expected rows follow from those rules and the construction.
"""

import numpy as np
import osculate as osc
from osculate.stops import Stops, find_stops, stop_table

STOPPED, INVALID = int(osc.Flag.STOPPED), int(osc.Flag.INVALID)


def track(n, stopped, extra=None):
    """Times 0, 1, ..., n − 1 s, STOPPED at the given rows.

    The positions (t, 0) m differ from row to row, so that no two runs share a place: with
    unknown noise (NaN) stops are neither trimmed nor merged by place.
    """
    t = np.arange(n, dtype=float)
    x = np.column_stack([t, np.zeros(n)])
    flags = np.zeros(n, np.uint8)
    flags[list(stopped)] = STOPPED
    if extra is not None:
        rows, bits = extra
        flags[list(rows)] |= np.uint8(bits)
    return t, x, flags


def stops_of(t, x, flags, offsets=None, noise=None, min_stop=None):
    offsets = np.array([0, len(t)]) if offsets is None else np.asarray(offsets)
    m = len(offsets) - 1
    noise = np.full(m, np.nan) if noise is None else np.asarray(noise, dtype=float)
    first, last, code = find_stops(t, x, flags, offsets, noise, min_stop)
    return [(int(a), int(b), int(c)) for a, b, c in zip(first, last, code)]


def test_a_run_of_stopped_samples_is_one_stop():
    assert stops_of(*track(100, range(20, 40))) == [(20, 39, 0)]


def test_moving_gaps_of_two_samples_are_bridged_three_are_not():
    bridged = [*range(20, 30), *range(32, 46)]  # rows 30, 31 moving
    assert stops_of(*track(100, bridged)) == [(20, 45, 0)]
    apart = [*range(20, 30), *range(33, 46)]  # rows 30, 31, 32 moving
    assert stops_of(*track(100, apart)) == [(20, 29, 0), (33, 45, 0)]


def test_shortest_stop_is_five_mean_steps_unless_given():
    # Mean step 1 s: 6 samples span 5 s and stay, 5 samples span 4 s and go.
    assert stops_of(*track(100, range(20, 26))) == [(20, 25, 0)]
    assert stops_of(*track(100, range(20, 25))) == []
    assert stops_of(*track(100, range(20, 25)), min_stop=4.0) == [(20, 24, 0)]
    assert stops_of(*track(100, range(20, 40)), min_stop=19.5) == []


def test_stops_never_cross_tracks_or_count_invalid_rows():
    t, x, flags = track(100, range(40, 60))
    t[50:] -= 50.0  # two tracks of 50 rows, each with its own clock
    assert stops_of(t, x, flags, offsets=[0, 50, 100]) == [(40, 49, 0), (50, 59, 1)]
    # INVALID rows in the middle of a stop: the stop ends before them and starts again after.
    t, x, flags = track(100, range(20, 60), extra=(range(38, 41), INVALID))
    assert stops_of(t, x, flags) == [(20, 37, 0), (41, 59, 0)]


def test_ends_are_trimmed_to_samples_that_hold_the_position():
    # Noise 1 cm: a sample holds the stop within 3 cm of its centre. Rows 22-39 stand at x = 20,
    # rows 20 and 21 are still 5 cm short: the centre is 20 − 0.1/20 = 19.995 m, rows 22-39 lie
    # 5 mm from it, rows 20 and 21 45 mm: trimmed. With unknown noise nothing is trimmed.
    t, x, flags = track(100, range(20, 40))
    x[20:40, 0] = 20.0
    x[20:22, 0] = 19.95
    assert stops_of(t, x, flags, noise=[0.01]) == [(22, 39, 0)]
    assert stops_of(t, x, flags) == [(20, 39, 0)]


def test_stop_table_on_the_callers_rows():
    t, x, flags = track(100, range(20, 40))
    x[20:40] = [3.0, 4.0]  # held at (3, 4)
    first, last, code = find_stops(t, x, flags, np.array([0, 100]), np.array([0.01]))
    order = np.arange(100)[::-1]  # kernel row r is the caller's row 99 − r
    table = stop_table(t, x, first, last, code, np.array(["van"]), order)
    assert len(table) == 1 and table.track.tolist() == ["van"]
    assert (table.start[0], table.end[0], table.duration[0]) == (20.0, 39.0, 19.0)
    assert table.samples.tolist() == [20] and table.track_index.tolist() == [0]
    assert (table.first_row[0], table.last_row[0]) == (79, 60)
    np.testing.assert_array_equal(table.position, [[3.0, 4.0]])  # mean of exact positions
    cols = table.columns()
    names = ["track", "start", "end", "duration", "position_x", "position_y", "samples"]
    assert list(cols) == names
    assert table["duration"] is table.duration
    empty = stop_table(t, x, first[:0], last[:0], code[:0], np.array(["van"]), None)
    assert len(empty) == 0 and empty.position.shape == (0, 2)
    assert len(Stops.none(3)) == 0 and Stops.none(3).position.shape == (0, 3)
