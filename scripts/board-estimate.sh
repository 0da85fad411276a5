#!/usr/bin/env bash
# Estimates what listening costs on a slower board from instruction counts,
# which do not depend on this machine's speed or load: valgrind's callgrind
# counts the instructions `auscult run` executes on N1 and on N2 minutes of
# simulated healthy sound fed through stdin as fast as it is read (--clock
# samples: the whole agent per window: features, embedding, scoring, the
# running gate, alarm logic and the bbolt log), and the difference divided by
# the extra minutes is the cost of one second of listening without start-up.
# It then prints the CPU share that cost would take on a board, for the clock
# rates and instructions-per-cycle figures given (defaults: assumptions for
# Raspberry Pi class Cortex-A53/A72/A76 cores, stated in the output; they are
# from memory, not measured here).
#
# Usage: scripts/board-estimate.sh [N1_MIN N2_MIN]   (default 2 and 8; under
# callgrind the agent runs about 50x slower, so 8 minutes of sound take about
# 20 s here)
# Instruction counts are x86-64 instructions; an arm64 build executes a
# similar number of instructions for this kind of code (stated as an
# assumption, not measured).
set -euo pipefail
cd "$(dirname "$0")/.."
n1=${1:-2}
n2=${2:-8}
[[ "$n1" =~ ^[0-9]+$ && "$n2" =~ ^[0-9]+$ ]] && ((n2 > n1 && n1 >= 1)) ||
  { echo "board-estimate.sh: want two whole numbers of minutes, N2 > N1 >= 1" >&2; exit 2; }
command -v valgrind >/dev/null || { echo "board-estimate.sh: needs valgrind (apt-get install valgrind)" >&2; exit 1; }
work=$(mktemp -d "${TMPDIR:-/tmp}/auscult-board.XXXXXX")
trap 'rm -rf "$work"' EXIT
go build -o "$work/auscult" ./agent
A="$work/auscult"
"$A" simulate --out "$work/sim" --seed 1 --train 30 --test-normal 1 --per-fault 1 --seconds 10 >/dev/null
"$A" enroll --out "$work/b.baseline" "$work/sim/train" >/dev/null
count() { # minutes -> instructions executed by `auscult run` on that much sound
  local m=$1
  "$A" simulate --script "healthy@${m}m" --seed 1 --take 1 >"$work/raw-$m.pcm" 2>/dev/null
  rm -f "$work/run-$m.db"
  cat >"$work/run-$m.yaml" <<YAML
site: obrinvale
asset: P-492B
baseline: $work/b.baseline
source:
  kind: stdin
  rate_hz: 16000
log:
  path: $work/run-$m.db
YAML
  # asyncpreemptoff: Go's preemption signals trip an assertion in callgrind 3.19
  GODEBUG=asyncpreemptoff=1 valgrind --tool=callgrind --callgrind-out-file=/dev/null "$A" run --config "$work/run-$m.yaml" --clock samples \
    <"$work/raw-$m.pcm" 2>"$work/valgrind-$m.txt" >/dev/null
  sed -n 's/.*Collected : \([0-9]*\).*/\1/p' "$work/valgrind-$m.txt" | tail -n 1
}
i1=$(count "$n1")
i2=$(count "$n2")
[ -n "$i1" ] && [ -n "$i2" ] || { echo "board-estimate.sh: no instruction count in valgrind's output" >&2; exit 1; }
awk -v i1="$i1" -v i2="$i2" -v n1="$n1" -v n2="$n2" 'BEGIN {
  per = (i2 - i1) / ((n2 - n1) * 60)
  printf "instructions: %.4g for %d min, %.4g for %d min of sound\n", i1, n1, i2, n2
  printf "listening costs %.3g million instructions per second of sound (%.3g G per hour)\n", per / 1e6, per * 3600 / 1e9
  printf "\nCPU share of one core it would take (assumed clock and instructions per cycle, from memory):\n"
  printf "%-44s %8s %6s %10s\n", "board core", "clock", "IPC", "CPU share"
  n = split("Cortex-A53 (Pi 3 class)|1.2|0.6;Cortex-A72 (Pi 4 class)|1.5|1.0;Cortex-A76 (Pi 5 class)|2.4|1.5", rows, ";")
  for (k = 1; k <= n; k++) {
    split(rows[k], f, "|")
    printf "%-44s %5.1f GHz %6.1f %9.2f %%\n", f[1], f[2], f[3], 100 * per / (f[2] * 1e9 * f[3])
  }
}'
