#!/usr/bin/env bash
# Reproduces the detection figures in docs/evaluation.md: for seeds 1, 2 and
# 3 (three different simulated pumps) it simulates the data set, enrols on
# the healthy recordings, evaluates on the labelled test set (all SNRs and
# SNR >= 0 dB), prints the mean tables over the three (scripts/evaltable),
# and then runs the ablation over all three.
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
  "$A" evaluate --baseline "$d/baseline" --labels "$d/test/labels.csv" "$d/test" --where "snr_db>=0" \
    --json > "$d/eval-snr0.json"
  dirs+=("$d")
done
echo "== mean over seeds 1-3, all SNRs"
go run ./scripts/evaltable "$work"/seed{1,2,3}/eval.json
echo "== mean over seeds 1-3, SNR >= 0 dB"
go run ./scripts/evaltable "$work"/seed{1,2,3}/eval-snr0.json
echo "== ablation over seeds 1-3"
go run ./scripts/ablation "${dirs[@]}"
echo "evaluation: files in $work"
