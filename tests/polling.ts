/** Polling for tests that wait on background work (jobs, the mail outbox, a server process). */

export const sleep = (ms: number) => new Promise<void>((r) => setTimeout(r, ms));

/**
 * Calls `probe` every `everyMs` until it answers something other than `undefined` and returns that,
 * or fails after `ms` naming what it waited for.
 */
export async function until<T>(what: string, probe: () => Promise<T | undefined>, ms = 120_000, everyMs = 100): Promise<T> {
  const end = Date.now() + ms;
  for (;;) {
    const v = await probe();
    if (v !== undefined) return v;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await sleep(everyMs);
  }
}
