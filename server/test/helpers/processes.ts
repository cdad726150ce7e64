import { spawn, type ChildProcess } from 'node:child_process';
import net from 'node:net';
import path from 'node:path';

/** Repository root (server/test/helpers -> ../../..). */
export const repoRoot = path.resolve(__dirname, '..', '..', '..');

/** A TCP port that was free a moment ago on 127.0.0.1. */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const address = server.address();
      const port = typeof address === 'object' && address ? address.port : 0;
      server.close(() => resolve(port));
    });
  });
}

/** A child process started by a test, stopped by {@link stop}. */
export interface Started {
  child: ChildProcess;
  stop(): Promise<void>;
}

/**
 * Starts `node <args>` and waits until its output matches `ready` (or fails after timeoutMs).
 */
export function startNode(
  args: string[],
  env: Record<string, string>,
  ready: RegExp,
  timeoutMs = 20_000,
): Promise<Started> {
  const child = spawn(process.execPath, args, {
    cwd: repoRoot,
    env: { ...process.env, ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let output = '';
  const stop = () =>
    new Promise<void>((resolve) => {
      if (child.exitCode !== null || child.signalCode !== null) return resolve();
      child.once('exit', () => resolve());
      child.kill('SIGTERM');
      setTimeout(() => child.kill('SIGKILL'), 3_000).unref();
    });
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => {
      void stop();
      reject(new Error(`${args.join(' ')} was not ready within ${timeoutMs} ms:\n${output}`));
    }, timeoutMs);
    const onData = (chunk: Buffer) => {
      output += chunk.toString();
      if (ready.test(output)) {
        clearTimeout(timer);
        resolve({ child, stop });
      }
    };
    child.stdout?.on('data', onData);
    child.stderr?.on('data', onData);
    child.once('exit', (code) => {
      clearTimeout(timer);
      reject(new Error(`${args.join(' ')} exited with ${code}:\n${output}`));
    });
  });
}
