#!/bin/sh
# mutate.sh - seeded errors against the suite (`make mutate`; not part of `make test`).
#
# Copies the tree (tracked and untracked, not ignored, files as they are in the working tree)
# to a scratch folder, builds it and runs the whole suite once (it must pass), timing each test.
# Then, for each mutation of the list (default tests/mutations.txt, format described there), it
# replaces the exact original text in the scratch copy of its file, rebuilds, and runs the suite
# with HL_FAILFAST=1: the mutation's own "try" tests first, then every other test, quickest
# first, stopping at the first failure. So a caught mutant costs one or a few tests; only a
# survivor runs everything. The file is restored before the next mutation.
#
# Result per mutation:
#   caught     a test failed (named in the table, with the first line that says where)
#   SURVIVED   every test passed: an error (unless the list entry carries "harmless:")
#   harmless   survived, and the list says why that is no error (an equivalent mutant)
#   STALE      the original text is not in the file any more: an error (the list drifted)
#   AMBIGUOUS  the original text occurs more than once: an error (give more context)
#   NOBUILD    the mutant does not compile: an error (proves nothing about the tests)
# The table is printed and kept in build/mutate.txt; the exit status is non-zero on any error.
#
# Environment: MUTATIONS (list file), MUTATE_ONLY="M01 M07" (run only these ids),
# MUTATE_DIR (scratch folder, kept; default a fresh one under /tmp, removed at the end),
# MUTATE_NO_BASELINE=1 (skip the baseline run; all tests then count as equally quick).
set -u
ROOT=$(pwd)
LIST=${MUTATIONS:-tests/mutations.txt}
case "$LIST" in /*) ;; *) LIST="$ROOT/$LIST" ;; esac
[ -f "$LIST" ] || { echo "mutate: no list $LIST" >&2; exit 2; }
PY=/usr/bin/python3
[ -x "$PY" ] || PY=python3

if [ -n "${MUTATE_DIR:-}" ]; then
    S=$MUTATE_DIR
    mkdir -p "$S"
    keep=1
else
    S=$(mktemp -d /tmp/hl-mutate.XXXXXX) || exit 1
    keep=0
fi
cleanup() { [ $keep -eq 1 ] || rm -rf "$S"; }
trap cleanup EXIT
trap 'exit 130' INT TERM

echo "mutate: scratch copy in $S"
# the working tree as it is (uncommitted edits and new files included), build/ and out/ excluded
git ls-files -z -c -o --exclude-standard | tar -c --null -T - -f - | (cd "$S" && tar -x -f -) || exit 1
cd "$S" || exit 1
REC="$S/.mutations.rec"

# ---- the list (read by tools/mutlist.py, which tests/e2e/mutations_apply.py shares) ----
"$PY" tools/mutlist.py rec "$LIST" "$REC" || exit 2

echo "mutate: building the scratch copy"
make -s -j2 --no-print-directory all unit >"$S/.build.log" 2>&1 || {
    echo "mutate: the unmutated tree does not build:"; tail -n 30 "$S/.build.log"; exit 2; }

# ---- every test, and its baseline time ----
ALL=""
for t in build/test_*; do [ -x "$t" ] && ALL="$ALL $t"; done
for t in tests/e2e/*.sh tests/e2e/*.py; do
    # mutations_apply.py checks the list against the sources: every mutant makes its own entry
    # stale, so it would "catch" them all
    case "${t##*/}" in _*|mutations_apply.py) continue ;; esac
    [ -f "$t" ] && ALL="$ALL $t"
done
: >"$S/.times"
if [ "${MUTATE_NO_BASELINE:-0}" != 1 ]; then
    echo "mutate: baseline run of the unmutated tree"
    base_bad=0
    for t in $ALL; do
        t0=$(date +%s%N)
        if ! sh tests/run.sh "$t" >"$S/.base.log" 2>&1; then
            echo "mutate: baseline FAIL: $t"; tail -n 20 "$S/.base.log"; base_bad=1
        fi
        echo "$(( ($(date +%s%N) - t0) / 1000000 )) $t" >>"$S/.times"
    done
    [ $base_bad -eq 0 ] || { echo "mutate: the unmutated tree fails its suite: stop"; exit 2; }
else
    for t in $ALL; do echo "0 $t" >>"$S/.times"; done
fi
BY_TIME=$(sort -n "$S/.times" | awk '{print $2}')

# resolve "try" names (test_orders, ledger_hand_calc.py) to the paths above
resolve() {
    for w in $1; do
        for t in $ALL; do
            case "$t" in */"$w"|*/"$w".py|*/"$w".sh|"$w") echo "$t"; break ;; esac
        done
    done
}

TABLE="$S/.table"
: >"$TABLE"
errors=0; ncaught=0; nharmless=0
while IFS="$(printf '\037')" read -r id file find repl what try harmless <&3; do
    if [ -n "${MUTATE_ONLY:-}" ]; then
        case " $MUTATE_ONLY " in *" $id "*) ;; *) continue ;; esac
    fi
    count=$("$PY" - "$file" "$find" <<'EOF'
import sys
try:
    print(open(sys.argv[1], encoding="utf-8").read().count(sys.argv[2]))
except OSError:
    print(0)
EOF
)
    result=""; by=""
    if [ "$count" -eq 0 ]; then
        result=STALE; by="original text not found in $file"
    elif [ "$count" -gt 1 ]; then
        result=AMBIGUOUS; by="original text found $count times in $file"
    else
        cp "$file" "$S/.orig"
        "$PY" - "$file" "$find" "$repl" <<'EOF'
import sys
p, a, b = sys.argv[1:]
s = open(p, encoding="utf-8").read()
open(p, "w", encoding="utf-8").write(s.replace(a, b, 1))
EOF
        if ! make -s -j2 --no-print-directory all unit >"$S/.build.log" 2>&1; then
            result=NOBUILD; by=$(grep -m1 'error' "$S/.build.log" | cut -c1-90)
        else
            order=$( { resolve "$try"; echo "$BY_TIME"; } | awk 'NF && !seen[$0]++')
            # shellcheck disable=SC2086
            HL_FAILFAST=1 sh tests/run.sh $order >"$S/.run.log" 2>&1
            if [ $? -ne 0 ]; then
                result=caught
                t=$(sed -n 's/^FAIL \([^ :]*\).*/\1/p' "$S/.run.log" | head -n 1)
                where=$(sed -n '/^FAIL /,$p' "$S/.run.log" | sed 1d |
                        grep -m1 -E 'tests/unit/[a-z_]+\.c:[0-9]+|FAIL|fail|expected|got' |
                        sed 's/^ *//' | cut -c1-70)
                by="${t##*/}${where:+: $where}"
            elif [ -n "$harmless" ]; then
                result=harmless; by=$harmless
            else
                result=SURVIVED; by="every test passed"
            fi
        fi
        cp "$S/.orig" "$file"
        touch "$file"
    fi
    case $result in
        caught) ncaught=$((ncaught + 1)) ;;
        harmless) nharmless=$((nharmless + 1)) ;;
        *) errors=$((errors + 1)) ;;
    esac
    printf '%s | %s | %s | %s | %s\n' "$id" "$file" "$what" "$result" "$by" >>"$TABLE"
    printf '%s %-9s %s: %s -> %s\n' "$id" "$result" "$file" "$what" "$by"
done 3<"$REC" </dev/null

total=$(wc -l <"$TABLE")
{
    echo "| id | file | mutation | result | caught by |"
    echo "|---|---|---|---|---|"
    sed 's/^/| /; s/$/ |/' "$TABLE"
    echo
    echo "mutate: $total mutations: $ncaught caught, $nharmless harmless (equivalent), $errors errors (survived, stale, ambiguous or not building)"
} >"$S/.out"
echo
cat "$S/.out"
mkdir -p "$ROOT/build" && cp "$S/.out" "$ROOT/build/mutate.txt"
[ $errors -eq 0 ]
