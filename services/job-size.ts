/** How big a request is, in lines (a spectrum counts a hundredth of its points): the unit of admission control. */
export function jobSize(body: { lines?: readonly unknown[]; spectrum?: { x: readonly unknown[] } }): number {
  return (body.lines?.length ?? 0) + Math.ceil((body.spectrum?.x.length ?? 0) / 100);
}
