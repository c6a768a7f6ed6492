import { readdirSync, readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';

/**
 * No Docker engine or cluster runs here: these checks read the deployment files for what must hold (probes on the
 * service's own routes, a non-root user, an init process, resources, an Indexed Job), so that a change cannot
 * quietly break them.
 */
describe('deployment files', () => {
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
  it('compose runs two replicas behind nginx, which retries a failed upstream once', () => {
    const c = readFileSync('docker/compose.yaml', 'utf8');
    expect(c).toMatch(/replicas: 2/);
    const n = readFileSync('docker/nginx.conf', 'utf8');
    expect(n).toMatch(/proxy_next_upstream error timeout http_502 http_503 non_idempotent/);
  });
});
