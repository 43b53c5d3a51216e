/**
 * Entry point the workbench loads into the extension host (extensionTestsPath): runs the
 * mocha suites here and reports through console.log, which the page relays to the runner.
 */
import Mocha from 'mocha';

const PREFIX = '[knotwise-host] ';

/** A small reporter that writes through console.log (the host's stdout is not relayed). */
class ConsoleReporter {
  constructor(runner: Mocha.Runner) {
    let depth = 0;
    runner.on('suite', (s: Mocha.Suite) => {
      if (s.title) console.log(PREFIX + '  '.repeat(depth) + s.title);
      depth++;
    });
    runner.on('suite end', () => {
      depth--;
    });
    runner.on('pass', (t: Mocha.Test) => console.log(`${PREFIX}${'  '.repeat(depth)}✔ ${t.title} (${t.duration ?? 0} ms)`));
    runner.on('fail', (t: Mocha.Test, err: Error) => {
      console.log(`${PREFIX}${'  '.repeat(depth)}✘ ${t.title}`);
      for (const line of String(err.stack ?? err.message)
        .split('\n')
        .slice(0, 12))
        console.log(`${PREFIX}${'  '.repeat(depth + 2)}${line}`);
    });
  }
}

export async function run(): Promise<void> {
  const mocha = new Mocha({ ui: 'bdd', timeout: 120_000, color: false, reporter: ConsoleReporter as unknown as typeof Mocha.reporters.Base });
  mocha.suite.emit('pre-require', globalThis, 'knotwise-host', mocha);
  // Loaded after the globals exist (esbuild keeps these requires lazy).
  require('./settings.test');
  require('./commands.test');
  require('./manifest.test');
  require('./follow.test');
  require('./records.test');
  require('./saveRecovery.test');
  require('./candidates.test');
  require('./calibration.test');
  require('./groups.test');
  require('./surface.test');
  await new Promise<void>((resolve, reject) => {
    const runner = mocha.run((failures) => {
      const stats = runner.stats ?? { passes: 0, failures };
      console.log(`KNOTWISE-HOST-RESULT ${JSON.stringify({ passes: stats.passes, failures: stats.failures })}`);
      if (failures > 0) reject(new Error(`${failures} extension-host test(s) failed`));
      else resolve();
    });
  });
}
