import { describe, expect, it } from 'vitest';
import { checkExample, peaksExample } from '../../services/openapi/examples.js';
import { useApp } from '../helpers/app.js';

const app = useApp();

describe('/v1/peaks takes the spectrum body of /v1/fits and /v1/checks', () => {
  it('species, options and tolerances are accepted (not an error) and do not change the peaks', async () => {
    const plain = await app().inject({ method: 'POST', url: '/v1/peaks', payload: peaksExample });
    expect(plain.statusCode, plain.body).toBe(200);
    const asFit = await app().inject({
      method: 'POST',
      url: '/v1/peaks',
      payload: {
        species: '12C16O',
        options: { temperature: 296 },
        tolerances: checkExample.tolerances,
        ...peaksExample,
      },
    });
    expect(asFit.statusCode, asFit.body).toBe(200);
    expect(asFit.json().peaks).toEqual(plain.json().peaks);
    // The example holds one Lorentzian line at 2143.00 cm-1 (services/openapi/examples.ts); 0.01 cm-1 is a fifth
    // of the 0.05 cm-1 sampling step.
    expect(plain.json().peaks).toHaveLength(1);
    expect(Math.abs(plain.json().peaks[0].position - 2143)).toBeLessThan(0.01);
  });

  it('a CSV spectrum with ?species= (as for /v1/fits) is accepted', async () => {
    const csv = `wavenumber,absorbance\n${peaksExample.spectrum.x.map((x, i) => `${x},${peaksExample.spectrum.y[i]}`).join('\n')}\n`;
    const r = await app().inject({
      method: 'POST',
      url: '/v1/peaks?species=12C16O',
      headers: { 'content-type': 'text/csv' },
      payload: csv,
    });
    expect(r.statusCode, r.body).toBe(200);
  });

  it('each peak field says its unit (x converted to cm-1 even when sent in µm)', async () => {
    const um = { spectrum: { ...peaksExample.spectrum, x: peaksExample.spectrum.x.map((x) => 1e4 / x), xUnit: 'um' } };
    const r = await app().inject({ method: 'POST', url: '/v1/peaks', payload: um });
    expect(r.statusCode, r.body).toBe(200);
    expect(r.json().units).toEqual({
      position: 'cm-1',
      uncertainty: 'cm-1',
      width: 'cm-1',
      intensity: 'cm-1',
      height: 'absorbance',
      step: 'cm-1',
      noise: 'absorbance',
    });
    expect(Math.abs(r.json().peaks[0].position - 2143)).toBeLessThan(0.01);
  });
});
