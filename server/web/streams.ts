/**
 * Caps on open progress streams (server-sent events): each holds a connection and a file descriptor, so a
 * page opened in many tabs — or a script — must not be able to open thousands. At most `perJob` streams per
 * evaluation and `perClient` per client address; one more answers 429 with a message saying so (the run
 * page then falls back to reloading itself).
 */
export interface StreamLimits {
  perJob: number;
  perClient: number;
}

export const DEFAULT_STREAM_LIMITS: StreamLimits = { perJob: 16, perClient: 32 };

export interface StreamGate {
  /** Registers a stream; returns its release function (safe to call twice). @throws 429 error when a cap is reached */
  open(jobId: string, client: string): () => void;
  /** Streams open now. */
  readonly size: number;
}

function tooMany(message: string): Error {
  return Object.assign(new Error(message), { statusCode: 429, code: 'TOO_MANY_STREAMS' });
}

export function makeStreamGate(limits: StreamLimits = DEFAULT_STREAM_LIMITS): StreamGate {
  const byJob = new Map<string, number>();
  const byClient = new Map<string, number>();
  let size = 0;
  const inc = (m: Map<string, number>, k: string, d: number) => {
    const v = (m.get(k) ?? 0) + d;
    if (v <= 0) m.delete(k);
    else m.set(k, v);
  };
  return {
    get size() {
      return size;
    },
    open(jobId, client) {
      if ((byJob.get(jobId) ?? 0) >= limits.perJob) {
        throw tooMany(`This evaluation already has ${limits.perJob} open progress streams (the most this server allows); close other pages showing it.`);
      }
      if ((byClient.get(client) ?? 0) >= limits.perClient) {
        throw tooMany(`This client already has ${limits.perClient} open progress streams (the most this server allows); close other run pages.`);
      }
      inc(byJob, jobId, 1);
      inc(byClient, client, 1);
      size++;
      let released = false;
      return () => {
        if (released) return;
        released = true;
        inc(byJob, jobId, -1);
        inc(byClient, client, -1);
        size--;
      };
    },
  };
}
