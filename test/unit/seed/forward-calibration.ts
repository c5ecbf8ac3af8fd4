/**
 * Forward calibration written out independently of seed/ and lib/ from REFERENCE.md §7:
 * ADC V = counts·Vref/2^N or /(2^N − 1) [S: Microchip docs]; linear sensor T = (V − offset)/(scale/1000);
 * thermistor low in a divider R = Rs·V/(Vs − V); Steinhart–Hart 1/T = A + B ln R + C (ln R)³;
 * beta 1/T = 1/T0 + ln(R/R0)/β; correction T' = gain·T + offsetK.
 */
import type { TemperatureCalibration } from "@/lib/analysis/types";

export function forwardTemperatureK(cal: TemperatureCalibration, raw: number): number {
  let volts: number;
  if (cal.input === "counts") {
    if (!cal.adc) throw new Error("counts need an ADC");
    const divisor = cal.adc.divisor === "2^N" ? 2 ** cal.adc.bits : 2 ** cal.adc.bits - 1;
    volts = (raw * cal.adc.referenceV) / divisor;
  } else if (cal.input === "volts") {
    volts = raw;
  } else if (cal.input === "millivolts") {
    volts = raw / 1000;
  } else {
    throw new Error(`test helper does not handle input ${cal.input}`);
  }
  let temperatureK: number;
  const sensor = cal.sensor;
  if (sensor.kind === "linear-voltage") {
    temperatureK = (volts - sensor.offsetV) / (sensor.scaleMvPerK / 1000);
  } else if (sensor.kind === "thermistor-divider") {
    const resistanceOhm =
      sensor.thermistorSide === "low"
        ? (sensor.seriesOhm * volts) / (sensor.supplyV - volts)
        : (sensor.seriesOhm * (sensor.supplyV - volts)) / volts;
    const lnR = Math.log(resistanceOhm);
    const eq = sensor.equation;
    temperatureK =
      eq.kind === "steinhart-hart"
        ? 1 / (eq.a + eq.b * lnR + eq.c * lnR ** 3)
        : 1 / (1 / eq.t0K + Math.log(resistanceOhm / eq.r0Ohm) / eq.beta);
  } else {
    throw new Error(`test helper does not handle sensor ${sensor.kind}`);
  }
  return cal.correction ? cal.correction.gain * temperatureK + cal.correction.offsetK : temperatureK;
}
