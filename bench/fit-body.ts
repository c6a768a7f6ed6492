/** The 60-line CO 1-0 list (P and R to J = 30, σ 0.001 cm⁻¹, assigned) of the throughput bench, as a JSON body. */
export function fitBody(): string {
  const lines = [];
  for (let j = 0; j < 30; j++) {
    const x = (J: number) => J * (J + 1);
    const nu = (v1: number, J1: number, J0: number) =>
      2143.27 + (1.9225 - 0.0175 * v1) * x(J1) - 1.9225 * x(J0) - 6.1e-6 * (x(J1) ** 2 - x(J0) ** 2);
    lines.push({ position: nu(1, j + 1, j), uncertainty: 0.001, assignment: { band: '1-0', branch: 'R', j } });
    lines.push({ position: nu(1, j, j + 1), uncertainty: 0.001, assignment: { band: '1-0', branch: 'P', j: j + 1 } });
  }
  return JSON.stringify({ species: 'CO', lines });
}
