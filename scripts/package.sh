#!/usr/bin/env bash
# Builds the Debian package of one built auscult binary with Debian's own dpkg-deb.
#
# Usage: scripts/package.sh BINARY ARCH VERSION [OUTDIR]
#   BINARY   a built agent: `go build -o auscult ./agent`, or one of scripts/build.sh's
#            dist/auscult_VERSION_linux_ARCH[_nocapture]
#   ARCH     its Debian architecture: amd64, arm64 or armhf (build.sh's armv7 is armhf);
#            checked against the ELF header
#   VERSION  the package version, e.g. 1.2.0 (a leading "v" is dropped; checked with
#            dpkg --validate-version, and against `BINARY version` when it runs here,
#            natively or under qemu-user-static)
#   OUTDIR   where the package goes (default: dist/ in the checkout)
#
# Writes OUTDIR/auscult_VERSION_ARCH.deb for a build with live capture (Depends on
# libportaudio2) and OUTDIR/auscult_VERSION_ARCH_nocapture.deb for a CGO_ENABLED=0
# build (no library dependencies), so both variants can sit in one folder. Which one a
# binary is comes from its ELF dynamic section (readelf -d: libportaudio.so.2 or not).
# Re-running replaces the file; the same inputs give the same bytes (file times are
# SOURCE_DATE_EPOCH, by default the time of the checkout's last commit).
#
# Needs: dpkg-deb (dpkg), readelf (binutils), go (to list the modules inside the
# binary for the copyright file). Uses dpkg-shlibdeps (dpkg-dev) for the library
# dependencies when it can resolve them for ARCH, else the binary's own symbol
# versions (readelf -V).
# Environment: DEB_MAINTAINER (the Maintainer field), SOURCE_DATE_EPOCH.
set -euo pipefail

repo="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
die() { echo "package.sh: $*" >&2; exit 1; }

if [ $# -lt 3 ] || [ $# -gt 4 ]; then
  sed -n '2,/^set -euo/{/^set -euo/d;s/^# \{0,1\}//;p}' "$0" >&2
  exit 2
fi
bin="$1" arch="$2" version="${3#v}" outdir="${4:-$repo/dist}"

for tool in dpkg-deb readelf go; do
  command -v "$tool" >/dev/null || die "$tool is not installed (dpkg-deb: dpkg; readelf: binutils; go: Go 1.26 or newer)"
done
[ -f "$bin" ] || die "$bin: no such file"
dpkg --validate-version "$version" 2>/dev/null ||
  die "version '$version' is not a Debian version (it must start with a digit, e.g. 1.2.0 or 1.2.0-1)"

# The binary must be an ELF executable for ARCH: class (32/64-bit) at byte 4, machine at byte 18.
[ "$(od -An -tx1 -N4 "$bin" | tr -d ' \n')" = 7f454c46 ] || die "$bin is not an ELF executable"
class=$(od -An -tu1 -j4 -N1 "$bin" | tr -d ' ')
machine=$(od -An -tu2 -j18 -N2 "$bin" | tr -d ' ')
case "$arch" in
  amd64) want="2 62" ;;  # ELFCLASS64, EM_X86_64
  arm64) want="2 183" ;; # ELFCLASS64, EM_AARCH64
  armhf) want="1 40" ;;  # ELFCLASS32, EM_ARM
  *) die "architecture '$arch': want amd64, arm64 or armhf" ;;
esac
[ "$class $machine" = "$want" ] ||
  die "$bin is ELF class $class, machine $machine: not built for $arch (want class and machine $want)"

# Dependencies: adduser for the maintainer scripts, procps for /bin/kill (the unit's
# ExecReload; not in a minimal Debian, where systemd-analyze verify fails without it),
# then the shared libraries the binary loads (none for a CGO_ENABLED=0 build).
mapfile -t needed < <(readelf -d "$bin" | sed -n 's/.*(NEEDED).*\[\(.*\)\]/\1/p')
capture=no
for lib in "${needed[@]}"; do [ "$lib" = libportaudio.so.2 ] && capture=yes; done
shlibs="" how="none: statically linked"
if ((${#needed[@]})); then
  if command -v dpkg-shlibdeps >/dev/null; then
    tmp=$(mktemp -d)
    mkdir "$tmp/debian"
    printf 'Source: auscult\n\nPackage: auscult\nArchitecture: any\n' >"$tmp/debian/control"
    abs=$(realpath "$bin")
    if out=$(cd "$tmp" && DEB_HOST_ARCH="$arch" dpkg-shlibdeps -O "$abs" 2>/dev/null); then
      shlibs=${out#shlibs:Depends=} how="dpkg-shlibdeps"
    fi
    rm -rf "$tmp"
  fi
  if [ -z "$shlibs" ]; then
    # dpkg-shlibdeps needs ARCH's libraries installed here; without them, map the
    # sonames and take the C library's minimum version from the symbol versions
    # the binary asks for.
    glibc=$(readelf -V "$bin" | grep -o 'GLIBC_[0-9][0-9.]*' | sed 's/GLIBC_//' | sort -t. -k1,1n -k2,2n -k3,3n -u | tail -n 1)
    deps=()
    for lib in "${needed[@]}"; do
      case "$lib" in
        libc.so.6 | libm.so.6 | libpthread.so.0 | libdl.so.2 | librt.so.1) d="libc6${glibc:+ (>= $glibc)}" ;;
        libportaudio.so.2) d="libportaudio2" ;;
        *) die "$bin needs $lib, which this script does not know the Debian package of; install dpkg-dev and $lib for $arch so dpkg-shlibdeps can tell" ;;
      esac
      [[ " ${deps[*]-} " == *" $d "* ]] || deps+=("$d")
    done
    shlibs=$(IFS=,; echo "${deps[*]}")
    shlibs=${shlibs//,/, }
    how="sonames (dpkg-shlibdeps could not resolve $arch libraries here)"
  fi
fi
depends="adduser, procps${shlibs:+, $shlibs}"

# When the binary runs here (natively, or under Debian's qemu-user-static for another
# architecture), the version it reports must be the package's.
run=()
case "$arch" in
  "$(dpkg --print-architecture)") ;;
  arm64) command -v qemu-aarch64-static >/dev/null && run=(qemu-aarch64-static) ;;
  armhf) command -v qemu-arm-static >/dev/null && run=(qemu-arm-static) ;;
esac
if { [ "$arch" = "$(dpkg --print-architecture)" ] || ((${#run[@]})); } && said=$("${run[@]}" "$bin" version 2>/dev/null); then
  case "$said" in
    "auscult $version" | "auscult v$version" | "auscult ${version%-*}" | "auscult v${version%-*}") ;;
    *) die "$bin says '$said', the package would say $version: build it with -ldflags '-X main.version=$version'" ;;
  esac
  checked="binary reports '$said'${run:+ (under ${run[0]})}"
else
  checked="binary not run here (not checked against its own version)"
fi

# The tree.
stage=$(mktemp -d)
trap 'rm -rf "$stage"' EXIT
root="$stage/auscult"
umask 022
install -D -m 0755 "$bin" "$root/usr/bin/auscult"
install -D -m 0644 "$repo/systemd/auscult.service" "$root/lib/systemd/system/auscult.service"
install -D -m 0644 "$repo/configs/agent.example.yaml" "$root/usr/share/auscult/agent.example.yaml"
doc="$root/usr/share/doc/auscult"
# README.md uncompressed: the unit's Documentation= points at it. The docs folder
# beside it keeps the README's relative links working on the board.
install -D -m 0644 "$repo/README.md" "$doc/README.md"
install -d -m 0755 "$doc/docs"
install -m 0644 "$repo"/docs/*.md "$doc/docs/"

# The copyright file: ours, then the licence of everything Go linked into the binary.
modcache=$(go env GOMODCACHE)
{
  cat "$repo/packaging/debian/copyright.in"
  echo
  go version -m "$bin" | awk '$1 == "dep" || $1 == "=>" { printf "  %s %s\n", $2, $3 }'
  gover=$(go version "$bin" | awk '{print $2}')
  echo
  echo "==== the Go standard library ($gover): LICENSE ===="
  cat "$(go env GOROOT)/LICENSE"
  go version -m "$bin" | awk '$1 == "dep" { p = $2; v = $3 } $1 == "=>" { p = $2; v = $3 } $1 == "dep" || $1 == "=>" { m[p] = v } END { for (p in m) print p, m[p] }' | sort |
    while read -r path ver; do
      # The module cache escapes capitals as !lower.
      dir="$modcache/$(printf '%s' "$path" | sed 's/[A-Z]/!\L&/g')@$ver"
      [ -d "$dir" ] || die "module $path@$ver is not in $modcache: run 'go mod download' in the checkout the binary was built from"
      found=0
      for f in "$dir"/*; do
        case "$(basename "$f" | tr '[:upper:]' '[:lower:]')" in
          licen[cs]e* | copying* | notice* | edl-v* | epl-v*)
            echo
            echo "==== $path $ver: $(basename "$f") ===="
            cat "$f"
            found=1
            ;;
        esac
      done
      [ "$found" = 1 ] || die "module $path@$ver has no licence file in $dir"
    done
} >"$stage/copyright"
install -m 0644 "$stage/copyright" "$doc/copyright"

# Control files.
install -d -m 0755 "$root/DEBIAN"
for s in postinst prerm postrm; do
  install -m 0755 "$repo/packaging/debian/$s" "$root/DEBIAN/$s"
done
if [ "$capture" = yes ]; then
  note="" name="auscult_${version}_${arch}.deb"
else
  note=$' .\n This build has no live capture (built without cgo and PortAudio): it\n listens to WAV files and to raw samples on standard input only.'
  name="auscult_${version}_${arch}_nocapture.deb"
fi
# Installed-Size as dpkg-gencontrol counts it: KiB per file rounded up, 1 per folder.
size=$(find "$root" -path "$root/DEBIAN" -prune -o \( -type f -printf '%s\n' -o -printf '1024\n' \) |
  awk '{ n += int(($1 + 1023) / 1024) } END { print n }')
maintainer=${DEB_MAINTAINER:-auscult developers <auscult@example.invalid>}
awk -v v="$version" -v a="$arch" -v m="$maintainer" -v s="$size" -v d="$depends" -v n="$note" '
  /@NOCAPTURE_NOTE@/ { if (n != "") print n; next }
  { gsub("@VERSION@", v); gsub("@ARCH@", a); gsub("@MAINTAINER@", m); gsub("@INSTALLED_SIZE@", s); gsub("@DEPENDS@", d); print }
' "$repo/packaging/debian/control.in" >"$root/DEBIAN/control"
(cd "$root" && find . -path ./DEBIAN -prune -o -type f -printf '%P\n' | LC_ALL=C sort | xargs md5sum) >"$root/DEBIAN/md5sums"
chmod 0644 "$root/DEBIAN/control" "$root/DEBIAN/md5sums"

# Same inputs, same bytes: fixed file times, root ownership, sorted by dpkg-deb.
if [ -z "${SOURCE_DATE_EPOCH:-}" ]; then
  SOURCE_DATE_EPOCH=$(git -C "$repo" log -1 --format=%ct 2>/dev/null || stat -c %Y "$bin")
fi
export SOURCE_DATE_EPOCH
find "$root" -exec touch -h -d "@$SOURCE_DATE_EPOCH" {} +
mkdir -p "$outdir"
dpkg-deb --root-owner-group -Zxz --build "$root" "$outdir/$name" >/dev/null
echo "package.sh: $outdir/$name ($(stat -c %s "$outdir/$name") bytes)"
echo "  live capture  $capture"
echo "  Depends       $depends  [$how]"
echo "  version       $version, $checked"
