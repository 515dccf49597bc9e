/**
 * Random kills while an outlook's e-mails go out, shared by tests/integration/outbox-crash.test.ts
 * (two kills) and bench/outbox-kill-bench.ts (twenty and more): publish a version of an outlook,
 * SIGKILL the server at a random moment while its messages are being handed to SMTP, start it again
 * on the same data folder, let the outbox drain, and count per member what the SMTP server received
 * for that version: copies beyond the first (duplicates) and members with none (missed).
 */
import type { FakeSmtp } from '../../server/mail/fake-smtp.js';
import { HttpSession, startServerProcess, type ServerProcess } from './server-process.js';
import { demoModel } from '../../seed/demo-model.js';
import { sleep, until } from '../polling.js';

/** A seeded generator (mulberry32), so a run can be repeated from its printed seed. */
export function seeded(seed: number) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export interface KillLab {
  smtp: FakeSmtp;
  server: ServerProcess;
  planner: HttpSession;
  outlookId: number;
  env: Record<string, string>;
}

export async function signInPlanner(server: ServerProcess) {
  const planner = new HttpSession(server.url);
  const r = await planner.request('POST', '/api/auth/login', { email: 'planner@example.org', password: 'netput-demo' });
  if (r.status !== 200) throw new Error(`sign-in failed: ${r.status}`);
  return planner;
}

/** Starts a server on `env` (its DATA_DIR, SMTP_URL) and prepares a projected outlook draft to publish again and again. */
export async function openKillLab(smtp: FakeSmtp, env: Record<string, string>): Promise<KillLab> {
  const server = await startServerProcess(env);
  const planner = await signInPlanner(server);
  const model = await planner.request('POST', '/api/models', {
    name: 'Outbox kill model',
    definition: demoModel({ backtestSeasons: 0 }),
  });
  if (model.status !== 201) throw new Error(`model: ${model.status} ${JSON.stringify(model.body)}`);
  const run = await planner.request('POST', `/api/models/${model.body.id}/runs`);
  const fitted = await until('the fit', async () => {
    const s = await planner.request('GET', `/api/model-runs/${run.body.id}/status`);
    return ['succeeded', 'failed'].includes(s.body.status) ? s.body.status : undefined;
  });
  if (fitted !== 'succeeded') throw new Error('the fit failed');
  const outlook = await planner.request('POST', '/api/outlooks', { season: '2026/27', modelRunId: run.body.id });
  if (outlook.status !== 201) throw new Error(`outlook: ${outlook.status} ${JSON.stringify(outlook.body)}`);
  await planner.request('POST', `/api/outlooks/${outlook.body.id}/projection`);
  await until('the projection', async () => {
    const p = await planner.request('GET', `/api/outlooks/${outlook.body.id}/projection`);
    if (p.body.status === 'failed') throw new Error(`projection failed: ${p.body.error}`);
    return p.body.status === 'succeeded' ? true : undefined;
  });
  return { smtp, server, planner, outlookId: outlook.body.id as number, env };
}

/** Messages the SMTP server holds for one outlook version (their Message-IDs carry `outlook.v<versionId>.`). */
export function versionMessages(smtp: FakeSmtp, versionId: number) {
  return smtp.messages().filter((m) => (m.messageId ?? '').includes(`outlook.v${versionId}.u`));
}

async function publish(lab: KillLab, note: string) {
  const r = await lab.planner.request('POST', `/api/outlooks/${lab.outlookId}/publish`, { commentary: note });
  if (r.status !== 201) throw new Error(`publish: ${r.status} ${JSON.stringify(r.body)}`);
  return { versionId: r.body.id as number, version: r.body.version as number, queued: r.body.mails.queued as number };
}

async function drained(lab: KillLab, version: number) {
  return until(
    'the outbox to drain',
    async () => {
      const l = await lab.planner.request('GET', `/api/outlooks/${lab.outlookId}/deliveries?version=${version}`);
      return l.status === 200 && l.body.counts.queued + l.body.counts.sending === 0 ? l.body : undefined;
    },
    180_000,
    200,
  );
}

/** One version sent without a kill: how long its messages take to go out, first to last (ms). */
export async function calibrate(lab: KillLab) {
  const { versionId, version, queued } = await publish(lab, 'Calibration');
  await drained(lab, version);
  await until('every message', async () => (versionMessages(lab.smtp, versionId).length >= queued ? true : undefined));
  const times = versionMessages(lab.smtp, versionId).map((m) => Date.parse(m.receivedAt));
  return { queued, spanMs: Math.max(...times) - Math.min(...times) };
}

export interface KillRound {
  versionId: number;
  killAfterMs: number;
  queued: number;
  receivedBeforeKill: number;
  /** The kill landed while messages of this version were still to go (else it does not count). */
  duringSending: boolean;
  duplicates: number;
  missed: number;
  /** Every copy of a member's message carried the one Message-ID of that message. */
  sameMessageId: boolean;
  /** Delivery-log rows sent again after the restart (attempts > 1), and whether each says so. */
  resent: number;
  resentNoted: boolean;
  counts: Record<string, number>;
}

/** Publishes, kills the server `random() × spanMs` after its first message of the version arrived, restarts it and counts. */
export async function killRound(lab: KillLab, random: () => number, spanMs: number): Promise<KillRound> {
  const { versionId, version, queued } = await publish(lab, `Kill round ${Date.now()}`);
  await until('the first message', async () => (versionMessages(lab.smtp, versionId).length > 0 ? true : undefined), 60_000, 2);
  const killAfterMs = Math.round(random() * spanMs);
  await sleep(killAfterMs);
  await lab.server.stop('SIGKILL');
  const receivedBeforeKill = versionMessages(lab.smtp, versionId).length;

  lab.server = await startServerProcess(lab.env);
  // Sessions live in the database: the planner's cookie still works (signing in at every restart
  // would run into the sign-in rate limit).
  lab.planner = lab.planner.at(lab.server.url);
  const log = await drained(lab, version);
  await sleep(500); // anything sent twice arrives by now
  const got = versionMessages(lab.smtp, versionId);
  const byMember = new Map<string, Set<string>>();
  const copies = new Map<string, number>();
  for (const m of got) {
    const to = m.to.join(',');
    copies.set(to, (copies.get(to) ?? 0) + 1);
    byMember.set(to, (byMember.get(to) ?? new Set()).add(m.messageId ?? ''));
  }
  const resentRows = (log.rows as { attempts: number; lastError: string | null }[]).filter((r) => r.attempts > 1);
  return {
    versionId,
    killAfterMs,
    queued,
    receivedBeforeKill,
    duringSending: receivedBeforeKill < queued,
    duplicates: [...copies.values()].reduce((s, n) => s + n - 1, 0),
    missed: queued - copies.size,
    sameMessageId: [...byMember.values()].every((ids) => ids.size === 1),
    resent: resentRows.length,
    resentNoted: resentRows.every((r) => /outcome was known/.test(r.lastError ?? '')),
    counts: log.counts,
  };
}
