#!/usr/bin/env bash
# Runs telegrapher's contract benchmarks and their numpy twins side by side, in one run on
# this machine, and prints the ratios. Both sides report their best run: the Go
# benchmarks the best of 7 (3 for switching), the numpy scripts the best of 7.
#
#   bash testdata/bench/compare.sh
#
# Needs Debian's python3-numpy (/usr/bin/python3). OPENBLAS_CORETYPE and OPENBLAS_L2_SIZE
# are unset for the numpy runs only, so numpy runs at its own best speed.
set -euo pipefail
cd "$(dirname "$0")/../.."
py=/usr/bin/python3

ms_per_op() { # benchmark output -> the best ms/op of the named benchmark over its runs
	awk -v name="$1" '$1 ~ "^"name"(-[0-9]+)?$" { for (i = 1; i <= NF; i++) if ($i == "ns/op" && (best == "" || $(i-1) < best)) best = $(i-1) }
		END { print best / 1e6 }'
}

echo "machine: $(nproc) cores, $(grep -m1 'model name' /proc/cpuinfo | cut -d: -f2 | sed 's/^ //'), $(go version | cut -d' ' -f3)"
scan_go=$(go test -run '^$' -bench '^BenchmarkScan100k$' -benchtime 20x -count 7 ./freqscan | ms_per_op BenchmarkScan100k)
lap_go=$(go test -run '^$' -bench '^BenchmarkLaplace64k$' -benchtime 30x -count 7 ./waves | ms_per_op BenchmarkLaplace64k)
sw_go=$(go test -run '^$' -bench '^BenchmarkSwitching1000$' -benchtime 3x -count 3 ./waves | ms_per_op BenchmarkSwitching1000)

scan_np=$(env -u OPENBLAS_CORETYPE -u OPENBLAS_L2_SIZE $py testdata/bench/scan_bench.py | sed -n 's/.*: \([0-9.]*\) ms\/op.*/\1/p')
lap_np=$(env -u OPENBLAS_CORETYPE -u OPENBLAS_L2_SIZE $py testdata/bench/laplace_bench.py | sed -n 's/.*: \([0-9.]*\) ms\/op.*/\1/p')

go build -o /tmp/telegrapher-bench ./cmd/telegrapher
best=999999
for _ in $(seq 20); do
	t0=$(date +%s%N)
	/tmp/telegrapher-bench constants testdata/loading_study.toml >/dev/null
	t1=$(date +%s%N)
	d=$(((t1 - t0) / 1000))
	((d < best)) && best=$d
done

printf '%-24s %10s %10s %8s %s\n' benchmark "go ms/op" "numpy ms" ratio goal
printf '%-24s %10.2f %10.2f %7.1fx %s\n' BenchmarkScan100k "$scan_go" "$scan_np" "$(echo "$scan_np / $scan_go" | bc -l)" ">= 5x"
printf '%-24s %10.2f %10.2f %7.1fx %s\n' BenchmarkLaplace64k "$lap_go" "$lap_np" "$(echo "$lap_np / $lap_go" | bc -l)" ">= 2x"
printf '%-24s %10.1f %10s %8s %s\n' BenchmarkSwitching1000 "$sw_go" - - "<= 2000 ms"
printf '%-24s %10.1f %10s %8s %s\n' "constants (cold start)" "$(echo "$best / 1000" | bc -l)" - - "< 20 ms wall"
