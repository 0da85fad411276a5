#!/usr/bin/env bash
# Measures what listening costs in real time: the agent's CPU share of one
# core and its peak RSS while it listens, and the latency from a window's
# last sample to its decision. It replays a folder of simulated healthy and
# faulty recordings at speed 1 (paced to real time, as a microphone would
# deliver them) through `auscult run` for SECONDS, then stops it with SIGTERM.
#
# Usage: scripts/listen-bench.sh [SECONDS [WORKDIR]]   (default 120 s, a new temporary folder)
# A WORKDIR from an earlier run reuses its simulated recordings.
# WEB_LOAD=N also serves the site-visit pages and keeps N clients asking for
# them as fast as they are answered (status, 30-day trend, events, the
# spectrogram of an evidence clip, CSV and JSON exports of the month, the
# backup) for the whole run: compare the latency with and without.
# MQTT=1 also publishes to a private Mosquitto on a free loopback port (as on
# the skid: alarms, hourly summaries, status), with mosquitto_sub
# receiving; the message count is printed.
#
# CPU is utime+stime from /proc/PID/stat, sampled when the agent logs
# "listening" and again just before SIGTERM, over the wall time between
# (startup excluded). Peak RSS is VmHWM from /proc/PID/status just before
# SIGTERM (startup included); RssAnon and RssFile split the resident set at
# that moment into private memory and file pages (the executable and the
# bbolt log, which is mmapped: clean file pages the kernel can drop). Latency is the agent's own lag_mean_ms and
# lag_max_ms from its final "stopped" line: how long after the window's last
# sample was due (on the paced schedule) the decision was made; it includes
# waiting for the rest of the 4096-sample read block that completes the
# window.
set -euo pipefail
cd "$(dirname "$0")/.."
secs=${1:-120}
[[ "$secs" =~ ^[0-9]+$ ]] && ((secs >= 10)) || { echo "listen-bench.sh: SECONDS must be a whole number >= 10, got '$secs'" >&2; exit 2; }
[ -r /proc/self/stat ] || { echo "listen-bench.sh: needs Linux /proc" >&2; exit 1; }
work=${2:-$(mktemp -d "${TMPDIR:-/tmp}/auscult-listen.XXXXXX")}
mkdir -p "$work"
echo "listen-bench: working in $work"
go build -o "$work/auscult" ./agent
A="$work/auscult"

# Recordings of 10 s: 27 faulty ones (9 faults x 3 severities) and enough
# healthy ones that the folder plays for longer than SECONDS.
data="$work/sim"
normal=$(((secs + 9) / 10 + 6 - 27))
((normal >= 12)) || normal=12
have=0
[ -d "$data/test" ] && have=$(find "$data/test" -name '*.wav' | wc -l)
if ((have * 10 < secs + 60)); then
  rm -rf "$data"
  "$A" simulate --out "$data" --seed 1 --train 30 --test-normal "$normal" --per-fault 1 --seconds 10 >/dev/null
  have=$(find "$data/test" -name '*.wav' | wc -l)
fi
"$A" enroll --out "$work/listen.baseline" "$data/train" >/dev/null
rm -f "$work/listen.db"
cat >"$work/listen.yaml" <<EOF
site: obrinvale
asset: P-492B
baseline: $work/listen.baseline
source:
  kind: wav
  path: $data/test
  speed: 1
log:
  path: $work/listen.db
EOF
load=${WEB_LOAD:-0}
mqtt_pids=()
if [ "${MQTT:-0}" = 1 ]; then
  mosq="$(command -v mosquitto || echo /usr/sbin/mosquitto)"
  [ -x "$mosq" ] || { echo "listen-bench.sh: MQTT=1 needs mosquitto (apt-get install mosquitto mosquitto-clients)" >&2; exit 1; }
  mport=$((20000 + RANDOM % 20000))
  printf 'listener %s 127.0.0.1\nallow_anonymous true\npersistence false\nuser root\n' "$mport" >"$work/mosquitto.conf"
  "$mosq" -c "$work/mosquitto.conf" >"$work/mosquitto.log" 2>&1 &
  mqtt_pids+=($!)
  sleep 0.5
  mosquitto_sub -h 127.0.0.1 -p "$mport" -t 'auscult/#' -q 1 -v >"$work/scada.txt" 2>/dev/null &
  mqtt_pids+=($!)
  printf 'mqtt:\n  url: tcp://127.0.0.1:%s\n' "$mport" >>"$work/listen.yaml"
fi
if ((load > 0)); then
  token="listen-bench-token-$(date +%s%N)"
  printf '%s\n' "$token" >"$work/web-token"
  port=$((20000 + RANDOM % 20000))
  printf 'web:\n  listen: 127.0.0.1:%s\n  token_file: %s\n' "$port" "$work/web-token" >>"$work/listen.yaml"
  go run ./scripts/prefill -days 30 "$work/listen.db"   # a month of invented history to page through
fi
echo "listen-bench: $have recordings of 10 s (healthy and faulty) replayed in real time for $secs s"

# cpu_ticks prints utime+stime of process $1 in clock ticks (fields 14 and
# 15 of /proc/PID/stat, counted after the ")" that ends the command name).
cpu_ticks() { sed 's/^.*) //' "/proc/$1/stat" | awk '{ print $12 + $13 }'; }
now() { date +%s.%N; }

log="$work/listen.log"
"$A" run --config "$work/listen.yaml" --stats-every 30s 2>"$log" &
pid=$!
trap 'kill -TERM "$pid" 2>/dev/null || true' EXIT
for _ in $(seq 1 300); do
  grep -q 'msg=listening' "$log" && break
  kill -0 "$pid" 2>/dev/null || { cat "$log" >&2; echo "listen-bench.sh: the agent exited before listening" >&2; exit 1; }
  sleep 0.1
done
grep -q 'msg=listening' "$log" || { cat "$log" >&2; echo "listen-bench.sh: no 'listening' line within 30 s" >&2; exit 1; }
t0=$(now); c0=$(cpu_ticks "$pid")
clients=()
if ((load > 0)); then
  base="http://127.0.0.1:$port"
  paths=(/ "/trend?range=30d" "/events" "/clips/1/spectrogram.png" "/export?what=trend&format=csv&from=30d"
    "/export?what=events&format=json&from=30d" /backup "/report?from=30d")
  for i in $(seq 1 "$load"); do
    (
      n=0
      while :; do
        for p in "${paths[@]}"; do
          curl -s -o /dev/null -H "Authorization: Bearer $token" "$base$p" || true
          n=$((n + 1))
          echo "$n" >"$work/client-$i.count"
        done
      done
    ) &
    clients+=($!)
  done
fi
sleep "$secs"
for c in "${clients[@]}"; do kill "$c" 2>/dev/null || true; done
kill -0 "$pid" 2>/dev/null || { cat "$log" >&2; echo "listen-bench.sh: the agent stopped before $secs s were up" >&2; exit 1; }
c1=$(cpu_ticks "$pid"); t1=$(now)
hwm_kb=$(awk '/^VmHWM:/ { print $2 }' "/proc/$pid/status")
anon_kb=$(awk '/^RssAnon:/ { print $2 }' "/proc/$pid/status")
file_kb=$(awk '/^RssFile:/ { print $2 }' "/proc/$pid/status")
kill -TERM "$pid"
trap - EXIT
rc=0; wait "$pid" || rc=$?
((rc == 0)) || { cat "$log" >&2; echo "listen-bench.sh: the agent exited with status $rc after SIGTERM" >&2; exit 1; }
stopped=$(grep 'msg=stopped' "$log" | tail -n 1)
[ -n "$stopped" ] || { cat "$log" >&2; echo "listen-bench.sh: no 'stopped' line in $log" >&2; exit 1; }
field() { sed -n "s/.* $1=\([^ ]*\).*/\1/p" <<<"$stopped"; }
events=$(grep -c ' event=' "$log" || true)

echo "listen-bench: figures over $(awk -v a="$t0" -v b="$t1" 'BEGIN { printf "%.1f", b - a }') s of listening ($(nproc) cores, load $(cut -d' ' -f1-3 /proc/loadavg))"
awk -v c0="$c0" -v c1="$c1" -v t0="$t0" -v t1="$t1" -v hz="$(getconf CLK_TCK)" -v hwm="$hwm_kb" \
  -v anon="$anon_kb" -v file="$file_kb" -v win="$(field windows)" -v lm="$(field lag_mean_ms)" -v lx="$(field lag_max_ms)" -v ev="$events" -v webload="$load" 'BEGIN {
  cpu = 100 * (c1 - c0) / hz / (t1 - t0)
  if (webload > 0) {
    printf "CPU share of one core  %6.2f %%      (listening and serving the pages)\n", cpu
    printf "peak RSS (VmHWM)       %6.1f MiB    (listening and serving the pages)\n", hwm / 1024
  } else {
    printf "CPU share of one core  %6.2f %%      goal < 2 %%    %s\n", cpu, (cpu < 2 ? "met" : "NOT met")
    printf "peak RSS (VmHWM)       %6.1f MiB    goal < 30 MB  %s\n", hwm / 1024, (hwm / 1024 < 30 ? "met" : "NOT met")
  }
  printf "RSS at the end          %5.1f MiB    of which %.1f MiB private (heap, stacks, runtime) and %.1f MiB file pages (the binary, the mmapped log)\n", (anon + file) / 1024, anon / 1024, file / 1024
  printf "windows decided        %6d        (%d events logged)\n", win, ev
  printf "latency mean           %6d ms\n", lm
  printf "latency max            %6d ms\n", lx
  printf "CPU per window         %6.1f ms\n", 1000 * (c1 - c0) / hz / (win > 0 ? win : 1)
}'
if ((load > 0)); then
  served=$(cat "$work"/client-*.count 2>/dev/null | awk '{ s += $1 } END { print s + 0 }')
  echo "web load             $load clients asking without pause: $served requests answered ($(awk -v n="$served" -v s="$secs" 'BEGIN { printf "%.1f", n / s }') per s)"
fi
if ((${#mqtt_pids[@]} > 0)); then
  sleep 1
  kill "${mqtt_pids[@]}" 2>/dev/null || true
  echo "mqtt                 $(wc -l <"$work/scada.txt") messages received by mosquitto_sub ($(grep -c '/summary ' "$work/scada.txt" || true) summaries, $(grep -c '/alarm ' "$work/scada.txt" || true) alarm messages)"
fi
echo "listen-bench: agent log in $log"
