const performance = { now: (): number => { const u = process.cpuUsage(); return (u.user + u.system) / 1000; } };
import { fitCurve, prepareData } from './core/fit/index';
import { RowBasisCurve } from './core/fit/linearFit';
import { selectColumns } from './core/ingest/select';
import { readCsvFile } from './core/node/readCsv';
import { GivensQR } from './core/stats/givensQR';
import { orderByX } from './core/tune/plan';
async function main(): Promise<void> {
  const table = await readCsvFile('bench/tmp/bench-1000000.csv');
  const data = selectColumns(table, { x: 'x', y: 'y' }).data;
  const fit = fitCurve(prepareData(data), { family: 'natural', df: 10 });
  const curve = fit.curve as RowBasisCurve;
  const order = orderByX(data.x);
  const n = fit.n; const p = curve.designSize; const x = data.x;
  const row = new Float64Array(p);
  const xs = Float64Array.from(order, (i) => x[i] as number);
  for (let r = 0; r < 3; r++) {
    let t0 = performance.now();
    let s = 0;
    for (let j = 0; j < n; j++) { curve.designRow(x[order[j] as number] as number, row); s += row[3] as number; }
    console.log('rows only', performance.now() - t0, s);
    t0 = performance.now(); s = 0;
    for (let j = 0; j < n; j++) { curve.designRow(xs[j] as number, row); s += row[3] as number; }
    console.log('rows only, gathered x', performance.now() - t0, s);
    const basis = (curve as unknown as { basis: { row(x: number, o: Float64Array): number } }).basis;
    const b4 = new Float64Array(4);
    t0 = performance.now(); s = 0;
    for (let j = 0; j < n; j++) { s += basis.row(xs[j] as number, b4); }
    console.log('basis.row only, gathered x', performance.now() - t0, s);
    t0 = performance.now();
    const g = new Float64Array(p * p);
    for (let j = 0; j < n; j++) { curve.designRow(x[order[j] as number] as number, row);
      for (let a = 0; a < p; a++) { const ra = row[a] as number; const o = a * p; for (let b = a; b < p; b++) g[o + b] = (g[o + b] as number) + ra * (row[b] as number); } }
    console.log('rows + gram', performance.now() - t0, g[0]);
    t0 = performance.now();
    const qr = new GivensQR(p);
    for (let j = 0; j < n; j++) { curve.designRow(x[order[j] as number] as number, row); qr.addRow(row, 0); }
    console.log('rows + givens', performance.now() - t0);
  }
}
void main();
