#!/usr/bin/env bash
# Instructions per call of the benchmarks' key operations, counted by
# valgrind (cachegrind, no cache simulation): each operation runs N and 2N
# times, and the difference divided by N is printed, so start-up is not
# counted. Repeatable on a shared machine, unlike times.
#
#   scripts/instruction-counts.sh            # default features
#   FEATURES=--no-default-features scripts/instruction-counts.sh
set -euo pipefail
cd "$(dirname "$0")/.."
N=${N:-2000}
cargo build --release -q -p qbound --example instruction_counts ${FEATURES:-}
bin=target/release/examples/instruction_counts
count() {
    valgrind --tool=cachegrind --cache-sim=no --cachegrind-out-file=/dev/null \
        "$bin" "$1" "$2" 2>&1 | sed -n 's/.*I *refs: *//p' | tr -d ','
}
echo "| operation | instructions per call |"
echo "|---|---:|"
for op in $("$bin" list); do
    a=$(count "$op" "$N")
    b=$(count "$op" $((2 * N)))
    echo "| $op | $(( (b - a) / N )) |"
done
