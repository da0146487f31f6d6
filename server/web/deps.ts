import type { Store } from './store.ts';
import type { Catalogue } from './catalogue.ts';
import type { JobRunner } from './jobs.ts';
import type { WebLimits } from './limits.ts';
import type { BriefingJobs } from './briefings.ts';
import type { StreamGate } from './streams.ts';

/** What route plugins need, passed as plugin options (no globals). */
export interface WebDeps {
  store: Store;
  catalogue: Catalogue;
  jobs: JobRunner;
  limits: WebLimits;
  /** PDF briefings as durable jobs (drawn in a worker thread, kept in the database). */
  briefings: BriefingJobs;
  /** Caps on open progress streams (per evaluation, per client). */
  streams: StreamGate;
  /** Route config that switches the compute rate limit on. */
  computeRateLimit: { max: number; timeWindow: string };
  /** Route config for form and scenario-writing posts: their own rate limit (a person never reaches it). */
  formPost: { rateLimit: { max: number; timeWindow: string }; rateLimitWhat: string };
}
