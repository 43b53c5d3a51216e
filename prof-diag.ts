const performance = { now: (): number => { const u = process.cpuUsage(); return (u.user + u.system) / 1000; } };
import { diagnose } from './core/diagnose';
import { fitCurve, prepareData } from './core/fit/index';
import { RowBasisCurve } from './core/fit/linearFit';
import { selectColumns } from './core/ingest/select';
import { readCsvFile } from './core/node/readCsv';
import { breuschPagan } from './core/stats/breuschPagan';
import type { DesignRows } from './core/stats/design';
import { durbinWatson } from './core/stats/durbinWatson';
import { lackOfFit } from './core/stats/lackOfFit';
import { normalQuantiles } from './core/stats/normalQuantiles';
import { shapiroWilk } from './core/stats/shapiroWilk';
import { orderByX } from './core/tune/plan';

function t<T>(label: string, f: () => T): T {
  const t0 = performance.now();
  const out = f();
  console.log(`${label}: ${((performance.now() - t0) / 1000).toFixed(3)} s`);
  return out;
}

async function main(): Promise<void> {
  const table = await readCsvFile('bench/tmp/bench-1000000.csv');
  const data = selectColumns(table, { x: 'x', y: 'y' }).data;
  const fit = fitCurve(prepareData(data), { family: 'natural', df: 10 });
  const reps = Number(process.argv[2] ?? 2);
  for (let r = 0; r < reps; r++) {
    console.log(`--- round ${r + 1}`);
    const n = fit.n;
    const { x } = data;
    const order = t('orderByX', () => orderByX(x));
    const cmp = t('comparator sort (old)', () => Int32Array.from({ length: n }, (_, i) => i).sort((a, b) => (x[a] as number) - (x[b] as number) || a - b));
    let same = true;
    for (let i = 0; i < n; i++) if (order[i] !== cmp[i]) { same = false; break; }
    console.log('orderByX equals comparator sort:', same);
    const scaled = t('gather', () => { const s = new Float64Array(n); for (let j = 0; j < n; j++) s[j] = fit.residuals[order[j] as number] as number; return s; });
    const curve = fit.curve as RowBasisCurve;
    const design: DesignRows = { p: curve.designSize, row(j, out) { curve.designRow(x[order[j] as number] as number, out); } };
    t('shapiroWilk', () => shapiroWilk(scaled));
    console.log(t('durbinWatson', () => durbinWatson(scaled, design)));
    console.log(t('breuschPagan', () => breuschPagan(scaled, design)));
    console.log(t('lackOfFit', () => lackOfFit(data.x, data.y, data.w, fit.rss, fit.df)));
    const qq = t('normalQuantiles', () => normalQuantiles(scaled, 400));
    console.log('qq sample[0..2]', qq.sample[0], qq.sample[1], qq.theoretical[0]);
    t('diagnose total', () => diagnose(data, fit));
  }
}
void main();
