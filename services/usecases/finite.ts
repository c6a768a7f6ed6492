/**
 * Every number a use case returns must be finite: JSON has no NaN or Infinity, and a client must never read one as
 * a result. Input inside the schema's bounds can still overflow somewhere in the arithmetic; then the request is
 * answered 422 naming the quantity (its path in the response), never 500.
 */
export class NonFiniteResult extends Error {
  constructor(
    readonly quantity: string,
    readonly value: string,
  ) {
    super(`the computed ${quantity} is ${value}: the input is accepted, but it drives this quantity out of range`);
    this.name = 'NonFiniteResult';
  }
}

/** Throws NonFiniteResult at the first non-finite number (depth-first, iterative); returns the value otherwise. */
export function assertFinite<T>(value: T): T {
  // A first walk without paths (every answer takes it); the paths are built only to name what was found.
  if (allFinite(value)) return value;
  const stack: [unknown, string][] = [[value, '']];
  while (stack.length > 0) {
    const [v, path] = stack.pop() as [unknown, string];
    if (typeof v === 'number') {
      if (!Number.isFinite(v)) throw new NonFiniteResult(path || '(result)', String(v));
    } else if (Array.isArray(v)) {
      for (let i = v.length - 1; i >= 0; i--) stack.push([v[i], path ? `${path}/${i}` : String(i)]);
    } else if (v !== null && typeof v === 'object') {
      for (const [k, x] of Object.entries(v as Record<string, unknown>)) stack.push([x, path ? `${path}/${k}` : k]);
    }
  }
  return value;
}

/** Whether every number in `value` is finite: numbers are tested where they are met, only objects are stacked. */
function allFinite(value: unknown): boolean {
  if (typeof value === 'number') return Number.isFinite(value);
  const stack: unknown[] = [value];
  while (stack.length > 0) {
    const v = stack.pop();
    if (v === null || typeof v !== 'object') continue;
    if (Array.isArray(v)) {
      for (let i = v.length - 1; i >= 0; i--) {
        const x: unknown = v[i];
        if (typeof x === 'number') {
          if (!Number.isFinite(x)) return false;
        } else if (x !== null && typeof x === 'object') stack.push(x);
      }
    } else
      for (const k in v) {
        if (!Object.hasOwn(v, k)) continue;
        const x: unknown = (v as Record<string, unknown>)[k];
        if (typeof x === 'number') {
          if (!Number.isFinite(x)) return false;
        } else if (x !== null && typeof x === 'object') stack.push(x);
      }
  }
  return true;
}
