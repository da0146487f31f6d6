// Preload of worker threads and child processes that run the TypeScript sources (see worker-loader.ts):
// tsx's ES-module hooks for this thread, without its CommonJS require hook. Plain JavaScript: it runs
// before any TypeScript can be loaded.
import { register } from 'tsx/esm/api';

register();
