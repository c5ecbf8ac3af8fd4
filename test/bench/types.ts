/** One benchmark measurement, printed by the bench runner. */
export interface BenchResult {
  name: string;
  value: number;
  unit: string;
  note?: string;
}
