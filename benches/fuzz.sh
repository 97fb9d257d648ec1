#!/usr/bin/env bash
# Run every cargo-fuzz (libFuzzer) target of fuzz/ for SECONDS each (default 60), one after another,
# and print the executions and findings of each. Exits non-zero if any target found a crash, a
# timeout or an out-of-memory input; the reproducer is then in fuzz/artifacts/<target>/ (replay it
# with `cargo fuzz run <target> fuzz/artifacts/<target>/<file>` from fuzz/).
#
#   benches/fuzz.sh [SECONDS] [TARGET ...]
#
# Environment: FUZZ_SANITIZER (default none: the kernels contain no unsafe code, and ASan would
# cost ~3x the executions; set "address" to use it), RAYON_NUM_THREADS (default 2).
# Needs `cargo install cargo-fuzz`. cargo fuzz passes nightly-only flags to rustc; on a stable
# toolchain RUSTC_BOOTSTRAP=1 lets it through, so it is set unless rustc is already a nightly.
set -euo pipefail
cd "$(dirname "$0")/../fuzz"

secs=${1:-60}
shift || true
if ! [[ $secs =~ ^[0-9]+$ ]]; then
  echo "usage: benches/fuzz.sh [SECONDS] [TARGET ...]" >&2
  exit 2
fi
if ! cargo fuzz --version >/dev/null 2>&1; then
  echo "cargo fuzz is missing: cargo install cargo-fuzz" >&2
  exit 2
fi
if ! rustc --version | grep -q nightly; then
  export RUSTC_BOOTSTRAP=1
fi
export RAYON_NUM_THREADS=${RAYON_NUM_THREADS:-2}
sanitizer=${FUZZ_SANITIZER:-none}

if [ $# -gt 0 ]; then
  targets=("$@")
else
  mapfile -t targets < <(cargo fuzz list)
fi

build_log=$(mktemp)
if ! cargo fuzz build -s "$sanitizer" >"$build_log" 2>&1; then
  cat "$build_log" >&2
  exit 2
fi
rm -f "$build_log"

status=0
printf '%-16s %12s %8s %10s  %s\n' target executions seconds exec/s finding
for t in "${targets[@]}"; do
  mkdir -p "corpus/$t" "artifacts/$t"
  log=$(mktemp)
  set +e
  cargo fuzz run -s "$sanitizer" "$t" "corpus/$t" -- \
    -max_total_time="$secs" -timeout=20 -rss_limit_mb=4096 -print_final_stats=1 >"$log" 2>&1
  rc=$?
  set -e
  runs=$(grep -oE '^stat::number_of_executed_units: *[0-9]+' "$log" | grep -oE '[0-9]+$' || echo 0)
  took=$(grep -oE 'Done [0-9]+ runs in [0-9]+ second' "$log" | grep -oE '[0-9]+ second' | grep -oE '[0-9]+' || echo "$secs")
  rate=$(( took > 0 ? runs / took : 0 ))
  finding=none
  if [ $rc -ne 0 ]; then
    finding=$(grep -m1 -oE "(deadly signal|panicked at [^,]*|Timeout|out-of-memory|ERROR: [A-Za-z]+)" "$log" || echo "exit $rc")
    finding="$finding; see $(grep -m1 -oE "Test unit written to [^ ]+" "$log" | sed "s/Test unit written to //" || true)"
    status=1
    cp "$log" "artifacts/$t/last-run.log"
  fi
  printf '%-16s %12s %8s %10s  %s\n' "$t" "$runs" "$took" "$rate" "$finding"
  rm -f "$log"
done
exit $status
