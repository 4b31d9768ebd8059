#!/usr/bin/python3
"""Table for scripts/bench_survey: Google Benchmark's JSON of bench_survey, plus the program's
`minimize` (one start) and `basins --grid 200` timed as processes here, in the same run."""
import json
import os
import statistics
import subprocess
import sys
import time

FORMULA = "(valve_a^2 - 1)^2 + (valve_b^2 - 1)^2 + 0.5*valve_a*valve_b"
METHODS = ["newton", "saddle-free-newton", "trust-region-exact", "bfgs", "gradient-descent"]


def timed(command, repeats):
    """Median wall time of a command, and its output (the last run's)."""
    times = []
    out = ""
    for _ in range(repeats):
        start = time.perf_counter()
        out = subprocess.run(command, check=True, capture_output=True, text=True).stdout
        times.append(time.perf_counter() - start)
    return statistics.median(times), out


def main():
    bench = json.load(open(sys.argv[1]))
    program = sys.argv[2]
    median = {b["run_name"]: b for b in bench["benchmarks"] if b.get("aggregate_name") == "median"}

    def get(name):
        return median.get(name)

    load = os.getloadavg()[0]
    print(f"host: {bench['context'].get('host_name', '?')}, {bench['context']['num_cpus']} CPUs, "
          f"load average {load:.2f}, {bench['context']['date']}")
    print()
    print("| method | one start (`minimize` in-process) | basin start, 1 thread (wall / CPU) | "
          "200×200 map, every core | `saddlewise minimize` process | `saddlewise basins --grid 200` process |")
    print("|---|---|---|---|---|---|")
    for index, method in enumerate(METHODS):
        one = get(f"BM_MinimizeOneStart/method:{index}")
        single = get(f"BM_BasinMap200/method:{index}/threads:1/min_time:0.500/real_time")
        every = get(f"BM_BasinMap200/method:{index}/threads:0/min_time:0.500/real_time")
        minimize_s, _ = timed([program, "minimize", FORMULA, "--from", "valve_a=0.3,valve_b=1.1", "--method", method,
                               "--summary", "--json"], 5)
        basins_s, out = timed([program, "basins", FORMULA, "--box", "valve_a=-1.6:1.6,valve_b=-1.6:1.6", "--grid",
                               "200", "--method", method, "--json"], 3)
        seconds = json.loads(out)["methods"][0]["seconds"]
        one_us = one["real_time"] if one else float("nan")
        print(f"| {method} | {one_us:.1f} µs ({one['iterations']:.0f} it.) "
              f"| {single['us_per_start_wall'] * 1e6:.1f} / {single['us_per_start_cpu']:.1f} µs "
              f"({single['us_per_start_wall'] * 1e6 / one_us:.2f}× one start) "
              f"| {every['real_time']:.0f} ms ({every['us_per_start_wall'] * 1e6:.1f} µs per start) "
              f"| {minimize_s * 1e3:.1f} ms "
              f"| {basins_s * 1e3:.0f} ms (runs {seconds * 1e3:.0f} ms: {seconds / 40000 * 1e6:.1f} µs per start, "
              f"one `minimize` process costs as much as {minimize_s / (seconds / 40000):.0f} basin starts) |")
    print()
    for name in ["BM_CriticalMapTwoValve/1/real_time", "BM_CriticalMapTwoValve/0/real_time",
                 "BM_CriticalMapHimmelblau/real_time"]:
        b = get(name)
        if b:
            print(f"{name}: {b['real_time']:.1f} ms, {b['points']:.0f} points")


if __name__ == "__main__":
    main()
