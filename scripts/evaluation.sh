#!/usr/bin/env bash
# Reproduces the detection figures in docs/evaluation.md: for seeds 1, 2 and
# 3 (three different simulated pumps) it simulates the data set, enrols on
# the healthy recordings, evaluates on the labelled test set (all SNRs and
# SNR >= 0 dB), and then runs the ablation over all three.
# Usage: scripts/evaluation.sh [WORKDIR]   (about 3 minutes on 2 cores)
set -euo pipefail
cd "$(dirname "$0")/.."
work=${1:-$(mktemp -d)}
mkdir -p "$work"
go build -o "$work/auscult" ./agent
A="$work/auscult"
dirs=()
for seed in 1 2 3; do
  d="$work/seed$seed"
  [ -f "$d/test/labels.csv" ] || "$A" simulate --out "$d" --seed "$seed"
  "$A" enroll --out "$d/baseline" "$d/train"
  echo "== seed $seed, all SNRs"
  "$A" evaluate --baseline "$d/baseline" --labels "$d/test/labels.csv" "$d/test" --roc "$d/roc.svg" \
    --json > "$d/eval.json"
  "$A" evaluate --baseline "$d/baseline" --labels "$d/test/labels.csv" "$d/test"
  echo "== seed $seed, SNR >= 0 dB"
  "$A" evaluate --baseline "$d/baseline" --labels "$d/test/labels.csv" "$d/test" --where "snr_db>=0"
  dirs+=("$d")
done
echo "== ablation over seeds 1-3"
go run ./scripts/ablation "${dirs[@]}"
echo "evaluation: files in $work"
