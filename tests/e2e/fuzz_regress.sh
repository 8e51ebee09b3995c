#!/bin/sh
# fuzz_regress.sh - run every fuzz seed (campaigns/, tests/campaigns/, tests/bad/, templates/,
# SMILES and formula strings of tests/, long generated SMILES) and every tests/fuzz/regress/
# reproducer once through the libFuzzer targets (the readers, the CSV schedule reader and the two pipeline targets)
# (ASan + UBSan + LeakSanitizer, no mutation: -runs=0).  Without clang it prints SKIPPED and why,
# and exits 77 (tests/run.sh: skipped; a failure under CI).
# The fuzz build lives in build/fuzz whatever BUILD says (it is its own sanitized build).
cd "${HL_ROOT:-$(dirname "$0")/../..}" || exit 1
if ! command -v clang-14 >/dev/null 2>&1 && ! command -v clang >/dev/null 2>&1; then
    echo "fuzz_regress: SKIPPED: clang not installed (apt-get install clang-14 libclang-rt-14-dev)"
    exit 77
fi
if ! ls /usr/lib/llvm-*/lib/clang/*/lib/linux/libclang_rt.fuzzer-*.a >/dev/null 2>&1; then
    echo "fuzz_regress: SKIPPED: libFuzzer runtime missing (apt-get install libclang-rt-14-dev)"
    exit 77
fi
out=$(sh tools/fuzz.sh --regress 2>&1)
rc=$?
printf '%s\n' "$out"
if [ $rc -eq 3 ]; then
    echo "fuzz_regress: SKIPPED: $out"
    exit 77
fi
n=$(printf '%s\n' "$out" | sed -n 's/.* ok *\([0-9]*\) executions.*/\1/p' | awk '{s += $1} END {print s + 0}')
open=$(printf '%s\n' "$out" | grep -c 'still fails')
targets=$(printf '%s\n' "$out" | grep -c ' ok  ')
# every target of tools/fuzz.sh must have run (a target dropped from the list is a failure)
if [ $rc -eq 0 ] && [ "$targets" -ne 6 ]; then
    echo "fuzz_regress: FAILED: $targets of the 6 targets ran"
    exit 1
fi
if [ $rc -eq 0 ]; then
    echo "fuzz_regress: $n inputs ran clean through $targets targets ($open open reproducer(s) listed in tests/fuzz/regress/OPEN)"
    exit 0
fi
echo "fuzz_regress: FAILED (exit $rc)"
exit 1
