/** Writes JCAMP-DX (X++(Y..Y)) in the AFFN, PAC, SQZ, DIF and DIFDUP forms, for round-trip tests of the reader. */
export type JcampForm = 'AFFN' | 'PAC' | 'SQZ' | 'DIF' | 'DIFDUP';

const SQZ_POS = '@ABCDEFGHI';
const SQZ_NEG = '@abcdefghi';
const DIF_POS = '%JKLMNOPQR';
const DIF_NEG = '%jklmnopqr';
const DUP = ' STUVWXYZs';

function sqz(v: number): string {
  const s = String(Math.abs(v));
  const first = Number(s[0]);
  return (v < 0 ? SQZ_NEG[first] : SQZ_POS[first]) + s.slice(1);
}
function dif(v: number): string {
  const s = String(Math.abs(v));
  const first = Number(s[0]);
  return (v < 0 ? DIF_NEG[first] : DIF_POS[first]) + s.slice(1);
}
function dup(count: number): string {
  const s = String(count);
  return (DUP[Number(s[0])] as string) + s.slice(1);
}

export function writeJcamp(
  x: Float64Array,
  y: Float64Array,
  form: JcampForm,
  opts: { yFactor: number; xFactor?: number; perLine?: number; yUnits?: string; xUnits?: string; title?: string },
): string {
  const n = x.length;
  const xf = opts.xFactor ?? 1;
  const ints = Array.from(y, (v) => Math.round(v / opts.yFactor));
  const per = opts.perLine ?? 10;
  const head = [
    `##TITLE=${opts.title ?? 'synthetic spectrum'}`,
    '##JCAMP-DX=4.24',
    '##DATA TYPE=INFRARED SPECTRUM',
    `##XUNITS=${opts.xUnits ?? '1/CM'}`,
    `##YUNITS=${opts.yUnits ?? 'ABSORBANCE'}`,
    `##XFACTOR=${xf}`,
    `##YFACTOR=${opts.yFactor}`,
    `##FIRSTX=${x[0]}`,
    `##LASTX=${x[n - 1]}`,
    `##NPOINTS=${n}`,
    '##XYDATA=(X++(Y..Y))',
  ];
  const body: string[] = [];
  let i = 0;
  while (i < n) {
    const end = Math.min(n, i + per);
    const xv = Number(((x[i] as number) / xf).toPrecision(12));
    const chunk = ints.slice(i, end);
    let line = `${xv}`;
    if (form === 'AFFN') line += ` ${chunk.join(' ')}`;
    else if (form === 'PAC') line += chunk.map((v) => (v < 0 ? `${v}` : `+${v}`)).join('');
    else if (form === 'SQZ') line += chunk.map(sqz).join('');
    else {
      // DIF: first value SQZ, then differences; the line's last value is repeated at the start of the next line.
      const parts: string[] = [sqz(chunk[0] as number)];
      const diffs = chunk.slice(1).map((v, k) => v - (chunk[k] as number));
      if (form === 'DIF') parts.push(...diffs.map(dif));
      else {
        let k = 0;
        while (k < diffs.length) {
          let run = 1;
          while (k + run < diffs.length && diffs[k + run] === diffs[k]) run++;
          parts.push(dif(diffs[k] as number) + (run > 1 ? dup(run) : ''));
          k += run;
        }
      }
      line += parts.join('');
      body.push(line);
      // The next line starts at the last point of this one (the Y-value check).
      if (end >= n) break;
      i = end - 1;
      continue;
    }
    body.push(line);
    i = end;
  }
  return [...head, ...body, '##END='].join('\n');
}
