/**
 * Process entry: build the app, listen, close gracefully on SIGINT/SIGTERM.
 * Environment: HOST (default 127.0.0.1), PORT (3000), DATA_DIR (./data), WORKERS (evaluation threads),
 * ENSEMBLE_THREADS (threads for the draws of one ensemble), WALL_SECONDS (longest evaluation).
 */
import { buildApp } from './app.ts';

const host = process.env.HOST ?? '127.0.0.1';
const port = Number(process.env.PORT ?? 3000);
if (!Number.isInteger(port) || port < 0 || port > 65535) {
  console.error(`PORT must be a whole number from 0 to 65535 (found ${JSON.stringify(process.env.PORT)})`);
  process.exit(1);
}
const positive = (v: string | undefined) => (v !== undefined && Number(v) > 0 ? Number(v) : undefined);

const app = await buildApp({
  logger: true,
  dataDir: process.env.DATA_DIR ?? 'data',
  workerThreads: positive(process.env.WORKERS),
  ensembleThreads: positive(process.env.ENSEMBLE_THREADS),
  limits: { ...(positive(process.env.WALL_SECONDS) ? { wallSeconds: positive(process.env.WALL_SECONDS) } : {}) },
});
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
