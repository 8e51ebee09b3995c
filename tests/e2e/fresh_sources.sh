#!/bin/sh
# fresh_sources.sh - tools/fresh-debian.sh reads the Debian mirror from apt's sources as apt does
# (sources.list(5): one-line .list files and deb822 .sources files): disabled and deb-src-only
# stanzas, files apt ignores, options in brackets, continuation lines and a trailing slash; and
# says SKIPPED when no mirror is found.
cd "${HL_ROOT:-$(dirname "$0")/../..}" || exit 1
t=$(mktemp -d); trap 'rm -rf "$t"' EXIT
pass=0; fail=0
check() { # NAME EXPECTED ACTUAL
    if [ "$2" = "$3" ]; then pass=$((pass + 1)); else
        fail=$((fail + 1)); printf 'FAIL %s\n--- expected\n%s\n--- got\n%s\n' "$1" "$2" "$3"; fi
}
run() { HL_APT_ETC=$1 sh tools/fresh-debian.sh --print-sources 2>&1; }

# 1. deb822 only: a disabled stanza and a deb-src-only one come first; URIs continue on a line
mkdir -p "$t/a/sources.list.d"
cat >"$t/a/sources.list.d/debian.sources" <<'X'
# a comment
Types: deb
URIs: http://disabled.example/debian
Suites: bookworm
Components: main
Enabled: no

Types: deb-src
URIs: http://src.example/debian
Suites: bookworm
Components: main

Types: deb deb-src
# the mirror
URIs:
 http://mirror.example/debian/
Suites: bookworm bookworm-updates
Components: main
Signed-By: /usr/share/keyrings/debian-archive-keyring.gpg

Types: deb
URIs: http://security.example/debian-security
Suites: bookworm-security
Components: main
X
echo "deb http://ignored.example/debian bookworm main" >"$t/a/sources.list.d/other.list.disabled"
check deb822 "mirror: http://mirror.example/debian
deb http://mirror.example/debian bookworm main
deb http://mirror.example/debian bookworm-updates main
deb http://security.example/debian-security bookworm-security main" "$(run "$t/a")"

# 2. one-line format with options in brackets and a comment; no updates or security entry
mkdir -p "$t/b/sources.list.d"
cat >"$t/b/sources.list" <<'X'
# deb http://commented.example/debian bookworm main
deb-src http://src.example/debian bookworm main
deb [arch=amd64 signed-by=/usr/share/keyrings/debian-archive-keyring.gpg] http://one.example/debian/ bookworm main # mirror
X
check one-line "mirror: http://one.example/debian
deb http://one.example/debian bookworm main" "$(run "$t/b")"

# 3. no entry at all: a plain skip, exit 3
mkdir -p "$t/c/sources.list.d"
out=$(run "$t/c"); rc=$?
check none-rc 3 "$rc"
case "$out" in "fresh-debian: SKIPPED: no Debian mirror found"*) pass=$((pass + 1)) ;;
    *) fail=$((fail + 1)); echo "FAIL none-message: $out" ;; esac

echo "fresh_sources: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
