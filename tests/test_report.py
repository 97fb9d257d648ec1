"""`osculate demo` recovers the scenarios' ground truth within tolerance (osculate.report).

The demo's estimates against the generators' ground truth, with the tolerances stated beside each
check (the same as in the report); the files, links, units and tables of the report folder.
"""

import csv
import json
import re
import shutil
import subprocess
import sys
import textwrap

import numpy as np
import osculate.demo as demo
import osculate.report as report
import pytest

PROMISED = [
    "report.md",
    "summary.csv",
    "summary_units.json",
    "checks.csv",
    "manifest.json",
    "drone_samples.parquet",
    "ev_samples.parquet",
    "ev_resampled.parquet",
    "tracers_samples.parquet",
    "drone_path.png",
    "drone_profile.png",
    "ev_path.png",
    "ev_profile.png",
    "ev_gg.png",
    "ev_work.png",
    "ev_curvature.png",
    "tracers_path.png",
]


def report_errors(text):
    """Error column of report.md's key-figure tables: name → the number shown."""
    shown = {}
    for line in text.splitlines():
        cells = [c.strip() for c in line.strip().strip("|").split("|")]
        if len(cells) == 6 and cells[0] not in ("key figure", "---"):
            shown[cells[0]] = float(cells[3].split()[0])
    return shown


def report_rows(text):
    """Key figures of report.md: name → (estimated, true) as numbers."""
    rows = {}
    for line in text.splitlines():
        cells = [c.strip() for c in line.strip().strip("|").split("|")]
        if len(cells) == 6 and cells[0] not in ("key figure", "---"):
            rows[cells[0]] = (float(cells[1].split()[0]), float(cells[2].split()[0]))
    return rows


@pytest.fixture(scope="module")
def demo_run(tmp_path_factory):
    out = tmp_path_factory.mktemp("demo") / "report"
    proc = subprocess.run(
        [sys.executable, "-m", "osculate.cli", "demo", "--out", str(out)],
        capture_output=True,
        text=True,
        timeout=300,
    )
    return out, proc


def test_demo_exits_0_and_writes_every_file(demo_run):
    out, proc = demo_run
    assert proc.returncode == 0, proc.stderr
    assert "report written to" in proc.stdout
    assert "local codes and licensed engineers decide" in proc.stdout
    for name in PROMISED:
        assert (out / name).stat().st_size > 0, name
    for name in PROMISED:
        if name.endswith(".png"):
            assert (out / name).read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    import pyarrow.parquet as pq

    table = pq.read_table(out / "ev_samples.parquet")
    assert {"lap", "t", "speed", "curvature", "flags", "work", "power"} <= set(table.column_names)
    assert table.num_rows == len(demo.spiral_loop().t)  # every logged row, none dropped


def test_demo_finishes_within_30_seconds(demo_run):
    out, _ = demo_run
    took = float(re.search(r"in ([0-9.]+) s\.", (out / "report.md").read_text()).group(1))
    assert took < 30.0


def test_report_states_scenarios_methods_and_cautions(demo_run):
    out, _ = demo_run
    text = " ".join((out / "report.md").read_text().split())
    for phrase in (
        "Survey drone",
        "Electric vehicle",
        "Tracer particles",
        'method="smooth"',
        "invented",
        "indicative",
        "local codes and licensed engineers decide",
        "Every key figure is within its stated tolerance",
        "comes from no code or standard",
        "Element tables are reconstructions from logged data",
        "design values (radii, spiral parameters, lengths) are decided by local codes and "
        "licensed engineers",
    ):
        assert phrase in text, phrase


def test_report_estimates_match_the_ground_truth(demo_run):
    out, _ = demo_run
    rows = report_rows((out / "report.md").read_text())
    f, e, d = demo.survey_flight(), demo.spiral_loop(), demo.swirl_tracers()

    def est(prefix):
        hits = [v for k, v in rows.items() if k.startswith(prefix)]
        assert len(hits) == 1, (prefix, list(rows))
        return hits[0][0]

    # Survey drone, truth from the flight plan: R = 30 m, v = 6 m/s, a_n = v²/R = 1.2 m/s².
    assert abs(est("turn radius") / f.turn_radius - 1) < 0.02
    assert abs(est("centripetal acceleration in turns") / (6.0**2 / 30.0) - 1) < 0.03
    assert abs(est("cruise speed") / f.cruise_speed - 1) < 0.01
    assert abs(est("length of the flight path") / f.length - 1) < 0.01
    assert est("turns found") == f.turn.max() + 1  # the plan's half-circle turns
    worst = [v[0] for k, v in rows.items() if re.match(r"turn \d \(the worst\)", k)]
    assert len(worst) == 1 and abs(worst[0] / f.turn_radius - 1) < 0.02  # plan: R = 30 m
    # Electric vehicle, truth from the loop's geometry and the logged force's model.
    assert abs(est("bend radius (median") / 35.0 - 1) < 0.02
    assert abs(est("bend radius from the turn table") / 35.0 - 1) < 0.02
    assert est("bends found") == 2 * len(e.lap_distance)  # two bends per lap (construction)
    # The element table, against the loop's construction (demo.spiral_loop): per lap half a
    # straight, then twice spiral, arc, spiral, straight: 2 arcs and 4 spirals, counted exactly.
    assert est("circular arcs per lap") == 2
    assert est("transition spirals per lap") == 4
    assert est("laps whose elements run") == len(e.lap_distance)
    assert abs(est("arc radius") / e.bend_radius - 1) < 0.02  # R = 35 m, to 2 %
    # A² = R·L for a clothoid from a straight into radius R over length L: √(35·40) m, to 5 %.
    assert abs(est("spiral parameter A") / np.sqrt(35.0 * 40.0) - 1) < 0.05
    # L = 40 m, to max(5 %, two sample spacings): spacings here are at most 14 m/s / 20 Hz.
    assert abs(est("spiral length") / e.spiral_length - 1) < max(0.05, 2 * 0.7 / 40.0)
    assert abs(est("clothoid rate") / (1 / (35.0 * 40.0)) - 1) < 0.05
    # Laps are numbered from 1 in the report; the generator's arrays are indexed from 0.
    lap = int(re.search(r"length of lap (\d)", " ".join(rows)).group(1))
    assert abs(est("length of lap") / e.lap_distance[lap - 1] - 1) < 0.005
    lap = int(re.search(r"resistance force, lap (\d)", " ".join(rows)).group(1))
    assert abs(est("work of the resistance force") / e.drag_work[lap - 1] - 1) < 0.01
    # Tracers: per-track median errors in percent; circulation Γ(1 − exp(−r²/r_c²)).
    assert 0 <= est("radius of curvature") < 2.0
    assert 0 <= est("speed: median") < 1.0
    for r_mm in (10, 20, 50):
        truth = d.enclosed_circulation(r_mm / 1000)
        assert (
            abs(est(f"circulation of the gridded field, circle r = {r_mm} mm") / truth - 1) < 0.01
        )


def test_checks_csv_agrees_with_the_report(demo_run):
    out, _ = demo_run
    rows = report_rows((out / "report.md").read_text())
    with (out / "checks.csv").open() as fh:
        checks = list(csv.DictReader(fh))
    # 14 figures + the hover stop, the summary radius, the turn tables' counts and radii, and
    # the loop's element table (arcs, spirals and their order per lap; radius, A, spiral length).
    assert len(checks) == len(rows) == 26
    for c in checks:
        est, true = rows[c["figure"]]
        assert np.isclose(float(c["estimated"]), est, rtol=1e-4)
        assert np.isclose(float(c["true"]), true, rtol=1e-4, atol=1e-12)
        assert c["within"] == "True"


def test_checks_csv_has_the_signed_error(demo_run):
    out, _ = demo_run
    with (out / "checks.csv").open() as fh:
        checks = list(csv.DictReader(fh))
    shown = report_errors((out / "report.md").read_text())
    relative = [c for c in checks if c["relative"] == "True"]
    # All but the tracers' two percentages, the two turn counts and the three element counts.
    assert len(relative) == 19
    for c in checks:
        est, true, err = float(c["estimated"]), float(c["true"]), float(c["error"])
        # The definition: (estimated − true) / true for a relative check, else estimated − true;
        # the CSV's floats round-trip, so only the last bits of the division may differ.
        want = (est - true) / true if c["relative"] == "True" else est - true
        assert abs(err - want) <= 1e-12, c["figure"]
        # The same number as report.md's error column: percent with 2 decimals (±0.005 %), or
        # 3 significant digits of the difference (±0.5 % of it).
        if c["relative"] == "True":
            assert abs(shown[c["figure"]] / 100 - err) <= 0.5e-4, c["figure"]
        else:
            assert np.isclose(shown[c["figure"]], err, rtol=5e-3), c["figure"]
    # The sign: an estimate short of a negative truth (less work done) is a negative error.
    c = report.Check("s", "x", "J", estimated=-99.0, true=-100.0, tolerance=0.02)
    assert np.isclose(c.error, -0.01)


def links(text):
    """Targets of the Markdown images and of the other links of a text."""
    images = re.findall(r"!\[[^\]]*\]\(([^)\s]+)\)", text)
    others = re.findall(r"(?<!!)\[[^\]]*\]\(([^)\s]+)\)", text)
    return images, others


def test_report_embeds_every_figure_and_its_links_resolve(demo_run):
    out, _ = demo_run
    text = (out / "report.md").read_text()
    images, others = links(text)
    for target in images + others:
        assert (out / target).is_file(), target
    pngs = sorted(p.name for p in out.glob("*.png"))
    assert len(pngs) == 8
    assert sorted(images) == pngs  # every figure embedded, once
    assert set(pngs) <= set(others)  # and listed among the files
    # Each image is followed by its one-line caption, numbered in order.
    captions = re.findall(r"!\[[^\]]*\]\([^)]+\)\n\n\*Figure (\d+)\. [^\n]+\*\n", text)
    assert captions == [str(i) for i in range(1, 9)]
    # Every file of the folder is linked from the Files section.
    assert sorted(others) == sorted(p.name for p in out.iterdir())


def test_laps_are_numbered_from_1(demo_run):
    out, _ = demo_run
    import pyarrow.parquet as pq

    text = (out / "report.md").read_text()
    assert not re.search(r"\blaps? 0\b", text)
    e = demo.spiral_loop()
    laps = len(e.lap_distance)
    for name in ("ev_samples.parquet", "ev_resampled.parquet"):
        lap = pq.read_table(out / name).column("lap").to_numpy()
        assert lap.min() == 1 and lap.max() == laps, name
    with (out / "summary.csv").open() as fh:
        tracks = [r["track"] for r in csv.DictReader(fh) if r["scenario"] == "electric vehicle"]
    assert tracks == [str(i) for i in range(1, laps + 1)]
    # The lap lengths of the truth differ from the loop's design length: the report says why.
    flat = " ".join(text.split())
    assert f"{e.lap_length:.3f} m long by design" in flat
    assert ", ".join(f"{x:.2f}" for x in e.lap_distance) + f" m for laps 1 to {laps}" in flat
    assert "start/finish line in the middle of a straight" in flat


def test_summary_units_cover_every_column(demo_run):
    import osculate as osc

    out, _ = demo_run
    units = json.loads((out / "summary_units.json").read_text())
    with (out / "summary.csv").open() as fh:
        header = next(csv.reader(fh))
    assert list(units) == header
    assert {k for k, v in units.items() if not v} == {"scenario", "track"}  # labels only
    assert set(osc.SUMMARY_COLUMNS) <= set(units)
    # From osc.SUMMARY_COLUMNS ("length": "L, path length", "mean_speed": "L/T, ...",
    # "max_accel_normal": "L/T², ...", "turning_angle": "rad, ...", "samples": "rows of the
    # track") with the demo's L = m and T = s; fit information from Kinematics.fit_info's
    # documentation (λ* dimensionless, the equivalent kernel's bandwidth in samples).
    assert units["length"] == "m" and units["max_speed_at"] == "s"
    assert units["mean_speed"] == "m/s" and units["max_accel_normal"] == "m/s²"
    assert units["max_jerk_magnitude"] == "m/s³" and units["turning_angle"] == "rad"
    assert units["samples"] == units["stops"] == "count"
    assert units["smoothing"] == "1" and units["bandwidth"] == "samples"
    # report.md's summary table: a units row under the header, the same units.
    lines = (out / "report.md").read_text().splitlines()
    at = lines.index(next(ln for ln in lines if ln.startswith("| scenario | track |")))
    names = [c.strip() for c in lines[at].strip("|").split("|")]
    row = [c.strip() for c in lines[at + 2].strip("|").split("|")]
    assert row[0] == "*unit*"
    assert row[2:] == [units[n] for n in names[2:]]


def test_demo_stdout_table_has_a_header_row(demo_run):
    out, proc = demo_run
    lines = proc.stdout.splitlines()
    header = ["scenario", "key figure", "estimated", "true", "error", "tolerance", "within"]
    assert re.split(r"\s{2,}", lines[0].strip()) == header
    assert set(lines[1]) == {"-", " "}
    with (out / "checks.csv").open() as fh:
        checks = list(csv.DictReader(fh))
    rows = lines[2 : 2 + len(checks)]
    # Aligned: every row as wide as the header, each column starting where the rule's does.
    starts = [m.start() for m in re.finditer(r"-+", lines[1])]
    assert len(starts) == len(header)
    for line, c in zip(rows, checks):
        assert len(line) == len(lines[0])
        assert line.startswith(c["scenario"]) and line[starts[1] :].startswith(c["figure"])
        assert line.endswith("yes")


def test_a_second_run_removes_only_the_stale_files(demo_run, tmp_path):
    # The module's demo run drew figures; a second run into a copy of its folder draws none.
    first, _ = demo_run
    out = tmp_path / "again"
    shutil.copytree(first, out)
    (out / "notes.txt").write_text("mine")  # a foreign file
    (out / "my_plot.png").write_bytes(b"mine")  # a foreign figure, never in the manifest
    outside = tmp_path / "outside.txt"
    outside.write_text("mine")
    manifest = json.loads((out / "manifest.json").read_text())
    written = set(manifest["files"])
    # A manifest naming files out of the folder must not reach them.
    manifest["files"] += ["../outside.txt", str(outside), "sub/x.png"]
    (out / "manifest.json").write_text(json.dumps(manifest))
    rep = report.run(out, figures=False)
    now = {p.name for p in out.iterdir()}
    figures = {n for n in written if n.endswith(".png")}
    assert len(figures) == 8
    assert not figures & now  # the first run's figures are gone
    assert {p.name for p in rep.removed} == figures
    assert {"notes.txt", "my_plot.png"} <= now and outside.read_text() == "mine"
    assert now == (written - figures) | {"notes.txt", "my_plot.png"}
    assert set(json.loads((out / "manifest.json").read_text())["files"]) == written - figures
    text = (out / "report.md").read_text()
    assert "No figures: this run was asked not to draw them" in text
    assert "removed the files of an earlier run" in text


def test_summary_has_one_row_per_track(demo_run):
    out, _ = demo_run
    with (out / "summary.csv").open() as fh:
        rows = list(csv.DictReader(fh))
    counts = {}
    for r in rows:
        counts[r["scenario"]] = counts.get(r["scenario"], 0) + 1
    assert counts == {"survey drone": 1, "electric vehicle": 3, "tracer particles": 240}
    assert {"length", "min_radius", "max_accel_normal", "smoothing"} <= set(rows[0])


BLOCK_EXTRAS = textwrap.dedent(
    """
    import sys
    for name in ("matplotlib", "pandas", "pyarrow"):
        sys.modules[name] = None  # as on a numpy-only install: importing them fails
    from osculate.cli import main
    sys.exit(main(["demo", "--out", sys.argv[1]]))
    """
)


def test_demo_on_a_numpy_only_install(tmp_path):
    out = tmp_path / "plain"
    proc = subprocess.run(
        [sys.executable, "-c", BLOCK_EXTRAS, str(out)],
        capture_output=True,
        text=True,
        timeout=300,
    )
    assert proc.returncode == 0, proc.stderr
    assert "pip install 'osculate[plot]'" in proc.stdout
    names = {p.name for p in out.iterdir()}
    assert not any(n.endswith((".png", ".parquet")) for n in names)
    for stem in ("drone_samples", "ev_samples", "ev_resampled", "tracers_samples"):
        assert (out / f"{stem}.csv").stat().st_size > 0
    text = (out / "report.md").read_text()
    assert "No figures: they need matplotlib, `pip install 'osculate[plot]'`" in text
    assert text.count("No figures") == 1  # said once
    assert "![" not in text and ".png" not in text and "Figure " not in text  # none described
    assert "local codes and licensed engineers decide" in " ".join(text.split())
    _, others = links(text)
    assert sorted(others) == sorted(names)  # every file linked, each link resolves
    with (out / "ev_samples.csv").open() as fh:
        assert sum(1 for _ in fh) == len(demo.spiral_loop().t) + 1


def test_check_arithmetic():
    c = report.Check("s", "x", "m", estimated=29.3, true=30.0, tolerance=0.02)
    assert np.isclose(c.error, -0.7 / 30) and c.passed is False
    c = report.Check("s", "x", "m", estimated=29.41, true=30.0, tolerance=0.02)
    assert c.passed
    c = report.Check("s", "x", "%", estimated=2.5, true=0.0, tolerance=2.0, relative=False)
    assert c.error == 2.5 and not c.passed
    c = report.Check("s", "x", "m", estimated=float("nan"), true=1.0, tolerance=0.5)
    assert not c.passed
