#!/usr/bin/env python3
"""Single-patient $evaluate-measure latency under a loopback load: N client threads, each asking for one patient's
individual report of one measure, round-robin over the demo patients and the nine measures. Prints median and p95.
Not a test. Usage: tests/bench/evaluate-latency.py BASE_URL [threads] [requests-per-thread]"""
import json, statistics, sys, threading, time, urllib.request

base = sys.argv[1].rstrip('/')
threads = int(sys.argv[2]) if len(sys.argv) > 2 else 4
per_thread = int(sys.argv[3]) if len(sys.argv) > 3 else 500
measures = ["colorectal-cancer-screening", "breast-cancer-screening", "cervical-cancer-screening", "depression-screening",
            "influenza-vaccination", "immunizations-by-age-2", "diabetes-a1c-below-8", "diabetes-a1c-above-9",
            "hypertension-bp-below-140-90"]
page = json.load(urllib.request.urlopen(f"{base}/Patient?_count=500"))
patients = [e["resource"]["id"] for e in page.get("entry", []) if e["resource"]["resourceType"] == "Patient"]
latencies, errors, lock = [], [0], threading.Lock()

def client(k):
    mine = []
    for i in range(per_thread):
        n = k * per_thread + i
        url = (f"{base}/Measure/{measures[n % len(measures)]}/$evaluate-measure?periodStart=2026-01-01&periodEnd=2026-12-31"
               f"&subject=Patient/{patients[n % len(patients)]}")
        t = time.perf_counter()
        try:
            with urllib.request.urlopen(url) as r:
                r.read()
        except Exception:
            with lock:
                errors[0] += 1
            continue
        mine.append((time.perf_counter() - t) * 1000)
    with lock:
        latencies.extend(mine)

for warm in range(50):
    urllib.request.urlopen(f"{base}/Measure/{measures[warm % 9]}/$evaluate-measure?subject=Patient/{patients[warm]}").read()
start = time.perf_counter()
workers = [threading.Thread(target=client, args=(k,)) for k in range(threads)]
[w.start() for w in workers]
[w.join() for w in workers]
wall = time.perf_counter() - start
latencies.sort()
p95 = latencies[int(0.95 * (len(latencies) - 1))]
print(f"{len(latencies)} requests, {threads} clients, {errors[0]} errors, {len(latencies)/wall:.0f} requests/s; "
      f"median {statistics.median(latencies):.2f} ms, p95 {p95:.2f} ms")
