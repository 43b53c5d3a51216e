/**
 * Invented demo scenarios, generated from a fixed seed so the committed CSV files can be
 * rebuilt byte for byte: `npx tsx examples/generate.ts`. None of this is measured data.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { RandomStream } from '../core/tune/rng';

/** Standard normal variate by the Box-Muller transform from two uniform draws. */
function normal(rng: RandomStream): number {
  const u1 = (rng.int(2 ** 30) + 0.5) / 2 ** 30;
  const u2 = (rng.int(2 ** 30) + 0.5) / 2 ** 30;
  return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
}

function write(name: string, header: string, rows: string[]): void {
  writeFileSync(join(__dirname, name), [header, ...rows].join('\n') + '\n');
}

/** Humidity sensor against a reference hygrometer: 15 set points, 4 readings each; the response bends and then stiffens near condensation. */
function humidity(): void {
  const rng = new RandomStream(20261201, 1);
  const rows: string[] = [];
  for (let s = 0; s < 15; s++) {
    const rh = 10 + s * 6;
    for (let r = 0; r < 4; r++) {
      const reading = 0.3 + 2.6 * (1 - Math.exp(-rh / 40)) + 0.25 / (1 + Math.exp(-(rh - 78) / 4)) + 0.02 * normal(rng);
      rows.push(`${rh.toFixed(1)},${reading.toFixed(4)}`);
    }
  }
  write('humidity-sensor.csv', 'reference_rh [%RH],sensor_output [V]', rows);
}

/** Cooling fan: temperature rise of a heat sink against airflow, with spread growing at low flow. */
function fan(): void {
  const rng = new RandomStream(20261201, 2);
  const rows: string[] = [];
  for (let i = 0; i < 160; i++) {
    const flow = 5 + (i * 95) / 159 + 0.3 * normal(rng);
    const rise = 4 + 380 / (flow + 6) + (0.4 + 6 / flow) * normal(rng);
    rows.push(`${flow.toFixed(3)};${rise.toFixed(3).replace('.', ',')}`);
  }
  write('fan-temperature-rise.csv', 'airflow [m3/h];temperature_rise [K]', rows);
}

/** Defects per batch against a process temperature setting (counts). */
function defects(): void {
  const rng = new RandomStream(20261201, 3);
  const rows: string[] = [];
  for (let i = 0; i < 90; i++) {
    const temp = 180 + (i % 30) * 2;
    const mean = Math.exp(0.8 + 0.0009 * (temp - 215) ** 2);
    // Poisson draw by inversion of the cumulative distribution.
    const u = (rng.int(2 ** 30) + 0.5) / 2 ** 30;
    let k = 0;
    let p = Math.exp(-mean);
    let cdf = p;
    while (u > cdf && k < 1000) {
      k++;
      p *= mean / k;
      cdf += p;
    }
    rows.push(`${i + 1},${temp},${k}`);
  }
  write('defects-per-batch.csv', 'batch,setting [degC],defects', rows);
}

humidity();
fan();
defects();
