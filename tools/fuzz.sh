#!/bin/sh
# fuzz.sh - libFuzzer targets of the campaign, CSV schedule, SMILES and formula readers and of the whole
# pipeline (campaign text to the JSON ledger in memory, and to both writers' files) (tests/fuzz/).
#
#   sh tools/fuzz.sh SECONDS     build, seed, fuzz each target SECONDS (make fuzz FUZZ_SECONDS=N)
#   sh tools/fuzz.sh --regress   build, seed, run every seed and tests/fuzz/regress input once
#   sh tools/fuzz.sh --build     build only
#   FUZZ_FORK=1 sh tools/fuzz.sh SECONDS   keep fuzzing after a crash (libFuzzer fork mode)
#
# Build: the library with clang, coverage instrumentation, ASan and UBSan (UB aborts), via the
# Makefile into build/fuzz; each target is linked with libFuzzer.  Corpora: build/fuzz/corpus/T
# (grows across runs), read together with build/fuzz/seed/T (from tests/fuzz/seed.py) and
# tests/fuzz/regress/T, less the reproducers listed in tests/fuzz/regress/OPEN (found and
# reported, not fixed yet: --regress runs them one by one and says whether they still fail).
# A crash, leak, abort or timeout is written to build/fuzz/artifacts/T/ and fails the run.
# Prints executions per target from libFuzzer's final statistics.
set -u
cd "$(dirname "$0")/.." || exit 2
MODE=${1:-30}
case $MODE in
    --build | --regress) ;;
    *[!0-9]* | '') echo "usage: sh tools/fuzz.sh SECONDS | --regress | --build" >&2; exit 2 ;;
esac
OUT=build/fuzz
# FUZZ_TARGETS="fuzz_smiles fuzz_workbook" picks some of them (one at a time on a shared machine).
TARGETS=${FUZZ_TARGETS:-"fuzz_campaign fuzz_smiles fuzz_formula fuzz_pipeline fuzz_workbook fuzz_sched"}
CLANG=${CLANG:-}
if [ -z "$CLANG" ]; then
    for c in clang-14 clang; do
        command -v "$c" >/dev/null 2>&1 && { CLANG=$c; break; }
    done
fi
if [ -z "$CLANG" ]; then
    echo "fuzz: clang not found (Debian: apt-get install clang-14 libclang-rt-14-dev)" >&2
    exit 3
fi

SAN="-fsanitize=address,undefined -fno-sanitize-recover=undefined -fno-omit-frame-pointer"
# -Wno-error: a clang-only warning in a module must not stop fuzzing (gcc -Werror guards them).
LIBFLAGS="-g -O1 -fsanitize=fuzzer-no-link $SAN -Wno-error"
mkdir -p $OUT
if ! make -s -j2 --no-print-directory BUILD=$OUT CC="$CLANG" EXTRA_CFLAGS="$LIBFLAGS" \
        $OUT/libhalo.a >$OUT/build.log 2>&1; then
    cat $OUT/build.log >&2
    echo "fuzz: library build failed" >&2
    exit 2
fi
LIBS="$(pkg-config --libs xlsxwriter libcjson) -lcsv -lm"
for t in $TARGETS; do
    stale=0
    for h in tests/fuzz/*.h; do [ "$h" -nt $OUT/$t ] && stale=1; done
    if [ ! -x $OUT/$t ] || [ $stale = 1 ] || [ tests/fuzz/$t.c -nt $OUT/$t ] || [ $OUT/libhalo.a -nt $OUT/$t ]; then
        # shellcheck disable=SC2086
        "$CLANG" -std=c11 -Wall -Wextra -Werror -D_POSIX_C_SOURCE=200809L -g -O1 \
            -fsanitize=fuzzer $SAN -Iinclude -Itests/fuzz tests/fuzz/$t.c $OUT/libhalo.a $LIBS -o $OUT/$t ||
            { echo "fuzz: cannot link $t" >&2; exit 2; }
    fi
done
[ "$MODE" = "--build" ] && exit 0

/usr/bin/python3 tests/fuzz/seed.py . $OUT/seed >/dev/null || { echo "fuzz: seeding failed" >&2; exit 2; }

export ASAN_OPTIONS=${ASAN_OPTIONS:-detect_leaks=1:abort_on_error=0}
export UBSAN_OPTIONS=${UBSAN_OPTIONS:-print_stacktrace=1}
fail=0
stamp=$OUT/.started
: >$stamp
for t in $TARGETS; do
    mkdir -p $OUT/corpus/$t $OUT/artifacts/$t tests/fuzz/regress/$t
    case $t in
        fuzz_campaign | fuzz_pipeline | fuzz_workbook) maxlen=65536 ;;
        fuzz_smiles) maxlen=8192 ;; # past 1,000 atoms even in bracket atoms ([13CH2] x 1001)
        fuzz_sched) maxlen=8192 ;;
        *) maxlen=256 ;;
    esac
    # a balance may take 0.3 s (-O2), some 6 s under the sanitizers, and an input holds up to 8
    # (tests/fuzz/fuzz_pipeline.h)
    tmo=10
    case $t in fuzz_pipeline | fuzz_workbook) tmo=60 ;; esac
    dict=""
    [ -f tests/fuzz/$t.dict ] && dict="-dict=tests/fuzz/$t.dict"
    case $t in fuzz_pipeline | fuzz_workbook) dict="-dict=tests/fuzz/fuzz_campaign.dict" ;; esac
    log=$OUT/$t.log
    # Reproducers listed in tests/fuzz/regress/OPEN (found, reported, not fixed yet) are left
    # out of the corpus; the regression run tries them one by one and says whether they still fail.
    run=$OUT/regress-run/$t
    rm -rf "$run" && mkdir -p "$run"
    # the workbook target also runs the pipeline target's reproducers (same input, more checks)
    shared=""
    [ $t = fuzz_workbook ] && shared="tests/fuzz/regress/fuzz_pipeline/*"
    for f in tests/fuzz/regress/$t/* $shared; do
        [ -f "$f" ] || continue
        grep -qx "$t/${f##*/}" tests/fuzz/regress/OPEN 2>/dev/null || cp "$f" "$run/"
    done
    if [ "$MODE" = "--regress" ]; then
        log=$OUT/$t.regress.log
        # Execute every input once, no mutation: -runs=0 over the folders.
        $OUT/$t -runs=0 -print_final_stats=1 -timeout=$((tmo * 2)) -rss_limit_mb=2048 \
            -max_len=$maxlen -artifact_prefix=$OUT/artifacts/$t/ $OUT/seed/$t "$run" >$log 2>&1
        rc=$?
        for f in $(sed -n "s|^$t/||p" tests/fuzz/regress/OPEN 2>/dev/null); do
            if $OUT/$t -timeout=20 "tests/fuzz/regress/$t/$f" >$OUT/open-$f.log 2>&1; then
                echo "fuzz $t: open reproducer $f now passes: remove it from tests/fuzz/regress/OPEN"
            else
                echo "fuzz $t: open reproducer $f still fails (known, listed in tests/fuzz/regress/OPEN)"
            fi
        done
    elif [ -n "${FUZZ_FORK:-}" ]; then
        # Keep going after a crash (fork mode); every crash is kept in artifacts/ and fails the run.
        # shellcheck disable=SC2086
        $OUT/$t -fork=1 -ignore_crashes=1 -ignore_timeouts=1 -ignore_ooms=1 \
            -max_total_time="$MODE" -timeout=$tmo -rss_limit_mb=2048 -max_len=$maxlen $dict \
            -artifact_prefix=$OUT/artifacts/$t/ $OUT/corpus/$t $OUT/seed/$t "$run" \
            >$log 2>&1
        rc=$?
        last=$(grep -E '^#[0-9]+: ' $log | tail -n 1)
        bad=$(printf '%s\n' "$last" | sed -n 's|.*oom/timeout/crash: *\([0-9/]*\).*|\1|p')
        printf 'fuzz %-14s %10s executions, oom/timeout/crash %s\n' "$t" \
            "$(printf '%s' "$last" | sed -n 's/^#\([0-9]*\):.*/\1/p')" "${bad:-?}"
        [ "${bad:-0/0/0}" = "0/0/0" ] || rc=1
        [ $rc -eq 0 ] || { fail=$((fail + 1)); find $OUT/artifacts/$t -type f -newer $stamp | sed 's/^/  artifact /' | head -n 20; }
        continue
    else
        # shellcheck disable=SC2086
        $OUT/$t -max_total_time="$MODE" -print_final_stats=1 -timeout=$tmo -rss_limit_mb=2048 \
            -max_len=$maxlen $dict -artifact_prefix=$OUT/artifacts/$t/ \
            $OUT/corpus/$t $OUT/seed/$t "$run" >$log 2>&1
        rc=$?
    fi
    execs=$(sed -n 's/^stat::number_of_executed_units: *//p' $log | tail -n 1)
    inputs=$(find $OUT/seed/$t "$run" -type f | wc -l)
    if [ $rc -eq 0 ]; then
        printf 'fuzz %-14s ok    %10s executions (%s seed+regress inputs)\n' "$t" "${execs:-?}" "$inputs"
    else
        fail=$((fail + 1))
        printf 'fuzz %-14s FAIL  exit %d after %s executions; log %s\n' "$t" $rc "${execs:-?}" "$log"
        grep -E '^(==[0-9]+==ERROR|SUMMARY|artifact_prefix|Test unit written|.*runtime error)' $log | head -n 8
        sed -n '/^==[0-9]*==ERROR/,/^$/p' $log | head -n 30
        echo "  reproduce: $OUT/$t ARTIFACT; minimise: $OUT/$t -minimize_crash=1 -runs=100000 ARTIFACT"
    fi
done
[ $fail -eq 0 ] || { echo "fuzz: $fail target(s) failed" >&2; exit 1; }
exit 0
