#!/usr/bin/env bash
# Installs what the tests need (idempotently) and runs every test.
# Usage: scripts/test.sh            (from any folder; needs root or sudo for apt-get)
set -euo pipefail
cd "$(dirname "$0")/.."

# Debian packages the tests use: sox writes reference WAV files; portaudio19-dev
# (with libasound2-dev) builds live capture, tested through ALSA's file plugin;
# systemd brings systemd-analyze, which checks the service unit; mosquitto is the
# real broker the tests start on a free loopback port, and mosquitto-clients
# brings mosquitto_sub, the client we did not write that receives what we publish;
# chromium is the real browser that loads the site-visit pages in their tests.
packages=(sox portaudio19-dev systemd mosquitto mosquitto-clients chromium)
missing=()
for p in "${packages[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if ((${#missing[@]})); then
  echo "test.sh: installing ${missing[*]}"
  sudo=""; [ "$(id -u)" -eq 0 ] || sudo="sudo"
  $sudo apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq --no-install-recommends "${missing[@]}"
fi
# The cross-builds for the boards and qemu to run them here: scripts/build.sh --deps
# adds the arm64 and armhf architectures to dpkg and installs gcc-aarch64-linux-gnu,
# gcc-arm-linux-gnueabihf, their libc6-dev-*-cross, portaudio19-dev:arm64 and :armhf,
# qemu-user-static, file and binutils when missing, and fails if a piece is still missing.
bash scripts/build.sh --deps
command -v go >/dev/null || { echo "test.sh: Go is not installed (need Go 1.26 or newer)"; exit 1; }
# Everything the tests need is installed above: a test that finds a real
# component missing must fail, not skip.
export CI=true

# quiet runs a command and shows its output only when it fails.
quiet() {
  local out
  if ! out="$("$@" 2>&1)"; then
    echo "$out"
    return 1
  fi
}

echo "== vet"
go vet ./...
echo "== build without cgo"
CGO_ENABLED=0 go build -o /dev/null ./agent
echo "== benchmarks compile and run once"
quiet go test -run '^$' -bench . -benchtime 1x ./...
echo "== fuzz the WAV parser briefly"
quiet go test -run '^$' -fuzz FuzzParseWAV -fuzztime 15s ./pkg/audio
echo "== fuzz the MQTT command parser briefly"
quiet go test -run '^$' -fuzz FuzzParseCommand -fuzztime 10s ./pkg/publish
echo "== race detector on the concurrent parts"
quiet go test -count=1 -race -short ./agent ./pkg/pipeline ./pkg/ring ./pkg/capture ./pkg/store ./pkg/alarm ./pkg/monitor ./pkg/publish/...
echo "== cross-architecture scores under qemu"
bash scripts/crossarch.sh
echo "== install, upgrade, remove and purge in a throw-away Debian root"
quiet bash scripts/install-test.sh
echo "== tests"
go test -count=1 ./...
