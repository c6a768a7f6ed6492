#!/usr/bin/env bash
# Scale-out check on one machine: two instances of the service behind Debian's nginx on loopback, a bounded
# autocannon load of 60-line fits, one instance killed mid-run. Prints the answers by status. The instances run
# with the production defaults (workers, rate limit, load shedding all on) plus TRUST_PROXY=1 as behind nginx; the
# load comes from one client, so the rate limit (RATE_LIMIT_PER_MINUTE per client and instance) answers most of it
# with 429: what must be zero is 5xx and connection errors. Ports are picked free.
# Needs: nginx (apt-get install nginx), a build (npm run build). Everything listens on 127.0.0.1 only.
set -euo pipefail
cd "$(dirname "$0")/.."
DURATION=${DURATION:-20}
work=$(mktemp -d)
trap 'kill $(jobs -p) 2>/dev/null || true; nginx -p "$work" -c nginx.conf -s stop 2>/dev/null || true; rm -rf "$work"' EXIT
free_port() { node -e "const s=require('net').createServer().listen(0,'127.0.0.1',()=>{console.log(s.address().port);s.close()})"; }
P0=$(free_port); P1=$(free_port); P2=$(free_port)
for port in $P1 $P2; do
  HOST=127.0.0.1 PORT=$port TRUST_PROXY=1 LOG_LEVEL=warn \
    node dist/services/server.js > "$work/api-$port.log" 2>&1 &
  echo $! > "$work/api-$port.pid"
done
sed -e "s/server api:8080 max_fails=1 fail_timeout=5s;/server 127.0.0.1:$P1 max_fails=1 fail_timeout=5s;\n    server 127.0.0.1:$P2 max_fails=1 fail_timeout=5s;/" \
    -e "s/listen 8080;/listen 127.0.0.1:$P0;/" \
    -e 's/^worker_processes auto;/worker_processes 1;\npid nginx.pid;\nerror_log error.log;/' \
    -e 's/^http {/http {\n  access_log off;\n  client_body_temp_path body;\n  proxy_temp_path proxy;/' docker/nginx.conf > "$work/nginx.conf"
mkdir -p "$work/body" "$work/proxy"
for i in $(seq 1 50); do
  curl -fs "http://127.0.0.1:$P1/readyz" > /dev/null && curl -fs "http://127.0.0.1:$P2/readyz" > /dev/null && break
  sleep 0.2
done
nginx -p "$work" -c nginx.conf
sleep 0.5
# Kill one instance a quarter of the way through.
( sleep $((DURATION / 4)); kill -"${SIGNAL:-TERM}" "$(cat "$work/api-$P2.pid")"; echo "sent SIG${SIGNAL:-TERM} to the instance on $P2 at $((DURATION / 4)) s" ) &
node bench/load-fits.mjs "http://127.0.0.1:$P0/v1/fits" "$DURATION"
