// npm run mutation [-- --mutate 'src/derive/**/*.ts'] : StrykerJS over src/ (see stryker.config.mjs), then the
// mutation score per folder. One folder at a time keeps its own incremental file, test/mutation/<folder>.json, so
// that a run over one folder neither reads nor discards the results of another.
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';

const args = process.argv.slice(2);
const at = args.indexOf('--mutate');
const pattern = at >= 0 ? args[at + 1] : undefined;
const folder = pattern ? /^src\/([\w-]+)\//.exec(pattern)?.[1] : undefined;
const extra = args.includes('--incrementalFile')
  ? []
  : ['--incrementalFile', join('test', 'mutation', `${folder ?? (pattern ? 'custom' : 'all')}.json`)];

const run = spawnSync('npx', ['stryker', 'run', ...args, ...extra], { stdio: 'inherit' });
if (run.status !== 0) process.exit(run.status ?? 1);

const reportPath = join('reports', 'mutation', 'mutation.json');
if (!existsSync(reportPath)) process.exit(0);
const report = JSON.parse(readFileSync(reportPath, 'utf8'));
const detected = new Set(['Killed', 'Timeout']);
const undetected = new Set(['Survived', 'NoCoverage']);
const byFolder = new Map();
for (const [file, { mutants }] of Object.entries(report.files)) {
  const key = dirname(file).replace(/^.*?src\//, 'src/');
  const row = byFolder.get(key) ?? { killed: 0, survived: 0, noCoverage: 0, other: 0 };
  for (const m of mutants) {
    if (detected.has(m.status)) row.killed++;
    else if (m.status === 'Survived') row.survived++;
    else if (m.status === 'NoCoverage') row.noCoverage++;
    else if (!undetected.has(m.status)) row.other++;
  }
  byFolder.set(key, row);
}
console.log('\nMutation score per folder (killed + timeout) / (killed + timeout + survived + no coverage)');
console.log('| folder | killed | survived | no coverage | score |');
console.log('| --- | ---: | ---: | ---: | ---: |');
for (const [key, r] of [...byFolder].sort(([a], [b]) => a.localeCompare(b))) {
  const valid = r.killed + r.survived + r.noCoverage;
  const score = valid > 0 ? ((100 * r.killed) / valid).toFixed(1) : 'n/a';
  console.log(`| ${key} | ${r.killed} | ${r.survived} | ${r.noCoverage} | ${score} % |`);
}
