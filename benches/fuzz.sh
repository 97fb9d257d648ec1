#!/usr/bin/env bash
# Run every cargo-fuzz (libFuzzer) target of fuzz/ for SECONDS each (default 60), one after another,
# and print the executions and findings of each. First every input kept in fuzz/regressions/<target>/
# (crashes found earlier, minimized) is replayed once; a failing one counts as a finding. Exits non-zero if any target found a crash, a
# timeout or an out-of-memory input (inputs slower than 10 s but under the 20 s timeout are listed, not counted); the reproducers are then in fuzz/artifacts/<target>/ (replay
# one with `cargo fuzz run <target> artifacts/<target>/<file>` from fuzz/).
#
#   benches/fuzz.sh [SECONDS] [TARGET ...]
#
# Environment:
#   FUZZ_SANITIZER  default none: the kernels contain no unsafe code, and ASan would cost ~3x the
#                   executions; "address" turns it on.
#   FUZZ_KEEP_GOING 1: keep fuzzing after a crash (libFuzzer -fork=1 -ignore_crashes=1) and list
#                   the distinct panic sites of all crashes found, by replaying every artifact.
#   RAYON_NUM_THREADS default 2.
# Needs `cargo install cargo-fuzz`. cargo fuzz passes nightly-only flags to rustc; on a stable
# toolchain RUSTC_BOOTSTRAP=1 lets them through, so it is set unless rustc is already a nightly.
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
keep_going=${FUZZ_KEEP_GOING:-0}

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
triple=$(rustc -vV | sed -n 's/^host: //p')

status=0
for t in "${targets[@]}"; do
  for f in regressions/"$t"/*; do
    [ -f "$f" ] || continue
    if ! "target/$triple/release/$t" "$f" >/dev/null 2>&1; then
      echo "regression input $f still fails: replay with target/$triple/release/$t $f"
      status=1
    fi
  done
done
printf '%-16s %12s %8s %10s  %s\n' target executions seconds exec/s finding
for t in "${targets[@]}"; do
  mkdir -p "corpus/$t" "artifacts/$t"
  log=$(mktemp)
  extra=()
  if [ "$keep_going" = 1 ]; then
    extra=(-fork=1 -ignore_crashes=1 -ignore_timeouts=1 -ignore_ooms=1)
  fi
  before=$(find "artifacts/$t" -type f -name '*-*' ! -name 'slow-unit-*' | wc -l)
  slow_before=$(find "artifacts/$t" -type f -name 'slow-unit-*' | wc -l)
  start=$(date +%s)
  set +e
  cargo fuzz run -s "$sanitizer" "$t" "corpus/$t" -- -max_total_time="$secs" -timeout=20 \
    -rss_limit_mb=4096 -print_final_stats=1 "${extra[@]}" \
    >"$log" 2>&1
  rc=$?
  set -e
  took=$(($(date +%s) - start))
  runs=$(grep -oE '^stat::number_of_executed_units: *[0-9]+' "$log" | grep -oE '[0-9]+$' | tail -1 || true)
  if [ -z "$runs" ]; then # fork mode: the last status line "#N: ..."
    runs=$(grep -oE '^#[0-9]+' "$log" | tail -1 | tr -d '#' || true)
  fi
  runs=${runs:-0}
  rate=$((took > 0 ? runs / took : 0))
  # Crashes, timeouts (over -timeout) and out-of-memory inputs count; a slow unit (libFuzzer's
  # report of an input slower than 10 s but under the timeout) is listed, not counted.
  found=$(($(find "artifacts/$t" -type f -name '*-*' ! -name 'slow-unit-*' | wc -l) - before))
  slow=$(($(find "artifacts/$t" -type f -name 'slow-unit-*' | wc -l) - slow_before))
  finding=none
  if [ "$slow" -gt 0 ]; then
    finding="none ($slow slow input(s) kept in artifacts/$t/)"
  fi
  if [ $rc -ne 0 ] || [ "$found" -gt 0 ]; then
    status=1
    cp "$log" "artifacts/$t/last-run.log"
    if [ "$keep_going" = 1 ]; then
      sites=$(for f in artifacts/"$t"/crash-* artifacts/"$t"/timeout-* artifacts/"$t"/oom-*; do
        [ -f "$f" ] || continue
        "target/$triple/release/$t" "$f" 2>&1 | grep -m1 -oE 'panicked at [^ ]+|deadly signal|timeout|out-of-memory' || true
      done | sort | uniq -c | sed 's/^ *//' | paste -sd ';' - || true)
      finding="$found new artifacts; sites: ${sites:-?}"
    else
      finding=$(grep -m1 -oE "(deadly signal|panicked at [^ ]*|Timeout|out-of-memory)" "$log" || echo "exit $rc")
      finding="$finding; see $(grep -m1 -oE "Test unit written to [^ ]+" "$log" | sed "s/Test unit written to //" || true)"
    fi
  fi
  printf '%-16s %12s %8s %10s  %s\n' "$t" "$runs" "$took" "$rate" "$finding"
  rm -f "$log"
done
exit $status
