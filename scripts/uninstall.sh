#!/usr/bin/env bash
# Removes what scripts/install.sh installed.
#
# Usage: sudo scripts/uninstall.sh [--purge] [--prefix DIR]
#   (no option)   stop and disable auscult.service, remove /usr/local/bin/auscult, the unit
#                 and /usr/local/share/{auscult,doc/auscult}; keep /etc/auscult (the config),
#                 /var/lib/auscult (baselines and log) and the user auscult
#   --purge       also remove /etc/auscult, /var/lib/auscult and the user and group auscult
#   --prefix DIR  the root of the system to remove it from (default /)
# Safe to repeat. Refuses when the auscult .deb is installed: use apt remove / apt purge.
set -euo pipefail

say() { echo "uninstall.sh: $*"; }
die() { echo "uninstall.sh: $*" >&2; exit 1; }
usage() { sed -n '2,/^set -euo/{/^set -euo/d;s/^# \{0,1\}//;p}' "$0"; }

purge=no prefix=/
while [ $# -gt 0 ]; do
  case "$1" in
    --purge) purge=yes; shift ;;
    --prefix) [ $# -ge 2 ] || die "--prefix needs a folder"; prefix="$2"; shift 2 ;;
    -h | --help) usage; exit 0 ;;
    *) usage >&2; exit 2 ;;
  esac
done
[ "$(id -u)" -eq 0 ] || die "run as root (sudo $0 ...)"
[ -d "$prefix" ] || die "--prefix $prefix: no such folder"
root=$(cd "$prefix" && pwd -P)
[ "$root" = / ] && root=""
unit=auscult.service

status=$(dpkg-query --admindir="$root/var/lib/dpkg" -W -f='${db:Status-Status}' auscult 2>/dev/null || true)
case "$status" in
  "" | not-installed | config-files) ;;
  *) die "the auscult package is installed ($status): apt remove auscult (keeps config and data) or apt purge auscult" ;;
esac

# Stop and disable while the unit file is still there.
if [ -z "$root" ] && [ -d /run/systemd/system ]; then
  if [ -e "/etc/systemd/system/$unit" ]; then
    systemctl disable --now --quiet "$unit" || true
    systemctl reset-failed "$unit" 2>/dev/null || true
    say "systemd: $unit stopped and disabled"
  fi
elif [ -e "$root/etc/systemd/system/$unit" ] && command -v systemctl >/dev/null; then
  systemctl --root="${root:-/}" disable --quiet "$unit" 2>/dev/null || true
fi
# The enablement link, whoever made it (systemctl may be missing).
wants="$root/etc/systemd/system/multi-user.target.wants/$unit"
[ -L "$wants" ] && rm -f "$wants"

for f in /usr/local/bin/auscult "/etc/systemd/system/$unit" /usr/local/share/auscult /usr/local/share/doc/auscult; do
  if [ -e "$root$f" ] || [ -L "$root$f" ]; then
    rm -rf --one-file-system "$root$f"
    say "removed $f"
  fi
done
if [ -z "$root" ] && [ -d /run/systemd/system ]; then
  systemctl daemon-reload
fi

if [ "$purge" = no ]; then
  say "kept /etc/auscult (config), /var/lib/auscult (baselines, log) and the user auscult; --purge removes them"
  exit 0
fi
for d in /etc/auscult /var/lib/auscult; do
  if [ -e "$root$d" ]; then
    rm -rf --one-file-system "$root$d"
    say "removed $d"
  fi
done
on_root=()
[ -n "$root" ] && on_root=(--root "$root")
entry() { # entry passwd|group NAME: the account's line, from the target system
  if [ -z "$root" ]; then getent "$1" "$2" || true; else grep "^$2:" "$root/etc/$1" || true; fi
}
uid=$(entry passwd auscult | cut -d: -f3)
if [ -n "$uid" ]; then
  # Only a system account (never a person's login that happens to be called auscult).
  [ "$uid" -lt 1000 ] || die "the user auscult has uid $uid, not a system account: left alone"
  userdel "${on_root[@]}" auscult
  say "removed the user auscult"
fi
if [ -n "$(entry group auscult)" ]; then
  groupdel "${on_root[@]}" auscult
  say "removed the group auscult"
fi
