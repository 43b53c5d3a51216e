import { argsortStable } from './core/stats/argsort';
const cpu = (): number => { const u = process.cpuUsage(); return (u.user + u.system) / 1000; };
function ref(x: Float64Array): Int32Array {
  const idx = Array.from({ length: x.length }, (_, i) => i);
  const key = (v: number): number => (Number.isNaN(v) ? Infinity : v);
  idx.sort((a, b) => { const va = x[a]!, vb = x[b]!; const na = Number.isNaN(va), nb = Number.isNaN(vb); if (na || nb) return (na ? 1 : 0) - (nb ? 1 : 0) || a - b; return key(va) - key(vb) || (va === vb ? 0 : va < vb ? -1 : 1) || a - b; });
  return Int32Array.from(idx);
}
const gens: [string, (n: number) => Float64Array][] = [
  ['random', (n) => Float64Array.from({ length: n }, () => Math.random() * 200 - 100)],
  ['ties', (n) => Float64Array.from({ length: n }, () => Math.floor(Math.random() * 5) - 2)],
  ['special', (n) => Float64Array.from({ length: n }, () => [0, -0, NaN, Infinity, -Infinity, 5e-324, -5e-324, 1e308, -1e308, 1, -1][Math.floor(Math.random() * 11)]!)],
  ['big', (n) => Float64Array.from({ length: n }, () => 1.7e18 + Math.floor(Math.random() * 1000) * 256)],
];
for (const n of [0, 1, 2, 5, 31, 32, 33, 100, 1000, 100000]) for (const [name, g] of gens) {
  const x = g(n); const a = argsortStable(x); const b = ref(x);
  for (let i = 0; i < n; i++) if (a[i] !== b[i]) { console.log('MISMATCH', name, n, i); break; }
}
const n = 1_000_000; const x = Float64Array.from({ length: n }, () => Math.round(Math.random() * 1e8) / 1e6);
for (let r = 0; r < 5; r++) { const t0 = cpu(); argsortStable(x); console.log('argsort 1M', (cpu() - t0).toFixed(1)); }
