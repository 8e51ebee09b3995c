#!/bin/sh
# run_tally.sh - tests/run.sh counts a skip as skipped, never as passed, and under CI a skip of a
# required check fails the run. Runs tests/run.sh on stand-in tests in a scratch folder (a test
# that passes, one that fails, one that skips under a required name, one that skips under another
# name), then the real required checks with LibreOffice and clang hidden from PATH: their skip
# must fail the run when CI=true. Expected tallies are written out by hand below.
cd "${HL_ROOT:-$(dirname "$0")/../..}" || exit 1
tmp=$(mktemp -d) || exit 1
trap 'rm -rf "$tmp"' EXIT
bad=0
n=0

mk() { # mk NAME EXIT-STATUS
    printf '#!/bin/sh\necho "%s: stand-in %s"\nexit %s\n' "$1" "$2" "$2" >"$tmp/$1"
}
mk pass.sh 0
mk fail.sh 1
mk fuzz_regress.sh 77     # a required name (HL_REQUIRED)
mk optional_skip.sh 77    # not a required check

# expect WANT-STATUS WANT-LAST-LINE ENV... -- TESTS...: one run of tests/run.sh
expect() {
    want_rc=$1 want_line=$2
    shift 2
    envs=""
    while [ "$1" != "--" ]; do envs="$envs $1"; shift; done
    shift
    n=$((n + 1))
    # the outer run's own settings (HL_FAILFAST from tools/mutate.sh, CI) must not leak in
    out=$(env -u HL_FAILFAST -u HL_REQUIRED -u CI BUILD="$tmp" $envs sh tests/run.sh "$@" 2>&1)
    rc=$?
    last=$(printf '%s\n' "$out" | tail -n 1)
    ok_rc=0
    if [ "$want_rc" = 0 ]; then [ $rc -eq 0 ] && ok_rc=1; else [ $rc -ne 0 ] && ok_rc=1; fi
    if [ $ok_rc -eq 0 ] || [ "$last" != "$want_line" ]; then
        echo "FAIL ($envs $*): exit $rc, last line '$last'; wanted exit $want_rc, '$want_line'"
        printf '%s\n' "$out" | sed 's/^/    /'
        bad=$((bad + 1))
    fi
}

# a skip is its own count, outside CI the run passes
expect 0 "1 passed, 0 failed, 1 skipped" CI= -- "$tmp/pass.sh" "$tmp/fuzz_regress.sh"
expect 0 "1 passed, 0 failed, 1 skipped" CI=false -- "$tmp/pass.sh" "$tmp/fuzz_regress.sh"
# under CI the required skip is a failure; an optional one stays a skip
expect 1 "1 passed, 1 failed, 0 skipped" CI=true -- "$tmp/pass.sh" "$tmp/fuzz_regress.sh"
expect 0 "1 passed, 0 failed, 1 skipped" CI=true -- "$tmp/pass.sh" "$tmp/optional_skip.sh"
# a failure fails the run; HL_FAILFAST stops at it
expect 1 "1 passed, 1 failed, 1 skipped" CI= -- "$tmp/fail.sh" "$tmp/pass.sh" "$tmp/optional_skip.sh"
expect 1 "0 passed, 1 failed, 0 skipped" CI= HL_FAILFAST=1 -- "$tmp/fail.sh" "$tmp/pass.sh"

# the real required checks, with soffice and clang out of reach: skipped, and failed under CI
mkdir "$tmp/bin"
for tool in sh date tail grep awk sed basename cat env mktemp rm; do
    p=$(command -v "$tool") && ln -s "$p" "$tmp/bin/$tool"
done
expect 0 "0 passed, 0 failed, 2 skipped" PATH="$tmp/bin" CI= -- \
    tests/e2e/libreoffice_recalc.py tests/e2e/fuzz_regress.sh
expect 1 "0 passed, 2 failed, 0 skipped" PATH="$tmp/bin" CI=true -- \
    tests/e2e/libreoffice_recalc.py tests/e2e/fuzz_regress.sh

# an openpyxl comparison with openpyxl out of reach (a package of that name that refuses to
# import, first on PYTHONPATH): SKIPPED outside CI, a failure under CI
mkdir -p "$tmp/hide/openpyxl"
echo 'raise ImportError("hidden by run_tally.sh")' >"$tmp/hide/openpyxl/__init__.py"
expect 0 "0 passed, 0 failed, 1 skipped" PYTHONPATH="$tmp/hide" CI= -- tests/e2e/header_codes.py
expect 1 "0 passed, 1 failed, 0 skipped" PYTHONPATH="$tmp/hide" CI=true -- tests/e2e/header_codes.py

if [ $bad -gt 0 ]; then
    echo "run_tally: $bad of $n runs of tests/run.sh gave the wrong tally"
    exit 1
fi
echo "run_tally: $n runs of tests/run.sh tallied skips and failures as expected"
