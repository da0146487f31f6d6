/**
 * Process entry: build the app, listen, close gracefully on SIGINT/SIGTERM.
 * Environment: HOST (default 127.0.0.1), PORT (3000), DATA_DIR (./data), WORKERS (evaluation threads),
 * ENSEMBLE_THREADS (threads for the draws of one ensemble), WALL_SECONDS (longest evaluation),
 * ALLOWED_HOSTS (host names besides the loopback ones that requests may be addressed to, comma-separated).
 * A setting out of range or a DATA_DIR that cannot be written stops the start with one line naming it.
 */
import type { FastifyInstance } from 'fastify';
import { buildApp } from './app.ts';
import { DataDirError } from './web/store.ts';
import { normaliseHost } from './web/plugins/security.ts';

const host = process.env.HOST ?? '127.0.0.1';
const port = Number(process.env.PORT ?? 3000);
if (!Number.isInteger(port) || port < 0 || port > 65535) {
  console.error(`PORT must be a whole number from 0 to 65535 (found ${JSON.stringify(process.env.PORT)})`);
  process.exit(1);
}
/** A setting from the environment: undefined when unset; a clear message and exit 1 when out of range. */
function setting(name: string, wholeNumber: boolean): number | undefined {
  const v = process.env[name];
  if (v === undefined || v === '') return undefined;
  const x = Number(v);
  if (!(x > 0) || !Number.isFinite(x) || (wholeNumber && !Number.isInteger(x))) {
    console.error(`${name} must be ${wholeNumber ? 'a whole number ≥ 1' : 'a number > 0'} (found ${JSON.stringify(v)})`);
    process.exit(1);
  }
  return x;
}
const wallSeconds = setting('WALL_SECONDS', false);

/**
 * Host names requests may be addressed to besides 127.0.0.1, localhost and ::1 (DNS-rebinding guard,
 * web/plugins/security.ts): ALLOWED_HOSTS, plus HOST when it is one specific name or address.
 */
function allowedHosts(): string[] {
  const listed = (process.env.ALLOWED_HOSTS ?? '').split(',').map((h) => h.trim()).filter(Boolean);
  for (const h of listed) {
    if (normaliseHost(h) === undefined) {
      console.error(`ALLOWED_HOSTS must be host names or IP addresses separated by commas (found ${JSON.stringify(h)})`);
      process.exit(1);
    }
  }
  const wildcard = ['0.0.0.0', '::', '[::]', ''];
  return wildcard.includes(host) ? listed : [...listed, host];
}

let app: FastifyInstance;
try {
  app = await buildApp({
    logger: true,
    dataDir: process.env.DATA_DIR ?? 'data',
    workerThreads: setting('WORKERS', true),
    ensembleThreads: setting('ENSEMBLE_THREADS', true),
    limits: wallSeconds !== undefined ? { wallSeconds } : {},
    allowedHosts: allowedHosts(),
  });
} catch (err) {
  if (err instanceof DataDirError) {
    console.error(err.message);
    process.exit(1);
  }
  throw err;
}
try {
  await app.listen({ host, port });
} catch (err) {
  const code = (err as NodeJS.ErrnoException).code;
  console.error(
    code === 'EADDRINUSE'
      ? `Port ${port} on ${host} is already in use: stop the other program or set PORT to another number.`
      : `Cannot listen on ${host}:${port}: ${(err as Error).message}`,
  );
  await app.close();
  process.exit(1);
}
for (const signal of ['SIGINT', 'SIGTERM'] as const) {
  process.once(signal, () => {
    void app.close().then(() => process.exit(0));
  });
}
