#!/usr/bin/env bash
# The whole job on one machine, on simulated sound, in about two minutes:
# commissioning a pump (pump P-492B at the invented Obrinvale raw-water
# lift station), enrolling it live through the agent's stdin on an
# accelerated clock, an hour of healthy running, a bearing fault that
# develops from mild to severe, the alarm as the SCADA side sees it over
# MQTT, the site-visit pages, and the log taken home at the end.
#
# Usage: scripts/demo.sh            (from any folder; needs Go 1.26 or newer)
# MQTT: a private Mosquitto on a free loopback port when the mosquitto
# package is installed (scripts/test.sh installs it); otherwise the alarms
# stay in the local log, and the demo says so.
# Everything it writes goes into a new temporary folder, named at the end.
set -euo pipefail

repo="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
command -v go >/dev/null || { echo "demo.sh: Go is not on the PATH (need Go 1.26 or newer)" >&2; exit 1; }
work="$(mktemp -d "${TMPDIR:-/tmp}/auscult-demo.XXXXXX")"
bin="$work/auscult"
pids=()
cleanup() { for p in "${pids[@]}"; do kill "$p" 2>/dev/null || true; done; }
trap cleanup EXIT

step() {
	printf '\n%s\n' "$1"
	printf '%s\n' "$(printf '%s' "$1" | tr -c '\n' '-')"
}
free_port() { python3 -c 'import socket; s=socket.socket(); s.bind(("127.0.0.1",0)); print(s.getsockname()[1])' 2>/dev/null ||
	echo $((20000 + RANDOM % 20000)); }
wait_for() { # FILE PATTERN SECONDS
	for _ in $(seq 1 $(($3 * 10))); do grep -q "$2" "$1" 2>/dev/null && return 0; sleep 0.1; done
	echo "demo.sh: no '$2' in $1 within $3 s" >&2
	tail -n 20 "$1" >&2
	return 1
}

step "0. Building auscult"
(cd "$repo" && go build -trimpath -o "$bin" ./agent)
echo "built $bin ($("$bin" version))"

step "1. Commissioning pump P-492B at Obrinvale"
mosq="$(command -v mosquitto || true)"
[ -n "$mosq" ] || { [ -x /usr/sbin/mosquitto ] && mosq=/usr/sbin/mosquitto; } || true
mqtt=""
if [ -n "$mosq" ]; then
	port="$(free_port)"
	printf 'listener %s 127.0.0.1\nallow_anonymous true\npersistence false\nuser root\n' "$port" >"$work/mosquitto.conf"
	"$mosq" -c "$work/mosquitto.conf" >"$work/mosquitto.log" 2>&1 &
	pids+=($!)
	sleep 0.5
	if kill -0 "${pids[-1]}" 2>/dev/null; then
		mqtt="tcp://127.0.0.1:$port"
		echo "the plant's broker: a private Mosquitto at $mqtt"
	fi
fi
[ -n "$mqtt" ] || echo "no Mosquitto could be started here: alarms stay in the local log (install the mosquitto package to see the SCADA side)"
webport="$(free_port)"
head -c 24 /dev/urandom | base64 | tr -d '/+=' >"$work/web-token"
cat >"$work/agent.yaml" <<EOF
# Obrinvale raw-water lift station, pump P-492B (an invented site).
site: obrinvale
asset: P-492B
baseline: $work/P-492B.baseline
source:
  kind: stdin          # the demo pipes simulated sound in; on the skid: kind: device
  rate_hz: 16000
log:
  path: $work/auscult.db
  summary_min: 15
  flush_s: 2           # the demo runs an hour in seconds; on the skid the default 10 s spares the SD card
web:
  listen: 127.0.0.1:$webport
  token_file: $work/web-token
EOF
if [ -n "$mqtt" ]; then
	printf 'mqtt:\n  url: %s\n  reconnect_max_s: 5\n' "$mqtt" >>"$work/agent.yaml"
	if command -v mosquitto_sub >/dev/null; then
		mosquitto_sub -h 127.0.0.1 -p "$port" -t 'auscult/#' -q 1 -v >"$work/scada.txt" 2>/dev/null &
		pids+=($!)
	fi
fi
echo "configuration: $work/agent.yaml"

step "2. Enrolling the healthy pump live, through stdin (an hour of sound, accelerated)"
# The sound of step 3 is made meanwhile on the other core (the simulator is
# the slow part of this demo).
listen_script=healthy@60m,bearing_outer/mild@6m,bearing_outer/moderate@6m,bearing_outer/severe@6m,healthy@3m
("$bin" simulate --seed 1 --snr 6 --take 1 --script "$listen_script" >"$work/listen.s16le" 2>/dev/null && touch "$work/made") &
pids+=($!)
"$bin" simulate --seed 1 --snr 6 --take 0 --script healthy@60m 2>/dev/null |
	"$bin" enroll --live --config "$work/agent.yaml" --source stdin --duration 60m --out "$work/P-492B.baseline" 2>&1 |
	grep -v '^ *$' | tail -n 12

step "3. Listening: an hour of healthy running, then a bearing fault that grows"
echo "script: healthy 60 min, outer-race bearing mild 6 min, moderate 6 min, severe 6 min, healthy 3 min"
echo "(stamped as if it began 81 minutes ago; fed as fast as the agent reads it)"
mkfifo "$work/sound"
"$bin" run --config "$work/agent.yaml" --source stdin --clock samples --clock-start 81m <"$work/sound" 2>"$work/agent.log" &
pids+=($!)
(
	while [ ! -e "$work/made" ]; do sleep 0.2; done
	cat "$work/listen.s16le"
	touch "$work/fed"
	exec sleep 3600 # keeps stdin open: the agent keeps serving its pages until the demo ends
) >"$work/sound" 2>/dev/null &
pids+=($!)
wait_for "$work/agent.log" 'site-visit pages up' 30
while [ ! -e "$work/fed" ]; do sleep 0.5; done
sleep 3
echo "events the agent logged (from its journal lines):"
grep -o 'msg="[^"]*" asset=P-492B event=[^ ]*' "$work/agent.log" | sed 's/ asset=P-492B event=/  [/; s/msg="//; s/"  \[/  [/; s/$/]/' |
	grep -v 'machine.running' | sed -n "1,12p" | sed 's/^/  /'

step "4. What the SCADA bridge received over MQTT"
if [ -n "$mqtt" ]; then # summaries close on the agent's periodic flush: wait for them, and for the outbox to drain (at most 30 s)
	last=-1
	for _ in $(seq 1 30); do
		now=$(wc -l <"$work/scada.txt" 2>/dev/null || echo 0)
		[ "$now" = "$last" ] && grep -q '/summary ' "$work/scada.txt" && break
		last=$now
		sleep 1
	done
fi
if [ -n "$mqtt" ] && [ -s "$work/scada.txt" ]; then
	awk '{ topic = $1; $1 = ""; kind = topic; sub(/.*\//, "", kind)
		if (kind == "alarm" || kind == "status") {
			line = $0; out = ""
			n = split("seq time change state severity score threshold machine evidence_clip_id", keys, " ")
			for (i = 1; i <= n; i++) if (match(line, "\"" keys[i] "\":(\"[^\"]*\"|[0-9.eE+-]+)")) out = out " " substr(line, RSTART, RLENGTH)
			printf "  %-34s%s\n", topic, out
		} }' "$work/scada.txt" | sed -n "1,14p"
	echo "  ($(grep -c '/summary ' "$work/scada.txt" || true) summaries, $(grep -c '/alarm ' "$work/scada.txt" || true) alarm messages in all: $work/scada.txt)"
else
	echo "no broker in this demo: the same alarms are in the local log ($work/auscult.db)"
fi

step "5. The site-visit pages"
echo "open http://127.0.0.1:$webport/ and sign in with the token in $work/web-token"
curl -s -o /dev/null -w "  status page: HTTP %{http_code}, %{size_download} bytes\n" -H "Authorization: Bearer $(cat "$work/web-token")" "http://127.0.0.1:$webport/" ||
	echo "  (curl is not installed: open the address in a browser)"

step "6. Taking the log home"
"$bin" export --url "http://127.0.0.1:$webport" --token-file "$work/web-token" --what events --from 2d --out "$work/events.csv"
echo "events.csv: $(($(wc -l <"$work/events.csv") - 1)) events; the alarms:"
grep -E ',alarm\.(raised|cleared)|,warning\.raised' "$work/events.csv" | cut -d, -f1-4,6-8 | sed -n "1,6s/^/  /p"
"$bin" report --url "http://127.0.0.1:$webport" --token-file "$work/web-token" --from 1d --out "$work/visit-report.html"
"$bin" backup --url "http://127.0.0.1:$webport" --token-file "$work/web-token" --out "$work/P-492B-log-copy.db"

kill "${pids[@]}" 2>/dev/null || true
pids=()
echo
echo "All files of this run are in $work (remove it with: rm -r '$work')"
echo "demo finished in ${SECONDS} s"
