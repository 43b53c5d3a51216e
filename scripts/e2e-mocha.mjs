// Runs mocha test files (TypeScript through tsx) in this Node process and prints the
// closing line "N passed, M failed" that .ci/run adds up. Exit code 1 on any failure.
import { register } from 'tsx/esm/api';
import { register as registerCjs } from 'tsx/cjs/api';
import Mocha from 'mocha';

/** Runs `files` with mocha; resolves to the number of failures. */
export async function runMocha(files, { timeout = 60000, title = 'tests' } = {}) {
  register();
  registerCjs();
  const mocha = new Mocha({ timeout, reporter: 'spec', color: false });
  for (const f of files) mocha.addFile(f);
  await mocha.loadFilesAsync();
  const t0 = Date.now();
  return await new Promise((resolve) => {
    const runner = mocha.run();
    runner.on('end', () => {
      const s = runner.stats ?? { passes: 0, failures: 0, pending: 0 };
      console.log(`${title}: ${((Date.now() - t0) / 1000).toFixed(1)} s`);
      console.log(`${s.passes} passed, ${s.failures} failed${s.pending ? `, ${s.pending} skipped` : ''}`);
      resolve(s.failures);
    });
  });
}
