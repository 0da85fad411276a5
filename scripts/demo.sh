#!/usr/bin/env bash
# A commissioning walk-through on simulated sound: build auscult, record a
# healthy pump, enrol it, listen to one healthy and one faulty recording,
# then measure how well it tells them apart over a whole labelled test set.
#
# Usage: scripts/demo.sh            (from any folder; needs Go 1.26 or newer)
# Everything it writes goes into a new temporary folder, named at the end.
set -euo pipefail

repo="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
command -v go >/dev/null || { echo "demo.sh: Go is not on the PATH (need Go 1.26 or newer)" >&2; exit 1; }
work="$(mktemp -d "${TMPDIR:-/tmp}/auscult-demo.XXXXXX")"
bin="$work/auscult"
data="$work/obrinvale"

# step prints a numbered heading with an underline.
step() {
	printf '\n%s\n' "$1"
	printf '%s\n' "$(printf '%s' "$1" | tr -c '\n' '-')"
}

step "0. Building auscult"
(cd "$repo" && go build -trimpath -o "$bin" ./agent)
echo "built $bin ($("$bin" version))"

step "1. Recording the healthy pump after commissioning (simulated, seed 7)"
echo "60 healthy recordings for the baseline, then a test set of 40 healthy and"
echo "2 recordings of every fault at every severity, all 10 s long."
sim="$("$bin" simulate --out "$data" --seed 7 --train 60 --test-normal 40 --per-fault 2)"
echo "$sim"
asset="$(sed -n 's/.*, pump \([^:]*\):.*/\1/p' <<<"$sim")"
[ -n "$asset" ] || { echo "demo.sh: could not read the pump's tag from: $sim" >&2; exit 1; }

step "2. Enrolling what healthy sounds like for pump $asset"
baseline="$work/$asset.baseline"
"$bin" enroll --out "$baseline" --asset "$asset" "$data/train"

step "3. Choosing a healthy and a faulty recording from the test labels"
labels="$data/test/labels.csv"
# Columns: file,label,fault,severity,snr_db,setpoint_hz,nuisance,snr_band.
# Healthy: the first one without nuisance sounds, else the first one.
healthy="$(awk -F, 'NR > 1 && $2 == 0 { if ($7 == "none") { print $1; exit } if (!first) first = $1 }
	END { if (first) print first }' "$labels" | head -n 1)"
# Faulty: a severe outer-race bearing fault or cavitation at an SNR of at
# least 3 dB, the loudest such one.
faulty="$(awk -F, 'NR > 1 && $2 == 1 && $4 == "severe" && ($3 == "bearing_outer" || $3 == "cavitation") && $5 + 0 >= 3 {
	if (best == "" || $5 + 0 > snr) { best = $1; snr = $5 + 0; what = $3 } }
	END { if (best != "") print best }' "$labels")"
[ -n "$healthy" ] || { echo "demo.sh: no healthy recording in $labels" >&2; exit 1; }
[ -n "$faulty" ] || { echo "demo.sh: no severe bearing_outer or cavitation recording at SNR >= 3 dB in $labels" >&2; exit 1; }
describe() { awk -F, -v f="$1" '$1 == f { printf "%s: fault %s, severity %s, SNR %s dB, nuisance %s\n",
	$1, ($3 == "" ? "none" : $3), ($4 == "" ? "-" : $4), $5, $7 }' "$labels"; }
echo "healthy  $(describe "$healthy")"
echo "faulty   $(describe "$faulty")"

step "4. Listening to the healthy recording"
"$bin" score --report --baseline "$baseline" "$data/test/$healthy"

step "5. Listening to the faulty recording"
report="$("$bin" score --report --baseline "$baseline" "$data/test/$faulty")"
echo "$report"
verdict="$(sed -n 's/^  verdict *//p' <<<"$report")"
case "$verdict" in
ALARM*) echo "The faulty recording raised an alarm." ;;
WARNING*) echo "The faulty recording raised a warning: unusual, but below the alarm level." ;;
*) echo "Note: the faulty recording did NOT raise an alarm; its verdict is \"$verdict\"." ;;
esac

step "6. Measuring detection over the whole test set"
roc="$work/roc.svg"
"$bin" evaluate --baseline "$baseline" --labels "$labels" --roc "$roc" --by fault,severity,snr_band "$data/test"
echo
echo "ROC curves written to $roc"
echo "All files of this run are in $work (remove it with: rm -r '$work')"
echo "demo finished in ${SECONDS} s"
