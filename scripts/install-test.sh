#!/usr/bin/env bash
# Installs, upgrades, removes and purges auscult in throw-away Debian 12 roots, as root.
#
# Usage: sudo scripts/install-test.sh [--keep]
#   --keep  leave the work folder (roots, packages, logs) for inspection; it is named at the end
#
# A minimal Debian bookworm root (debootstrap --variant=minbase, from the Debian mirror apt
# uses here) is made once and kept as a tarball in $AUSCULT_TEST_CACHE (default
# /var/cache/auscult-test); each run unpacks fresh copies of it, mounts /proc, /sys, /dev,
# /dev/pts and a tmpfs /run into them, and chroots in. Downloaded packages are kept in
# the cache too. Two builds of the agent (with live capture, versions 1.0.0 and 1.0.1) are
# packaged with scripts/package.sh, then:
#   a  apt-get install ./auscult_1.0.0_amd64.deb: libportaudio2 from the mirror, user,
#      folders, config, unit, `auscult version`, the config valid to the agent as user auscult
#   b  edit the config, add a baseline and a log, install 1.0.1: edits and files survive
#   c  apt-get remove: program gone, config and /var/lib/auscult kept
#   d  reinstall (the edited config still there), apt-get purge: all gone; and purge of a
#      removed package (config-files state)
#   e  scripts/install.sh and uninstall.sh in a fresh root: refused without libportaudio2,
#      install, upgrade in place keeping config/baseline/log, repeat (idempotent),
#      uninstall (keeps data), --purge (all gone); and --prefix from outside the root
#   f  systemd-analyze verify (Debian's systemd, installed in the roots) on both installed units
#   g  a root booted with systemd as PID 1 (systemd-nspawn --boot, no network): install.sh
#      enables without a baseline, the unit starts as user auscult once an enrolled baseline
#      (simulated pump) and a WAV replay are configured, upgrade restarts it on the new
#      binary, reload, stop, uninstall; then the .deb: postinst starts it when the baseline
#      exists, restarts it on reinstall, prerm stops it on remove, purge
# Prints PASS or FAIL per check and exits 1 when any check failed.
# Environment: AUSCULT_TEST_CACHE, AUSCULT_TEST_MIRROR (default: apt's bookworm main mirror).
# shellcheck disable=SC2016 # the snippets in single quotes run inside the roots: their $ expand there
set -euo pipefail

repo="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
keep=no
case "${1:-}" in
  "") ;;
  --keep) keep=yes ;;
  *) sed -n '2,/^set -euo/{/^set -euo/d;/shellcheck/d;s/^# \{0,1\}//;p}' "$0" >&2; exit 2 ;;
esac
[ "$(id -u)" -eq 0 ] || { echo "install-test.sh: run as root (it uses chroot and mount)" >&2; exit 1; }
command -v go >/dev/null || { echo "install-test.sh: Go is not on the PATH (need Go 1.26 or newer)" >&2; exit 1; }

# Debian packages this test needs on the host: debootstrap makes the root; binutils and
# dpkg-dev let package.sh read the binary; portaudio19-dev builds live capture;
# systemd-container brings systemd-nspawn, which boots a root with systemd as PID 1.
missing=()
for p in debootstrap binutils dpkg-dev portaudio19-dev systemd-container; do
  # One status line per installed architecture (portaudio19-dev:arm64 may sit beside amd64).
  status=$'\n'$(dpkg-query -W -f='${Status}\n' "$p" 2>/dev/null || true)
  [[ $status == *$'\n'"install ok installed"* ]] || missing+=("$p")
done
if ((${#missing[@]})); then
  echo "install-test.sh: installing ${missing[*]}"
  apt-get update -qq
  DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
fi

cache="${AUSCULT_TEST_CACHE:-/var/cache/auscult-test}"
mirror="${AUSCULT_TEST_MIRROR:-$(apt-cache policy 2>/dev/null | awk '$3 == "bookworm/main" && $2 ~ /^https?:/ { print $2; exit }')}"
mirror="${mirror:-http://deb.debian.org/debian}"
work="$(mktemp -d "${TMPDIR:-/tmp}/auscult-install-test.XXXXXX")"
chmod 0755 "$work"
log="$work/log"
roots=()
pass=0 fail=0

now() { date +%s.%N; }
since() { awk -v a="$1" -v b="$(now)" 'BEGIN { printf "%.1f s", b - a }'; }

# Unmount every root, then delete the work folder only when nothing is mounted in it.
unmount_root() {
  local m
  for m in run dev/pts dev sys proc var/cache/apt/archives; do
    if mountpoint -q "$1/$m"; then umount "$1/$m" || umount -l "$1/$m" || true; fi
  done
}
cleanup() {
  local r
  for r in "${roots[@]}"; do unmount_root "$r"; done
  if grep -q " $work/" /proc/self/mountinfo; then
    echo "install-test.sh: still mounted under $work, not deleting it:" >&2
    grep " $work/" /proc/self/mountinfo | awk '{print "  " $5}' >&2
  elif [ "$keep" = yes ]; then
    echo "install-test.sh: kept $work"
  else
    rm -rf --one-file-system "$work"
  fi
}
trap cleanup EXIT

# check NAME COMMAND...: one named check; its output goes to the log.
check() {
  local name="$1"
  shift
  if "$@" >>"$log" 2>&1; then
    echo "PASS  $name"
    pass=$((pass + 1))
  else
    echo "FAIL  $name"
    fail=$((fail + 1))
  fi
}
# inroot ROOT COMMAND...: run a command inside a root with a clean environment.
inroot() {
  local r="$1"
  shift
  chroot "$r" /usr/bin/env -i PATH=/usr/local/sbin:/usr/local/bin:/usr/sbin:/usr/bin:/sbin:/bin \
    HOME=/root LANG=C.UTF-8 DEBIAN_FRONTEND=noninteractive "$@"
}
# sh_in ROOT SCRIPT: a shell snippet (sh -e) inside a root. In it, `not CMD` fails when CMD
# succeeds (a bare `! CMD` would not stop sh -e), and `out FILE CMD...` keeps CMD's output
# in FILE, shows it, and keeps its exit status (a pipe into tee would lose it).
prelude='not() { if "$@"; then return 1; fi; }
out() { f=$1; shift; if "$@" >"$f" 2>&1; then cat "$f"; else cat "$f"; return 1; fi; }'
sh_in() { echo "+ [$(basename "$1")] $2" >>"$log"; inroot "$1" /bin/sh -ec "$prelude
$2"; }

# ---- builds and packages --------------------------------------------------------------
t=$(now)
for v in 1.0.0 1.0.1; do
  (cd "$repo" && go build -ldflags "-X main.version=$v" -o "$work/bin/auscult-$v" ./agent)
  bash "$repo/scripts/package.sh" "$work/bin/auscult-$v" amd64 "$v" "$work/debs" | sed 's/^/  /'
done
echo "built and packaged 1.0.0 and 1.0.1 in $(since "$t")"
chmod -R a+rX "$work/bin" "$work/debs"

# ---- the cached Debian root -------------------------------------------------------------
tarball="$cache/bookworm-minbase-amd64.tar.gz"
mkdir -p "$cache/debootstrap-debs" "$cache/apt-archives/partial"
if [ ! -s "$tarball" ] || [ "$(cat "$cache/mirror" 2>/dev/null)" != "$mirror" ]; then
  t=$(now)
  echo "debootstrap --variant=minbase bookworm from $mirror (first run; cached afterwards)"
  debootstrap --variant=minbase --cache-dir="$cache/debootstrap-debs" bookworm "$work/bootstrap" "$mirror" >"$work/debootstrap.log" 2>&1 ||
    { tail -n 20 "$work/debootstrap.log" >&2; echo "install-test.sh: debootstrap failed (log above)" >&2; exit 1; }
  echo "  debootstrap took $(since "$t")"
  t=$(now)
  tar --numeric-owner --xattrs -C "$work/bootstrap" -czf "$tarball.tmp" .
  mv -f "$tarball.tmp" "$tarball"
  echo "$mirror" >"$cache/mirror"
  rm -rf --one-file-system "$work/bootstrap"
  echo "  cached as $tarball ($(du -h "$tarball" | cut -f1)) in $(since "$t")"
fi

# new_root NAME: a fresh root from the tarball, mounted, with current package lists.
new_root() {
  local r="$work/$1" t
  t=$(now)
  mkdir -p "$r"
  tar --numeric-owner --xattrs -C "$r" -xzf "$tarball"
  roots+=("$r")
  mount -t proc proc "$r/proc"
  mount --bind /sys "$r/sys"
  mount -o remount,bind,ro "$r/sys"
  mount --bind /dev "$r/dev"
  mount --bind /dev/pts "$r/dev/pts"
  mount -t tmpfs -o mode=0755 tmpfs "$r/run"
  mount --bind "$cache/apt-archives" "$r/var/cache/apt/archives"
  cp -L /etc/resolv.conf "$r/etc/resolv.conf"
  inroot "$r" apt-get update -qq >>"$log" 2>&1 || { tail -n 20 "$log" >&2; echo "install-test.sh: apt-get update failed in $r" >&2; exit 1; }
  echo "root $1: unpacked, mounted and apt-get update in $(since "$t")"
  R="$r"
}

# ---- a-d: the .deb ------------------------------------------------------------------------
echo
echo "== the .deb in a bookworm minbase root"
new_root deb
r="$R"
mkdir -p "$r/tmp/debs" && cp "$work"/debs/*.deb "$r/tmp/debs/" && chmod -R a+rX "$r/tmp/debs"
mkdir -p "$r/root/auscult/scripts"
cp -r "$repo/systemd" "$repo/configs" "$repo/README.md" "$r/root/auscult/"
cp "$repo/scripts/install.sh" "$repo/scripts/uninstall.sh" "$r/root/auscult/scripts/"
cp "$work/bin/auscult-1.0.1" "$r/tmp/auscult-1.0.1"

example_unit="$repo/systemd/auscult.service"
user_ok='u=$(getent passwd auscult); uid=$(echo "$u" | cut -d: -f3); [ "$uid" -lt 1000 ];
  [ "$(echo "$u" | cut -d: -f6)" = /var/lib/auscult ]; [ "$(echo "$u" | cut -d: -f7)" = /usr/sbin/nologin ];
  id -nG auscult | tr " " "\n" | grep -qx auscult; id -nG auscult | tr " " "\n" | grep -qx audio; echo "$u; groups $(id -nG auscult)"'
folders_ok='[ "$(stat -c "%U:%G %a" /var/lib/auscult)" = "auscult:auscult 750" ]; [ "$(stat -c "%U:%G %a" /etc/auscult/agent.yaml)" = "root:auscult 640" ]'
gone_ok='not getent passwd auscult; not getent group auscult; [ ! -e /etc/auscult ]; [ ! -e /var/lib/auscult ]'

t=$(now)
check "a  apt-get install ./auscult_1.0.0_amd64.deb ($(stat -c %s "$work/debs/auscult_1.0.0_amd64.deb") bytes)" \
  sh_in "$r" 'out /tmp/apt-a.log apt-get install -y --no-install-recommends /tmp/debs/auscult_1.0.0_amd64.deb'
echo "   (took $(since "$t"))"
check "a  libportaudio2 and procps came from the mirror as dependencies" sh_in "$r" 'for p in libportaudio2 procps; do dpkg-query -W -f="\${Package} \${Status} \${Version}\n" $p | grep "install ok installed"; done'
check "a  system user auscult: home /var/lib/auscult, no login shell, groups auscult and audio" sh_in "$r" "$user_ok"
check "a  /var/lib/auscult auscult:auscult 0750, /etc/auscult/agent.yaml root:auscult 0640" sh_in "$r" "$folders_ok"
check "a  /etc/auscult/agent.yaml is the example" sh_in "$r" 'cmp /etc/auscult/agent.yaml /usr/share/auscult/agent.example.yaml'
check "a  /lib/systemd/system/auscult.service is the repository's unit" cmp "$example_unit" "$r/lib/systemd/system/auscult.service"
check "a  enabled for boot (deb-systemd-helper link), not started: postinst says systemd is not running" \
  sh_in "$r" '[ "$(readlink /etc/systemd/system/multi-user.target.wants/auscult.service)" = /lib/systemd/system/auscult.service ]; grep "systemd is not running here" /tmp/apt-a.log'
check "a  auscult version says 1.0.0" sh_in "$r" '[ "$(auscult version)" = "auscult 1.0.0" ]'
check "a  as user auscult, 'auscult check' finds the config valid and the log folder writable" \
  sh_in "$r" 'runuser -u auscult -- auscult check --config /etc/auscult/agent.yaml --source stdin </dev/null >/tmp/check.txt 2>/dev/null || true; cat /tmp/check.txt; grep -q "agent.yaml: valid (asset P-492B)" /tmp/check.txt; grep -q "^log .*writable" /tmp/check.txt'
check "a  scripts/install.sh refuses to mix with the installed package" \
  sh_in "$r" 'not /root/auscult/scripts/install.sh --binary /tmp/auscult-1.0.1 2>/tmp/mix.txt; grep "package is installed" /tmp/mix.txt; [ ! -e /usr/local/bin/auscult ]'

# b: local changes, then the newer package.
# local_edits changes what a site changes (the config, a baseline, the log: random bytes) and records their hashes.
local_edits='sed -i "s/^  max_mb: 256 /  max_mb: 128 /" /etc/auscult/agent.yaml; echo "# edited on site by M. Okafor" >>/etc/auscult/agent.yaml
  head -c 38315 /dev/urandom >/var/lib/auscult/P-492B.ausb; head -c 65536 /dev/urandom >/var/lib/auscult/auscult.db
  chown auscult:auscult /var/lib/auscult/P-492B.ausb /var/lib/auscult/auscult.db
  sha256sum /etc/auscult/agent.yaml /var/lib/auscult/P-492B.ausb /var/lib/auscult/auscult.db >/root/kept.sha256'
check "b  edit the config as M. Okafor would, add a baseline and a log (random bytes)" sh_in "$r" "$local_edits"
kept_ok='sha256sum -c /root/kept.sha256; grep -q "^  max_mb: 128 " /etc/auscult/agent.yaml; [ "$(stat -c %U /var/lib/auscult/P-492B.ausb)" = auscult ]'
t=$(now)
check "b  apt-get install ./auscult_1.0.1_amd64.deb over 1.0.0" \
  sh_in "$r" 'out /tmp/apt-b.log apt-get install -y /tmp/debs/auscult_1.0.1_amd64.deb; not grep "wrote /etc/auscult/agent.yaml" /tmp/apt-b.log'
echo "   (took $(since "$t"))"
check "b  auscult version says 1.0.1, dpkg says 1.0.1" sh_in "$r" '[ "$(auscult version)" = "auscult 1.0.1" ]; [ "$(dpkg-query -W -f="\${Version}" auscult)" = 1.0.1 ]'
check "b  edited config, baseline and log unchanged (sha256), owners kept" sh_in "$r" "$kept_ok"

# c: remove keeps config and data.
check "c  apt-get remove auscult" sh_in "$r" 'apt-get remove -y auscult'
check "c  program, unit and example gone" sh_in "$r" '[ ! -e /usr/bin/auscult ]; [ ! -e /lib/systemd/system/auscult.service ]; [ ! -e /usr/share/auscult ]'
check "c  config, baseline, log and user kept; package in config-files state" \
  sh_in "$r" "$kept_ok; getent passwd auscult; dpkg-query -W -f='\${db:Status-Status}' auscult | grep -x config-files"

# d: reinstall, then purge; and purge straight from config-files state.
check "d  reinstall 1.0.1: the edited config, baseline and log are still there" \
  sh_in "$r" "apt-get install -y /tmp/debs/auscult_1.0.1_amd64.deb; $kept_ok"
check "d  apt-get purge auscult" sh_in "$r" 'apt-get purge -y auscult'
check "d  /etc/auscult, /var/lib/auscult, user, group, boot link and package record gone" \
  sh_in "$r" "$gone_ok; [ ! -L /etc/systemd/system/multi-user.target.wants/auscult.service ]; s=\$(dpkg-query -W -f='\${db:Status-Status}' auscult 2>/dev/null || true); [ -z \"\$s\" ] || [ \"\$s\" = not-installed ]"
check "d  install, remove, then purge of the removed package: all gone" \
  sh_in "$r" "apt-get install -y /tmp/debs/auscult_1.0.0_amd64.deb; apt-get remove -y auscult; [ -e /etc/auscult/agent.yaml ]; apt-get purge -y auscult; $gone_ok"

# f (packaged unit): Debian's systemd in the root checks the unit installed by the package.
t=$(now)
check "f  apt-get install systemd in the root" sh_in "$r" 'apt-get install -y --no-install-recommends systemd'
echo "   (took $(since "$t"))"
check "f  with systemd installed, the package installs and enables the unit, starts nothing" \
  sh_in "$r" 'out /tmp/apt-f.log apt-get install -y /tmp/debs/auscult_1.0.1_amd64.deb; [ ! -d /run/systemd/system ]; grep "systemd is not running here" /tmp/apt-f.log; [ "$(systemctl is-enabled auscult.service)" = enabled ]'
check "f  systemd-analyze verify /lib/systemd/system/auscult.service (in the root)" \
  sh_in "$r" 'v=$(systemd-analyze verify /lib/systemd/system/auscult.service 2>&1); echo "$v"; [ -z "$v" ]'
check "f  purge after that: all gone, unit disabled" \
  sh_in "$r" "apt-get purge -y auscult; $gone_ok; [ ! -L /etc/systemd/system/multi-user.target.wants/auscult.service ]"

# ---- e: the scripts -----------------------------------------------------------------------
echo
echo "== scripts/install.sh and uninstall.sh in a fresh root"
new_root scripts
r="$R"
mkdir -p "$r/root/auscult/scripts" "$r/root/auscult/docs"
cp -r "$repo/systemd" "$repo/configs" "$repo/README.md" "$r/root/auscult/"
cp "$repo/scripts/install.sh" "$repo/scripts/uninstall.sh" "$r/root/auscult/scripts/"
[ -f "$repo/docs/install.md" ] && cp "$repo/docs/install.md" "$r/root/auscult/docs/"
cp "$work/bin/auscult-1.0.0" "$work/bin/auscult-1.0.1" "$r/tmp/"
inst=/root/auscult/scripts/install.sh
uninst=/root/auscult/scripts/uninstall.sh
unit_ok='[ "$(readlink -f /etc/systemd/system/auscult.service)" = /etc/systemd/system/auscult.service ];
  grep -qx "ExecStart=/usr/local/bin/auscult run --config /etc/auscult/agent.yaml" /etc/systemd/system/auscult.service'

check "e  install.sh refuses a live-capture build without libportaudio2, and changes nothing" \
  sh_in "$r" "not $inst --binary /tmp/auscult-1.0.0 2>/tmp/e0.txt; grep 'apt-get install libportaudio2' /tmp/e0.txt; [ ! -e /usr/local/bin/auscult ]; not getent passwd auscult"
check "e  apt-get install libportaudio2" sh_in "$r" 'apt-get install -y --no-install-recommends libportaudio2'
check "e  install.sh --binary 1.0.0 (no systemctl in the root: says so)" \
  sh_in "$r" "out /tmp/e1.txt $inst --binary /tmp/auscult-1.0.0; grep 'systemctl is not installed' /tmp/e1.txt"
check "e  install.sh warns that /bin/kill (procps, for the unit's ExecReload) is missing" sh_in "$r" "grep 'apt-get install procps' /tmp/e1.txt"
check "e  system user auscult: home /var/lib/auscult, no login shell, groups auscult and audio" sh_in "$r" "$user_ok"
check "e  /var/lib/auscult auscult:auscult 0750, /etc/auscult/agent.yaml root:auscult 0640, the example" \
  sh_in "$r" "$folders_ok; cmp /etc/auscult/agent.yaml /root/auscult/configs/agent.example.yaml"
check "e  unit in /etc/systemd/system with ExecStart=/usr/local/bin/auscult; auscult version 1.0.0" \
  sh_in "$r" "$unit_ok; [ \"\$(/usr/local/bin/auscult version)\" = 'auscult 1.0.0' ]"
check "e  edit the config, add a baseline and a log (random bytes)" sh_in "$r" "$local_edits"
t=$(now)
check "f  apt-get install systemd procps in the root" sh_in "$r" 'apt-get install -y --no-install-recommends systemd procps'
echo "   (took $(since "$t"))"
check "e  install.sh --binary 1.0.1 upgrades in place: version 1.0.1, enabled for the next boot" \
  sh_in "$r" "out /tmp/e2.txt $inst --binary /tmp/auscult-1.0.1; [ \"\$(/usr/local/bin/auscult version)\" = 'auscult 1.0.1' ]; grep 'enabled for the next boot' /tmp/e2.txt; [ \"\$(systemctl is-enabled auscult.service)\" = enabled ]"
check "e  edited config, baseline and log unchanged (sha256), owners kept" sh_in "$r" "$kept_ok"
check "f  systemd-analyze verify /etc/systemd/system/auscult.service (install.sh's unit, in the root)" \
  sh_in "$r" 'v=$(systemd-analyze verify /etc/systemd/system/auscult.service 2>&1); echo "$v"; [ -z "$v" ]'
check "e  install.sh again with the same binary: unit unchanged, nothing else touched" \
  sh_in "$r" "out /tmp/e3.txt $inst --binary /tmp/auscult-1.0.1; grep 'unit /etc/systemd/system/auscult.service unchanged' /tmp/e3.txt; $kept_ok"
check "e  uninstall.sh: binary, unit, boot link gone" \
  sh_in "$r" "$uninst; [ ! -e /usr/local/bin/auscult ]; [ ! -e /etc/systemd/system/auscult.service ]; [ ! -L /etc/systemd/system/multi-user.target.wants/auscult.service ]; [ ! -e /usr/local/share/auscult ]"
check "e  uninstall.sh kept config, baseline, log and user" sh_in "$r" "$kept_ok; getent passwd auscult"
check "e  uninstall.sh again: nothing to do, exit 0" sh_in "$r" "$uninst"
check "e  install.sh after uninstall: the kept config is used, not replaced" \
  sh_in "$r" "out /tmp/e4.txt $inst --binary /tmp/auscult-1.0.1; grep 'kept /etc/auscult/agent.yaml' /tmp/e4.txt; $kept_ok"
check "e  uninstall.sh --purge: config, data, user and group gone" sh_in "$r" "$uninst --purge; $gone_ok; [ ! -e /usr/local/bin/auscult ]"
check "e  uninstall.sh --purge again: exit 0" sh_in "$r" "$uninst --purge"

# --prefix: prepare the root from outside, as for an SD card mounted on a workstation.
host_passwd=$(sha256sum /etc/passwd /etc/group)
check "e  install.sh --prefix ROOT from the host: user in the root's /etc/passwd, files in the root" \
  bash -ec "bash '$repo/scripts/install.sh' --binary '$work/bin/auscult-1.0.1' --prefix '$r'
    grep -q '^auscult:' '$r/etc/passwd'; [ -x '$r/usr/local/bin/auscult' ]; [ -f '$r/etc/auscult/agent.yaml' ]
    [ \"\$(chroot '$r' stat -c %U:%G /var/lib/auscult)\" = auscult:auscult ]"
check "e  the host's /etc/passwd and /etc/group untouched by --prefix" bash -c "[ \"\$(sha256sum /etc/passwd /etc/group)\" = '$host_passwd' ]"
check "e  uninstall.sh --prefix ROOT --purge from the host: all gone in the root" \
  bash -ec "bash '$repo/scripts/uninstall.sh' --prefix '$r' --purge; [ -z \"\$(grep '^auscult:' '$r/etc/passwd')\" ]; [ ! -e '$r/usr/local/bin/auscult' ]; [ ! -e '$r/etc/auscult' ]; [ ! -e '$r/var/lib/auscult' ]"

# ---- g: booted with systemd as PID 1 --------------------------------------------------------
echo
echo "== a root booted with systemd as PID 1 (systemd-nspawn)"
t=$(now)
"$work/bin/auscult-1.0.1" simulate --out "$work/sim" --seed 2 --train 33 --test-normal 1 --per-fault 1 >>"$log" 2>&1
"$work/bin/auscult-1.0.1" enroll --asset P-492B --out "$work/P-492B.ausb" "$work/sim/train" >>"$log" 2>&1
echo "enrolled a baseline from 5.5 min of simulated healthy pump in $(since "$t")"
new_root boot
r="$R"
check "g  apt-get install systemd procps adduser libportaudio2 in the root (before booting it)" \
  sh_in "$r" 'apt-get install -y --no-install-recommends systemd procps adduser libportaudio2'
mkdir -p "$r/root/auscult/scripts" "$r/root/bin" "$r/root/debs"
cp -r "$repo/systemd" "$repo/configs" "$repo/README.md" "$r/root/auscult/"
cp "$repo/scripts/install.sh" "$repo/scripts/uninstall.sh" "$r/root/auscult/scripts/"
cp "$work/bin/auscult-1.0.0" "$work/bin/auscult-1.0.1" "$r/root/bin/"
cp "$work"/debs/*.deb "$r/root/debs/"
cp "$work/P-492B.ausb" "$r/root/P-492B.ausb"
cp -r "$work/sim/train" "$r/root/replay"
cat >"$r/root/helpers.sh" <<'EOF'
# Helpers of the boot test's checks (sourced by sh -e).
not() { if "$@"; then return 1; fi; }
out() { f=$1; shift; if "$@" >"$f" 2>&1; then cat "$f"; else cat "$f"; return 1; fi; }
prop() { systemctl show -P "$1" auscult.service; }
active() { [ "$(prop ActiveState)/$(prop SubState)" = active/running ]; }
# seed: the enrolled baseline, the simulated recordings, and the config pointed at them
# (kind wav, real time): what a commissioning leaves behind, without a microphone.
seed() {
  install -o auscult -g auscult -m 0644 /root/P-492B.ausb /var/lib/auscult/P-492B.ausb
  rm -rf /var/lib/auscult/replay && cp -r /root/replay /var/lib/auscult/replay && chown -R auscult:auscult /var/lib/auscult/replay
  sed -i -e 's|^  kind: device |  kind: wav    |' -e 's|^  # path: /srv/recordings |  path: /var/lib/auscult/replay |' /etc/auscult/agent.yaml
  grep -q '^  path: /var/lib/auscult/replay' /etc/auscult/agent.yaml
}
EOF
cat >"$r/root/boot-test.sh" <<'EOF'
#!/bin/sh
# The boot test: runs as a service inside the booted root, writes PASS/FAIL lines to
# /root/boot-test.out, then powers the container off.
out=/root/boot-test.out log=/root/boot-test.log
inst=/root/auscult/scripts/install.sh uninst=/root/auscult/scripts/uninstall.sh
export inst uninst
: >"$out"
t() {
  echo "+ $1: $2" >>"$log"
  if sh -ec ". /root/helpers.sh
$2" >>"$log" 2>&1; then echo "PASS  g  $1" >>"$out"; else echo "FAIL  g  $1" >>"$out"; fi
}
t "systemd is PID 1 here" '[ "$(cat /proc/1/comm)" = systemd ]; [ -d /run/systemd/system ]'
t "install.sh 1.0.0: enabled, not started, says there is no baseline yet" \
  'out /root/g1.txt $inst --binary /root/bin/auscult-1.0.0; grep "enabled, not started: no baseline" /root/g1.txt; [ "$(systemctl is-enabled auscult)" = enabled ]; not active'
t "without a baseline a start fails, and systemd retries it every 5 s (Restart=on-failure)" \
  'not systemctl start auscult; sleep 7; n=$(prop NRestarts); echo "NRestarts=$n"; [ "$n" -ge 1 ]
   journalctl -b -u auscult --no-pager | grep "P-492B.ausb: no such file or directory"'
t "baseline and WAV replay configured; systemctl restart: active/running (Type=notify: READY=1 came)" \
  'seed; systemctl restart auscult; active'
t "the agent runs as auscult, groups auscult+audio, no new privileges, listening (journal)" \
  'pid=$(prop MainPID); [ "$(ps -o user= -p $pid)" = auscult ]; grep -E "^NoNewPrivs:\s+1" /proc/$pid/status
   audio=$(getent group audio | cut -d: -f3); grep -E "^Groups:.*\b$audio\b" /proc/$pid/status
   sleep 2; journalctl -b -u auscult --no-pager | grep "msg=listening"'
t "its log /var/lib/auscult/auscult.db: owned by auscult, not world-readable (UMask=0027)" \
  'sleep 1; ls -l /var/lib/auscult; [ "$(stat -c %U /var/lib/auscult/auscult.db)" = auscult ]; [ $(( 0$(stat -c %a /var/lib/auscult/auscult.db) % 8 )) -eq 0 ]'
t "install.sh 1.0.1 while it runs: restarted on the new binary; config and baseline kept" \
  'old=$(prop MainPID); sha256sum /etc/auscult/agent.yaml /var/lib/auscult/P-492B.ausb >/root/k; out /root/g2.txt $inst --binary /root/bin/auscult-1.0.1
   grep "restarted on the new binary" /root/g2.txt; active; new=$(prop MainPID); [ "$new" != "$old" ]
   [ "$(readlink /proc/$new/exe)" = /usr/local/bin/auscult ]; [ "$(/usr/local/bin/auscult version)" = "auscult 1.0.1" ]; sha256sum -c /root/k'
t "systemctl reload (ExecReload=/bin/kill -HUP): same process, config re-read (journal)" \
  'pid=$(prop MainPID); systemctl reload auscult; sleep 2; [ "$(prop MainPID)" = $pid ]; active; journalctl -b -u auscult --no-pager | grep "config reload"'
t "systemctl stop: clean stop well within TimeoutStopSec=20" \
  'a=$(date +%s); systemctl stop auscult; b=$(date +%s); echo "stopped in $((b - a)) s"; [ $((b - a)) -lt 15 ]; [ "$(prop ActiveState)" = inactive ]; [ "$(prop Result)" = success ]'
t "uninstall.sh on a running service: stopped, disabled, unit gone; config and data kept" \
  'systemctl start auscult; active; out /root/g3.txt $uninst; [ "$(prop ActiveState)" = inactive ]; not systemctl -q is-enabled auscult 2>/dev/null
   [ ! -e /etc/systemd/system/auscult.service ]; sha256sum -c /root/k'
t "uninstall.sh --purge: config, data and user gone" \
  '$uninst --purge; not getent passwd auscult; [ ! -e /etc/auscult ]; [ ! -e /var/lib/auscult ]'
t "apt-get install ./auscult_1.0.0_amd64.deb: enabled, not started, says there is no baseline yet" \
  'out /root/g4.txt apt-get install -y /root/debs/auscult_1.0.0_amd64.deb; grep "not started: no baseline" /root/g4.txt; [ "$(systemctl is-enabled auscult)" = enabled ]; not active'
t "baseline and replay configured, upgrade to 1.0.1: postinst starts it on the new binary" \
  'seed; apt-get install -y /root/debs/auscult_1.0.1_amd64.deb; active; pid=$(prop MainPID); [ "$(readlink /proc/$pid/exe)" = /usr/bin/auscult ]; [ "$(auscult version)" = "auscult 1.0.1" ]'
t "apt-get install --reinstall while it runs: postinst restarts it (new process)" \
  'old=$(prop MainPID); apt-get install -y --reinstall /root/debs/auscult_1.0.1_amd64.deb; active; [ "$(prop MainPID)" != "$old" ]'
t "apt-get remove: prerm stopped it; config, baseline and log kept" \
  'sha256sum /etc/auscult/agent.yaml /var/lib/auscult/P-492B.ausb >/root/k; apt-get remove -y auscult; [ "$(prop ActiveState)" = inactive ]; sha256sum -c /root/k; [ -e /var/lib/auscult/auscult.db ]'
t "apt-get install again: the kept baseline lets postinst start it at once" \
  'apt-get install -y /root/debs/auscult_1.0.1_amd64.deb; active'
t "apt-get purge: stopped, everything gone" \
  'apt-get purge -y auscult; [ "$(prop ActiveState)" = inactive ]; not getent passwd auscult; [ ! -e /etc/auscult ]; [ ! -e /var/lib/auscult ]'
echo done >>"$out"
systemctl poweroff --no-block
EOF
chmod 0755 "$r/root/boot-test.sh"
cat >"$r/etc/systemd/system/auscult-boot-test.service" <<'EOF'
[Unit]
Description=auscult boot test (install-test.sh)
After=multi-user.target
[Service]
Type=simple
Environment=DEBIAN_FRONTEND=noninteractive
ExecStart=/root/boot-test.sh
[Install]
WantedBy=multi-user.target
EOF
ln -sf /etc/systemd/system/auscult-boot-test.service "$r/etc/systemd/system/multi-user.target.wants/auscult-boot-test.service"
unmount_root "$r"
t=$(now)
# --keep-unit and --register=no: no systemd on the host to ask for a scope or a machine.
if timeout 300 systemd-nspawn -q -D "$r" --boot --private-network --register=no --keep-unit --console=pipe >"$work/nspawn.log" 2>&1 &&
  grep -qx 'done' "$r/root/boot-test.out" 2>/dev/null; then
  echo "booted, tested and powered off in $(since "$t")"
else
  echo "FAIL  g  the booted root did not finish its test (systemd-nspawn log: $work/nspawn.log)"
  fail=$((fail + 1))
  tail -n 20 "$work/nspawn.log"
fi
if [ -f "$r/root/boot-test.out" ]; then
  grep -v -x 'done' "$r/root/boot-test.out" || true
  pass=$((pass + $(grep -c '^PASS' "$r/root/boot-test.out" || true)))
  fail=$((fail + $(grep -c '^FAIL' "$r/root/boot-test.out" || true)))
  cat "$r/root/boot-test.log" >>"$log"
fi

echo
echo "install-test.sh: $pass passed, $fail failed (log: $log$([ "$keep" = yes ] || echo ', deleted with the work folder; --keep keeps it'))"
if [ "$fail" -gt 0 ]; then
  keep=yes
  echo "install-test.sh: keeping $work for the failures; the log's last lines:"
  tail -n 40 "$log"
  exit 1
fi
