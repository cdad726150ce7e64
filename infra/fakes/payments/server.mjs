// Command line: `node infra/fakes/payments/server.mjs` runs the payments fake on 127.0.0.1 and
// port EVALON_PAYMENTS_PORT (default 12111; 0 picks a free port and prints it).
import { createPaymentsFake } from './app.mjs';
import { configFromEnv } from './config.mjs';

const log = (message) => process.stdout.write(`[payments-fake] ${message}\n`);

async function main() {
  const { port, options } = configFromEnv();
  const fake = createPaymentsFake({ ...options, log });
  const { url } = await fake.listen(port);
  log(`listening on ${url}`);
  log(`state: ${options.stateFile ?? 'memory only'}`);
  const hooks = options.webhookEndpoints.map((e) => e.url).join(', ') || 'none';
  log(`webhooks to: ${hooks}`);
  let stopping = false;
  const stop = async () => {
    if (stopping) return;
    stopping = true;
    await fake.close();
    process.exit(0);
  };
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
}

main().catch((err) => {
  process.stderr.write(`[payments-fake] could not start: ${err.message}\n`);
  process.exit(1);
});
