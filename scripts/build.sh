#!/usr/bin/env bash
# Release binaries of the agent for amd64 and the boards (arm64, armv7), into dist/.
# Usage: scripts/build.sh [VERSION]   build dist/auscult_VERSION_linux_{amd64,arm64,armv7} (live capture: cgo +
#                                     PortAudio) and the same names with _nocapture (CGO_ENABLED=0), then check each
#                                     one (under qemu for the ARM ones) and print a table
#        scripts/build.sh --deps      only install what the builds and their checks need (what scripts/test.sh calls)
# VERSION defaults to `git describe --tags --always --dirty`, or "dev" outside a git checkout. DIST=DIR writes
# elsewhere. Needs a Debian 12 amd64 host; root or sudo the first time, for apt-get.
#
# Cross-building with cgo uses Debian's cross compilers and Debian's own PortAudio for each architecture, installed
# side by side through multiarch (dpkg --add-architecture arm64 armhf). On Debian 12 portaudio19-dev and everything
# it pulls (libasound2-dev, libjack-jackd2-dev, pkgconf) are Multi-Arch: same, so the amd64, arm64 and armhf
# packages co-install: the headers in /usr/include are shared (identical), the libraries sit in /usr/lib/<triplet>,
# and pkgconf:<arch> brings /usr/bin/<triplet>-pkg-config, whose search path is /usr/lib/<triplet>/pkgconfig and the
# architecture-independent folders, never amd64's (checked: its libdir for portaudio-2.0 is /usr/lib/<triplet>).
set -euo pipefail
cd "$(dirname "$0")/.."

# The targets: label, GOARCH, GOARM, GNU triplet, qemu user emulator (empty: runs natively), `file` architecture.
targets=(
  "amd64 amd64 - x86_64-linux-gnu - x86-64"
  "arm64 arm64 - aarch64-linux-gnu qemu-aarch64-static ARM aarch64"
  "armv7 arm 7 arm-linux-gnueabihf qemu-arm-static ARM, EABI5"
)
# Debian packages: the C compiler, C library and PortAudio (with pkgconf's wrapper) of each architecture, qemu to
# run the ARM binaries here, file and binutils (readelf) to check what was built. The :amd64 qualifier matters:
# once the arm64 instance is installed, an unqualified query would also match it.
packages=(
  gcc libc6-dev pkgconf:amd64 portaudio19-dev:amd64
  gcc-aarch64-linux-gnu libc6-dev-arm64-cross pkgconf:arm64 portaudio19-dev:arm64
  gcc-arm-linux-gnueabihf libc6-dev-armhf-cross pkgconf:armhf portaudio19-dev:armhf
  qemu-user-static file binutils
)

die() { echo "build.sh: $*" >&2; exit 1; }

# table lines up '|'-separated rows in columns.
table() {
  awk -F'|' '{ for (i = 1; i <= NF; i++) { c[NR, i] = $i; if (length($i) > w[i]) w[i] = length($i) } n[NR] = NF }
    END { for (r = 1; r <= NR; r++) { line = ""; for (i = 1; i <= n[r]; i++) line = line (i < n[r] ? sprintf("%-" w[i] "s  ", c[r, i]) : c[r, i]); print line } }'
}

install_deps() {
  [ "$(dpkg --print-architecture 2>/dev/null)" = amd64 ] || die "needs a Debian amd64 host (dpkg --print-architecture)"
  local sudo="" update=0 missing=() p
  [ "$(id -u)" -eq 0 ] || sudo="sudo"
  for a in arm64 armhf; do
    if ! dpkg --print-foreign-architectures | grep -qx "$a"; then
      echo "build.sh: adding the $a architecture to dpkg"
      $sudo dpkg --add-architecture "$a"
      update=1
    fi
  done
  for p in "${packages[@]}"; do
    dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
  done
  if ((${#missing[@]})); then
    update=1
    echo "build.sh: installing ${missing[*]}"
  fi
  if ((update)); then
    $sudo apt-get update -qq
  fi
  if ((${#missing[@]})); then
    DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
  fi
  # Whatever was or was not installed above, every piece must now be there: fail, never skip.
  local t label goarch goarm triplet emu arch
  for t in "${targets[@]}"; do
    read -r label goarch goarm triplet emu arch <<<"$t"
    command -v "$triplet-gcc" >/dev/null || die "$triplet-gcc is missing"
    "$triplet-pkg-config" --exists portaudio-2.0 || die "$triplet-pkg-config finds no portaudio-2.0"
    [ "$emu" = - ] || command -v "$emu" >/dev/null || die "$emu is missing (qemu-user-static)"
  done
  command -v file >/dev/null || die "file is missing"
  command -v readelf >/dev/null || die "readelf is missing (binutils)"
}

if [ "${1:-}" = --deps ]; then
  install_deps
  exit 0
fi
if [ "${1:-}" = -h ] || [ "${1:-}" = --help ]; then
  sed -n '2,8p' "$0" | sed 's/^# \{0,1\}//'
  exit 0
fi

version="${1:-}"
if [ -z "$version" ]; then
  version="$(git describe --tags --always --dirty 2>/dev/null || true)"
  version="${version:-dev}"
fi
[[ "$version" =~ ^[A-Za-z0-9._+-]+$ ]] || die "version '$version': use letters, digits and . _ + - only"
dist="${DIST:-dist}"
command -v go >/dev/null || die "Go is not installed (need Go 1.26 or newer)"
install_deps
mkdir -p "$dist"

work="$(mktemp -d)"
trap 'rm -rf "$work"' EXIT
# ALSA's file plugin as a capture device (see shared PLATFORM-NOTES): with ALSA_CONFIG_PATH pointing here, a build
# with live capture lists "testmic" whatever sound hardware the machine has (here: none).
cp pkg/capture/capturetest/testmic.asoundrc "$work/asound.conf"

ldflags="-s -w -X main.version=$version"
rows=()
failed=0
for t in "${targets[@]}"; do
  read -r label goarch goarm triplet emu arch <<<"$t"
  [ "$goarm" = - ] && goarm=""
  [ "$emu" = - ] && emu=""
  base="$dist/auscult_${version}_linux_${label}"
  echo "== $label: live capture (cgo, $triplet-gcc, PortAudio from /usr/lib/$triplet)"
  env CGO_ENABLED=1 GOOS=linux GOARCH="$goarch" GOARM="$goarm" CC="$triplet-gcc" PKG_CONFIG="$triplet-pkg-config" \
    go build -trimpath -ldflags "$ldflags" -o "$base" ./agent
  echo "== $label: without live capture (CGO_ENABLED=0)"
  env CGO_ENABLED=0 GOOS=linux GOARCH="$goarch" GOARM="$goarm" \
    go build -trimpath -ldflags "$ldflags" -o "${base}_nocapture" ./agent

  for bin in "$base" "${base}_nocapture"; do
    size="$(stat -c %s "$bin" | awk '{printf "%d (%.1f MiB)", $1, $1 / 1048576}')"
    desc="$(file -b "$bin")"
    # file(1)'s answer without the build ids: class, machine, static or dynamic (with the loader).
    summary="$(sed -E 's/ LSB executable//; s/,? version 1 \((SYSV|GNU\/Linux)\)//; s/, (Go )?BuildID[^,]*//g;
      s/, for GNU\/Linux [0-9.]*//; s/, stripped$//' <<<"$desc")"
    link="static"
    if grep -q "dynamically linked" <<<"$desc"; then
      needed="$(readelf -d "$bin" | sed -n 's/.*(NEEDED).*\[\(.*\)\]/\1/p' | paste -sd' ')"
      glibc="$(readelf -V "$bin" | grep -o 'GLIBC_[0-9.]*' | sort -uV | tail -1)"
      link="dynamic"
      summary="$summary; needs $needed, ${glibc/_/ >= }"
    fi
    # Run `auscult devices`: the capture build must list the testmic device, the other must say it has no live capture.
    out="$(env -u AUSCULT_TEST_INFILE ALSA_CONFIG_PATH="$work/asound.conf" ${emu:+"$emu"} "$bin" devices 2>"$work/stderr")" && rc=0 || rc=$?
    problem=""
    grep -q "$arch" <<<"$desc" || problem="not a $arch binary"
    if [ "$bin" = "$base" ]; then
      [ "$link" != static ] || problem="${problem:+$problem; }statically linked: cgo did not take part"
      line="$(grep -m1 -E '^[ *] +[0-9]+ +[0-9]+ .* testmic$' <<<"$out" || true)"
      if [ "$rc" -eq 0 ] && [ -n "$line" ]; then
        capture="yes: lists testmic, $(awk '{print $(NF-3)}' <<<"$line") inputs"
      else
        capture="NO"
        problem="${problem:+$problem; }devices exited $rc without listing testmic"
      fi
    else
      [ "$link" = static ] || problem="${problem:+$problem; }not static"
      if [ "$rc" -ne 0 ] && grep -q "no live capture" "$work/stderr"; then
        capture="no: says live capture is not built in"
      else
        capture="UNEXPECTED"
        problem="${problem:+$problem; }devices exited $rc without saying live capture is not built in"
      fi
    fi
    if [ -n "$problem" ]; then
      echo "build.sh: $bin: $problem" >&2
      echo "$out" >&2
      cat "$work/stderr" >&2
      failed=1
    fi
    rows+=("$(basename "$bin")|$size|$summary|$capture")
  done
done

(cd "$dist" && sha256sum "auscult_${version}_linux_"{amd64,arm64,armv7}{,_nocapture} >"auscult_${version}_SHA256SUMS")

echo
echo "== release binaries in $dist/ (version $version)"
{
  echo "file|bytes|file(1), shortened; for dynamic ones the libraries and newest glibc symbol they need|live capture (auscult devices)"
  printf '%s\n' "${rows[@]}"
} | table
echo "checksums: $dist/auscult_${version}_SHA256SUMS"
exit "$failed"
