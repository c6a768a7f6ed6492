#!/usr/bin/env bash
# Scale-out check on one machine: two instances of the service behind Debian's nginx on loopback, a bounded
# autocannon load of 60-line fits, one instance killed mid-run. Prints the answers by status. The instances run
# with the production defaults (workers, rate limit, load shedding all on) plus TRUST_PROXY=1 as behind nginx; the
# load comes from one client, so the rate limit (RATE_LIMIT_PER_MINUTE per client and instance) answers most of it
# with 429: what must be zero is 5xx and connection errors. Ports are picked free. Then, through nginx: a body of
# exactly BODY_LIMIT bytes must reach the service (its own problem+json answer, not nginx's 413 page), and the
# instance left must still answer /readyz. Prints one JSON line of figures and `PASS` or `FAIL: …`; exits 1 on FAIL.
# Needs: nginx (apt-get install nginx), a build (npm run build). Everything listens on 127.0.0.1 only.
# DURATION (s, default 20) bounds the load.
set -euo pipefail
cd "$(dirname "$0")/.."
DURATION=${DURATION:-20}
work=$(mktemp -d)
trap 'kill $(jobs -p) 2>/dev/null || true; nginx -p "$work" -c nginx.conf -s stop 2>/dev/null || true; [ -n "${KEEP_LOGS:-}" ] && cat "$work/error.log" >&2; rm -rf "$work"' EXIT
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
# Started as root, nginx's workers run as an unprivileged user: they must reach the temp directories (a body larger
# than the in-memory buffer is spooled there; without access nginx answers 500 to every large upload).
chmod 755 "$work"
chmod 777 "$work/body" "$work/proxy"
for i in $(seq 1 50); do
  curl -fs "http://127.0.0.1:$P1/readyz" > /dev/null && curl -fs "http://127.0.0.1:$P2/readyz" > /dev/null && break
  sleep 0.2
done
nginx -p "$work" -c nginx.conf
sleep 0.5
# Kill one instance a quarter of the way through.
( sleep $((DURATION / 4)); kill -"${SIGNAL:-TERM}" "$(cat "$work/api-$P2.pid")"; echo "sent SIG${SIGNAL:-TERM} to the instance on $P2 at $((DURATION / 4)) s" ) &
node bench/load-fits.mjs "http://127.0.0.1:$P0/v1/fits" "$DURATION" > "$work/load.json"
cat "$work/load.json"
# A body of exactly BODY_LIMIT (32 MiB by default) bytes: nginx must pass it on (client_max_body_size ≥ BODY_LIMIT).
head -c $((32 * 1024 * 1024)) /dev/zero | tr '\0' ' ' > "$work/big.json"
big=$(curl -s -o "$work/big.out" -w '%{http_code} %{content_type}' -H 'content-type: application/json' \
  --data-binary @"$work/big.json" "http://127.0.0.1:$P0/v1/fits")
ready=$(curl -s -o /dev/null -w '%{http_code}' "http://127.0.0.1:$P0/readyz")
echo "{\"bodyAtLimit\":\"$big\",\"readyzAfterKill\":$ready}"
node -e '
  const load = JSON.parse(require("fs").readFileSync(process.argv[1], "utf8"));
  const [bigStatus, bigType] = process.argv[2].split(" ");
  const fivexx = Object.entries(load.byStatus).filter(([k]) => k >= "500").reduce((s, [, n]) => s + n, 0);
  const fails = [];
  if (fivexx > 0) fails.push(`${fivexx} answers 5xx`);
  if (load.errors > 0 || load.timeouts > 0) fails.push(`${load.errors} connection errors, ${load.timeouts} timeouts`);
  if (!(load.byStatus["200"] > 0)) fails.push("no fit answered 200");
  if (!/problem\+json/.test(bigType ?? "") || !(bigStatus >= "400" && bigStatus < "500"))
    fails.push(`a BODY_LIMIT body got ${process.argv[2]} (nginx refused it, or the service failed)`);
  if (process.argv[3] !== "200") fails.push(`/readyz of the instance left answered ${process.argv[3]}`);
  console.log(fails.length ? `FAIL: ${fails.join("; ")}` : "PASS");
  process.exit(fails.length ? 1 : 0);
' "$work/load.json" "$big" "$ready"
