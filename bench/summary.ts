/**
 * The two parts of `npm run bench` run in separate processes; each records its ratios here
 * (bench/out/ratios.json) and the second prints them all beside their goals, with the machine's load and the
 * longest functions in src/. Nothing here is asserted.
 */
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { loadavg } from 'node:os';
import { functionLengths } from './function-lengths.js';

export interface Ratio {
  readonly measure: string;
  readonly value: number;
  /** How the value is written, e.g. "0.42" or "6.1×". */
  readonly shown: string;
  readonly goal: string;
  readonly met: boolean;
}

const file = 'bench/out/ratios.json';

/**
 * Adds this part's ratios to the file (`fresh`: starts it anew). A measure recorded again (one part run on its own
 * twice) replaces the earlier figure, which keeps its place in the list, so the summary shows each measure once.
 */
export function recordRatios(ratios: readonly Ratio[], fresh = false): void {
  const before = !fresh && existsSync(file) ? (JSON.parse(readFileSync(file, 'utf8')) as Ratio[]) : [];
  const latest = new Map(ratios.map((r) => [r.measure, r]));
  const kept = before.map((r) => latest.get(r.measure) ?? r);
  const added = ratios.filter((r) => !before.some((b) => b.measure === r.measure));
  writeFileSync(file, JSON.stringify([...kept, ...added], null, 1));
}

export const load = (): string =>
  loadavg()
    .map((x) => x.toFixed(1))
    .join(' / ');

export function printSummary(): void {
  const ratios = existsSync(file) ? (JSON.parse(readFileSync(file, 'utf8')) as Ratio[]) : [];
  console.log(`\nEvery ratio of issue 15 beside its goal (load average 1 / 5 / 15 min at the end: ${load()})`);
  console.log('| measure | ratio | goal | met |');
  console.log('| --- | ---: | ---: | :---: |');
  for (const r of ratios) console.log(`| ${r.measure} | ${r.shown} | ${r.goal} | ${r.met ? 'yes' : 'no'} |`);
  const longest = functionLengths('src').slice(0, 5);
  console.log(
    `\nLongest functions in src/ (lines, bench/function-lengths.ts): ${longest.map((f) => `${f.name} ${f.lines} (${f.file})`).join(', ')}`,
  );
}
