import { readFileSync } from 'node:fs';

const pkg = JSON.parse(readFileSync(new URL('../package.json', import.meta.url), 'utf8')) as { name: string; version: string };

/** Tool name and version stamped on every result and briefing. */
export const TOOL = { name: 'Barrier evaluator', version: pkg.version } as const;
