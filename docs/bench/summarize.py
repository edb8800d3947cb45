#!/usr/bin/env python3
"""summarize.py OUT: for each benchmark in alternate.sh's OUT, the range of
cpu-ns/op (ns/op where a benchmark reports no CPU time) of the first binary
and of the second, in µs, and the median over the runs of second ÷ first
within the same run."""
import collections
import re
import statistics
import sys

cur, run = None, 0
binaries, order = [], []
values = collections.defaultdict(lambda: collections.defaultdict(list))
by_run = collections.defaultdict(dict)
for line in open(sys.argv[1]):
    m = re.match(r"### (\S+) run (\d+)", line)
    if m:
        cur, run = m.group(1), int(m.group(2))
        if cur not in binaries:
            binaries.append(cur)
        continue
    if not (cur and line.startswith("Benchmark")):
        continue
    f = line.split()
    name = re.sub(r"-\d+$", "", f[0])
    units = {f[i]: float(f[i - 1]) for i in range(2, len(f)) if f[i].endswith("/op")}
    v = units.get("cpu-ns/op", units.get("ns/op"))
    if v is None:
        continue
    if name not in order:
        order.append(name)
    values[name][cur].append(v)
    by_run[(name, run)][cur] = v


def span(xs):
    return f"{min(xs) / 1e3:.0f}-{max(xs) / 1e3:.0f}" if xs else "-"


print(f"{'benchmark':60s} {'first µs':>12s} {'second µs':>12s}  second/first (median)")
for n in order:
    first = values[n].get(binaries[0], [])
    second = values[n].get(binaries[1], []) if len(binaries) > 1 else []
    ratios = [d[binaries[1]] / d[binaries[0]] for (k, _), d in by_run.items()
              if k == n and len(binaries) > 1 and binaries[0] in d and binaries[1] in d]
    r = f"{statistics.median(ratios):.3f}" if ratios else "-"
    print(f"{n:60s} {span(first):>12s} {span(second):>12s}  {r}")
