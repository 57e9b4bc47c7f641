#!/usr/bin/env bash
# Proves the README's two commands work on a brand-new Debian 12 machine:
# makes a minimal Debian 12 (bookworm) root with debootstrap, clones the
# repository into it (so only committed files are there), and runs
#   bash tools/setup.sh && bash tools/test.sh
# inside it as root with a bare environment (no locale, HOME=/root, no stdin).
# The machine this runs on may already have packages installed by hand, which
# can hide a missing step in tools/setup-deps.sh; the fresh root cannot.
#
# Usage (as root, on Debian):  bash tools/fresh-check.sh [REPO] [ROOT]
#   REPO  git repository to clone (default: this checkout; commit first)
#   ROOT  directory for the fresh root (default: /var/tmp/gwdivide-freshroot)
# GW_FRESH_WORKTREE=1 also copies uncommitted and new files of REPO's work tree.
# GW_FRESH_CI=1 runs `bash .ci/run` (as CI does) instead of the README's commands.
# A pristine copy of the bootstrapped root is kept in ROOT.base so later runs
# skip the download; delete it to bootstrap anew.  The log is ROOT.log.
# Needs about 3 GB of disk and 20-30 minutes (package download and builds).
set -euo pipefail
here="$(cd "$(dirname "$0")/.." && pwd)"
repo="${1:-$here}"
root="${2:-/var/tmp/gwdivide-freshroot}"
log="$root.log"

if [ "$(id -u)" -ne 0 ]; then echo "fresh-check: run as root (chroot, mount)" >&2; exit 2; fi

# Use the Debian mirror this machine's apt already uses, and no other host.
mirror="$(grep -hsE '^(URIs:|deb )' /etc/apt/sources.list /etc/apt/sources.list.d/*.sources \
          /etc/apt/sources.list.d/*.list 2>/dev/null \
          | grep -oE 'https?://[^ ]+/debian/?' | grep -v security | head -n1 || true)"
mirror="${mirror:-http://deb.debian.org/debian}"

if ! command -v debootstrap >/dev/null; then
  DEBIAN_FRONTEND=noninteractive apt-get install -y -q debootstrap
fi

umount_all() {
  for m in dev/pts dev sys proc; do
    mountpoint -q "$root/$m" && umount -l "$root/$m" || true
  done
}
trap umount_all EXIT

if [ ! -d "$root.base" ]; then
  echo "fresh-check: bootstrapping Debian 12 from $mirror into $root.base"
  debootstrap --variant=minbase bookworm "$root.base" "$mirror"
fi
umount_all
rm -rf "$root"
cp -a "$root.base" "$root"
# A fresh machine can resolve names; a chroot needs the host's resolver file.
cp -L /etc/resolv.conf "$root/etc/resolv.conf"

git clone -q "$repo" "$root/root/gwdivide"
if [ -n "${GW_FRESH_WORKTREE:-}" ]; then
  # Also copy the work tree's uncommitted and new (not ignored) files, to try
  # work before it is committed.  Without this only committed files are used.
  (cd "$repo" && git ls-files -z -c -o --exclude-standard) \
    | (cd "$repo" && xargs -0 cp --parents -a -t "$root/root/gwdivide" 2>/dev/null || true)
  echo "fresh-check: work-tree files copied over the clone"
fi
echo "fresh-check: testing commit $(git -C "$root/root/gwdivide" log -1 --format='%h %s')"

mount -t proc proc "$root/proc"
mount --rbind /sys "$root/sys"
mount --rbind /dev "$root/dev"

# The README's two commands, or with GW_FRESH_CI=1 what CI runs.
cmd='bash tools/setup.sh && bash tools/test.sh'
if [ -n "${GW_FRESH_CI:-}" ]; then cmd='bash .ci/run'; fi
echo "fresh-check: running: $cmd"
set +e
chroot "$root" /usr/bin/env -i HOME=/root TERM=dumb CI=true \
  PATH=/usr/local/sbin:/usr/local/bin:/usr/sbin:/usr/bin:/sbin:/bin \
  /bin/bash -c "cd /root/gwdivide && $cmd" \
  </dev/null 2>&1 | tee "$log"
rc=${PIPESTATUS[0]}
set -e
echo "fresh-check: exit code $rc (log: $log)"
exit "$rc"
