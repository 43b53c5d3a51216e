import { performance } from 'node:perf_hooks';
import { diagnose } from './core/diagnose';
import { fitCurve, prepareData } from './core/fit/index';
import { selectColumns } from './core/ingest/select';
import { readCsvFile } from './core/node/readCsv';
const cpu = (): number => { const u = process.cpuUsage(); return (u.user + u.system) / 1000; };
async function main(): Promise<void> {
  const table = await readCsvFile('bench/tmp/bench-1000000.csv');
  const data = selectColumns(table, { x: 'x', y: 'y' }).data;
  for (let r = 0; r < 4; r++) {
    let w0 = performance.now(), c0 = cpu();
    const fit = fitCurve(prepareData(data), { family: 'natural', df: 10 });
    console.log(`fit: wall ${(performance.now() - w0).toFixed(0)} ms, cpu ${(cpu() - c0).toFixed(0)} ms`);
    w0 = performance.now(); c0 = cpu();
    diagnose(data, fit);
    console.log(`diagnose: wall ${(performance.now() - w0).toFixed(0)} ms, cpu ${(cpu() - c0).toFixed(0)} ms`);
  }
}
void main();
