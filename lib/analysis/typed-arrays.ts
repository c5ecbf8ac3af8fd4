/**
 * Bounds-checked element access for the analysis's typed arrays and row lists. With
 * `noUncheckedIndexedAccess` an indexed read is `T | undefined`; a cast (`x[i] as number`) would
 * silence that and let an off-by-one read become NaN far from its cause. `valueAt` proves the bound
 * instead and fails at the faulty index. It is small enough for V8 to inline, so hot loops keep their
 * speed (`npm run bench analysis`).
 */
export function valueAt<T>(list: ArrayLike<T>, index: number): T {
  const value = list[index];
  if (value === undefined) throw new RangeError(`index ${index} is outside 0…${list.length - 1}`);
  return value;
}
