#!/usr/bin/env python3
"""Plan three demo aircraft in two demo facilities each through the scalematch API.

Standard library only. Prints one row per plan and flags every plan whose balance
would run above 80 % of its allowed load (the rating divided by the balance's safety
factor), and, as DO NOT RUN, any above the allowed load itself. Exits 1 when the
service answers with an error (an RFC 9457 problem) or cannot be reached.

All figures are estimates only: the facility's approved limits, procedures and
licensed engineering judgement govern.

    python3 plan_demo.py --url http://127.0.0.1:8080
"""

import argparse
import json
import sys
import urllib.error
import urllib.request

# Full-scale aircraft of the invented demo world (docs/demo-world.md). Lengths in m,
# areas in m²; lift and moment slopes per radian, zero-lift angle in degrees.
AIRCRAFT = {
    "Orrin J16": {
        "flight": {"altitude": "12000 m", "mach": 0.78},
        "article": {
            "reference_length": 2.4, "reference_area": 36.5, "span": 16.4, "length": 19.6,
            "frontal_area": 4.4, "wetted_area": 228,
            "aero": {"lift_slope": 4.9, "zero_lift_alpha": -1.6, "cl_max": 1.25,
                     "cd_min": 0.022, "cl_at_cd_min": 0.14, "induced_drag_factor": 0.057,
                     "cm_zero": 0.03, "cm_slope": -1.05},
        },
    },
    "Velmar T64": {
        "flight": {"altitude": "6100 m", "mach": 0.47},
        "article": {
            "reference_length": 2.10, "reference_area": 46.5, "span": 23.4, "length": 23.9,
            "frontal_area": 7.6, "wetted_area": 305,
            "aero": {"lift_slope": 5.3, "zero_lift_alpha": -2.2, "cl_max": 1.45,
                     "cd_min": 0.027, "cl_at_cd_min": 0.18, "induced_drag_factor": 0.042,
                     "cm_zero": 0.05, "cm_slope": -0.85},
        },
    },
    "Pellin P3": {
        "flight": {"altitude": "2100 m", "true_airspeed": "68 m/s"},
        "article": {
            "reference_length": 1.42, "reference_area": 13.4, "span": 9.6, "length": 7.9,
            "frontal_area": 1.7, "wetted_area": 45,
            "aero": {"lift_slope": 5.1, "zero_lift_alpha": -2.4, "cl_max": 1.55,
                     "cd_min": 0.029, "cl_at_cd_min": 0.12, "induced_drag_factor": 0.052,
                     "cm_zero": 0.04, "cm_slope": -0.75},
        },
    },
}

# Which facilities suit which aircraft: the jet in the transonic and the cryogenic
# tunnel, the turboprop in the transonic and the pressurised low-speed tunnel, the
# trainer in the two low-speed tunnels.
PLANS = [
    ("Orrin J16", "tsw-1"), ("Orrin J16", "cn2-05"),
    ("Velmar T64", "tsw-1"), ("Velmar T64", "plp-3"),
    ("Pellin P3", "lsw-2"), ("Pellin P3", "plp-3"),
]

# Share of the allowed load (rating / safety factor) above which a plan is flagged
# for a second look (common practice; the README's rule).
ALLOWED_SHARE_FLAG = 0.80


class ServiceError(Exception):
    """The service answered with a problem, or could not be reached."""


def post(url, body):
    """POST body as JSON to url and return the decoded JSON answer."""
    req = urllib.request.Request(
        url, data=json.dumps(body).encode("utf-8"), method="POST",
        headers={"Content-Type": "application/json", "Accept": "application/json"})
    try:
        with urllib.request.urlopen(req, timeout=60) as resp:
            return json.load(resp)
    except urllib.error.HTTPError as e:
        raw = e.read().decode("utf-8", "replace")
        try:
            p = json.loads(raw)
        except ValueError:
            raise ServiceError(f"HTTP {e.code}: {raw.strip()}") from None
        msg = f"HTTP {p.get('status', e.code)} {p.get('title', '')}: {p.get('detail', '')}"
        for fe in p.get("errors") or []:
            msg += f"\n  {fe.get('field') or '(body)'}: {fe.get('message')}"
        if p.get("limits"):
            msg += "\n  limits: " + ", ".join(p["limits"])
        raise ServiceError(msg) from None
    except (urllib.error.URLError, OSError) as e:
        raise ServiceError(f"cannot reach {url}: {e}") from None


def plan_request(aircraft, facility_id):
    a = AIRCRAFT[aircraft]
    return {
        "flight": a["flight"],
        "article": a["article"],
        "facility_id": facility_id,
        "model": {"scale_min": 0.01, "scale_max": 0.5},
        "alpha": {"from": -4, "to": 16, "step": 1},
        "objective": {"priority": ["mach", "reynolds"], "mach_tolerance": 0.005},
    }


def balance_flag(loads):
    """Return the flag of a load report, or None: "DO NOT RUN" above the allowed
    load (rating / safety factor), "CHECK" above 80 % of it.

    >>> balance_flag({"max_utilization": 0.60, "allowed_utilization": 1 / 1.5})
    'CHECK'
    >>> balance_flag({"max_utilization": 0.52, "allowed_utilization": 1 / 1.5}) is None
    True
    >>> balance_flag({"max_utilization": 0.70, "allowed_utilization": 1 / 1.5})
    'DO NOT RUN'
    >>> balance_flag({}) is None
    True
    """
    util, allowed = loads.get("max_utilization"), loads.get("allowed_utilization")
    if util is None or not allowed:
        return None
    if util > allowed * (1 + 1e-12):
        return "DO NOT RUN"
    if util > ALLOWED_SHARE_FLAG * allowed:
        return "CHECK"
    return None


def scale_ratio(s):
    return f"1:{1 / s:.1f}" if s > 0 else "-"


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--url", default="http://127.0.0.1:8080",
                    help="base URL of the scalematch service (default %(default)s)")
    args = ap.parse_args(argv)
    base = args.url.rstrip("/")

    header = ("aircraft", "facility", "scale", "test M", "p0 kPa", "Re ratio",
              "balance %", "binding")
    fmt = "{:<11} {:<8} {:>8} {:>7} {:>7} {:>9} {:>10}  {}"
    print(fmt.format(*header))
    flagged = []
    for aircraft, facility_id in PLANS:
        try:
            p = post(base + "/v1/plans", plan_request(aircraft, facility_id))
        except ServiceError as e:
            print(f"{aircraft} in {facility_id}: {e}", file=sys.stderr)
            return 1
        loads = p.get("loads") or {}
        util = loads.get("max_utilization")
        binding = ", ".join(b["constraint"] for b in p.get("binding") or []) or "-"
        print(fmt.format(
            aircraft, facility_id, scale_ratio(p["model"]["scale"]),
            f"{p['test']['mach']:.3f}", f"{p['test']['stagnation_pressure'] / 1000:.1f}",
            f"{p['mismatch']['reynolds_ratio']:.3f}",
            "-" if util is None else f"{100 * util:.1f}", binding))
        flag = balance_flag(loads)
        if flag:
            flagged.append((flag, aircraft, facility_id, loads))
    if flagged:
        print()
        for flag, aircraft, facility_id, loads in flagged:
            limiting = loads.get("limiting")
            where = ""
            if limiting:
                where = f" ({limiting.get('component')} at alpha {limiting.get('alpha')} deg)"
            util, allowed = loads["max_utilization"], loads["allowed_utilization"]
            text = (f"{aircraft} in {facility_id}: balance {loads.get('balance_id')} at "
                    f"{100 * util:.1f} % of its rating{where}, {100 * util / allowed:.0f} % of "
                    f"the {100 * allowed:.0f} % allowed (rating / safety factor)")
            if flag == "DO NOT RUN":
                print(f"DO NOT RUN: {text}: above the allowed load")
            else:
                print(f"CHECK: {text}: above {100 * ALLOWED_SHARE_FLAG:.0f} % of the allowed load")
    print()
    print("Estimates only: the facility's approved limits, procedures and licensed "
          "engineering judgement govern.")
    return 0


if __name__ == "__main__":
    sys.exit(main())
