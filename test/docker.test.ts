import { readdirSync, readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { loadConfig } from '../services/config.js';

/**
 * No Docker engine or cluster runs here: these checks read the deployment files for what must hold (probes on the
 * service's own routes, a non-root user, an init process, resources, an Indexed Job), so that a change cannot
 * quietly break them.
 */
describe('deployment files', () => {
  it('the image starts the server as npm start does, with the same node arguments', () => {
    const d = readFileSync('Dockerfile', 'utf8');
    const cmd = /^CMD (\[.*\])$/m.exec(d);
    expect(cmd, 'an exec-form CMD').not.toBeNull();
    const start = (JSON.parse(readFileSync('package.json', 'utf8')) as { scripts: { start: string } }).scripts.start;
    expect(JSON.parse(cmd?.[1] as string)).toEqual(start.trim().split(/\s+/));
  });

  it('the Dockerfile builds in stages, runs as a non-root user under tini, with a health check', () => {
    const d = readFileSync('Dockerfile', 'utf8');
    expect((d.match(/^FROM /gm) ?? []).length).toBeGreaterThanOrEqual(2);
    expect(d).toMatch(/^USER node$/m);
    expect(d).toMatch(/ENTRYPOINT \["\/usr\/bin\/tini", "--"\]/);
    expect(d).toMatch(/HEALTHCHECK .*\n.*\/healthz/);
    expect(d).toMatch(/npm ci --omit=dev[^\n]*--ignore-scripts/);
    // The build stage copies every source tree that tsconfig.build.json includes.
    const build = JSON.parse(readFileSync('tsconfig.build.json', 'utf8')) as { include: string[] };
    for (const dir of build.include) expect(d).toContain(`COPY ${dir} ./${dir}`);
    // npm run build is scripts/build.mjs.
    expect(JSON.parse(readFileSync('package.json', 'utf8')).scripts.build).toBe('node scripts/build.mjs');
    expect(d).toContain('COPY scripts/build.mjs ./scripts/build.mjs');
  });
  it('the image runs a maintained Node LTS line that the package declares it supports', () => {
    // Node.js release schedule (from memory): 20 ended 2026-04-30; 22 is maintained to 2027-04-30, 24 to 2028-04-30.
    const maintained = [22, 24];
    const d = readFileSync('Dockerfile', 'utf8');
    const majors = [...d.matchAll(/^FROM node:(\d+)/gm)].map((m) => Number(m[1]));
    expect(majors.length).toBeGreaterThanOrEqual(2);
    for (const m of majors) expect(maintained).toContain(m);
    const engines = JSON.parse(readFileSync('package.json', 'utf8')).engines.node as string;
    const floor = /^>=(\d+)\.(\d+)\.\d+$/.exec(engines);
    expect(floor, engines).not.toBeNull();
    for (const m of majors) expect(m).toBeGreaterThanOrEqual(Number(floor?.[1]));
  });
  it('Kubernetes: probes on /healthz and /readyz, resources, HPA, PDB and an Indexed Job', () => {
    const files = readdirSync('docker/k8s')
      .map((f) => readFileSync(`docker/k8s/${f}`, 'utf8'))
      .join('\n---\n');
    expect(files).toMatch(/readinessProbe:\s*\n\s*httpGet: \{ path: \/readyz/);
    expect(files).toMatch(/livenessProbe:\s*\n\s*httpGet: \{ path: \/healthz/);
    expect(files).toMatch(/resources:\s*\n\s*requests:/);
    expect(files).toMatch(/kind: HorizontalPodAutoscaler/);
    expect(files).toMatch(/kind: PodDisruptionBudget/);
    expect(files).toMatch(/completionMode: Indexed/);
    expect(files).toMatch(/runAsNonRoot: true/);
  });
  it('compose runs two replicas behind nginx, which re-sends a request only when a replica cannot be reached', () => {
    const c = readFileSync('docker/compose.yaml', 'utf8');
    expect(c).toMatch(/replicas: 2/);
    const n = readFileSync('docker/nginx.conf', 'utf8');
    const retry = /proxy_next_upstream ([^;]+);/.exec(n)?.[1]?.split(/\s+/) ?? [];
    expect(retry).toContain('error');
    for (const slow of ['timeout', 'http_502', 'http_503', 'http_504']) expect(retry).not.toContain(slow);
  });

  it('the pieces agree: nginx body limit ≥ BODY_LIMIT, read timeout > the deadline, grace periods nest', () => {
    const config = loadConfig({});
    const n = readFileSync('docker/nginx.conf', 'utf8');
    const size = /client_max_body_size (\d+)m;/.exec(n)?.[1];
    expect(Number(size) * 1024 * 1024).toBeGreaterThanOrEqual(config.bodyLimit);
    const readTimeout = Number(/proxy_read_timeout (\d+)s;/.exec(n)?.[1]);
    expect(readTimeout * 1000).toBeGreaterThan(config.processingDeadlineMs);
    const k8s = readFileSync('docker/k8s/deployment.yaml', 'utf8');
    const k8sGrace = Number(/terminationGracePeriodSeconds: (\d+)/.exec(k8s)?.[1]);
    const preStopMs = Number(/setTimeout\(\(\) => \{\}, (\d+)\)/.exec(k8s)?.[1] ?? 0);
    expect(preStopMs).toBeGreaterThan(0);
    expect(k8sGrace * 1000).toBeGreaterThan(config.shutdownGraceMs + preStopMs);
    const compose = readFileSync('docker/compose.yaml', 'utf8');
    const composeGrace = Number(/stop_grace_period: (\d+)s/.exec(compose)?.[1]);
    expect(composeGrace * 1000).toBeGreaterThan(config.shutdownGraceMs);
    // The loopback check runs the production defaults: no protection switched off.
    const check = readFileSync('docker/loopback-check.sh', 'utf8');
    for (const off of ['WORKERS=0', 'RATE_LIMIT_PER_MINUTE=0', 'MAX_EVENT_LOOP_DELAY_MS=0'])
      expect(check).not.toContain(off);
  });
});
