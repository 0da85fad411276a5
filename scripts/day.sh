#!/usr/bin/env bash
# A simulated day of listening, run faster than real time: enrols on the
# healthy recordings of simulated pump SEED, then streams HOURS of healthy
# running of the same pump (with the simulator's nuisances: clanks, beepers,
# speech-like babble, a neighbouring machine; set-point changes every ten
# minutes) through `auscult run --source stdin --clock samples` at default
# settings. All the audio is healthy, so every alarm or warning raised is a
# false one. It counts them, the machine state changes and sensor
# diagnostics, and checks that the heap and the goroutine count stay flat
# (no growth from the first quarter of the run to the last). The agent runs
# with GODEBUG=gctrace=1 so that its log also has the live heap after every
# garbage collection, which shows a leak more plainly than the heap in use.
#
# Usage: scripts/day.sh [HOURS [SEED [SNR]]]   (defaults 24, 1, 6 dB; SNR one of 10, 6, 3, 0, -3, -6)
# DAY_DIR=FOLDER picks the working folder (default: a new temporary one).
# DAY_BROKER=URL adds an mqtt section: with a URL where no broker answers
# (tcp://127.0.0.1:9) the day is a broker outage, and the run shows the
# outbox filling up to its bound while memory stays flat. DAY_SUMMARY_MIN
# (default 60) and DAY_OUTBOX_MB (default 8) make that happen sooner.
# The simulator is the bottleneck (some 40-90x real time on one core), so a
# day takes 15 to 40 minutes, depending on what else the machine is doing.
set -euo pipefail
cd "$(dirname "$0")/.."
hours=${1:-24}
seed=${2:-1}
snr=${3:-6}
[[ "$hours" =~ ^[0-9]+$ ]] && ((hours >= 1)) || { echo "day.sh: HOURS must be a whole number >= 1, got '$hours'" >&2; exit 2; }
[[ "$seed" =~ ^[0-9]+$ ]] || { echo "day.sh: SEED must be a whole number, got '$seed'" >&2; exit 2; }
work=${DAY_DIR:-$(mktemp -d "${TMPDIR:-/tmp}/auscult-day.XXXXXX")}
mkdir -p "$work"
echo "day: working in $work"
go build -o "$work/auscult" ./agent
A="$work/auscult"

# The data set's healthy training recordings are the same pump the script
# streams; the test set is not used, so it is kept to the minimum.
[ -d "$work/sim/train" ] || "$A" simulate --out "$work/sim" --seed "$seed" --test-normal 1 --per-fault 1 >/dev/null
"$A" enroll --out "$work/day.baseline" "$work/sim/train" >"$work/enroll.txt"
rm -f "$work/day.db"
cat >"$work/day.yaml" <<EOF
site: obrinvale
asset: P-492B
baseline: $work/day.baseline
source:
  kind: stdin
  rate_hz: 16000
  channels: 1
log:
  path: $work/day.db
  summary_min: ${DAY_SUMMARY_MIN:-60}
EOF
if [ -n "${DAY_BROKER:-}" ]; then
  printf 'mqtt:\n  url: %s\n  outbox_mb: %s\n  reconnect_max_s: 60\n' "$DAY_BROKER" "${DAY_OUTBOX_MB:-8}" >>"$work/day.yaml"
fi
log="$work/day.log"
stats=10s  # the agent's figures interval, in wall time
echo "day: seed $seed, ${hours} h of healthy running at SNR $snr dB; agent log in $log"
start=$(date +%s.%N)
"$A" simulate --seed "$seed" --snr "$snr" --script "healthy@${hours}h" 2>"$work/stream.txt" |
  GODEBUG=gctrace=1 "$A" run --config "$work/day.yaml" --source stdin --clock samples --stats-every "$stats" 2>"$log"
end=$(date +%s.%N)
grep -q 'msg=stopped' "$log" || { tail -n 20 "$log" >&2; echo "day.sh: no 'stopped' line in $log" >&2; exit 1; }

count() { grep -c " event=$1 " "$log" || true; }
alarms=$(count alarm.raised)
warnings=$(count warning.raised)
machine=$(grep -c ' event=machine\.' "$log" || true)
sensor=$(grep -c ' event=sensor\.[^ ]*\.active ' "$log" || true)
capture=$(grep -c ' event=capture\.' "$log" || true)
windows=$(grep 'msg=stopped' "$log" | tail -n 1 | sed -n 's/.* windows=\([0-9]*\).*/\1/p')

echo
printf '%s\n' "$(cat "$work/stream.txt")"
echo "enrolment (auscult enroll):"
sed -n '/^ *alarm at/,/^ *level/p' "$work/enroll.txt" | grep -v '^ *level'
awk -v h="$hours" -v s="$start" -v e="$end" -v w="$windows" -v n="$(nproc)" -v l="$(cut -d' ' -f1-3 /proc/loadavg)" 'BEGIN {
  printf "audio            %d h (%d windows decided)\n", h, w
  printf "wall time        %.0f s (%s cores, load at the end %s)\n", e - s, n, l
  printf "speed-up         %.0fx real time\n", h * 3600 / (e - s)
}'
awk -v h="$hours" -v a="$alarms" -v w="$warnings" -v m="$machine" -v s="$sensor" -v c="$capture" 'BEGIN {
  printf "false alarms     %d  (%.2f per day; goal 0)\n", a, a * 24 / h
  printf "false warnings   %d  (%.2f per day)\n", w, w * 24 / h
  printf "machine changes  %d  (counting the first, from unknown)\n", m
  printf "sensor faults    %d raised\n", s
  printf "capture faults   %d\n", c
}'
echo "events by code:"
{ grep -o ' event=[^ ]*' "$log" || true; } | sed 's/ event=//' | sort | uniq -c | sed 's/^ */  /'
# summary NAME UNIT SCALE reads one number a line: first, min, max and last,
# and the mean and the minimum of the first and of the last quarter. The
# minimum matters for heap_bytes, which saws up and down between collections.
summary() {
  awk -v name="$1" -v unit="$2" -v scale="$3" '{ v[NR] = $1 }
  function f(x) { return scale == 1 ? sprintf("%.4g", x) : sprintf("%.2f", x / scale) }
  END {
    if (NR == 0) { printf "%-16s no samples\n", name; exit }
    lo = hi = v[1]
    for (i = 1; i <= NR; i++) { if (v[i] < lo) lo = v[i]; if (v[i] > hi) hi = v[i] }
    q = int(NR / 4); if (q < 1) q = 1
    a = b = 0; am = v[1]; bm = v[NR]
    for (i = 1; i <= q; i++) {
      a += v[i]; b += v[NR - q + i]
      if (v[i] < am) am = v[i]
      if (v[NR - q + i] < bm) bm = v[NR - q + i]
    }
    a /= q; b /= q
    printf "%-16s %d samples; first %s  min %s  max %s  last %s%s\n", name, NR, f(v[1]), f(lo), f(hi), f(v[NR]), (unit == "" ? "" : " " unit)
    printf "%-16s first quarter mean %s min %s; last quarter mean %s min %s; mean %+.1f %%\n", "", f(a), f(am), f(b), f(bm),
      (a > 0 ? 100 * (b - a) / a : 0)
  }'
}
echo "heap and goroutines (figures every $stats of wall time; live heap after each collection from the GC trace, if any ran):"
{ grep 'msg=figures' "$log" || true; } | sed -n 's/.* heap_bytes=\([0-9]*\).*/\1/p' | summary "heap_bytes" MiB 1048576
{ grep '^gc [0-9]' "$log" || true; } | sed -n 's/.*->\([0-9]*\) MB, .*/\1/p' | summary "live heap (GC)" "MB (whole MB)" 1
{ grep 'msg=figures' "$log" || true; } | sed -n 's/.* goroutines=\([0-9]*\).*/\1/p' | summary "goroutines" "" 1
if [ -n "${DAY_BROKER:-}" ]; then
  echo "broker $DAY_BROKER: $(grep -c 'broker unreachable' "$log" || true) failed connects logged, $(grep -c 'connected to the broker' "$log" || true) connections"
  grep 'messages left in the outbox' "$log" | tail -n 1 || echo "outbox empty at the end"
  go run ./scripts/outbox "$work/day.db" || true
fi
if ((alarms + warnings > 0)); then
  echo
  echo "alarm and warning events (all false: the audio is healthy):"
  { grep -E ' event=(alarm|warning)\.' "$log" || true; } | head -n 40
fi
