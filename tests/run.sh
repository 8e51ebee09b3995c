#!/bin/sh
# run.sh - the whole suite: CUnit binaries, then end-to-end scripts.
# BUILD selects the build folder; HL_WRAP (e.g. valgrind ...) prefixes every binary run.
# Exits non-zero when any test fails.
BUILD=${BUILD:-build}
case "$BUILD" in /*) ABS_BUILD=$BUILD ;; *) ABS_BUILD="$(pwd)/$BUILD" ;; esac
export HALOLEDGER="$ABS_BUILD/haloledger"
export HL_WRAP="${HL_WRAP:-}"
export HL_ROOT="$(pwd)"
export PYTHON=/usr/bin/python3
fail=0; total=0
start=$(date +%s)
for t in "$BUILD"/test_*; do
    [ -x "$t" ] || continue
    total=$((total + 1))
    if $HL_WRAP "$t" >"$t.log" 2>&1; then
        printf 'ok   %s (%s)\n' "${t##*/}" "$(grep -E '^ +(asserts|tests) ' "$t.log" | awk '{printf "%s %s ", $1, $3}')"
    else
        printf 'FAIL %s\n' "${t##*/}"; sed -n '1,60p' "$t.log"; fail=$((fail + 1))
    fi
done
for t in tests/e2e/*.sh tests/e2e/*.py; do
    [ -f "$t" ] || continue
    case "${t##*/}" in _*) continue ;; esac # shared modules, not tests
    total=$((total + 1))
    case "$t" in *.py) runner=$PYTHON ;; *) runner=sh ;; esac
    log="$BUILD/e2e-$(basename "$t").log"
    if $runner "$t" >"$log" 2>&1; then
        printf 'ok   %s (%s)\n' "$t" "$(tail -n 1 "$log")"
    else
        printf 'FAIL %s\n' "$t"; tail -n 40 "$log"; fail=$((fail + 1))
    fi
done
echo "tests: $((total - fail))/$total passed in $(( $(date +%s) - start )) s"
[ "$fail" -eq 0 ]
