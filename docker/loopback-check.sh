#!/usr/bin/env bash
# Scale-out check on one machine: two instances of the service behind Debian's nginx on loopback, a bounded
# autocannon load of 60-line fits, one instance killed mid-run. Prints how many requests failed.
# Needs: nginx (apt-get install nginx), a build (npm run build). Everything listens on 127.0.0.1 only.
set -euo pipefail
cd "$(dirname "$0")/.."
DURATION=${DURATION:-20}
work=$(mktemp -d)
trap 'kill $(jobs -p) 2>/dev/null || true; nginx -p "$work" -c nginx.conf -s stop 2>/dev/null || true; rm -rf "$work"' EXIT
for port in 18081 18082; do
  HOST=127.0.0.1 PORT=$port WORKERS=0 RATE_LIMIT_PER_MINUTE=0 MAX_EVENT_LOOP_DELAY_MS=0 LOG_LEVEL=warn \
    node dist/services/server.js > "$work/api-$port.log" 2>&1 &
  echo $! > "$work/api-$port.pid"
done
sed -e 's/server api:8080 max_fails=1 fail_timeout=5s;/server 127.0.0.1:18081 max_fails=1 fail_timeout=5s;\n    server 127.0.0.1:18082 max_fails=1 fail_timeout=5s;/' \
    -e 's/listen 8080;/listen 127.0.0.1:18080;/' \
    -e 's/^worker_processes auto;/worker_processes 1;\npid nginx.pid;\nerror_log error.log;/' \
    -e 's/^http {/http {\n  access_log off;\n  client_body_temp_path body;\n  proxy_temp_path proxy;/' docker/nginx.conf > "$work/nginx.conf"
mkdir -p "$work/body" "$work/proxy"
for i in $(seq 1 50); do
  curl -fs http://127.0.0.1:18081/readyz > /dev/null && curl -fs http://127.0.0.1:18082/readyz > /dev/null && break
  sleep 0.2
done
nginx -p "$work" -c nginx.conf
sleep 0.5
# Kill one instance a quarter of the way through.
( sleep $((DURATION / 4)); kill -"${SIGNAL:-TERM}" "$(cat "$work/api-18082.pid")"; echo "sent SIG${SIGNAL:-TERM} to the instance on 18082 at $((DURATION / 4)) s" ) &
node bench/load-fits.mjs "http://127.0.0.1:18080/v1/fits" "$DURATION"
