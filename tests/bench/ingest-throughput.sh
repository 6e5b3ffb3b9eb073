#!/usr/bin/env bash
# Ingest throughput of the running service for a 10,000-resource transaction and 10,000 NDJSON lines,
# on SQLite and on a throwaway PostgreSQL 15. Prints resources/s. Not a test: numbers vary run to run.
# Usage (from the repository root): tests/bench/ingest-throughput.sh [runs]
set -euo pipefail
runs=${1:-3}
root=$(cd "$(dirname "$0")/../.." && pwd)
work=$(mktemp -d /tmp/measureeval-bench-XXXX)
port=${BENCH_PORT:-5311}
pgport=${BENCH_PG_PORT:-5411}
pgbin=/usr/lib/postgresql/15/bin

python3 "$root/tests/bench/make-ingest-data.py" "$work"
dotnet build -c Release "$root/src/MeasureEval.Api" -v q -nologo > "$work/build.log"

server=""
stop_server() { if [ -n "$server" ]; then kill "$server" 2>/dev/null || true; wait "$server" 2>/dev/null || true; server=""; fi; }
start_server() { # $1 provider, $2 connection string
  Storage__Provider="$1" Storage__ConnectionString="$2" ASPNETCORE_URLS="http://127.0.0.1:$port" \
    dotnet "$root/src/MeasureEval.Api/bin/Release/net10.0/MeasureEval.Api.dll" --contentRoot "$work" > "$work/server-$1.log" 2>&1 &
  server=$!
  for _ in $(seq 1 100); do curl -sf "http://127.0.0.1:$port/health/ready" > /dev/null && return 0; sleep 0.2; done
  echo "server did not become ready; see $work/server-$1.log" >&2; exit 1
}
measure() { # $1 label, $2 content type, $3 file, $4 url path
  for i in $(seq 1 "$runs"); do
    t=$(curl -s -o "$work/response.json" -w '%{time_total}' -X POST -H "Content-Type: $2" --data-binary "@$3" "http://127.0.0.1:$port$4")
    python3 - "$1" "$t" "$i" "$work/response.json" <<'PY'
import json, sys
label, seconds, run, path = sys.argv[1], float(sys.argv[2]), sys.argv[3], sys.argv[4]
body = json.load(open(path))
n = len(body["entry"]) if body["resourceType"] == "Bundle" else next(p["valueInteger"] for p in body["parameter"] if p["name"] == "stored")
print(f"{label:<28} run {run}: {n} resources in {seconds:6.2f} s = {n / seconds:8.0f} resources/s")
PY
  done
}

pgdata=""
cleanup() { stop_server; if [ -n "$pgdata" ]; then runuser -u postgres -- "$pgbin/pg_ctl" -D "$pgdata" -m immediate stop > /dev/null 2>&1 || true; fi; rm -rf "$work"; }
trap cleanup EXIT

start_server Sqlite "Data Source=$work/bench.db"
measure "SQLite transaction" application/fhir+json "$work/transaction-10k.json" /
measure "SQLite \$ingest NDJSON" application/fhir+ndjson "$work/resources-10k.ndjson" '/$ingest'
stop_server

if [ -x "$pgbin/initdb" ]; then
  chown postgres:postgres "$work"
  pgdata="$work/pg"
  runuser -u postgres -- "$pgbin/initdb" -D "$pgdata" -A trust -U postgres --no-sync > /dev/null
  runuser -u postgres -- "$pgbin/pg_ctl" -D "$pgdata" -o "-c listen_addresses=127.0.0.1 -p $pgport -k $work" -l "$work/pg.log" -w start > /dev/null
  start_server Postgres "Host=127.0.0.1;Port=$pgport;Username=postgres;Database=postgres"
  measure "PostgreSQL transaction" application/fhir+json "$work/transaction-10k.json" /
  measure "PostgreSQL \$ingest NDJSON" application/fhir+ndjson "$work/resources-10k.ndjson" '/$ingest'
fi
