"""Time Debian python3-iapws on the points Ebullio's steam benchmark uses (read from stdin as JSON).

Called by tests/bench/steam.ts as: /usr/bin/python3 tests/bench/steam_iapws_timing.py < points.json
Prints one JSON line: median seconds per (p, T) state and per saturation state over the repeats.
"""
import json
import statistics
import sys
import time

from iapws import IAPWS97

data = json.load(sys.stdin)
pt = data["pt"]
sat = data["sat"]
repeats = data["repeats"]


def run(fn):
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def pt_states():
    for p, T in pt:
        IAPWS97(P=p / 1e6, T=T).h


def sat_states():
    for p in sat:
        IAPWS97(P=p / 1e6, x=0).h
        IAPWS97(P=p / 1e6, x=1).h


print(json.dumps({"ptSeconds": run(pt_states) / len(pt), "satSeconds": run(sat_states) / len(sat)}))
