/** Unit conversions at the edges of the analysis; every function name says both units. */
import { ZERO_CELSIUS_K } from "./constants";

/** °C → K. */
export function celsiusToKelvin(temperatureC: number): number {
  return temperatureC + ZERO_CELSIUS_K;
}
/** K → °C. */
export function kelvinToCelsius(temperatureK: number): number {
  return temperatureK - ZERO_CELSIUS_K;
}
/** °F → K (exact definition: °F = °C · 9/5 + 32). */
export function fahrenheitToKelvin(temperatureF: number): number {
  return ((temperatureF - 32) * 5) / 9 + ZERO_CELSIUS_K;
}
/** International foot (0.3048 m exactly) → m. */
export function feetToMetres(lengthFt: number): number {
  return lengthFt * 0.3048;
}
/** Pa → hPa. */
export function pascalToHectopascal(pressurePa: number): number {
  return pressurePa / 100;
}
