// Command line: `node infra/fakes/carrier/server.mjs` runs the carrier stand-in on 127.0.0.1 and
// port EVALON_CARRIER_PORT (default 12211; 0 picks a free port and prints it).
import { createCarrierFake } from './app.mjs';
import { configFromEnv } from './config.mjs';

const log = (message) => process.stdout.write(`[carrier-fake] ${message}\n`);

async function main() {
  const { port, options } = configFromEnv();
  const fake = createCarrierFake({ ...options, log });
  const { url } = await fake.listen(port);
  log(`listening on ${url}`);
  log(`webhooks to: ${options.webhookUrl ?? 'none'}`);
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
  process.stderr.write(`[carrier-fake] could not start: ${err.message}\n`);
  process.exit(1);
});
