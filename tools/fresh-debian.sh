#!/bin/sh
# fresh-debian.sh - the README's set-up on a bare Debian 12 (bookworm) root, as root.
#
# Builds a minimal root with debootstrap (variant minbase: the Essential packages and apt, as
# in a bare container image) from the Debian mirror this machine's apt already uses, clones the
# committed HEAD of this checkout into it, and inside a chroot runs only the README's steps:
# `apt-get update && apt-get install -y make`, then `make demo` and `make test`. Any test that
# reports a skip there is a failure: it means `make deps` left something out.
#
# The pristine debootstrapped root is kept as a tarball under $HL_FRESH_CACHE (default
# /var/cache/haloledger), keyed by suite, architecture, variant and mirror, so that later runs skip
# debootstrap; it is rebuilt when older than $HL_FRESH_CACHE_DAYS (30) days or with --rebuild.
#
# Exit status: 0 passed; 1 a run started and failed; 2 bad usage; 3 cannot run here (not root,
# no git, no mirror found or reachable, debootstrap not installable); the reason is printed as
# `fresh-debian: SKIPPED: <reason>`.
# Options: --rebuild (debootstrap again and replace the cached root), --keep (leave the root and
# its log in place for a look), --print-sources (print the mirror and the sources.list the root
# gets, then stop). Environment: HL_MIRROR overrides the mirror read from apt; HL_APT_ETC
# (default /etc/apt) is where apt's sources are read from.
set -u
SUITE=bookworm
VARIANT=minbase
# The README's set-up command, run verbatim; the script checks that the README still says it.
README_MAKE='apt-get update && apt-get install -y make'
CACHE_DIR=${HL_FRESH_CACHE:-/var/cache/haloledger}
CACHE_DAYS=${HL_FRESH_CACHE_DAYS:-30}
APT_ETC=${HL_APT_ETC:-/etc/apt}
rebuild=0; keep=0; print_sources=0
for a in "$@"; do
    case "$a" in
        --rebuild) rebuild=1 ;;
        --keep) keep=1 ;;
        --print-sources) print_sources=1 ;;
        *) echo "usage: tools/fresh-debian.sh [--rebuild] [--keep] [--print-sources]" >&2; exit 2 ;;
    esac
done

say() { echo "fresh-debian: $*"; }
skip() { say "SKIPPED: $*"; exit 3; }
fail() { say "FAILED: $*"; exit 1; }
now() { date +%s; }
t_start=$(now)

# Every enabled `deb` entry of apt's sources as "URI SUITE" lines: one-line sources.list format
# (sources.list(5)) and deb822 .sources files (Types/URIs/Suites/Enabled fields, continuation
# lines, comments).
apt_entries() {
    for f in "$APT_ETC/sources.list" "$APT_ETC"/sources.list.d/*.list; do
        [ -f "$f" ] || continue
        awk '{ sub(/#.*/, ""); gsub(/\[[^]]*\]/, "") }
             $1 == "deb" && NF >= 3 { print $2, $3 }' "$f"
    done
    for f in "$APT_ETC"/sources.list.d/*.sources; do
        [ -f "$f" ] || continue
        awk 'function flush(   n, m, i, j, U, S) {
                 if ((" " types " ") ~ / deb / && tolower(enabled) != "no") {
                     n = split(uris, U, " "); m = split(suites, S, " ")
                     for (i = 1; i <= n; i++) for (j = 1; j <= m; j++) print U[i], S[j]
                 }
                 types = uris = suites = last = ""; enabled = "yes"
             }
             BEGIN { enabled = "yes" }
             /^#/ { next }
             { gsub(/[ \t]+/, " ") }
             /^ ?$/ { flush(); next }
             /^ / { v = substr($0, 2)
                    if (last == "types") types = types " " v
                    else if (last == "uris") uris = uris " " v
                    else if (last == "suites") suites = suites " " v
                    next }
             { k = tolower($0); sub(/:.*/, "", k); v = $0; sub(/^[^:]*: ?/, "", v); last = k
               if (k == "types") types = v; else if (k == "uris") uris = v
               else if (k == "suites") suites = v; else if (k == "enabled") enabled = v }
             END { flush() }' "$f"
    done
}
entries=$(apt_entries | sed 's|/*\( [^ ]*\)$|\1|')
if [ -n "${HL_MIRROR:-}" ]; then
    mirror=${HL_MIRROR%/}
else
    # the entry for the suite itself; else the first that is not the security archive
    mirror=$(printf '%s\n' "$entries" | awk -v s="$SUITE" '$2 == s { print $1; exit }')
    [ -n "$mirror" ] || mirror=$(printf '%s\n' "$entries" | awk '$1 ~ /^https?:/ && $2 !~ /security/ { print $1; exit }')
fi
[ -n "$mirror" ] || skip "no Debian mirror found in $APT_ETC/sources.list or $APT_ETC/sources.list.d/ (set HL_MIRROR)"
case "$mirror" in http://*|https://*) ;; *) skip "mirror $mirror is not an http(s) URI (set HL_MIRROR)" ;; esac

# The apt sources a Debian 12 installation has: the suite and its -updates from the mirror, and
# the security archive where this machine's apt uses one (debootstrap writes only the first).
root_sources() {
    echo "deb $mirror $SUITE main"
    printf '%s\n' "$entries" | awk -v s="$SUITE-updates" -v m="$mirror" '$2 == s && $1 == m { print "deb " m " " s " main"; exit }'
    printf '%s\n' "$entries" | awk -v s="$SUITE-security" '$2 == s { print "deb " $1 " " s " main"; exit }'
}
if [ "$print_sources" = 1 ]; then
    echo "mirror: $mirror"; root_sources; exit 0
fi

# ---- can it run here? -------------------------------------------------------------------------
[ "$(id -u)" = 0 ] || skip "not root (debootstrap, chroot and mount need root)"
command -v git >/dev/null 2>&1 || skip "git not installed (needed to clone the checkout)"
src=$(cd "$(dirname "$0")/.." && git rev-parse --show-toplevel 2>/dev/null) ||
    skip "$(dirname "$0")/.. is not a git checkout"
head=$(git -C "$src" rev-parse HEAD) || fail "no committed HEAD in $src"
grep -qF "$README_MAKE" "$src/README.md" ||
    fail "README.md no longer says \`$README_MAKE\`: update README_MAKE in $0 to the README's set-up"

# Reachability: the suite's InRelease with a short timeout (apt-helper ships with apt itself).
probe=$(mktemp)
if ! timeout 30 /usr/lib/apt/apt-helper -o Acquire::http::Timeout=10 -o Acquire::https::Timeout=10 \
        download-file "$mirror/dists/$SUITE/InRelease" "$probe" >/dev/null 2>&1; then
    rm -f "$probe"; skip "mirror $mirror not reachable (no $SUITE InRelease within 30 s)"
fi
rm -f "$probe"
if ! command -v debootstrap >/dev/null 2>&1; then
    say "installing debootstrap on this machine"
    DEBIAN_FRONTEND=noninteractive apt-get update -qq >/dev/null 2>&1
    DEBIAN_FRONTEND=noninteractive apt-get install -y -qq debootstrap >/dev/null 2>&1 ||
        skip "debootstrap not installed and apt-get install debootstrap failed"
fi
arch=$(dpkg --print-architecture)
say "suite $SUITE ($VARIANT) $arch from $mirror; testing $head of $src"
git -C "$src" diff --quiet HEAD 2>/dev/null || say "note: uncommitted changes in $src are not tested"

# ---- the root, with a trap that always unmounts -----------------------------------------------
work=$(mktemp -d /var/tmp/haloledger-fresh.XXXXXX) || fail "cannot create a work folder in /var/tmp"
R=$work/root
log=$work/fresh.log
last_log=/var/tmp/haloledger-fresh-last.log
mkdir "$R"
: >"$log"

mounts_under() { awk -v r="$R" '$2 == r || index($2, r "/") == 1 { print $2 }' /proc/mounts | sort -r; }
cleanup() {
    rc=$?
    trap - EXIT INT TERM HUP
    # processes this run started inside the root (e.g. a LibreOffice left behind), by pid
    for p in /proc/[0-9]*; do
        [ "$(readlink "$p/root" 2>/dev/null)" = "$R" ] && kill "${p#/proc/}" 2>/dev/null
    done
    for m in $(mounts_under); do umount "$m" 2>/dev/null || umount -l "$m" 2>/dev/null; done
    cp "$log" "$last_log" 2>/dev/null && say "log of this run: $last_log"
    if [ -n "$(mounts_under)" ]; then
        say "WARNING: still mounted under $R, left in place:"; mounts_under
        [ "$rc" = 0 ] && rc=1
    elif [ "$keep" = 1 ]; then
        say "root kept in $R"
    else
        rm -rf --one-file-system "$work"  # nothing is mounted under it any more
    fi
    exit "$rc"
}
trap cleanup EXIT
trap 'exit 130' INT
trap 'exit 143' TERM
trap 'exit 129' HUP

key=$(printf '%s' "$SUITE-$arch-$VARIANT-$mirror" | sed 's|://|_|; s|[^A-Za-z0-9._-]|_|g')
cache=$CACHE_DIR/root-$key.tar.gz
t0=$(now)
if [ "$rebuild" = 0 ] && [ -f "$cache" ] && [ -z "$(find "$cache" -mtime +"$CACHE_DAYS")" ]; then
    say "root from the cached tarball $cache"
    tar -C "$R" --numeric-owner -xzf "$cache" || fail "cannot unpack $cache (remove it or use --rebuild)"
    how=cached
else
    say "debootstrap $SUITE into $R (log: $log)"
    debootstrap --variant="$VARIANT" --arch="$arch" "$SUITE" "$R" "$mirror" >>"$log" 2>&1 || {
        tail -n 20 "$log"; fail "debootstrap failed"; }
    mkdir -p "$CACHE_DIR"
    tmp=$(mktemp "$CACHE_DIR/.root.XXXXXX") &&
        tar -C "$R" --numeric-owner -cf - . | gzip -1 >"$tmp" && mv "$tmp" "$cache" ||
        { rm -f "$tmp"; fail "cannot write the cache $cache"; }
    how=debootstrapped
fi
t_root=$(( $(now) - t0 ))
say "root ready ($how) in $t_root s; cache $(du -h "$cache" | cut -f1)"

root_sources >"$R/etc/apt/sources.list"
# No package lists, as on a Debian container image (its apt setting docker-clean deletes them):
# the README's own `apt-get update` must fetch them (a cached root's lists would be stale anyway).
find "$R/var/lib/apt/lists" -maxdepth 1 -type f ! -name lock -delete
cat /etc/resolv.conf >"$R/etc/resolv.conf"
# No daemon started by a package's maintainer script inside the chroot (the policy-rc.d
# interface of invoke-rc.d, /usr/share/doc/init-system-helpers/README.policy-rc.d).
printf '#!/bin/sh\nexit 101\n' >"$R/usr/sbin/policy-rc.d" && chmod 755 "$R/usr/sbin/policy-rc.d"

mount -t proc proc "$R/proc" &&
mount --bind /dev "$R/dev" && mount --make-private "$R/dev" &&
mount --bind /dev/pts "$R/dev/pts" && mount --make-private "$R/dev/pts" &&
mount -t tmpfs -o mode=1777,nosuid,nodev tmpfs "$R/dev/shm" &&
mount --bind /sys "$R/sys" && mount --make-private "$R/sys" &&
mount -o remount,bind,ro "$R/sys" || fail "cannot mount /proc, /dev, /dev/pts, /dev/shm, /sys in the root"

git clone -q --no-checkout "$src" "$R/root/haloledger" && git -C "$R/root/haloledger" checkout -q --detach "$head" ||
    fail "cannot clone $src into the root"

# step NAME COMMAND: run COMMAND in the root from the clone, as root with a bare login
# environment, no standard input; output shown and logged.
step() {
    name=$1; shift
    say "== $name: $*"
    s0=$(now)
    { chroot "$R" /usr/bin/env -i HOME=/root PATH=/usr/local/sbin:/usr/local/bin:/usr/sbin:/usr/bin:/sbin:/bin \
          TERM=dumb /bin/sh -c "cd /root/haloledger && $*" </dev/null 2>&1; echo $? >"$work/rc"; } | tee -a "$log"
    rc=$(cat "$work/rc")
    dt=$(( $(now) - s0 ))
    say "== $name: exit $rc in $dt s"
    [ "$rc" = 0 ] || fail "$name exited $rc"
}
step "README: install make" "$README_MAKE"; t_make=$dt
step "make demo" "make demo"; t_demo=$dt
from=$(( $(wc -l <"$log") + 1 ))
step "make test" "make test"; t_test=$dt

# A skip inside the bare root (tests/run.sh prints "SKIPPED NAME"; scripts print "skipped" in
# their logs) means make deps did not install what a test needs.
skips=$(cd "$R/root/haloledger" && { tail -n +"$from" "$log"; cat build/e2e-*.log; } 2>/dev/null |
        grep -i -E 'skipped|^skip |not installed' | grep -v -i -E '(^|[^0-9])0 skipped' | sort -u)
[ -z "$skips" ] || { printf '%s\n' "$skips"; fail "tests skipped in the bare root: make deps misses what they need"; }
summary=$(tail -n +"$from" "$log" | grep -E '^[0-9]+ passed, [0-9]+ failed' | tail -n 1)
[ -n "$summary" ] || fail "make test printed no 'N passed, N failed' line"
du=$(du -sh --one-file-system "$R" | cut -f1)
say "make test in the bare root: $summary"
say "PASSED in $(( $(now) - t_start )) s: root $t_root s ($how), install make $t_make s, make demo $t_demo s (incl. make deps), make test $t_test s; root grew to $du"
