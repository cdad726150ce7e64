import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { freePort, startNode } from './helpers/processes';

// server/src/main.ts stops on a promise rejection nobody handled and on an exception that
// escaped every handler: it logs the fault, stops the clean way and exits non-zero. The fault
// is planted by a preload module that rejects (or throws) when the process gets SIGUSR2.
let preload: string;
beforeAll(async () => {
  const dir = await fs.mkdtemp(path.join(os.tmpdir(), 'evalon-faults-'));
  preload = path.join(dir, 'plant-fault.mjs');
  await fs.writeFile(
    preload,
    `process.on('SIGUSR2', () => {
       if (process.env.EVALON_TEST_FAULT === 'throw') setImmediate(() => { throw new Error('planted exception'); });
       else void Promise.reject(new Error('planted rejection'));
     });\n`,
  );
});

async function runWithFault(
  fault: 'reject' | 'throw',
): Promise<{ code: number | null; output: string }> {
  const port = await freePort();
  const started = await startNode(
    ['--import', 'tsx', '--import', preload, 'server/src/main.ts'],
    {
      EVALON_PORT: String(port),
      EVALON_LOG_LEVEL: 'info',
      EVALON_OUTBOX_WORKER: 'off',
      EVALON_DEPOSIT_EXPIRY_JOB: 'off',
      EVALON_TEST_FAULT: fault,
    },
    /listening on/,
    60_000,
  );
  let output = '';
  started.child.stdout?.on('data', (c: Buffer) => (output += c.toString()));
  started.child.stderr?.on('data', (c: Buffer) => (output += c.toString()));
  const exited = new Promise<number | null>((resolve) => started.child.once('exit', resolve));
  started.child.kill('SIGUSR2');
  const code = await exited;
  return { code, output };
}

it('logs an unhandled rejection, stops cleanly and exits with 1', async () => {
  const { code, output } = await runWithFault('reject');
  expect(output).toContain('unhandled promise rejection; stopping');
  expect(output).toContain('planted rejection');
  expect(output).toContain('Evalon server stopping');
  expect(code).toBe(1);
}, 90_000);

it('logs an uncaught exception, stops cleanly and exits with 1', async () => {
  const { code, output } = await runWithFault('throw');
  expect(output).toContain('uncaught exception; stopping');
  expect(output).toContain('planted exception');
  expect(output).toContain('Evalon server stopping');
  expect(code).toBe(1);
}, 90_000);
