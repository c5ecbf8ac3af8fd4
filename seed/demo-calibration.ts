/**
 * Inverse calibration: the raw reading a sensor produces for a given air temperature.
 *
 * The demo generator knows the true temperature and must write what the logger would
 * have recorded, so every forward model of REFERENCE.md §7 is run backwards here:
 * correction T' = gain·T + offsetK (undone first), sensor model (linear voltage output,
 * NTC thermistor in a divider via Steinhart–Hart or beta), then the ADC
 * (V = counts·Vref/2^N or /(2^N − 1)).
 */
import type { AdcSpec, TemperatureCalibration, ThermistorEquation } from "../lib/analysis/types.ts";
import { kelvinToCelsius } from "../lib/analysis/units.ts";


/** Resistance (Ω) at which the thermistor equation gives temperatureK. */
export function thermistorResistanceOhm(equation: ThermistorEquation, temperatureK: number): number {
  if (equation.kind === "beta") {
    // 1/T = 1/T0 + ln(R/R0)/β  →  R = R0·exp(β(1/T − 1/T0))
    return equation.r0Ohm * Math.exp(equation.beta * (1 / temperatureK - 1 / equation.t0K));
  }
  // Steinhart–Hart 1/T = A + B·x + C·x³ with x = ln R: depressed cubic, one real root (B, C > 0).
  const { a, b, c } = equation;
  if (c === 0) return Math.exp((1 / temperatureK - a) / b);
  const p = b / c;
  const q = (a - 1 / temperatureK) / c;
  const root = Math.sqrt((p / 3) ** 3 + (q / 2) ** 2);
  return Math.exp(Math.cbrt(-q / 2 + root) + Math.cbrt(-q / 2 - root));
}

function adcFullScale(adc: AdcSpec): number {
  return adc.divisor === "2^N" ? 2 ** adc.bits : 2 ** adc.bits - 1;
}

/** Largest count the ADC can report. */
export function adcMaxCounts(adc: AdcSpec): number {
  return 2 ** adc.bits - 1;
}

function sensorOutputVolts(calibration: TemperatureCalibration, sensorTemperatureK: number): number {
  const sensor = calibration.sensor;
  switch (sensor.kind) {
    case "linear-voltage":
      return sensor.offsetV + (sensor.scaleMvPerK * sensorTemperatureK) / 1000;
    case "thermistor-divider": {
      const resistanceOhm = thermistorResistanceOhm(sensor.equation, sensorTemperatureK);
      const thermistorShare = resistanceOhm / (resistanceOhm + sensor.seriesOhm);
      return sensor.thermistorSide === "low"
        ? sensor.supplyV * thermistorShare
        : sensor.supplyV * (1 - thermistorShare);
    }
    default:
      throw new Error(`sensor model "${sensor.kind}" has no voltage output`);
  }
}

/**
 * Unrounded raw reading (in the calibration's input unit) that the stored calibration
 * maps back to temperatureK. Polynomial models are not used by the demo and are refused.
 */
export function rawReadingForTemperature(calibration: TemperatureCalibration, temperatureK: number): number {
  const gain = calibration.correction?.gain ?? 1;
  const offsetK = calibration.correction?.offsetK ?? 0;
  const sensorTemperatureK = (temperatureK - offsetK) / gain;

  if (calibration.sensor.kind === "polynomial") {
    throw new Error("the demo generator does not invert polynomial calibrations");
  }
  if (calibration.sensor.kind === "direct") {
    switch (calibration.input) {
      case "kelvin":
        return sensorTemperatureK;
      case "celsius":
        return kelvinToCelsius(sensorTemperatureK);
      case "fahrenheit":
        return ((kelvinToCelsius(sensorTemperatureK)) * 9) / 5 + 32;
      default:
        throw new Error(`direct calibration cannot read input "${calibration.input}"`);
    }
  }

  const volts = sensorOutputVolts(calibration, sensorTemperatureK);
  switch (calibration.input) {
    case "volts":
      return volts;
    case "millivolts":
      return volts * 1000;
    case "counts": {
      if (!calibration.adc) throw new Error("counts input needs an ADC description");
      return (volts / calibration.adc.referenceV) * adcFullScale(calibration.adc);
    }
    default:
      throw new Error(`sensor model "${calibration.sensor.kind}" cannot read input "${calibration.input}"`);
  }
}

/** What the logger stores: counts rounded and clipped to the ADC range, other inputs as is. */
export function quantizeRawReading(calibration: TemperatureCalibration, rawReading: number): number {
  if (calibration.input !== "counts" || !calibration.adc) return rawReading;
  return Math.min(adcMaxCounts(calibration.adc), Math.max(0, Math.round(rawReading)));
}
