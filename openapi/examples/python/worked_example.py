#!/usr/bin/env python3
"""A worked example of Ebullio's v1 API in plain Python (standard library only).

The scenario is invented: a small fruit-syrup plant concentrates 8 t/h of clarified juice (modelled
as pure sucrose in water) from 12 % to 40 % in one forced-circulation body under vacuum, heated by
low-pressure steam. The example

1. designs the single effect (area, steam, economy),
2. sweeps the body pressure to see what a deeper vacuum buys in area,
3. runs a larger sweep (body pressure x feed temperature) as a job: it asks for
   ``Prefer: respond-async``, polls ``GET /v1/jobs/{id}`` until the job has ended, then fetches
   the result,

and prints a JSON summary on stdout (progress goes to stderr).

    python3 worked_example.py --base-url http://localhost:8080 --api-key "$EBULLIO_API_KEY"

The base URL and key may also come from EBULLIO_BASE_URL and EBULLIO_API_KEY.

Results are preliminary engineering estimates: evaporators are pressure and vacuum equipment whose
design falls under local codes and must be checked by a licensed engineer; hot syrup burns.
"""

from __future__ import annotations

import argparse
import json
import os
import sys
import urllib.error
from typing import Any

from ebullio_client import EbullioClient, EbullioProblem

# The invented duty. Quantities are typed with their units, as an engineer would write them.
DESIGN: dict[str, Any] = {
    "liquor": "sucrose",
    "feed": {"massFlow": "8 t/h", "massFraction": "12 %", "temperature": "55 degC"},
    "product": {"massFraction": "40 %"},
    "steam": {"pressure": "1.2 barg"},
    "body": {"pressure": "25 kPa", "overallHeatTransferCoefficient": 1500},
}

PRESSURE_SWEEP: dict[str, Any] = {
    "operation": "single-effect",
    "base": DESIGN,
    "vary": [{"field": "body.pressure", "from": 15, "to": 35, "steps": 5}],
}

JOB_SWEEP: dict[str, Any] = {
    "operation": "single-effect",
    "base": DESIGN,
    "vary": [
        {"field": "body.pressure", "values": [15, 20, 25, 30]},
        {"field": "feed.temperature", "from": 40, "to": 60, "steps": 5},
    ],
}


def design_summary(result: dict[str, Any]) -> dict[str, Any]:
    return {
        "area": result["area"],
        "steamMassFlow": result["steam"]["massFlow"],
        "vaporMassFlow": result["vapor"]["massFlow"],
        "productMassFlow": result["product"]["massFlow"],
        "steamEconomy": result["steamEconomy"],
        "boilingPointRise": result["boilingPointRise"],
        "temperatureDifference": result["temperatureDifference"],
        "duty": result["duty"],
        "warnings": [w["code"] for w in result.get("warnings", [])],
    }


def sweep_summary(answer: dict[str, Any]) -> dict[str, Any]:
    rows = []
    for row in answer["rows"]:
        point: dict[str, Any] = {"values": row["values"], "status": row["status"]}
        if row["status"] == "ok":
            point.update(area=row["result"]["area"], steamEconomy=row["result"]["steamEconomy"],
                         steamMassFlow=row["result"]["steam"]["massFlow"])
        else:
            point["problem"] = row["problem"].get("detail")
        rows.append(point)
    ok = [r for r in rows if r["status"] == "ok"]
    smallest = min(ok, key=lambda r: r["area"]) if ok else None
    return {
        "count": answer["count"],
        "succeeded": answer["succeeded"],
        "failed": answer["failed"],
        "unitsCharged": answer["unitsCharged"],
        "smallestArea": smallest,
        "rows": rows,
    }


def run_job(ebullio: EbullioClient, timeout: float, poll_interval: float) -> dict[str, Any]:
    started = ebullio.start_job("/v1/sweeps", JOB_SWEEP)
    if started["job"] is None:
        # The server may answer at once whatever the preference (RFC 7240): the result is here.
        print("the server answered the sweep at once (no job)", file=sys.stderr)
        return {"async": False, "result": sweep_summary(started["result"])}
    job = started["job"]
    print(f"job {job['id']} {job['state']}: polling {started['location']}", file=sys.stderr)
    final = ebullio.wait_for_job(started["location"], timeout=timeout, poll_interval=poll_interval)
    print(f"job {final['id']} {final['state']} ({final['progress']['done']}/{final['progress']['total']})", file=sys.stderr)
    summary: dict[str, Any] = {
        "async": True,
        "id": final["id"],
        "state": final["state"],
        "progress": final["progress"],
        "unitsCharged": final["unitsCharged"],
    }
    if final["state"] == "succeeded":
        summary["result"] = sweep_summary(ebullio.job_result(final))
    elif final.get("problem"):
        summary["problem"] = final["problem"]
    return summary


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description="Design, sweep and a sweep job on Ebullio's API (an invented syrup evaporator).")
    parser.add_argument("--base-url", default=os.environ.get("EBULLIO_BASE_URL", "http://localhost:8080"),
                        help="where the API answers, without /v1 (env EBULLIO_BASE_URL)")
    parser.add_argument("--api-key", default=os.environ.get("EBULLIO_API_KEY"), help="an API key (env EBULLIO_API_KEY)")
    parser.add_argument("--job-timeout", type=float, default=300.0, help="seconds to wait for the job")
    parser.add_argument("--poll-interval", type=float, default=0.5, help="seconds between polls unless the server says Retry-After")
    args = parser.parse_args(argv)
    if not args.api_key:
        parser.error("an API key is needed: --api-key or EBULLIO_API_KEY")

    ebullio = EbullioClient(args.base_url, args.api_key)
    try:
        print("1. designing the evaporator", file=sys.stderr)
        design = ebullio.single_effect(DESIGN)
        print("2. sweeping the body pressure", file=sys.stderr)
        sweep = ebullio.sweep(PRESSURE_SWEEP)
        summary: dict[str, Any] = {
            "scenario": "invented: 8 t/h of juice (as sucrose) from 12 % to 40 % in one body",
            "design": {"request": DESIGN, "result": design_summary(design)},
            "pressureSweep": {"request": PRESSURE_SWEEP, "result": sweep_summary(sweep)},
            "cautions": [c["code"] for c in design.get("cautions", [])],
        }
        print("3. running a larger sweep as a job", file=sys.stderr)
        summary["job"] = {"request": JOB_SWEEP, **run_job(ebullio, args.job_timeout, args.poll_interval)}
    except EbullioProblem as problem:
        print(f"refused: {problem}", file=sys.stderr)
        for error in problem.errors:
            print(f"  {error.get('field')}: {error.get('message')}", file=sys.stderr)
        return 1
    except (urllib.error.URLError, TimeoutError, ConnectionError) as err:
        print(f"cannot reach {args.base_url}: {getattr(err, 'reason', err)}", file=sys.stderr)
        return 1
    json.dump(summary, sys.stdout, indent=2)
    sys.stdout.write("\n")
    return 0


if __name__ == "__main__":
    sys.exit(main())
