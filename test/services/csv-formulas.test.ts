import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { nextClient } from '../helpers/clients.js';
import { rowsOf } from '../helpers/csv-rows.js';
import { assignedFitBody } from '../helpers/requests.js';

/**
 * Line ids and sources are the caller's text, echoed in the CSV tables labs open in spreadsheets. A cell that starts
 * with =, +, -, @, a tab or a carriage return is read there as a formula (`=HYPERLINK(…)` runs on opening): such text
 * is written with a leading apostrophe, common practice against CSV formula injection. Numbers, and numeric text
 * such as a negative value, stay as they are. Defaults of `npm start`.
 */
const app = useApp();

describe('CSV cells a spreadsheet would run', () => {
  it('ids and sources that look like formulas are written as text; numeric ids and negative numbers are not', async () => {
    const body = assignedFitBody('HCl', ['1-0'], 12, 0.002, 3);
    const ids = ['=HYPERLINK("http://example.invalid","x")', '+cmd|calc', '@SUM(1)', '-2+3', '\tTAB', -5, 7, ' =1+1'];
    const lines = body.lines.map((l, i) => ({
      ...l,
      ...(i < ids.length ? { id: ids[i] } : {}),
      source: i === 0 ? '=1+1' : 'scan A',
    }));
    const r = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      payload: { ...body, lines },
      headers: { accept: 'text/csv' },
      remoteAddress: nextClient(),
    });
    expect(r.statusCode).toBe(200);
    const rows = rowsOf(r.body);
    const head = rows[0] as string[];
    const idCol = head.indexOf('id');
    const sourceCol = head.indexOf('source');
    const residualCol = head.indexOf('residual (cm-1)');
    const byIndex = new Map(rows.slice(1).map((c) => [Number(c[0]), c]));
    expect(byIndex.get(0)?.[idCol]).toBe(`'=HYPERLINK("http://example.invalid","x")`);
    expect(byIndex.get(1)?.[idCol]).toBe("'+cmd|calc");
    expect(byIndex.get(2)?.[idCol]).toBe("'@SUM(1)");
    expect(byIndex.get(3)?.[idCol]).toBe("'-2+3");
    expect(byIndex.get(4)?.[idCol]).toBe("'\tTAB");
    expect(byIndex.get(5)?.[idCol]).toBe('-5');
    expect(byIndex.get(6)?.[idCol]).toBe('7');
    expect(byIndex.get(7)?.[idCol]).toBe("' =1+1");
    expect(byIndex.get(0)?.[sourceCol]).toBe("'=1+1");
    expect(byIndex.get(1)?.[sourceCol]).toBe('scan A');
    // Residuals of both signs stay numbers: some are negative, none is prefixed.
    const residuals = rows.slice(1).map((c) => c[residualCol] as string);
    expect(residuals.some((x) => x.startsWith('-'))).toBe(true);
    for (const x of residuals) expect(Number.isFinite(Number(x))).toBe(true);
  });
});
