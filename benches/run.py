"""Benchmarks of osculate against NumPy code that computes the same outputs.

    python benches/run.py [--quick] [--case NAME ...] [--out FILE.json]

Cases (``--quick`` scales the sizes down: the cases below take about half a minute on 2 cores):

fd-one
    ``osculate.kinematics(method="fd", order=2)`` on one 3-D track of 1e6 and 1e7 samples, against
    the vectorized NumPy implementation in ``reference.py``.
fd-many
    10,000 tracks of 150–250 samples (200 on average), against a Python loop over the tracks calling
    the NumPy implementation, and against one vectorized NumPy pass over a padded (m, L, 3) block.
floor
    A memory-traffic floor for each data set: read every input byte once and write every output
    byte once with NumPy; the kernels' times are also shown as multiples of it.
threads
    fd-many with 1 and 2 rayon threads (fresh processes with RAYON_NUM_THREADS), and two Python
    threads calling osculate at once versus one after the other (with one rayon thread, so each
    call leaves a core free), plus how fast a pure-Python loop runs meanwhile.
scaling
    osculate on one track of 1e4 … 1e7 samples: time per sample, the slope of log(time) against
    log(n), and the spread of the time per sample from 1e5 to 1e7.
NAME (from ``NAME_case.py`` beside this file)
    Cases that other issues add (e.g. ``accessor``, ``work``): each runs as its own script with
    ``--quick`` passed on, checks its own pairs, and its targets are listed with the others.

Before any timing, each pair's outputs are checked equal to the tolerances stated in ``check.py``
(an AssertionError stops the run with a non-zero exit). Every measurement runs in a fresh
interpreter (``measure.py``): warm-up, repeats, the median, peak memory (resident-set growth from
the OS plus tracemalloc's peak of Python allocations), page faults and CPU time per call. The
targets are reported as PASS or MISS, never asserted: timings on a shared machine are noisy, and the
evidence is in ratios measured side by side in one run.
"""

from __future__ import annotations

import argparse
import json
import os
import platform
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path
from typing import Any

import numpy as np
from measure import in_subprocess

HERE = Path(__file__).resolve().parent
OWN_CASES = ("fd-one", "fd-many", "fd-interleaved", "floor", "threads", "scaling")
#: Cases that other issues put beside this file as ``NAME_case.py``: each takes ``[--quick]
#: --out FILE``, checks its own pairs, writes its figures as JSON and marks each target with a
#: "status". They run in their own interpreter, after the cases above.
EXTERNAL = {p.name[: -len("_case.py")]: p for p in sorted(HERE.glob("*_case.py"))}
CASES = OWN_CASES + tuple(EXTERNAL)

FULL: dict[str, Any] = {
    "quick": False,
    "one_sizes": [1_000_000, 10_000_000],
    "many": {"kind": "many", "m": 10_000, "mean_len": 200},
    "scaling_sizes": [10_000, 30_000, 100_000, 300_000, 1_000_000, 3_000_000, 10_000_000],
    "budget_s": 6.0,
    "min_repeats": 3,
    "thread_rounds": 3,
}
QUICK: dict[str, Any] = {
    "quick": True,
    "one_sizes": [100_000, 300_000],
    "many": {"kind": "many", "m": 1_000, "mean_len": 200},
    "scaling_sizes": [10_000, 30_000, 100_000, 300_000],
    "budget_s": 0.4,
    "min_repeats": 2,
    "thread_rounds": 2,
}

TARGETS = {
    "fd_one_vs_numpy": 10.0,
    "fd_one_vs_floor": 3.0,
    "fd_many_vs_loop": 50.0,
    "rayon_2_threads": 1.7,
    "peak_memory": 1.5,
    "interleaved_peak_memory": 1.3,
    "interleaved_vs_grouped": 1.3,
    "time_per_sample_spread": 0.30,
}


def one(n: int) -> dict[str, Any]:
    return {"kind": "one", "n": int(n)}


def machine() -> dict[str, Any]:
    """What the numbers were measured on."""
    info: dict[str, Any] = {
        "python": platform.python_version(),
        "numpy": np.__version__,
        "platform": platform.platform(),
        "cores": os.cpu_count(),
    }
    try:
        import osculate

        info["osculate"] = osculate.__version__
        so = next(Path(osculate.__file__).parent.glob("_core*.so"), None)
        if so is not None:
            stamp = time.strftime("%Y-%m-%d %H:%M:%S", time.localtime(so.stat().st_mtime))
            info["extension"] = f"{so} (built {stamp}, {so.stat().st_size} bytes)"
    except Exception as exc:  # pragma: no cover - reported, not fatal
        info["osculate"] = f"unavailable: {exc}"
    for path, key, field in (
        ("/proc/cpuinfo", "cpu", "model name"),
        ("/proc/meminfo", "memory_kib", "MemTotal"),
    ):
        try:
            with open(path) as f:
                for line in f:
                    if line.startswith(field):
                        info[key] = line.split(":", 1)[1].strip()
                        break
        except OSError:
            pass
    try:
        thp = Path("/sys/kernel/mm/transparent_hugepage/enabled").read_text().strip()
        info["transparent_hugepages"] = thp
    except OSError:
        pass
    if hasattr(os, "getloadavg"):
        info["load_average_at_start"] = os.getloadavg()
    return info


def log(msg: str) -> None:
    print(msg, file=sys.stderr, flush=True)


#: Measurements of this run, so that a case reuses what another already measured.
_MEASURED: dict[str, dict[str, Any]] = {}


def _label(data: dict[str, Any]) -> str:
    if data["kind"] == "one":
        return f"1 x {data['n']:.0e}"
    return f"{data['m']} x ~{data.get('mean_len', 200)}"


def timed_runs(
    runs: list[tuple[str, dict[str, Any]]],
    cfg: dict[str, Any],
    *,
    env: dict[str, str] | None = None,
    digest: bool = False,
    budget_s: float | None = None,
) -> list[dict[str, Any]]:
    """Time (implementation, data) runs interleaved in one fresh process (``measure.job_time``)."""
    t0 = time.perf_counter()
    load = os.getloadavg()[0] if hasattr(os, "getloadavg") else float("nan")
    spec = {
        "job": "time",
        "runs": [{"impl": impl, "data": data} for impl, data in runs],
        "budget_s": cfg["budget_s"] if budget_s is None else budget_s,
        "min_repeats": cfg["min_repeats"],
        "digest": digest,
    }
    results = in_subprocess(spec, env=env)
    for r, (_, data) in zip(results, runs):
        r["data"] = data
        r["load_average_before"] = load
    same = all(data == runs[0][1] for _, data in runs)
    what = ", ".join(
        f"{impl}{'' if same else f' {_label(data)}'} {r['median_s']:.4f} s"
        for r, (impl, data) in zip(results, runs)
    )
    where = f"{_label(runs[0][1])}: " if same else ""
    log(f"  {where}{what}{f' {env}' if env else ''} ({time.perf_counter() - t0:.1f} s)")
    return results


def measured(impls: list[str], data: dict[str, Any], cfg: dict[str, Any]) -> dict[str, Any]:
    """``impls`` on ``data``: timed side by side in one process, and the peak memory of each in
    a fresh process of its own; what this run already measured is reused."""

    def key(impl: str) -> str:
        return json.dumps([impl, data], sort_keys=True)

    missing = [impl for impl in impls if key(impl) not in _MEASURED]
    if missing:
        for impl, r in zip(missing, timed_runs([(impl, data) for impl in missing], cfg)):
            r.update(in_subprocess({"job": "memory", "impl": impl, "data": data}))
            _MEASURED[key(impl)] = r
    return {impl: _MEASURED[key(impl)] for impl in impls}


def _pooled(parts: list[dict[str, Any]]) -> dict[str, Any]:
    """One run measured in several processes, as one result (all calls pooled)."""
    times = [t for p in parts for t in p["times_s"]]
    out = dict(parts[0])
    median = statistics.median(times)
    out.update(
        times_s=times,
        repeats=len(times),
        median_s=median,
        min_s=min(times),
        max_s=max(times),
        samples_per_s=out["samples"] / median,
        processes=len(parts),
        load_average_before=max(p["load_average_before"] for p in parts),
    )
    for k in ("user_s_per_call", "sys_s_per_call", "minor_faults_per_call"):
        out[k] = statistics.median(p[k] for p in parts)
    return out


def checked(data: dict[str, Any], impls: list[str]) -> dict[str, Any]:
    t0 = time.perf_counter()
    result = in_subprocess({"job": "check", "data": data, "impls": impls})
    took = time.perf_counter() - t0
    log(f"  {_label(data)}: checked osculate = {', '.join(impls)} ({took:.1f} s)")
    return result


# ------------------------------------------------------------------------------ the cases


def _with_floor(impls: list[str], cfg: dict[str, Any]) -> list[str]:
    """The floor is timed in the same rounds as the kernels when the floor case is on."""
    return [*impls, "floor"] if "floor" in cfg["cases"] else impls


def case_fd_one(cfg: dict[str, Any]) -> dict[str, Any]:
    out: dict[str, Any] = {}
    for n in cfg["one_sizes"]:
        data = one(n)
        check = checked(data, ["numpy"])
        out[str(n)] = {
            "check": check,
            **measured(_with_floor(["osculate", "numpy"], cfg), data, cfg),
        }
    return out


def case_fd_many(cfg: dict[str, Any]) -> dict[str, Any]:
    data = cfg["many"]
    check = checked(data, ["numpy-loop", "numpy-padded"])
    impls = _with_floor(["osculate", "numpy-loop", "numpy-padded"], cfg)
    return {"check": check, **measured(impls, data, cfg)}


def case_fd_interleaved(cfg: dict[str, Any]) -> dict[str, Any]:
    """fd-many's tracks with their rows in time order (an ordinary log), grouped by ``tracks=``,
    timed in the same rounds as the grouped rows."""
    grouped = cfg["many"]
    mixed = {**grouped, "kind": "interleaved"}
    both = measured(["osculate"], grouped, cfg)["osculate"], measured(["osculate"], mixed, cfg)
    return {"grouped": both[0], "interleaved": both[1]["osculate"]}


def case_floor(cfg: dict[str, Any]) -> dict[str, Any]:
    out = {str(n): measured(["floor"], one(n), cfg)["floor"] for n in cfg["one_sizes"]}
    out["many"] = measured(["floor"], cfg["many"], cfg)["floor"]
    return out


def case_threads(cfg: dict[str, Any]) -> dict[str, Any]:
    data = cfg["many"]
    parts: dict[str, list[dict[str, Any]]] = {"1": [], "2": []}
    rounds = cfg["thread_rounds"]
    for _ in range(rounds):  # processes alternate, so that a change of load hits both alike
        for k in parts:
            env = {"RAYON_NUM_THREADS": k}
            budget = cfg["budget_s"] / rounds
            parts[k] += timed_runs([("osculate", data)], cfg, env=env, digest=True, budget_s=budget)
    digests = {p["digest"] for k in parts for p in parts[k]}
    if len(digests) != 1:
        raise AssertionError("threads: outputs with 1 and 2 rayon threads are not bit-identical")
    runs = {k: _pooled(v) for k, v in parts.items()}
    t0 = time.perf_counter()
    py = in_subprocess(
        {"job": "pythreads", "data": data, "repeats": 3}, env={"RAYON_NUM_THREADS": "1"}
    )
    log(f"  {_label(data)}: two Python threads ({time.perf_counter() - t0:.1f} s)")
    return {
        "rayon": runs,
        "rayon_speedup": runs["1"]["median_s"] / runs["2"]["median_s"],
        "outputs_bit_identical": True,
        "python_threads": py,
    }


def _slope(ns: list[int], ts: list[float]) -> float:
    return float(np.polyfit(np.log(ns), np.log(ts), 1)[0])


def case_scaling(cfg: dict[str, Any]) -> dict[str, Any]:
    sizes = cfg["scaling_sizes"]
    timed = timed_runs([("osculate", one(n)) for n in sizes], cfg, budget_s=2 * cfg["budget_s"])
    runs = {str(n): r for n, r in zip(sizes, timed)}
    ns = [int(n) for n in runs]
    ts = [runs[str(n)]["median_s"] for n in ns]
    per = {str(n): t / n for n, t in zip(ns, ts)}
    band = [n for n in ns if 100_000 <= n <= 10_000_000]
    band_per = [per[str(n)] for n in band]
    mid = float(np.median(band_per))
    return {
        "runs": runs,
        "seconds_per_sample": per,
        "slope_all": _slope(ns, ts),
        "slope_1e5_up": _slope(band, [runs[str(n)]["median_s"] for n in band]),
        "band": [min(band), max(band)],
        "spread_vs_median": max(abs(p / mid - 1.0) for p in band_per),
        "max_over_min": max(band_per) / min(band_per),
    }


def case_external(name: str, cfg: dict[str, Any]) -> dict[str, Any]:
    """Run ``NAME_case.py`` in a fresh interpreter and return its JSON figures."""
    with tempfile.TemporaryDirectory() as tmp:
        out = Path(tmp) / "figures.json"
        cmd = [sys.executable, str(EXTERNAL[name]), *(["--quick"] if cfg["quick"] else [])]
        t0 = time.perf_counter()
        proc = subprocess.run(
            [*cmd, "--out", str(out)], capture_output=True, text=True, timeout=1800, check=False
        )
        if proc.returncode != 0 or not out.exists():
            raise RuntimeError(f"{' '.join(cmd)} failed ({proc.returncode}):\n{proc.stderr}")
        log(f"  ran {EXTERNAL[name].name} ({time.perf_counter() - t0:.1f} s)")
        return json.loads(out.read_text())


def _statuses(figures: Any, path: str) -> list[tuple[str, dict[str, Any]]]:
    """Every dict with a "status" inside an external case's figures, with where it sits."""
    if not isinstance(figures, dict):
        return []
    found = [(path, figures)] if "status" in figures else []
    for key, value in figures.items():
        found += _statuses(value, f"{path} / {key}")
    return found


RUNNERS = {
    "fd-one": case_fd_one,
    "fd-many": case_fd_many,
    "fd-interleaved": case_fd_interleaved,
    "floor": case_floor,
    "threads": case_threads,
    "scaling": case_scaling,
}


# ------------------------------------------------------------------------------ report


def _mb(b: float | None) -> str:
    return "-" if b is None else f"{b / 1e6:.0f}"


def _ratio(v: float | None) -> str:
    return "-" if v is None else f"{v:.2f}"


def table(results: dict[str, Any]) -> list[str]:
    """The human-readable table."""
    cases = results["cases"]
    floors = cases.get("floor", {})
    head = (
        f"{'case':<9} {'data':<13} {'implementation':<22} {'median ms':>10} {'min-max ms':>15} "
        f"{'Msamples/s':>10} {'osc. faster':>11} {'x floor':>8} {'RSS+ MB':>8} "
        f"{'peak/io':>7} {'tracem. MB':>10} {'faults':>8} {'sys ms':>7} {'load':>5}"
    )
    lines = [head, "-" * len(head)]

    def row(
        case: str, data: str, name: str, r: dict[str, Any], base: float | None, fl: float | None
    ) -> None:
        med = r["median_s"]
        faster = "" if base is None else f"{med / base:.1f}x"
        xfloor = "" if fl is None else f"{med / fl:.1f}"
        lines.append(
            f"{case:<9} {data:<13} {name:<22} {med * 1e3:>10.1f} "
            f"{r['min_s'] * 1e3:>7.1f}-{r['max_s'] * 1e3:<7.1f} {r['samples_per_s'] / 1e6:>10.2f} "
            f"{faster:>11} {xfloor:>8} {_mb(r.get('rss_growth_bytes')):>8} "
            f"{_ratio(r.get('peak_over_in_out')):>7} {_mb(r.get('tracemalloc_peak_bytes')):>10} "
            f"{r['minor_faults_per_call']:>8.0f} {r['sys_s_per_call'] * 1e3:>7.1f}"
            f" {r.get('load_average_before', float('nan')):>5.1f}"
        )

    for n, res in cases.get("fd-one", {}).items():
        fl = floors.get(n, {}).get("median_s")
        base = res["osculate"]["median_s"]
        label = f"1 x {int(n):.0e}"
        row("fd-one", label, "osculate", res["osculate"], None, fl)
        row("fd-one", label, "numpy (vectorized)", res["numpy"], base, fl)
        if n in floors:
            row("floor", label, "numpy read+write", floors[n], base, fl)
    many = cases.get("fd-many")
    if many or "many" in floors:
        spec = results["config"]["many"]
        label = f"{spec['m']} x ~{spec['mean_len']}"
        fl = floors.get("many", {}).get("median_s")
        if many:
            base = many["osculate"]["median_s"]
            row("fd-many", label, "osculate", many["osculate"], None, fl)
            row("fd-many", label, "numpy loop over tracks", many["numpy-loop"], base, fl)
            row("fd-many", label, "numpy padded block", many["numpy-padded"], base, fl)
        else:
            base = None
        if "many" in floors:
            row("floor", label, "numpy read+write", floors["many"], base, fl)
    th = cases.get("threads")
    if th:
        spec = results["config"]["many"]
        label = f"{spec['m']} x ~{spec['mean_len']}"
        fl = floors.get("many", {}).get("median_s")
        base = th["rayon"]["2"]["median_s"]
        row("threads", label, "osculate, 1 rayon thread", th["rayon"]["1"], base, fl)
        row("threads", label, "osculate, 2 rayon threads", th["rayon"]["2"], None, fl)
    sc = cases.get("scaling")
    if sc:
        for n, r in sc["runs"].items():
            row(
                "scaling",
                f"1 x {int(n):.0e}",
                "osculate",
                r,
                None,
                floors.get(n, {}).get("median_s"),
            )
    lines.append("")
    lines.append(
        "osc. faster: this row's median / osculate's median on the same data"
        " (threads: / 2 threads);"
        " x floor: median / floor median on the same data; RSS+: growth of the resident set during"
        " one call; peak/io: (inputs + RSS growth) / (inputs + outputs); tracem.: peak of traced"
        " Python allocations; faults, sys: minor page faults and system CPU time per call;"
        " load: the machine's 1-minute load average when the measurement started."
    )
    if th:
        py = th["python_threads"]
        lines.append(
            f"threads: rayon 1 -> 2 threads speed-up {th['rayon_speedup']:.2f}x"
            " (outputs bit-identical); two Python threads at once vs one after the other"
            f" (1 rayon thread): {py['speedup']:.2f}x; a pure-Python loop runs at"
            f" {py['python_loop_rate_during_call']:.0%} of its solo rate during a call"
            " (about 0 if the call held the interpreter lock)."
        )
    if sc:
        per = ", ".join(f"{int(n):.0e}: {p * 1e9:.0f}" for n, p in sc["seconds_per_sample"].items())
        lines.append(
            f"scaling: ns/sample {per}; slope of log t vs log n {sc['slope_all']:.3f} (all), "
            f"{sc['slope_1e5_up']:.3f} (>= 1e5); time/sample from {sc['band'][0]:.0e} to "
            f"{sc['band'][1]:.0e} within ±{sc['spread_vs_median']:.0%} of its median "
            f"(max/min {sc['max_over_min']:.2f})."
        )
    return lines


def targets(results: dict[str, Any]) -> list[dict[str, Any]]:
    """Each target with the measured figure and PASS / MISS."""
    cases = results["cases"]
    floors = cases.get("floor", {})
    out: list[dict[str, Any]] = []

    def add(name: str, measured: float, goal: float, higher_is_better: bool, note: str) -> None:
        ok = measured >= goal if higher_is_better else measured <= goal
        sign = ">=" if higher_is_better else "<="
        out.append(
            {
                "target": name,
                "goal": f"{sign} {goal:g}",
                "measured": round(measured, 3),
                "status": "PASS" if ok else "MISS",
                "note": note,
            }
        )

    for n, res in cases.get("fd-one", {}).items():
        o = res["osculate"]["median_s"]
        add(
            f"fd-one {int(n):.0e}: faster than NumPy",
            res["numpy"]["median_s"] / o,
            TARGETS["fd_one_vs_numpy"],
            True,
            "x",
        )
        if n in floors:
            add(
                f"fd-one {int(n):.0e}: time / memory-traffic floor",
                o / floors[n]["median_s"],
                TARGETS["fd_one_vs_floor"],
                False,
                "x floor",
            )
        add(
            f"fd-one {int(n):.0e}: peak memory / (inputs + outputs)",
            res["osculate"]["peak_over_in_out"],
            TARGETS["peak_memory"],
            False,
            "osculate",
        )
    many = cases.get("fd-many")
    if many:
        o = many["osculate"]["median_s"]
        add(
            "fd-many: faster than the per-track loop",
            many["numpy-loop"]["median_s"] / o,
            TARGETS["fd_many_vs_loop"],
            True,
            "x",
        )
        add(
            "fd-many: peak memory / (inputs + outputs)",
            many["osculate"]["peak_over_in_out"],
            TARGETS["peak_memory"],
            False,
            "osculate",
        )
        if "many" in floors:
            add(
                "fd-many: time / memory-traffic floor",
                o / floors["many"]["median_s"],
                TARGETS["fd_one_vs_floor"],
                False,
                "x floor (fd-one's goal, for reference)",
            )
    mixed = cases.get("fd-interleaved")
    if mixed:
        add(
            "fd-interleaved: peak memory / (inputs + outputs)",
            mixed["interleaved"]["peak_over_in_out"],
            TARGETS["interleaved_peak_memory"],
            False,
            "rows of all tracks in time order, tracks=",
        )
        add(
            "fd-interleaved: time / time of the same rows grouped",
            mixed["interleaved"]["median_s"] / mixed["grouped"]["median_s"],
            TARGETS["interleaved_vs_grouped"],
            False,
            "x grouped",
        )
    th = cases.get("threads")
    if th:
        add(
            "threads: 2 rayon threads speed-up on fd-many",
            th["rayon_speedup"],
            TARGETS["rayon_2_threads"],
            True,
            "x",
        )
    for name in EXTERNAL:
        for where, d in _statuses(cases.get(name), name):
            measured = d.get("measured", d.get("ratio_to_input", float("nan")))
            out.append(
                {
                    "target": where,
                    "goal": str(d.get("target", "")),
                    "measured": round(measured, 3) if isinstance(measured, float) else measured,
                    "status": d["status"],
                    "note": f"from {EXTERNAL[name].name}",
                }
            )
    sc = cases.get("scaling")
    if sc:
        band = f"{sc['band'][0]:.0e}..{sc['band'][1]:.0e}"
        add(
            f"scaling: time/sample spread over {band}",
            sc["spread_vs_median"],
            TARGETS["time_per_sample_spread"],
            False,
            "max |t/n / median - 1|",
        )
    return out


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--quick", action="store_true", help="smaller sizes (CI smoke run)")
    parser.add_argument(
        "--case",
        nargs="+",
        choices=CASES,
        default=list(CASES),
        metavar="NAME",
        help=f"cases to run (default: all of {', '.join(CASES)})",
    )
    parser.add_argument("--out", type=Path, help="write all results as JSON here")
    args = parser.parse_args(argv)
    cfg = {**(QUICK if args.quick else FULL), "cases": list(args.case)}

    started = time.time()
    results: dict[str, Any] = {
        "mode": "quick" if args.quick else "full",
        "machine": machine(),
        "config": cfg,
        "targets_goal": TARGETS,
        "cases": {},
    }
    for name in CASES:
        if name in args.case:
            log(f"[{name}]")
            if name in EXTERNAL:
                results["cases"][name] = case_external(name, cfg)
            else:
                results["cases"][name] = RUNNERS[name](cfg)
    results["seconds"] = time.time() - started
    if hasattr(os, "getloadavg"):
        results["machine"]["load_average_at_end"] = os.getloadavg()
    results["targets"] = targets(results)

    m = results["machine"]
    print(
        f"osculate benchmarks ({results['mode']}), {m.get('cpu', '?')}, {m['cores']} cores, "
        f"{int(m.get('memory_kib', '0 kB').split()[0]) / 2**20:.0f} GiB, {m['platform']}, "
        f"Python {m['python']}, NumPy {m['numpy']}, osculate {m.get('osculate')}"
    )
    if any(name in results["cases"] for name in OWN_CASES):
        print("\n".join(table(results)))
        print()
    print(
        "Checks (before timing): every pair's outputs equal to the tolerances of check.py"
        " (NAME_case.py: to the tolerances each states): OK"
    )
    for r in results["targets"]:
        print(
            f"  {r['status']:<4}  {r['target']:<55} {r['goal']:>7}"
            f"  measured {r['measured']:g} {r['note']}"
        )
    print(f"total {results['seconds']:.0f} s")
    if args.out:
        args.out.write_text(json.dumps(results, indent=2, default=str) + "\n")
        print(f"wrote {args.out}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
