// The local stand-ins for hosted services: an SMTP catcher with a web inbox, the Google
// sign-in fake, the payments fake and the carrier stand-in. Each is reused when an earlier run left it running.
import fs from 'node:fs';
import path from 'node:path';
import { ensureService, log, root, stopService } from './proc.mjs';

export const ports = {
  smtp: Number(process.env.EVALON_SMTP_PORT ?? 1025),
  inbox: Number(process.env.EVALON_INBOX_PORT ?? 1080),
  oauth: Number(process.env.EVALON_OAUTH_PORT ?? 8089),
  payments: Number(process.env.EVALON_PAYMENTS_PORT ?? 12111),
  carrier: Number(process.env.EVALON_CARRIER_PORT ?? 12211),
};

const node = process.execPath;

const services = [
  {
    name: 'maildev',
    label: 'SMTP catcher (maildev)',
    port: () => ports.smtp,
    command: node,
    args: () => [
      path.join(root, 'node_modules/maildev/dist/bin/maildev.js'),
      '--smtp', String(ports.smtp),
      '--web', String(ports.inbox),
      '--ip', '127.0.0.1',
      '--web-ip', '127.0.0.1',
      '--max-emails', '2000',
    ],
    url: () => `smtp://127.0.0.1:${ports.smtp}, inbox http://127.0.0.1:${ports.inbox}`,
  },
  {
    name: 'oauth-fake',
    label: 'Google sign-in fake',
    port: () => ports.oauth,
    script: 'infra/fakes/oauth/server.mjs',
    url: () => `http://127.0.0.1:${ports.oauth}`,
  },
  {
    name: 'payments-fake',
    label: 'payments fake',
    port: () => ports.payments,
    script: 'infra/fakes/payments/server.mjs',
    url: () => `http://127.0.0.1:${ports.payments}`,
  },
  {
    name: 'carrier-fake',
    label: 'carrier stand-in',
    port: () => ports.carrier,
    script: 'infra/fakes/carrier/server.mjs',
    url: () => `http://127.0.0.1:${ports.carrier}`,
  },
];

/**
 * Starts every stand-in whose code exists. Returns the names of those this call started
 * (not the ones reused), so the caller stops only what it started.
 */
export async function startServices() {
  const started = [];
  for (const s of services) {
    if (s.script && !fs.existsSync(path.join(root, s.script))) continue;
    const { reused } = await ensureService({
      name: s.name,
      port: s.port(),
      command: s.command ?? node,
      args: s.args ? s.args() : [path.join(root, s.script)],
      timeoutMs: 30_000,
    });
    if (!reused) started.push(s.name);
    log(`${s.label} ${reused ? 'already running' : 'started'}: ${s.url()}`);
  }
  return started;
}

/** Stops the named services (as returned by startServices). */
export async function stopServices(names) {
  for (const name of names) await stopService(name);
}
