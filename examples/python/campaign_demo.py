#!/usr/bin/env python3
"""Run a 200-condition test campaign of the Orrin J16 in two demo facilities through
the scalematch API and write its CSV table.

Standard library only. Builds an envelope of 10 altitudes x 20 Mach numbers (200
conditions), posts it to POST /v1/campaigns for tsw-1 and cn2-05 with one model
and 1 % of Reynolds ratio offered for level sharing (which makes it large enough,
800 condition-facility plans, for a service with a store to run it as a job),
and, when the service answers 202 Accepted (a campaign it runs as a job), polls
the job's Location for its progress until it is done. Then it asks for the result
as text/csv (one row per condition and alpha point), writes it to --csv, and
prints the summary. Exits 1 when the service answers with an error (an RFC 9457
problem), the job fails or is cancelled, or the service cannot be reached.

All figures are estimates only: the facility's approved limits, procedures and
licensed engineering judgement govern.

    python3 campaign_demo.py --url http://127.0.0.1:8080 --csv campaign.csv
"""

import argparse
import csv
import io
import json
import sys
import time
import urllib.error
import urllib.request

# The Orrin J16 of the invented demo world (docs/demo-world.md): lengths in m, areas
# in m^2; lift and moment slopes per radian, zero-lift angle in degrees.
ARTICLE = {
    "reference_length": 2.4, "reference_area": 36.5, "span": 16.4, "length": 19.6,
    "frontal_area": 4.4, "wetted_area": 228,
    "aero": {"lift_slope": 4.9, "zero_lift_alpha": -1.6, "cl_max": 1.25,
             "cd_min": 0.022, "cl_at_cd_min": 0.14, "induced_drag_factor": 0.057,
             "cm_zero": 0.03, "cm_slope": -1.05},
}


class ServiceError(Exception):
    """The service answered with a problem, or could not be reached."""


def envelope(altitudes=10, machs=20):
    """Return the grid of the campaign: altitudes in m and Mach numbers.

    >>> alts, ms = envelope()
    >>> len(alts) * len(ms)
    200
    >>> alts[0], alts[-1], ms[0], ms[-1]
    (0.0, 12000.0, 0.4, 0.82)
    """
    alts = [12000.0 * i / (altitudes - 1) for i in range(altitudes)]
    ms = [round(0.4 + 0.42 * j / (machs - 1), 4) for j in range(machs)]
    return alts, ms


def campaign_request():
    alts, ms = envelope()
    return {
        "article": ARTICLE,
        "alpha": {"from": -2, "to": 10, "step": 2},
        "grid": {"altitudes": alts, "machs": ms},
        "facilities": [
            {"facility_id": "tsw-1", "installation": {"balance_id": "int-b1", "model_mass": 14}},
            {"facility_id": "cn2-05", "installation": {"balance_id": "int-k", "model_mass": 2.5}},
        ],
        "model": {"policy": "one_model"},
        "objective": {"aim": "lowest_reynolds_ratio"},
        "level_sharing": {"reynolds_cost_percent": 1},
    }


def problem_text(code, raw):
    """Return an RFC 9457 problem as one readable message.

    >>> problem_text(400, '{"status": 400, "title": "Invalid input", "detail": "1 field is invalid", "errors": [{"field": "grid.machs", "message": "required"}]}')
    'HTTP 400 Invalid input: 1 field is invalid\\n  grid.machs: required'
    """
    try:
        p = json.loads(raw)
    except ValueError:
        return f"HTTP {code}: {raw.strip()}"
    msg = f"HTTP {p.get('status', code)} {p.get('title', '')}: {p.get('detail', '')}"
    for fe in p.get("errors") or []:
        msg += f"\n  {fe.get('field') or '(body)'}: {fe.get('message')}"
    return msg


def call(method, url, body=None, accept="application/json"):
    """Send a request and return (status, headers, body bytes)."""
    data = None if body is None else json.dumps(body).encode("utf-8")
    req = urllib.request.Request(url, data=data, method=method,
                                 headers={"Content-Type": "application/json", "Accept": accept})
    try:
        with urllib.request.urlopen(req, timeout=600) as resp:
            return resp.status, resp.headers, resp.read()
    except urllib.error.HTTPError as e:
        raise ServiceError(problem_text(e.code, e.read().decode("utf-8", "replace"))) from None
    except (urllib.error.URLError, OSError) as e:
        raise ServiceError(f"cannot reach {url}: {e}") from None


def wait_for_job(base, location, every=0.5):
    """Poll a campaign job until it is done, printing its progress on stderr,
    and return its result as CSV. GET answers 202 with the job's state and
    progress while it is queued or running, 200 with the result once it is
    done, and the job's problem if it failed (409 if it was cancelled)."""
    while True:
        status, _, raw = call("GET", base + location, accept="text/csv")
        if status == 200:
            print(file=sys.stderr)
            return raw
        job = json.loads(raw)
        # total is 0 until a replica has begun the job: then only the state says anything.
        steps = f": {job['done']} of {job['total']} steps" if job.get("total") else ""
        print(f"\r{job.get('state')}{steps}".ljust(40), end="", file=sys.stderr, flush=True)
        time.sleep(every)


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--url", default="http://127.0.0.1:8080",
                    help="base URL of the scalematch service (default %(default)s)")
    ap.add_argument("--csv", default="campaign.csv", help="file to write the CSV table to")
    args = ap.parse_args(argv)
    base = args.url.rstrip("/")
    req = campaign_request()
    try:
        status, headers, raw = call("POST", base + "/v1/campaigns", req, accept="text/csv")
        if status == 202:
            raw = wait_for_job(base, headers.get("Location"))
    except ServiceError as e:
        print(f"campaign: {e}", file=sys.stderr)
        return 1
    text = raw.decode("utf-8")
    with open(args.csv, "w", encoding="utf-8", newline="") as f:
        f.write(text)
    rows = list(csv.DictReader(io.StringIO(text)))
    served = {r["label"] for r in rows if r["served"] == "true"}
    labels = {r["label"] for r in rows}
    by_facility = {}
    for r in rows:
        if r["served"] == "true" and r["alpha_deg"] == "-2":
            by_facility.setdefault(r["facility_id"], []).append(float(r["reynolds_ratio"]))
    print(f"{len(served)} of {len(labels)} conditions served; {len(rows)} rows written to {args.csv}")
    for fid, ratios in sorted(by_facility.items()):
        print(f"  {fid}: {len(ratios)} conditions, Reynolds ratio {min(ratios):.3f} to {max(ratios):.3f}")
    if len(labels) != 200:
        print(f"campaign: expected 200 conditions, the table has {len(labels)}", file=sys.stderr)
        return 1
    print()
    print("Estimates only: the facility's approved limits, procedures and licensed "
          "engineering judgement govern.")
    return 0


if __name__ == "__main__":
    sys.exit(main())
