import { argsortStable } from './core/stats/argsort';
const cpu = (): number => { const u = process.cpuUsage(); return (u.user + u.system) / 1000; };
const n = 1_000_000;
const xs = Float64Array.from({ length: n }, () => Math.round(Math.random() * 1e8) / 1e6);
let z = 0; const e = Float64Array.from({ length: n }, () => { z = Math.sqrt(-2 * Math.log(Math.random())) * Math.cos(6.283 * Math.random()); return z; });
let best = [Infinity, Infinity];
for (let r = 0; r < 10; r++) {
  let t0 = cpu(); argsortStable(xs); best[0] = Math.min(best[0]!, cpu() - t0);
  t0 = cpu(); argsortStable(e); best[1] = Math.min(best[1]!, cpu() - t0);
}
console.log('min x', best[0]!.toFixed(1), 'min normal', best[1]!.toFixed(1));
