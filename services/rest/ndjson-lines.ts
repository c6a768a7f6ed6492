/**
 * NDJSON lines from a byte stream, counted while splitting: a line longer than `maxBytes` is never buffered; its
 * bytes are dropped up to the next newline and it comes out as `{ tooLong }` (how many bytes it had), so that the
 * batch answers it in-band and goes on. Lines are decoded as UTF-8 once complete (a character is never split).
 */
export type NdjsonLine = { readonly text: string } | { readonly tooLong: number };

const NEWLINE = 0x0a;

export async function* ndjsonLines(
  input: AsyncIterable<Buffer | string>,
  maxBytes: number,
): AsyncGenerator<NdjsonLine> {
  let parts: Buffer[] = [];
  let size = 0;
  let skipping = false;
  const finish = (): NdjsonLine => {
    const line: NdjsonLine = skipping ? { tooLong: size } : { text: Buffer.concat(parts, size).toString('utf8') };
    parts = [];
    size = 0;
    skipping = false;
    return line;
  };
  for await (const chunk of input) {
    const buf = typeof chunk === 'string' ? Buffer.from(chunk) : chunk;
    let start = 0;
    while (start < buf.length) {
      const nl = buf.indexOf(NEWLINE, start);
      const end = nl === -1 ? buf.length : nl;
      const piece = end - start;
      if (!skipping && size + piece > maxBytes) {
        skipping = true;
        parts = [];
      }
      if (!skipping) parts.push(buf.subarray(start, end));
      size += piece;
      if (nl === -1) break;
      yield finish();
      start = nl + 1;
    }
  }
  if (size > 0 || skipping) yield finish();
}
