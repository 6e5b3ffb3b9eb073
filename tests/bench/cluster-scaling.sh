#!/usr/bin/env bash
# Population report time against node count, on one machine: a single node (cluster mode off), then cluster mode with
# 1, 2 and 3 nodes (64 partitions), all over one throwaway PostgreSQL 15, Redis membership. Prints medians, the
# per-partition overhead and the projected throughput per added core. Not a test: figures move with the machine's load.
# Usage (from the repository root): tests/bench/cluster-scaling.sh [patients (0 = the 500-patient demo)] [runs]
# PARTITIONS (default 64) and NODES (default "1 2 3") change the cluster runs; WARMUPS (default 1) untimed reports first.
set -euo pipefail
patients=${1:-0}
runs=${2:-7}
partitions=${PARTITIONS:-64}
node_counts=${NODES:-1 2 3}
warmups=${WARMUPS:-1}
root=$(cd "$(dirname "$0")/../.." && pwd)
work=$(mktemp -d /tmp/measureeval-cluster-bench-XXXX)
pgbin=/usr/lib/postgresql/15/bin
base_port=${BENCH_PORT:-5511}
pgport=$((base_port + 90))
redisport=$((base_port + 91))
dll="$root/src/MeasureEval.Api/bin/Release/net10.0/MeasureEval.Api.dll"

pids=()
redis=""
pgdata=""
stop_nodes() { for p in "${pids[@]}"; do kill "$p" 2>/dev/null || true; wait "$p" 2>/dev/null || true; done; pids=(); }
cleanup() {
  stop_nodes
  if [ -n "$redis" ]; then kill "$redis" 2>/dev/null || true; wait "$redis" 2>/dev/null || true; fi
  if [ -n "$pgdata" ]; then runuser -u postgres -- "$pgbin/pg_ctl" -D "$pgdata" -m immediate stop > /dev/null 2>&1 || true; fi
  rm -rf "$work"
}
trap cleanup EXIT

dotnet build -c Release "$root/src/MeasureEval.Api" -v q -nologo > "$work/build.log"
chown postgres:postgres "$work"
pgdata="$work/pg"
runuser -u postgres -- "$pgbin/initdb" -D "$pgdata" -A trust -U postgres -E UTF8 --no-locale --no-sync > /dev/null
runuser -u postgres -- "$pgbin/pg_ctl" -D "$pgdata" -o "-c listen_addresses=127.0.0.1 -p $pgport -k $work -c fsync=off -c max_connections=200" -l "$work/pg.log" -w start > /dev/null
psql -q -h 127.0.0.1 -p "$pgport" -U postgres -c 'CREATE DATABASE measureeval' > /dev/null
store="Host=127.0.0.1;Port=$pgport;Database=measureeval;Username=postgres"
redis-server --port "$redisport" --bind 127.0.0.1 --save '' --appendonly no --dir "$work" > "$work/redis.log" 2>&1 &
redis=$!

start_node() { # $1 http port, $2 silo port or "" for a single node without cluster mode, $3 cluster id
  local env=(Storage__Provider=Postgres "Storage__ConnectionString=$store" Auth__Disabled=true)
  if [ -n "$2" ]; then
    env+=(Cluster__Enabled=true "Cluster__ClusterId=$3" "Cluster__RedisConnectionString=127.0.0.1:$redisport" "Cluster__SiloPort=$2"
      "Cluster__Partitions=$partitions" Cluster__ProbeTimeout=00:00:01 Cluster__MissedProbesLimit=2 Cluster__VotesForDeathDeclaration=1
      Cluster__TableRefreshTimeout=00:00:02)
  fi
  (cd "$root" && exec env "${env[@]}" dotnet "$dll" --urls "http://127.0.0.1:$1") > "$work/node-$1.log" 2>&1 &
  pids+=($!)
  for _ in $(seq 1 300); do curl -sf "http://127.0.0.1:$1/health/ready" > /dev/null && return 0; sleep 0.2; done
  echo "node $1 did not become ready; see $work/node-$1.log" >&2; exit 1
}

# Load the population through a single node (cluster mode off).
start_node "$base_port" "" ""
if [ "$patients" -eq 0 ]; then
  for f in "$root"/fhir-bundles/demo/bundle-*.json; do
    curl -sf -X POST -H 'Content-Type: application/fhir+json' --data-binary @"$f" "http://127.0.0.1:$base_port/" > /dev/null
  done
  population="demo population (500 patients)"; count=500
else
  dotnet run -c Release --project "$root/src/MeasureEval.Cli" -- generate --patients "$patients" --seed 20261201 --out "$work/gen" > /dev/null 2>&1
  for f in "$work"/gen/*.ndjson; do
    curl -sf -X POST -H 'Content-Type: application/fhir+ndjson' --data-binary @"$f" "http://127.0.0.1:$base_port/\$ingest" > /dev/null
  done
  population="synthetic population ($patients patients, seed 20261201)"; count=$patients
fi

# All nine measures in one population report: one pass over the index for all of them.
python3 - "$root/measures" > "$work/parameters.json" <<'PY'
import glob, json, os, sys
ids = sorted(json.load(open(f))["id"] for f in glob.glob(os.path.join(sys.argv[1], "*.measure.json")))
params = [{"name": "periodStart", "valueDate": "2026-01-01"}, {"name": "periodEnd", "valueDate": "2026-12-31"},
          {"name": "reportType", "valueCode": "population"}] + [{"name": "measureId", "valueString": i} for i in ids]
print(json.dumps({"resourceType": "Parameters", "parameter": params}))
PY

cpu_ticks() { local t=0; for p in "${pids[@]}"; do t=$((t + $(awk '{print $14 + $15}' "/proc/$p/stat"))); done; echo "$t"; }
measure() { # $1 label, $2 http port; prints "label median_s cpu_s_per_report"
  for _ in $(seq 1 "$warmups"); do
    curl -sf -o /dev/null -X POST -H 'Content-Type: application/fhir+json' --data-binary @"$work/parameters.json" "http://127.0.0.1:$2/Measure/\$evaluate-measure"
  done
  local before times=() after
  before=$(cpu_ticks)
  for _ in $(seq 1 "$runs"); do
    times+=("$(curl -sf -o /dev/null -w '%{time_total}' -X POST -H 'Content-Type: application/fhir+json' --data-binary @"$work/parameters.json" "http://127.0.0.1:$2/Measure/\$evaluate-measure")")
  done
  after=$(cpu_ticks)
  python3 -c "import statistics,sys; t=sorted(map(float,sys.argv[4:])); print(sys.argv[1], statistics.median(t), (int(sys.argv[3])-int(sys.argv[2]))/100/len(t))" "$1" "$before" "$after" "${times[@]}" >> "$work/results.txt"
}

measure single "$base_port"
stop_nodes
for n in $node_counts; do
  cluster="bench-$(date +%s%N)"
  for i in $(seq 1 "$n"); do start_node $((base_port + i)) $((base_port + 10 + i)) "$cluster"; done
  sleep 3 # let every node see the others (table refresh 2 s) before timing
  measure "nodes-$n" $((base_port + 1))
  stop_nodes
done

load=$(cut -d' ' -f1-3 /proc/loadavg)
python3 - "$work/results.txt" "$population" "$count" "$partitions" "$runs" "$load" "$(nproc)" "$warmups" <<'PY'
import sys
rows = {l.split()[0]: (float(l.split()[1]), float(l.split()[2])) for l in open(sys.argv[1])}
population, patients, partitions, runs, load, cores, warmups = sys.argv[2], int(sys.argv[3]), int(sys.argv[4]), sys.argv[5], sys.argv[6], int(sys.argv[7]), sys.argv[8]
single, single_cpu = rows["single"]
print(f"{population}, nine measures, population report, {partitions} partitions, median of {runs} after {warmups} warm-up(s); {cores} cores; load average after: {load}")
for key, label in [("single", "single node (cluster off)"), ("nodes-1", "cluster, 1 node"), ("nodes-2", "cluster, 2 nodes"), ("nodes-3", "cluster, 3 nodes")]:
    if key not in rows:
        continue
    t, cpu = rows[key]
    print(f"  {label:<26} {t:7.3f} s  ({t / single:5.1f}x single)  CPU {cpu:6.2f} s per report (all nodes)")
overhead = (rows["nodes-1"][0] - single) / partitions
overhead_cpu = (rows["nodes-1"][1] - single_cpu) / partitions
per_patient = single / patients
print(f"  per-partition overhead: ({rows['nodes-1'][0]:.3f} - {single:.3f}) / {partitions} = {overhead * 1000:.1f} ms wall, {overhead_cpu * 1000:.1f} ms CPU")
print(f"  single node: {patients / single:,.0f} patients/s on one core ({per_patient * 1e6:.0f} us per patient, wall)")
# A core added to the cluster runs partitions of patients/partitions patients each, paying the overhead once per partition.
per_partition = patients / partitions
projected = per_partition / (overhead + per_partition * per_patient)
print(f"  projected per added core at {per_partition:.0f} patients per partition: {projected:,.0f} patients/s"
      f" ({projected / (patients / single) * 100:.0f} % of a single node's core); break-even (overhead = evaluation) at {overhead / per_patient:,.0f} patients per partition")
PY
