import { GivensQR } from './core/stats/givensQR';
const cpu = (): number => { const u = process.cpuUsage(); return (u.user + u.system) / 1000; };
const n = 1_000_000, p = 10;
const X = new Float64Array(n * p);
for (let i = 0; i < n * p; i++) X[i] = Math.random();
const y = new Float64Array(n); for (let i = 0; i < n; i++) y[i] = Math.random();

function givens(): number {
  const qr = new GivensQR(p); const row = new Float64Array(p);
  for (let i = 0; i < n; i++) { for (let k = 0; k < p; k++) row[k] = X[i * p + k]!; qr.addRow(row, y[i]!); }
  return qr.r[0]!;
}
// Blocked Householder: W column-major block m x p
function house(m: number): number {
  const r = new Float64Array(p * p), qty = new Float64Array(p);
  const W = new Float64Array(m * p), yb = new Float64Array(m);
  let rss = 0;
  let fill = 0;
  const flush = (cnt: number): void => {
    for (let j = 0; j < p; j++) {
      const wj = j * m;
      let sigma = 0;
      for (let i = 0; i < cnt; i++) { const v = W[wj + i]!; sigma += v * v; }
      if (sigma === 0) continue;
      const alpha = r[j * p + j]!;
      const norm = Math.sqrt(alpha * alpha + sigma);
      const beta = alpha > 0 ? -norm : norm;
      const v0 = alpha - beta;
      const inv = 1 / v0;
      for (let i = 0; i < cnt; i++) W[wj + i] = W[wj + i]! * inv;
      const tau = (beta - alpha) / beta;
      r[j * p + j] = beta;
      for (let k = j + 1; k < p; k++) {
        const wk = k * m;
        let s = r[j * p + k]!;
        for (let i = 0; i < cnt; i++) s += W[wj + i]! * W[wk + i]!;
        s *= tau;
        r[j * p + k] = r[j * p + k]! - s;
        for (let i = 0; i < cnt; i++) W[wk + i] = W[wk + i]! - s * W[wj + i]!;
      }
      let s = qty[j]!;
      for (let i = 0; i < cnt; i++) s += W[wj + i]! * yb[i]!;
      s *= tau;
      qty[j] = qty[j]! - s;
      for (let i = 0; i < cnt; i++) yb[i] = yb[i]! - s * W[wj + i]!;
    }
    for (let i = 0; i < cnt; i++) rss += yb[i]! * yb[i]!;
  };
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < p; k++) W[k * m + fill] = X[i * p + k]!;
    yb[fill] = y[i]!;
    if (++fill === m) { flush(m); fill = 0; }
  }
  if (fill) flush(fill);
  return Math.abs(r[0]!);
}
function gramBlocked(m: number): number {
  const g = new Float64Array(p * p); const W = new Float64Array(m * p); let fill = 0;
  const flush = (cnt: number): void => {
    for (let a = 0; a < p; a++) { const wa = a * m; for (let b = a; b < p; b++) { const wb = b * m; let s = 0; for (let i = 0; i < cnt; i++) s += W[wa + i]! * W[wb + i]!; g[a * p + b] = g[a * p + b]! + s; } }
  };
  for (let i = 0; i < n; i++) { for (let k = 0; k < p; k++) W[k * m + fill] = X[i * p + k]!; if (++fill === m) { flush(m); fill = 0; } }
  if (fill) flush(fill);
  return Math.sqrt(g[0]!);
}
function gramNaive(): number {
  const g = new Float64Array(p * p); const row = new Float64Array(p);
  for (let i = 0; i < n; i++) { for (let k = 0; k < p; k++) row[k] = X[i * p + k]!;
    for (let a = 0; a < p; a++) { const ra = row[a]!; const o = a * p; for (let b = a; b < p; b++) g[o + b] = g[o + b]! + ra * row[b]!; } }
  return Math.sqrt(g[0]!);
}
function copyOnly(): number { const row = new Float64Array(p); let s = 0; for (let i = 0; i < n; i++) { for (let k = 0; k < p; k++) row[k] = X[i * p + k]!; s += row[3]!; } return s; }
for (let r = 0; r < 3; r++) {
  for (const [name, f] of [['copy', copyOnly], ['givens', givens], ['house64', () => house(64)], ['house256', () => house(256)], ['gramNaive', gramNaive], ['gramBlocked64', () => gramBlocked(64)], ['gramBlocked256', () => gramBlocked(256)]] as const) {
    const t0 = cpu(); const v = (f as () => number)(); console.log(name, (cpu() - t0).toFixed(1), v.toPrecision(12));
  }
}
