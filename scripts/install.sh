#!/usr/bin/env bash
# Installs the auscult agent on this board from a built binary, or upgrades it in place.
#
# Usage: sudo scripts/install.sh [--binary PATH] [--prefix DIR]
#   --binary PATH  the agent to install (default: ./auscult in the checkout, as made by
#                  `go build -o auscult ./agent`; or one of scripts/build.sh's dist/ files)
#   --prefix DIR   the root of the system to install into (default /); another DIR, e.g. a
#                  board's SD card mounted at /mnt/sd, is prepared without starting anything
#
# What it does, every step safe to repeat:
#   - the system user auscult (group auscult, also in audio; home /var/lib/auscult, no login shell)
#   - /etc/auscult/agent.yaml from configs/agent.example.yaml, only when there is none
#   - /var/lib/auscult (auscult:auscult 0750) for baselines and the log, created when missing
#   - /usr/local/bin/auscult, /usr/local/share/auscult/agent.example.yaml, /usr/local/share/doc/auscult/
#   - /etc/systemd/system/auscult.service (the repository's unit, ExecStart pointed at /usr/local/bin)
#   - when systemd runs this system: daemon-reload, enable; start when the configured
#     baseline exists (restart when it was running); otherwise says so and only enables
# Re-running replaces the binary and the unit and keeps the config, the baselines and the log.
# Refuses when the auscult .deb is installed (upgrade that with apt instead).
# Undo with scripts/uninstall.sh [--purge].
set -euo pipefail

repo="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
say() { echo "install.sh: $*"; }
die() { echo "install.sh: $*" >&2; exit 1; }
usage() { sed -n '2,/^set -euo/{/^set -euo/d;s/^# \{0,1\}//;p}' "$0"; }

bin="$repo/auscult" prefix=/
while [ $# -gt 0 ]; do
  case "$1" in
    --binary) [ $# -ge 2 ] || die "--binary needs a path"; bin="$2"; shift 2 ;;
    --prefix) [ $# -ge 2 ] || die "--prefix needs a folder"; prefix="$2"; shift 2 ;;
    -h | --help) usage; exit 0 ;;
    *) usage >&2; exit 2 ;;
  esac
done
[ "$(id -u)" -eq 0 ] || die "run as root (sudo $0 ...): it creates a user and writes to /etc and /usr/local"
[ -d "$prefix" ] || die "--prefix $prefix: no such folder"
root=$(cd "$prefix" && pwd -P)
[ "$root" = / ] && root=""
[ -f "$bin" ] || die "$bin: no such file (build it with: go build -o auscult ./agent, or pass --binary)"
for f in systemd/auscult.service configs/agent.example.yaml README.md; do
  [ -f "$repo/$f" ] || die "$repo/$f is missing: run this script from an auscult checkout"
done

unit=auscult.service
config=/etc/auscult/agent.yaml
state=/var/lib/auscult

# A .deb install owns /usr/bin/auscult and its own unit: the two must not be mixed.
status=$(dpkg-query --admindir="$root/var/lib/dpkg" -W -f='${db:Status-Status}' auscult 2>/dev/null || true)
case "$status" in
  "" | not-installed | config-files) ;;
  *) die "the auscult package is installed ($status): upgrade it with apt install ./auscult_VERSION_ARCH.deb, or apt remove auscult first" ;;
esac

# The binary must run here before anything is changed (on another root: not run).
if [ -z "$root" ]; then
  if ! newver=$("$bin" version 2>&1); then
    libs=$(ldd "$bin" 2>/dev/null || true) # no `| grep -q`: under pipefail its early exit fails the pipe
    if [[ $libs == *"libportaudio.so.2 => not found"* ]]; then
      die "$bin has live capture and needs the PortAudio library: apt-get install libportaudio2 (or install a _nocapture build)"
    fi
    die "$bin does not run here: $newver"
  fi
else
  newver="(not run: installing into $root)"
fi

# The service user and its groups. On another root the tools work in that root's /etc.
on_root=()
[ -n "$root" ] && on_root=(--root "$root")
entry() { # entry passwd|group NAME: the account's line, from the target system
  if [ -z "$root" ]; then getent "$1" "$2" || true; else grep "^$2:" "$root/etc/$1" || true; fi
}
if [ -z "$(entry group audio)" ]; then groupadd "${on_root[@]}" --system audio; say "created the group audio"; fi
if [ -z "$(entry group auscult)" ]; then groupadd "${on_root[@]}" --system auscult; say "created the group auscult"; fi
if [ -z "$(entry passwd auscult)" ]; then
  useradd "${on_root[@]}" --system --gid auscult --groups audio --home-dir "$state" --no-create-home \
    --shell /usr/sbin/nologin --comment "auscult agent" auscult
  say "created the system user auscult (groups auscult, audio; home $state; no login shell)"
else
  usermod "${on_root[@]}" --append --groups audio auscult
fi
uid=$(entry passwd auscult | cut -d: -f3)
gid=$(entry group auscult | cut -d: -f3)

# Folders and the first config; existing ones are left exactly as they are.
[ -d "$root/etc/auscult" ] || install -d -m 0755 -o 0 -g 0 "$root/etc/auscult"
if [ -d "$root$state" ]; then
  say "kept $state"
else
  install -d -m 0750 -o "$uid" -g "$gid" "$root$state"
  say "created $state (auscult:auscult 0750)"
fi
if [ -e "$root$config" ]; then
  say "kept $config"
else
  install -m 0640 -o 0 -g "$gid" "$repo/configs/agent.example.yaml" "$root$config"
  say "wrote $config from configs/agent.example.yaml: set the asset and the microphone, then enrol"
fi

# Program files. The binary is replaced by a rename, so a running agent keeps its
# old file until it restarts and no half-written binary is ever in place.
oldver="none"
[ -x "$root/usr/local/bin/auscult" ] && [ -z "$root" ] && oldver=$("$root/usr/local/bin/auscult" version 2>&1 || echo unknown)
install -d -m 0755 "$root/usr/local/bin" "$root/usr/local/share/auscult" "$root/usr/local/share/doc/auscult"
install -m 0755 "$bin" "$root/usr/local/bin/.auscult.new"
mv -f "$root/usr/local/bin/.auscult.new" "$root/usr/local/bin/auscult"
say "binary /usr/local/bin/auscult: ${oldver#auscult } -> ${newver#auscult }"
install -m 0644 "$repo/configs/agent.example.yaml" "$root/usr/local/share/auscult/agent.example.yaml"
install -m 0644 "$repo/README.md" "$root/usr/local/share/doc/auscult/README.md"
[ -f "$repo/docs/install.md" ] && install -m 0644 "$repo/docs/install.md" "$root/usr/local/share/doc/auscult/install.md"

# The unit, with the paths of this layout.
tmp=$(mktemp)
trap 'rm -f "$tmp"' EXIT
sed -e 's|^ExecStart=/usr/bin/auscult |ExecStart=/usr/local/bin/auscult |' \
  -e 's|^Documentation=file:/usr/share/doc/auscult/|Documentation=file:/usr/local/share/doc/auscult/|' \
  "$repo/systemd/auscult.service" >"$tmp"
grep -q '^ExecStart=/usr/local/bin/auscult ' "$tmp" ||
  die "systemd/auscult.service: no 'ExecStart=/usr/bin/auscult ...' line to point at /usr/local/bin"
dest="$root/etc/systemd/system/$unit"
install -d -m 0755 "$root/etc/systemd/system"
if cmp -s "$tmp" "$dest"; then
  say "unit /etc/systemd/system/$unit unchanged"
else
  install -m 0644 "$tmp" "$dest" # install unlinks first: never writes through a mask symlink
  say "unit /etc/systemd/system/$unit installed"
fi

# The unit's ExecReload= runs /bin/kill, which Debian ships in procps (not in a minimal install).
[ -x "$root/bin/kill" ] ||
  say "warning: /bin/kill is missing (Debian package procps): 'systemctl reload $unit' would fail; apt-get install procps"

# systemd: only a system booted with it is started (sd_booted: /run/systemd/system).
baseline=$(sed -n 's/^baseline:[[:space:]]*//p' "$root$config" | head -n 1 |
  sed "s/[[:space:]]#.*\$//; s/[[:space:]]*\$//; s/^\"\(.*\)\"\$/\1/; s/^'\(.*\)'\$/\1/")
if [ -z "$root" ] && [ -d /run/systemd/system ]; then
  systemctl daemon-reload
  systemctl enable --quiet "$unit"
  if systemctl is-active --quiet "$unit"; then
    systemctl restart "$unit"
    say "systemd: $unit enabled and restarted on the new binary"
  elif [ -n "$baseline" ] && [ -e "$baseline" ]; then
    systemctl start "$unit"
    say "systemd: $unit enabled and started"
  else
    say "systemd: $unit enabled, not started: no baseline at ${baseline:-(none set in $config)} yet."
    say "  enrol one (docs/install.md), then: systemctl restart $unit"
  fi
else
  if [ -n "$root" ]; then
    why="installing into $root"
  else
    why="systemd is not running this system (PID 1 is $(cat /proc/1/comm 2>/dev/null || echo unknown): a chroot or a container?)"
  fi
  if command -v systemctl >/dev/null; then
    if systemctl --root="${root:-/}" enable --quiet "$unit" 2>/dev/null; then
      say "$why: $unit enabled for the next boot, not started"
    else
      say "$why: could not enable $unit here; on the running board: systemctl enable --now $unit"
    fi
  else
    say "$why, and systemctl is not installed: nothing enabled or started."
    say "  on the running board: systemctl enable --now $unit"
  fi
fi
