#!/usr/bin/env bash
# Replay benchmark: generates a whitespace table (iteration + 8 columns, %.4e) and times, on the same file in
# the same run, the reference awk line and our reading path. Prints records/s, MB/s and peak heap.
#
#   bench/run-bench.sh            3,000,000 lines (about 290 MB)
#   bench/run-bench.sh --big      also 30,000,000 lines (about 3 GB) under the same -Xmx, to show bounded memory
#
# The replay reads the table with bench/bench-table.yaml (seven residuals and the monitor vmid), so every
# standard detector runs, the monitor detectors included (BENCH_FORMAT overrides it, e.g. BENCH_FORMAT=table).
#
# mawk and the replay run BENCH_REPEAT times each (default 3), alternately; their medians are compared.
#
# Environment: BENCH_DIR (default: a fresh temp dir, removed at the end), BENCH_XMX (default 128m),
# BENCH_KEEP=1 keeps the generated files. The figures are a measurement, not a test.
set -euo pipefail

root="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$root"
xmx="${BENCH_XMX:-128m}"
format="${BENCH_FORMAT:-$root/bench/bench-table.yaml}"
big=0
[[ "${1:-}" == "--big" ]] && big=1

jar="$root/target/watcher.jar"
newest_src="$(find "$root/src/main" "$root/pom.xml" -type f -newer "$jar" 2>/dev/null | head -1 || true)"
if [[ ! -f "$jar" || -n "$newest_src" ]]; then
  echo "building $jar ..." >&2
  mvn -q -o package -DskipTests >&2 || mvn -q package -DskipTests >&2
fi

if [[ -n "${BENCH_DIR:-}" ]]; then
  work="$BENCH_DIR"; mkdir -p "$work"
else
  work="$(mktemp -d "${TMPDIR:-/tmp}/watcher-bench.XXXXXX")"
fi
cleanup() { [[ "${BENCH_KEEP:-0}" == 1 || -n "${BENCH_DIR:-}" ]] || rm -rf "$work"; }
trap cleanup EXIT

# timed CMD...: runs CMD with stdout to $work/out, sets wall and cpu (user+sys, children included) in seconds
timed() {
  local TIMEFORMAT='%R %U %S' t
  t=$( { time "$@" >"$work/out" 2>"$work/err"; } 2>&1 ) || echo "$1 exited with $?: $(tail -n 3 "$work/err")" >&2
  wall=$(awk '{print $1}' <<<"$t"); cpu=$(awk '{printf "%.2f", $2+$3}' <<<"$t")
}
rate() { awk -v b="$bytes" -v s="$1" -v n="$lines" 'BEGIN{printf "%.0f records/s  %.1f MB/s", n/s, b/1e6/s}'; }
ratio() { awk -v a="$1" -v b="$2" 'BEGIN{printf "%.2f", a/b}'; }
median() { printf '%s\n' "$@" | sort -n | awk '{v[NR] = $1} END {print v[int((NR + 1) / 2)]}'; }
repeat="${BENCH_REPEAT:-3}"

has_replay=0
if [[ -x "$root/watcher" ]] && "$root/watcher" build >/dev/null && "$root/watcher" replay --help >/dev/null 2>&1; then
  has_replay=1   # built before timing, so no build lands inside the measurement
fi

run_one() {
  local lines="$1" file="$work/table-$1.txt"
  if [[ ! -f "$file" ]]; then
    java -cp "$jar" dev.watcher.bench.TableGen "$file" "$lines"
  fi
  local bytes; bytes=$(stat -c %s "$file")
  cat "$file" >/dev/null   # warm the page cache so every contender reads from memory

  echo "== $lines lines, $(awk -v b="$bytes" 'BEGIN{printf "%.1f", b/1e6}') MB: $file"
  echo "   (wall = elapsed seconds, cpu = user+sys seconds; on a busy machine cpu is the steadier figure)"
  # mawk and the replay are timed BENCH_REPEAT times each, alternately (a shared VM's speed drifts); the
  # medians are compared and every run's wall time is shown
  local awk_wall="" awk_cpu="" awk_walls="" rep_walls="" rep_cpus="" awk_cpus="" state peak="" r
  for ((r = 1; r <= repeat; r++)); do
    if command -v mawk >/dev/null; then
      timed mawk '{for(i=2;i<=9;i++) s+=log($i)} END{print s}' "$file"
      awk_walls+="$wall "; awk_cpus+="$cpu "; cp "$work/out" "$work/mawk.out"
    fi
    if [[ "$has_replay" == 1 ]]; then
      state="$work/state-$lines"; rm -rf "$state"; mkdir -p "$state"
      WATCHER_HEAP="$xmx" WATCHER_JAVA_OPTS="-Xlog:gc:file=$work/gc-$lines-$r.log ${WATCHER_JAVA_OPTS:-}" \
        timed "$root/watcher" replay "$file" --format "$format" --state "$state"
      rep_walls+="$wall "; rep_cpus+="$cpu "; cp "$work/out" "$work/replay.out"
    fi
  done
  if [[ -n "$awk_walls" ]]; then
    awk_wall=$(median $awk_walls); awk_cpu=$(median $awk_cpus)
    echo "mawk            wall ${awk_wall} s  cpu ${awk_cpu} s  $(rate "$awk_wall")  (median of $repeat: ${awk_walls% }; printed: $(cat "$work/mawk.out"))"
  else
    echo "mawk            not installed: no reference time"
  fi

  timed java -Xmx"$xmx" -cp "$jar" dev.watcher.bench.ReadBench "$file"
  echo "read+parse      wall ${wall} s  cpu ${cpu} s  $(rate "$wall")  (JVM start included, -Xmx$xmx)"
  sed 's/^/                /' "$work/out"
  [[ -n "$awk_wall" ]] && echo "                $(ratio "$awk_wall" "$wall")x mawk's speed by wall time, $(ratio "$awk_cpu" "$cpu")x by cpu time"

  if [[ "$has_replay" == 1 ]]; then
    wall=$(median $rep_walls); cpu=$(median $rep_cpus)
    # peak heap: the largest heap occupancy the GC logs show before a collection
    peak=$(cat "$work"/gc-"$lines"-*.log 2>/dev/null | grep -o '[0-9]*M->' | sed 's/M->//' | sort -n | tail -1 || true)
    echo "watcher replay  wall ${wall} s  cpu ${cpu} s  $(rate "$wall")  (median of $repeat: ${rep_walls% }; -Xmx$xmx, peak heap ${peak:-?} MB by GC log)"
    echo "                format: $format"
    local counts; counts=$(grep -o '"type":"detection"[^}]*"state":"open"' "$state/timeline.jsonl" 2>/dev/null | wc -l || true)
    echo "                timeline: $(wc -l <"$state/timeline.jsonl") events, ${counts} detections opened"
    [[ -n "$awk_wall" ]] && echo "                $(ratio "$awk_wall" "$wall")x mawk's speed by wall time, $(ratio "$awk_cpu" "$cpu")x by cpu time"
    tail -n 3 "$work/replay.out" | sed 's/^/                /'
  else
    echo "watcher replay  not available yet (no ./watcher with a replay command)"
  fi
  # the detectors' share: the same record model generated in memory, every standard detector, per record
  # (per-record figures: the 3,000,000-line size is enough, the big one would take minutes for the same)
  if (( lines <= 3000000 )); then
    timed java -Xmx"$xmx" -cp "$jar" dev.watcher.bench.DetectBench "$lines"
    echo "detectors       wall ${wall} s  cpu ${cpu} s  (records generated in memory; per detector below)"
    sed 's/^/                /' "$work/out" | grep -vF 'e.g.'
  fi
  [[ "${BENCH_KEEP:-0}" == 1 ]] || rm -f "$file"
}

run_one 3000000
[[ "$big" == 1 ]] && run_one 30000000
echo "work dir: $work"
