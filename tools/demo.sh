#!/bin/sh
# demo.sh BINARY - write the demo ledgers of campaigns/*.json into out/demo/.
set -e
bin=$1
mkdir -p out/demo
for c in campaigns/*.json; do
    name=$(basename "$c" .json)
    # the March campaign is shown as seen on 2027-02-20, so its late order is flagged
    today=""
    [ "$name" = harrowmere-march ] && today="--today 2027-02-20"
    # the April campaign is closed at mid-month: actuals for its first half
    [ "$name" = brackenholt-april ] && today="--today 2027-04-15"
    "$bin" report "$c" $today -o "out/demo/$name.xlsx" -o "out/demo/$name.json" 2>"out/demo/$name.warnings.txt" || {
        cat "out/demo/$name.warnings.txt" >&2; exit 1; }
done
echo "demo ledgers written to $(pwd)/out/demo/:"
ls -1 out/demo/*.xlsx out/demo/*.json | sed 's/^/  /'
echo "warnings for each campaign are in out/demo/*.warnings.txt"
