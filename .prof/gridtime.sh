#!/bin/bash
# interleaved timings: threads=2, threads=1, numpy
cd /work/main
for i in 1 2 3; do
  for mode in 2 1 py; do
    s=$(date +%s.%N)
    if [ $mode = py ]; then python3 scripts/bench/spectra_numpy.py /tmp/grid.tsv > /dev/null; else BANDCROSS_CLI_THREADS=$mode node_modules/.bin/bandcross analyze /tmp/grid.tsv --json > /dev/null; fi
    e=$(date +%s.%N); echo "$mode $(echo "$e - $s" | bc)"
  done
done
