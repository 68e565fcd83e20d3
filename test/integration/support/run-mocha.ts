// Runs a prepared mocha (the Node runner's instance or the browser bundle's global) and settles with
// its result: the in-host entry's promise rejects when any test failed, which the editor reports as the
// exit code.
export function runMocha(runner: { run(done: (failures: number) => void): unknown }): Promise<void> {
  return new Promise<void>((resolve, reject) => {
    try {
      runner.run((failures) => {
        if (failures > 0) reject(new Error(`${failures} in-host test(s) failed`));
        else resolve();
      });
    } catch (err) {
      reject(err instanceof Error ? err : new Error(String(err)));
    }
  });
}
