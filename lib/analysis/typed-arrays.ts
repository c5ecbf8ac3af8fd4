/**
 * Bounds-checked element access for the analysis's typed arrays and row lists. With
 * `noUncheckedIndexedAccess` an indexed read is `T | undefined`; a cast (`x[i] as number`) would
 * silence that and let an off-by-one read become NaN far from its cause. `valueAt` proves the bound
 * instead and fails at the faulty index. Shared by many array kinds its one read turns generic and slow in
 * V8, so the hottest loops use the single-kind readers below (`npm run bench analysis`).
 */
export function valueAt<T>(list: ArrayLike<T>, index: number): T {
  const value = list[index];
  if (value === undefined) throw new RangeError(`index ${index} is outside 0…${list.length - 1}`);
  return value;
}

/**
 * `valueAt` for a Float64Array only. One helper serving every array kind sees many element kinds
 * at its one indexed read and V8 then takes the slow generic path there; the analysis's hottest
 * loops (sliding medians, spike and jump filters) read Float64Arrays through this one instead, so
 * its read stays specialised.
 */
export function float64At(list: Float64Array, index: number): number {
  const value = list[index];
  if (value === undefined) throw new RangeError(`index ${index} is outside 0…${list.length - 1}`);
  return value;
}

/** `float64At` for Int32Array index lists. */
export function int32At(list: Int32Array, index: number): number {
  const value = list[index];
  if (value === undefined) throw new RangeError(`index ${index} is outside 0…${list.length - 1}`);
  return value;
}
