"""WGS 84 geodetic ↔ east-north-up against pymap3d, a published constant and closed forms."""

import numpy as np
import osculate as osc
import pandas as pd
import pytest
from osculate import Flag

pm = pytest.importorskip("pymap3d")
WGS84 = pm.Ellipsoid.from_name("wgs84")

# Origins spread over the globe: mid latitude, southern hemisphere across the antimeridian,
# high Arctic, the equator, a high-altitude origin.
ORIGINS = [
    (45.0, 7.0, 100.0),
    (-33.9, 179.95, 20.0),
    (78.2, 15.6, 5.0),
    (0.0, -75.0, 2500.0),
    (27.99, 86.93, 8848.0),
]


def random_track(rng, origin, length_m=100_000.0, n=2000):
    """Points up to `length_m` from the origin in ENU, as geodetic through pymap3d."""
    ang = rng.uniform(0, 2 * np.pi, n)
    rad = length_m * np.sqrt(rng.uniform(0, 1, n))
    e, nn, u = rad * np.cos(ang), rad * np.sin(ang), rng.uniform(-500, 3000, n)
    lat, lon, h = pm.enu2geodetic(e, nn, u, *origin, ell=WGS84, deg=True)
    return np.asarray(lat), np.asarray(lon), np.asarray(h)


@pytest.mark.parametrize("origin", ORIGINS)
def test_forward_agrees_with_pymap3d(rng, origin):
    # Reference: pymap3d.geodetic2enu (WGS 84). Tolerance 1 mm over 100 km (required); both are
    # closed forms, so they agree to rounding (~1e-8 m).
    lat, lon, h = random_track(rng, origin)
    ours = osc.geodetic_to_enu(lat, lon, h, origin=origin)
    ref = np.column_stack(pm.geodetic2enu(lat, lon, h, *origin, ell=WGS84, deg=True))
    np.testing.assert_allclose(ours, ref, rtol=0, atol=1e-3)


@pytest.mark.parametrize("origin", ORIGINS)
def test_inverse_agrees_with_pymap3d(rng, origin):
    # Reference: pymap3d.enu2geodetic (WGS 84, You (2000) for ECEF → geodetic), an independent
    # method. Tolerance 1 mm: 1e-8° of latitude is 1.1 mm, longitude scaled by cos(lat); h 1 mm.
    ang = rng.uniform(0, 2 * np.pi, 2000)
    rad = 100_000.0 * np.sqrt(rng.uniform(0, 1, 2000))
    e, n, u = rad * np.cos(ang), rad * np.sin(ang), rng.uniform(-500, 3000, 2000)
    ours = osc.enu_to_geodetic(e, n, u, origin)
    lat, lon, h = (np.asarray(a) for a in pm.enu2geodetic(e, n, u, *origin, ell=WGS84, deg=True))
    metres_per_degree = 111_320.0  # ≥ 110.5 km per degree of latitude; an upper bound suffices
    np.testing.assert_allclose(ours[:, 0], lat, rtol=0, atol=1e-3 / metres_per_degree * 1.01)
    dlon = (ours[:, 1] - lon + 540.0) % 360.0 - 180.0
    coslat = np.cos(np.radians(lat))
    assert np.max(np.abs(dlon) * coslat) * metres_per_degree <= 1e-3
    np.testing.assert_allclose(ours[:, 2], h, rtol=0, atol=1e-3)


@pytest.mark.parametrize("origin", ORIGINS)
def test_round_trip(rng, origin):
    # geodetic → ENU → geodetic with both closed forms: required ≤ 1e-9°; heights ≤ 1 µm.
    lat, lon, h = random_track(rng, origin)
    enu = osc.geodetic_to_enu(lat, lon, h, origin)
    back = osc.enu_to_geodetic(*enu.T, origin=origin)
    assert np.max(np.abs(back[:, 0] - lat)) <= 1e-9
    assert np.max(np.abs((back[:, 1] - lon + 540.0) % 360.0 - 180.0)) <= 1e-9
    assert np.max(np.abs(back[:, 2] - h)) <= 1e-6


def test_known_point_north_pole_seen_from_the_equator():
    # Published WGS 84 constants, NIMA TR8350.2 (3rd ed., 2000): a = 6378137 m (Table 3.1) and the
    # derived semi-minor axis b = 6356752.3142 m (Table 3.3); values quoted from memory.
    # The pole (90°, any lon, 0 m) has ECEF (0, 0, b); the origin (0°, 0°, 0 m) has ECEF (a, 0, 0),
    # where east = +Y, north = +Z, up = +X. So the pole is at ENU (0, b, -a).
    # Tolerance 0.1 mm: the published b is rounded to 0.1 mm.
    enu = osc.geodetic_to_enu(90.0, 123.0, 0.0, origin=(0.0, 0.0, 0.0))
    np.testing.assert_allclose(enu, [0.0, 6356752.3142, -6378137.0], rtol=0, atol=1e-4)
    back = osc.enu_to_geodetic(0.0, 6356752.3142, -6378137.0, origin=(0.0, 0.0, 0.0))
    assert back[0] == pytest.approx(90.0, abs=1e-9)
    assert back[2] == pytest.approx(0.0, abs=1e-4)


def test_one_metre_up_and_one_second_of_arc_north():
    # Closed forms: raising h by 1 m moves the point 1 m along the local normal (up); at the
    # equator 1″ of latitude is M·π/648000 with meridian radius M = a(1-e²) = 6335439.327 m,
    # i.e. 30.7157 m (NIMA TR8350.2 constants; tolerance 1 mm: M varies by 1e-10 over 1″).
    enu = osc.geodetic_to_enu([0.0, 0.0, 1 / 3600], [10.0, 10.0, 10.0], [0.0, 1.0, 0.0])
    np.testing.assert_allclose(enu[1], [0.0, 0.0, 1.0], atol=1e-9)
    a, f = 6378137.0, 1 / 298.257223563
    m = a * (1 - f * (2 - f))
    assert enu[2, 1] == pytest.approx(m * np.pi / 648000, abs=1e-3)


def test_per_track_origins_are_each_tracks_first_fix(rng):
    # Two interleaved tracks on two continents, with a NaN fix at the start of one: each track's
    # ENU equals pymap3d's about that track's first finite fix (tolerance 1 mm, as above).
    lat_a, lon_a, h_a = random_track(rng, ORIGINS[0], length_m=5_000.0, n=50)
    lat_b, lon_b, h_b = random_track(rng, ORIGINS[1], length_m=5_000.0, n=50)
    lat_b[0] = np.nan
    lat = np.empty(100)
    lon, h = np.empty(100), np.empty(100)
    tracks = np.tile(["a", "b"], 50)
    lat[::2], lat[1::2] = lat_a, lat_b
    lon[::2], lon[1::2] = lon_a, lon_b
    h[::2], h[1::2] = h_a, h_b
    enu = osc.geodetic_to_enu(lat, lon, h, tracks=tracks)
    first_a = (lat_a[0], lon_a[0], h_a[0])
    first_b = (lat_b[1], lon_b[1], h_b[1])
    ref_a = np.column_stack(pm.geodetic2enu(lat_a, lon_a, h_a, *first_a, ell=WGS84))
    ref_b = np.column_stack(pm.geodetic2enu(lat_b, lon_b, h_b, *first_b, ell=WGS84))
    np.testing.assert_allclose(enu[::2], ref_a, atol=1e-3)
    assert np.isnan(enu[1]).all()
    np.testing.assert_allclose(enu[3::2], ref_b[1:], atol=1e-3)
    # Back with one origin per track, in the order of numpy.unique(tracks).
    back = osc.enu_to_geodetic(*enu.T, origin=[first_a, first_b], tracks=tracks)
    np.testing.assert_allclose(back[::2, 0], lat_a, atol=1e-9)
    np.testing.assert_allclose(back[3::2, 1], lon_b[1:], atol=1e-9)


def test_broadcasting_and_array_likes():
    enu = osc.geodetic_to_enu([[45.0, 45.1], [45.2, 45.3]], 7, 0.0, origin=[45, 7, 0])
    assert enu.shape == (2, 2, 3)
    assert osc.geodetic_to_enu(45.0, 7.0, 0.0).tolist() == [0.0, 0.0, 0.0]
    # The origin maps to itself, to rounding of the ECEF coordinates (~1e-9 m).
    assert osc.enu_to_geodetic(0, 0, 0, (45, 7, 0)).tolist() == pytest.approx(
        [45.0, 7.0, 0.0], abs=1e-8
    )


BAD = [
    # (description, call, exception, message regex)
    (
        "latitude out of range",
        lambda: osc.geodetic_to_enu([0.0, 95.0], [0, 0], [0, 0]),
        osc.InputError,
        r"lat: track 0, row 1: latitude 95 is outside \[-90, 90\] degrees",
    ),
    (
        "bad latitude, interleaved tracks: the caller's row",
        lambda: osc.geodetic_to_enu([0, 1, 2, -91.0], 0, 0, tracks=[5, 6, 5, 6]),
        osc.InputError,
        r"lat: track 6, row 3: latitude -91 is outside",
    ),
    (
        "origin off the globe",
        lambda: osc.geodetic_to_enu(0, 0, 0, origin=(100, 0, 0)),
        osc.InputError,
        r"origin: latitude 100",
    ),
    (
        "origin not finite",
        lambda: osc.enu_to_geodetic(0, 0, 0, origin=(np.nan, 0, 0)),
        osc.InputError,
        r"origin: must be finite",
    ),
    (
        "origin shape",
        lambda: osc.geodetic_to_enu(0, 0, 0, origin=(1, 2)),
        osc.InputError,
        r"origin: expected \(lat, lon, h\)",
    ),
    (
        "origins per track, wrong count",
        lambda: osc.enu_to_geodetic([0, 1], 0, 0, origin=[[0, 0, 0]] * 3, tracks=[1, 2]),
        osc.InputError,
        r"origin: expected",
    ),
    (
        "shapes do not broadcast",
        lambda: osc.geodetic_to_enu([1, 2], [1, 2, 3], 0),
        osc.InputError,
        r"lat, lon, h: shapes do not broadcast",
    ),
    ("strings", lambda: osc.geodetic_to_enu(["a"], [0], [0]), TypeError, r"lat: expected real"),
    ("empty", lambda: osc.geodetic_to_enu([], [], []), osc.InputError, r"empty"),
    (
        "tracks with 2-D coordinates",
        lambda: osc.geodetic_to_enu(np.zeros((2, 2)), 0, 0, tracks=[1, 2]),
        osc.InputError,
        r"tracks: needs 1-D",
    ),
]


@pytest.mark.parametrize("what, call, exc, pattern", BAD, ids=[b[0] for b in BAD])
def test_bad_input(what, call, exc, pattern):
    with pytest.raises(exc, match=pattern):
        call()


def test_nan_fixes_stay_nan_and_track_without_fix():
    enu = osc.geodetic_to_enu([np.nan, np.nan, 1.0], [0.0, 0.0, 1.0], 0.0, tracks=[1, 1, 2])
    assert np.isnan(enu[:2]).all() and enu[2].tolist() == [0.0, 0.0, 0.0]


def test_gps_circle_goes_straight_into_the_accessor():
    # A vehicle circling at 10 m/s on a radius of 500 m, laid out in ENU and converted to WGS 84 by
    # pymap3d: κ = 1/R and a_n = v²/R (uniform circular motion, closed form). Tolerance 1e-4
    # relative: finite-difference error at 0.1 s steps, plus the tangent-plane curvature of the
    # ellipsoid (the ENU frame is anchored at the first fix, 1 km from the centre: ≤ 1e-7).
    r, v = 500.0, 10.0
    t = np.arange(0.0, 2 * np.pi * r / v, 0.1)
    e, n = r * np.cos(v * t / r), r * np.sin(v * t / r)
    lat, lon, h = pm.enu2geodetic(e, n, np.full_like(t, 30.0), 52.0, 4.9, 0.0, ell=WGS84)
    df = pd.DataFrame({"t": t, "lat": lat, "lon": lon, "alt": h})
    df.loc[100, "lat"] = np.nan  # a dropped fix: kept, INVALID
    res = df.osc.kinematics(time="t", position=("lat", "lon", "alt"), crs="geodetic", order=4)
    assert list(res.columns[:3]) == ["east", "north", "up"]
    ok = res["flags"].to_numpy() == 0
    assert ok.sum() > 0.9 * len(df)
    np.testing.assert_allclose(res["curvature"][ok], 1 / r, rtol=1e-4)
    np.testing.assert_allclose(res["accel_normal"][ok], v * v / r, rtol=1e-4)
    # Counter-clockwise seen from above: left turns, positive about the default up = (0, 0, 1).
    assert (res["signed_curvature"][ok] > 0).all()
    assert Flag.INVALID in Flag(int(res["flags"].iloc[100]))
    s = df.osc.summary(time="t", position=("lat", "lon", "alt"), crs="geodetic")
    np.testing.assert_allclose(s[["origin_lat", "origin_lon"]].iloc[0], [lat[0], lon[0]])
    assert s["origin_h"].iloc[0] == pytest.approx(h[0])


def test_geodetic_without_height_is_planar_east_north():
    # Without an altitude column the height is 0 and the path is planar (east, north): the same
    # east/north and planar curvature as the 3-D path flattened (κ of a level circle; exact
    # agreement of the east/north components, which do not depend on the discarded "up").
    r, v = 200.0, 5.0
    t = np.arange(0.0, 100.0, 0.2)
    lat, lon, _ = pm.enu2geodetic(
        r * np.cos(v * t / r), r * np.sin(v * t / r), 0 * t, -12.0, 130.0, 0.0, ell=WGS84
    )
    df = pd.DataFrame({"t": t, "lat": lat, "lon": lon, "h": 0.0})
    flat = df.osc.kinematics(time="t", position=["lat", "lon"], crs="geodetic", order=4)
    full = df.osc.kinematics(time="t", position=["lat", "lon", "h"], crs="geodetic", order=4)
    assert "up" not in flat.columns and "tangent_z" not in flat.columns
    np.testing.assert_array_equal(flat[["east", "north"]], full[["east", "north"]])
    inner = slice(5, -5)
    # κ = 1/R (closed form); tolerance 1e-5 relative: FD error plus the up-drift of the tangent
    # plane that the planar path ignores (d²/2R over 400 m, 1e-2 m on 200 m).
    np.testing.assert_allclose(flat["curvature"].iloc[inner], 1 / r, rtol=1e-5)
