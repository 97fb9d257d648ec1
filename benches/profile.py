"""Profile ``osculate.kinematics(method="fd")`` on one track with callgrind or perf.

    python benches/profile.py [--tool callgrind|perf] [--n 1000000] [--so PATH] [--top 25]

callgrind (valgrind) counts executed instructions (Ir): the driver makes one warm-up call on 100
samples and one call on ``n`` samples of ``data.one_track``; the report lists the functions of the
extension (and the C library's memory functions) by their own Ir, with Ir per sample, and, when
the extension carries line tables, the hottest source lines of ``src/``. perf samples CPU time
(software clock, so it also works in VMs without hardware counters) over repeated calls, user and
kernel side alike: page faults on fresh output memory show up there, not in callgrind.

``--so`` runs against another build of the extension, e.g. the release profile with line tables,
built into its own target folder (ignored by git; nothing in Cargo.toml changes):

    CARGO_PROFILE_RELEASE_DEBUG=line-tables-only cargo build --release --lib \\
        --features python,pyo3/extension-module --target-dir target/profile
    python benches/profile.py --so target/profile/release/libosculate.so
"""

from __future__ import annotations

import argparse
import os
import re
import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
LINE = re.compile(r"^\s*([\d,]+)\s+\(\s*[\d.]+%\)\s+(.*)$")


def driver(n: int, repeats: int) -> None:
    """The profiled program: warm-up on 100 samples, then ``repeats`` calls on ``n``."""
    sys.path.insert(0, str(HERE))
    import data
    import osculate

    t, x = data.one_track(n)
    osculate.kinematics(t[:100], x[:100], up=(0, 0, 1))
    for _ in range(repeats):
        t0 = time.perf_counter()
        k = osculate.kinematics(t, x, up=(0, 0, 1))
        print(f"call: {time.perf_counter() - t0:.3f} s ({osculate.__file__})", file=sys.stderr)
        del k


def _package_with(so: Path, into: Path) -> Path:
    """A copy of the installed package whose extension module is ``so``."""
    import osculate

    src = Path(osculate.__file__).parent
    dst = into / "osculate"
    shutil.copytree(src, dst, ignore=shutil.ignore_patterns("__pycache__"))
    for old in dst.glob("_core*.so"):
        old.unlink()
    shutil.copy2(so, dst / "_core.abi3.so")
    return into


def _run_driver(prefix: list[str], n: int, repeats: int, env: dict[str, str]) -> None:
    cmd = [*prefix, sys.executable, str(Path(__file__).resolve()), "--driver", str(n), str(repeats)]
    print("$ " + " ".join(cmd), flush=True)
    subprocess.run(cmd, env=env, check=True)


def callgrind(n: int, env: dict[str, str], work: Path, top: int, extension: Path) -> None:
    out = work / "callgrind.out"
    _run_driver(["valgrind", "--tool=callgrind", f"--callgrind-out-file={out}", "-q"], n, 1, env)
    text = subprocess.run(
        ["callgrind_annotate", "--auto=yes", "--threshold=100", str(out)],
        capture_output=True,
        text=True,
        check=True,
    ).stdout
    total = 0
    functions: dict[str, int] = {}
    lines: list[tuple[int, str]] = []
    source = None
    for raw in text.splitlines():
        if raw.startswith("-- Auto-annotated source:"):
            source = raw.split(":", 1)[1].strip()
            continue
        m = LINE.match(raw)
        if not m:
            continue
        ir = int(m.group(1).replace(",", ""))
        rest = m.group(2)
        if rest.startswith("PROGRAM TOTALS"):
            total = ir
        elif source is None:
            # "file:function [object]"; code inlined from other files repeats the function name.
            where, _, obj = rest.partition(" [")
            fn = where.split(":", 1)[1] if ":" in where else where
            ours = "osculate::" in fn or obj.startswith(str(extension))
            libc = "libc.so" in obj and re.search(r"mem|malloc|free", fn) is not None
            if ours or libc:
                functions[fn] = functions.get(fn, 0) + ir
        elif "/src/" in source and not rest.startswith(("=>", "<counts")):
            if "events annotated" not in rest:
                lines.append((ir, f"{Path(source).name}: {rest.strip()}"))
    print(f"\ncallgrind: {total:,} instructions in the whole process (Python start-up included)")
    print(f"{'Ir':>15} {'Ir/sample':>10}  function (self cost, code inlined into it included)")
    for fn, ir in sorted(functions.items(), key=lambda kv: -kv[1])[:top]:
        whole = "" if "osculate::" in fn else "  (C library, whole process)"
        print(f"{ir:>15,} {ir / n:>10.1f}  {fn}{whole}")
    ours = sum(ir for fn, ir in functions.items() if "osculate::" in fn)
    print(f"{ours:>15,} {ours / n:>10.1f}  all osculate:: functions")
    if lines:
        print(f"\n{'Ir':>15} {'Ir/sample':>10}  hottest source lines")
        for ir, where in sorted(lines, key=lambda kv: -kv[0])[:top]:
            print(f"{ir:>15,} {ir / n:>10.1f}  {where[:110]}")
    print(f"\nraw profile: {out} (callgrind_annotate --auto=yes {out})")


def perf(n: int, env: dict[str, str], work: Path, top: int, extension: Path) -> None:
    out = work / "perf.data"
    repeats = max(3, int(3e7 // n))
    _run_driver(
        ["perf", "record", "-q", "-e", "cpu-clock", "-F", "2000", "-o", str(out)], n, repeats, env
    )
    for key in ("dso", "pid", "pid,sym"):
        report = subprocess.run(
            ["perf", "report", "-i", str(out), "--no-children", "--sort", key, "--stdio"],
            capture_output=True,
            text=True,
            check=True,
        ).stdout
        rows = [ln for ln in report.splitlines() if "%" in ln and not ln.startswith("#")]
        what = {"pid": "thread", "pid,sym": "thread and function"}.get(key, "shared object")
        print(f"\nperf, CPU time by {what} ({repeats} calls on {n} samples, set-up included):")
        print("\n".join(rows[:top]))
    print(f"\nraw profile: {out} (extension: {extension})")


def main() -> int:
    if len(sys.argv) == 4 and sys.argv[1] == "--driver":
        driver(int(sys.argv[2]), int(sys.argv[3]))
        return 0
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--tool", choices=("callgrind", "perf"), default="callgrind")
    parser.add_argument("--n", type=int, default=1_000_000, help="samples of the profiled call")
    parser.add_argument("--so", type=Path, help="use this build of the extension module")
    parser.add_argument("--top", type=int, default=25)
    parser.add_argument("--keep", type=Path, help="directory for the raw profile (default: temp)")
    args = parser.parse_args()
    tool = "valgrind" if args.tool == "callgrind" else "perf"
    if shutil.which(tool) is None:
        print(f"{tool} is not installed", file=sys.stderr)
        return 1
    work = args.keep or Path(tempfile.mkdtemp(prefix="osculate-profile-"))
    work.mkdir(parents=True, exist_ok=True)
    env = dict(os.environ)
    if args.so:
        pkg = _package_with(args.so.resolve(), work / "pkg")
        env["PYTHONPATH"] = os.pathsep.join([str(pkg), env.get("PYTHONPATH", "")]).rstrip(
            os.pathsep
        )
        extension = pkg / "osculate" / "_core.abi3.so"
    else:
        import osculate

        extension = next(Path(osculate.__file__).parent.glob("_core*.so"))
    (callgrind if args.tool == "callgrind" else perf)(args.n, env, work, args.top, extension)
    return 0


if __name__ == "__main__":
    sys.exit(main())
