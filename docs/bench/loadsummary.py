#!/usr/bin/env python3
"""loadsummary.py OUT: loadtool.sh's runs by store, connections and build: the
distinct plans' share of the health checks' rate (%), the process's CPU a
distinct plan and a health check (µs), their ratio (%), plans a group commit
and, over PostgreSQL, the backends' CPU a distinct plan (µs)."""
import collections
import re
import sys

runs = collections.defaultdict(list)
cur = None
patterns = {
    "share %": (r"^plans per health check", r"distinct ([\d.]+) %"),
    "CPU µs": (r"^distinct +POST", r"CPU (\d+)"),
    "health µs": (r"^health", r"CPU (\d+)"),
    "ratio %": (r"^CPU of", r"distinct ([\d.]+) %"),
    "a group": (r"group commits", r"([\d.]+) records"),
}
for line in open(sys.argv[1]):
    if line.startswith("=="):
        f = line.split()
        cur = (f[2], f[3], f[1])
        be = re.search(r"backends (\d+)", line)
        runs[cur].append({"load": f[5].split("=")[1], "backends µs": be.group(1) if be else "-"})
        continue
    for key, (where, what) in patterns.items():
        if cur and re.search(where, line):
            m = re.search(what, line)
            if m:
                runs[cur][-1][key] = m.group(1)
for k in sorted(runs):
    rs = runs[k]
    cols = ["share %", "CPU µs", "health µs", "ratio %", "a group", "backends µs", "load"]
    print(" ".join(k), "|", " | ".join(f"{c} " + ", ".join(r.get(c, "-") for r in rs) for c in cols))
