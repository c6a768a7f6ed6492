/**
 * Request examples of the OpenAPI document. The lines are the first lines of the invented "Fernhollow" CO scan
 * (examples/fernhollow-co-cylinder-0192.json, generated from Huber & Herzberg constants with seeded noise; not a
 * measurement). A test posts every example to the running service and expects it to be accepted.
 */

const CO_LINES = [
  ['P', 1, 2139.4218],
  ['P', 2, 2135.5475],
  ['P', 3, 2131.6311],
  ['P', 4, 2127.6854],
  ['R', 0, 2147.0807],
  ['R', 1, 2150.8536],
  ['R', 2, 2154.597],
  ['R', 3, 2158.2982],
  ['R', 4, 2161.9697],
] as const;

export const fitExample = {
  species: '12C16O',
  unit: 'cm-1',
  lines: CO_LINES.map(([branch, j, position]) => ({
    position,
    uncertainty: 0.002,
    assignment: { band: '1-0', branch, j },
  })),
};

/**
 * An invented CO2 scenario: the ν3 band 00⁰1–00⁰0 of 12C16O2 generated from the constants of Rothman & Young,
 * JQSRT 25, 505 (1981) (G, B, D, H of 00001 and 00011) with seeded Gaussian noise σ = 3e-4 cm⁻¹; not a
 * measurement. Only even J″ exist (the odd rotational levels of the ground state are missing).
 */
const CO2_NU3_LINES = [
  ['R', 0, 2349.9174],
  ['R', 2, 2351.4475],
  ['R', 4, 2352.9528],
  ['R', 6, 2354.4338],
  ['R', 8, 2355.8898],
  ['R', 10, 2357.3211],
  ['R', 12, 2358.7278],
  ['R', 14, 2360.1094],
  ['R', 16, 2361.4665],
  ['R', 18, 2362.7992],
  ['R', 20, 2364.1063],
  ['P', 2, 2347.5763],
  ['P', 4, 2345.9848],
  ['P', 6, 2344.3691],
  ['P', 8, 2342.7273],
  ['P', 10, 2341.0626],
  ['P', 12, 2339.3729],
  ['P', 14, 2337.6583],
  ['P', 16, 2335.9196],
  ['P', 18, 2334.1569],
  ['P', 20, 2332.3693],
  ['P', 22, 2330.5578],
] as const;

export const co2FitExample = {
  species: 'CO2',
  lines: CO2_NU3_LINES.map(([branch, j, position]) => ({
    position,
    uncertainty: 0.0003,
    assignment: { upper: { v: [0, 0, 1], l: 0 }, lower: { v: [0, 0, 0], l: 0 }, branch, j },
  })),
};

/** The same lines without assignments: the service assigns them against the reference constants. */
export const unassignedExample = {
  species: '12C16O',
  lines: CO_LINES.map(([, , position]) => ({ position, uncertainty: 0.002 })),
};

export const checkExample = { ...unassignedExample, tolerances: { calibrationOffset: 0.02 } };

export const predictionExample = { species: 'H35Cl', bands: ['1-0'], jMax: 5, temperature: 296 };

/** A synthetic absorbance spectrum: one Lorentzian line at 2143.0 cm-1 (FWHM 0.3) on a flat baseline, with a fixed ripple. */
export const peaksExample = (() => {
  const x: number[] = [];
  const y: number[] = [];
  for (let i = 0; i <= 80; i++) {
    const xi = 2141 + i * 0.05;
    const d = (xi - 2143) / 0.15;
    x.push(Number(xi.toFixed(2)));
    y.push(Number((0.01 + 0.5 / (1 + d * d) + 0.0005 * Math.sin(i * 2.7)).toFixed(5)));
  }
  return { spectrum: { x, y, xUnit: 'cm-1', yUnit: 'absorbance' } };
})();

/** The fit example as a CSV line list (read by header name). */
export const csvExample = `position,uncertainty,band,branch,j\n${CO_LINES.map(([b, j, p]) => `${p},0.002,1-0,${b},${j}`).join('\n')}\n`;

/** The fit example as a JCAMP-DX peak table (x y pairs), species given in the query string. */
export const jcampExample = [
  '##TITLE=Fernhollow CO cylinder 0192, 1-0 band (invented example)',
  '##JCAMP-DX=4.24',
  '##DATA TYPE=INFRARED PEAK TABLE',
  '##XUNITS=1/CM',
  '##YUNITS=ABSORBANCE',
  `##NPOINTS=${CO_LINES.length}`,
  '##PEAK TABLE=(XY..XY)',
  ...CO_LINES.map(([, , p]) => `${p} 0.5`),
  '##END=',
  '',
].join('\n');

/** Two fit requests as NDJSON (one body a line). */
export const ndjsonExample = `${JSON.stringify(fitExample)}\n${JSON.stringify(unassignedExample)}\n`;

/** The peaks example as a CSV spectrum (two columns, header naming the y quantity). */
export const csvSpectrumExample = `wavenumber,absorbance\n${peaksExample.spectrum.x.map((x, i) => `${x},${peaksExample.spectrum.y[i]}`).join('\n')}\n`;

/** The peaks example as a JCAMP-DX spectrum: ##XYDATA=(X++(Y..Y)) in AFFN, ten Y values a line. */
export const jcampSpectrumExample = (() => {
  const { x, y } = peaksExample.spectrum;
  const rows: string[] = [];
  for (let k = 0; k < y.length; k += 10) rows.push(`${x[k]} ${y.slice(k, k + 10).join(' ')}`);
  return [
    '##TITLE=one absorption line (invented example)',
    '##JCAMP-DX=4.24',
    '##DATA TYPE=INFRARED SPECTRUM',
    '##XUNITS=1/CM',
    '##YUNITS=ABSORBANCE',
    `##FIRSTX=${x[0]}`,
    `##LASTX=${x[x.length - 1]}`,
    `##NPOINTS=${x.length}`,
    '##XFACTOR=1',
    '##YFACTOR=1',
    '##XYDATA=(X++(Y..Y))',
    ...rows,
    '##END=',
    '',
  ].join('\n');
})();
