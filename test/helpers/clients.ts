/**
 * A fresh client address per call (10.x.y.z, counting up). The service runs with its `npm start` defaults, rate
 * limit included; tests that send more than a minute's quota stand for many clients, one address each, so that
 * each case still reaches the code under test instead of the 429.
 */
let next = 0;
export function nextClient(): string {
  const n = next++;
  return `10.${(n >> 16) & 255}.${(n >> 8) & 255}.${n & 255}`;
}
