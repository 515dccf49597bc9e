/** Polling for tests that wait on background work (outbox, queued fits, server processes). */

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Polls `probe` every `everyMs` until it answers something, or fails naming what it waited for after `ms`. */
export async function until<T>(what: string, probe: () => Promise<T | undefined>, ms = 120_000, everyMs = 100): Promise<T> {
  const end = Date.now() + ms;
  for (;;) {
    const v = await probe();
    if (v !== undefined) return v;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await sleep(everyMs);
  }
}

/** `until` with a test file's own default time limit and polling interval. */
export const untilWith =
  (defaults: { ms: number; everyMs: number }) =>
  <T>(what: string, probe: () => Promise<T | undefined>, ms = defaults.ms, everyMs = defaults.everyMs): Promise<T> =>
    until(what, probe, ms, everyMs);
