#!/usr/bin/env bash
# Times the whole analysis chain (decode, features, embedding, scoring) on
# one hour of 16 kHz audio: auscult on one core against the numpy/scipy
# reference implementation of the same features (scripts/ref/bench_numpy.py,
# single-threaded), and reports the ratio, the realtime factor and the peak
# memory. Needs sox, python3-numpy and python3-scipy (Debian packages; they
# are installed if missing).
set -euo pipefail
cd "$(dirname "$0")/.."
need=()
for p in sox python3-numpy python3-scipy time; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || need+=("$p")
done
if ((${#need[@]})); then
  sudo=""; [ "$(id -u)" -eq 0 ] || sudo="sudo"
  $sudo apt-get update -qq && DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq --no-install-recommends "${need[@]}"
fi
work=${BENCH_DIR:-$(mktemp -d)}
echo "bench: working in $work"
go build -o "$work/auscult" ./agent
A="$work/auscult"
[ -d "$work/sim/train" ] || "$A" simulate --out "$work/sim" --seed 1 --train 60 --test-normal 1 --per-fault 1 >/dev/null
"$A" enroll --out "$work/bench.baseline" "$work/sim/train" >/dev/null
if [ ! -f "$work/hour.wav" ]; then
  # One hour: healthy recordings repeated end to end (sox concatenates).
  files=("$work"/sim/train/*.wav)
  list=(); while [ "${#list[@]}" -lt 360 ]; do list+=("${files[@]}"); done
  sox "${list[@]:0:360}" "$work/hour.wav"
fi
secs=$(soxi -D "$work/hour.wav")
echo "bench: $(printf %.0f "$secs") s of audio in $work/hour.wav"

best_go=""
for i in 1 2 3; do
  /usr/bin/time -f "%e %M" -o "$work/time.txt" env GOMAXPROCS=1 "$A" score --baseline "$work/bench.baseline" "$work/hour.wav" >/dev/null
  read -r el rss < "$work/time.txt"
  if [ -z "$best_go" ] || awk "BEGIN{exit !($el < $best_go)}"; then best_go=$el; best_rss=$rss; fi
done
best_py=""
for i in 1 2; do
  read -r el _ < <(/usr/bin/python3 scripts/ref/bench_numpy.py "$work/hour.wav")
  if [ -z "$best_py" ] || awk "BEGIN{exit !($el < $best_py)}"; then best_py=$el; fi
done
awk -v s="$secs" -v g="$best_go" -v p="$best_py" -v r="$best_rss" 'BEGIN {
  printf "auscult (1 core)   %7.3f s  %7.0fx realtime  peak RSS %.1f MB\n", g, s/g, r/1024
  printf "numpy/scipy        %7.3f s  %7.0fx realtime\n", p, s/p
  printf "auscult is %.2fx as fast as the numpy reference\n", p/g
}'
