#!/usr/bin/env bash
# Replay benchmark: generates a whitespace table (iteration + 8 columns, %.4e) and times, on the same file in
# the same run, the reference awk line and our reading path. Prints records/s, MB/s and peak heap.
#
#   bench/run-bench.sh            3,000,000 lines (about 290 MB)
#   bench/run-bench.sh --big      also 30,000,000 lines (about 3 GB) under the same -Xmx, to show bounded memory
#
# Environment: BENCH_DIR (default: a fresh temp dir, removed at the end), BENCH_XMX (default 128m),
# BENCH_KEEP=1 keeps the generated files. The figures are a measurement, not a test.
set -euo pipefail

root="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$root"
xmx="${BENCH_XMX:-128m}"
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

now() { date +%s.%N; }
secs() { awk -v a="$1" -v b="$2" 'BEGIN{printf "%.3f", b-a}'; }

has_replay=0
if [[ -x "$root/watcher" ]] && "$root/watcher" replay --help >/dev/null 2>&1; then
  has_replay=1
fi

run_one() {
  local lines="$1" file="$work/table-$1.txt"
  if [[ ! -f "$file" ]]; then
    java -cp "$jar" dev.watcher.bench.TableGen "$file" "$lines"
  fi
  local bytes; bytes=$(stat -c %s "$file")
  cat "$file" >/dev/null   # warm the page cache so every contender reads from memory

  echo "== $lines lines, $(awk -v b="$bytes" 'BEGIN{printf "%.1f", b/1e6}') MB: $file"
  local t0 t1 awk_s out
  if command -v mawk >/dev/null; then
    t0=$(now); out=$(mawk '{for(i=2;i<=9;i++) s+=log($i)} END{print s}' "$file"); t1=$(now)
    awk_s=$(secs "$t0" "$t1")
    echo "mawk           ${awk_s} s  $(awk -v b="$bytes" -v s="$awk_s" -v n="$lines" \
      'BEGIN{printf "%.0f records/s  %.1f MB/s", n/s, b/1e6/s}')  (printed: $out)"
  else
    awk_s=""
    echo "mawk           not installed: no reference time"
  fi

  t0=$(now)
  out=$(java -Xmx"$xmx" -cp "$jar" dev.watcher.bench.ReadBench "$file")
  t1=$(now)
  local rb_s; rb_s=$(secs "$t0" "$t1")
  echo "read+parse     ${rb_s} s wall (JVM start included), -Xmx$xmx"
  echo "$out" | sed 's/^/               /'
  [[ -n "$awk_s" ]] && awk -v a="$awk_s" -v b="$rb_s" 'BEGIN{printf "               %.2fx the speed of mawk (wall clock)\n", a/b}'

  if [[ "$has_replay" == 1 ]]; then
    local state="$work/state-$lines"; rm -rf "$state"; mkdir -p "$state"
    t0=$(now)
    JAVA_TOOL_OPTIONS="-Xmx$xmx ${JAVA_TOOL_OPTIONS:-}" "$root/watcher" replay "$file" --format table \
      --state "$state" >"$work/replay-$lines.out" 2>&1 || echo "replay exited with $?"
    t1=$(now)
    local rp_s; rp_s=$(secs "$t0" "$t1")
    echo "watcher replay ${rp_s} s  $(awk -v b="$bytes" -v s="$rp_s" -v n="$lines" \
      'BEGIN{printf "%.0f records/s  %.1f MB/s", n/s, b/1e6/s}'), -Xmx$xmx"
    [[ -n "$awk_s" ]] && awk -v a="$awk_s" -v b="$rp_s" 'BEGIN{printf "               %.2fx the speed of mawk\n", a/b}'
    tail -n 3 "$work/replay-$lines.out" | sed 's/^/               /'
  else
    echo "watcher replay not available yet (no ./watcher with a replay command)"
  fi
  [[ "${BENCH_KEEP:-0}" == 1 ]] || rm -f "$file"
}

run_one 3000000
[[ "$big" == 1 ]] && run_one 30000000
echo "work dir: $work"
