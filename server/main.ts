/** Process entry: build the app, listen, close gracefully on SIGINT/SIGTERM. */
import { buildApp } from './app.ts';

const host = process.env.HOST ?? '127.0.0.1';
const port = Number(process.env.PORT ?? 3000);

const app = await buildApp({ logger: true });
await app.listen({ host, port });
for (const signal of ['SIGINT', 'SIGTERM'] as const) {
  process.once(signal, () => {
    void app.close().then(() => process.exit(0));
  });
}
