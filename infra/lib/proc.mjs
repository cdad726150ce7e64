// Small process helpers shared by the start, test and CI scripts. Plain Node ESM with no
// dependencies, because these run before `npm ci` has installed anything.
import { spawn, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

export const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
export const dataDir = path.join(root, '.data');

/** Prints a line prefixed with the script's tag. */
export function log(msg) {
  process.stdout.write(`[evalon] ${msg}\n`);
}

/** Resolves true when something accepts TCP connections on host:port. */
export function portOpen(port, host = '127.0.0.1') {
  return new Promise((resolve) => {
    const sock = net.connect({ port, host });
    sock.once('connect', () => {
      sock.destroy();
      resolve(true);
    });
    sock.once('error', () => resolve(false));
    sock.setTimeout(1000, () => {
      sock.destroy();
      resolve(false);
    });
  });
}

/** Waits until the port accepts connections, or throws after timeoutMs. */
export async function waitForPort(port, name, timeoutMs = 30_000) {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    if (await portOpen(port)) return;
    await new Promise((r) => setTimeout(r, 150));
  }
  throw new Error(`${name} did not open 127.0.0.1:${port} within ${timeoutMs / 1000} s`);
}

/** Whether a pid names a live process. */
export function alive(pid) {
  if (!pid) return false;
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

function pidFile(name) {
  return path.join(dataDir, 'run', `${name}.pid`);
}

/** The pid recorded for a service we started, if that process still runs. */
export function runningPid(name) {
  try {
    const pid = Number(fs.readFileSync(pidFile(name), 'utf8'));
    return alive(pid) ? pid : null;
  } catch {
    return null;
  }
}

/**
 * Starts a long-running service detached, logging to .data/logs/<name>.log, unless one we
 * started earlier still answers on its port (a second `npm start` reuses it). A port held by
 * some other program is reported, never fought over.
 * Returns {pid, reused}.
 */
export async function ensureService({ name, port, command, args, env = {}, timeoutMs }) {
  const pid = runningPid(name);
  if (pid && (await portOpen(port))) return { pid, reused: true };
  if (await portOpen(port)) {
    throw new Error(
      `Port ${port} on 127.0.0.1 is taken by another program, so ${name} cannot start. ` +
        `Stop that program, or choose another port with the environment variable shown in README.md.`,
    );
  }
  fs.mkdirSync(path.join(dataDir, 'logs'), { recursive: true });
  fs.mkdirSync(path.join(dataDir, 'run'), { recursive: true });
  const out = fs.openSync(path.join(dataDir, 'logs', `${name}.log`), 'a');
  const child = spawn(command, args, {
    cwd: root,
    env: { ...process.env, ...env },
    detached: true,
    stdio: ['ignore', out, out],
  });
  child.unref();
  fs.writeFileSync(pidFile(name), String(child.pid));
  try {
    await waitForPort(port, name, timeoutMs);
  } catch (err) {
    const tail = fs.readFileSync(path.join(dataDir, 'logs', `${name}.log`), 'utf8').slice(-2000);
    throw new Error(`${err.message}\n--- last lines of .data/logs/${name}.log ---\n${tail}`);
  }
  return { pid: child.pid, reused: false };
}

/** Stops a service we started (TERM, then KILL after a grace period). */
export async function stopService(name) {
  const pid = runningPid(name);
  if (!pid) return;
  try {
    process.kill(-pid, 'SIGTERM');
  } catch {
    try {
      process.kill(pid, 'SIGTERM');
    } catch {
      /* already gone */
    }
  }
  const until = Date.now() + 10_000;
  while (alive(pid) && Date.now() < until) await new Promise((r) => setTimeout(r, 100));
  if (alive(pid)) {
    try {
      process.kill(-pid, 'SIGKILL');
    } catch {
      /* already gone */
    }
  }
  fs.rmSync(pidFile(name), { force: true });
}

/** Runs a command in the foreground, inheriting stdio; throws on a non-zero exit. */
export function run(command, args, opts = {}) {
  const res = spawnSync(command, args, { cwd: root, stdio: 'inherit', ...opts });
  if (res.status !== 0) {
    throw new Error(`${command} ${args.join(' ')} exited with ${res.status ?? res.signal}`);
  }
  return res;
}

/** Whether an executable is on PATH (or at an absolute path). */
export function have(cmd) {
  return spawnSync('sh', ['-c', `command -v ${cmd}`], { stdio: 'ignore' }).status === 0;
}
