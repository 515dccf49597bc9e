/** The import API's two steps as the import tests take them: upload a file, then commit it and wait for the end. */
import { expect } from 'vitest';
import { until } from '../polling.js';
import type { signedIn } from './test-app.js';

type Agent = Awaited<ReturnType<typeof signedIn>>;

/** `POST /api/imports` with a file of `kind` and any further form fields (mapping, delivery point, decimal mark). */
export function uploadImport(a: Agent, kind: string, file: Buffer | string, fileName: string, fields: Record<string, string> = {}) {
  let req = a.post('/api/imports').field('kind', kind);
  for (const [k, v] of Object.entries(fields)) req = req.field(k, v);
  return req.attach('file', typeof file === 'string' ? Buffer.from(file) : file, fileName);
}

/** Commits an import (202, committing from 0) and waits for its background work to end; answers the final GET. */
export async function commitImport(a: Agent, id: number, onExisting: 'update' | 'skip', acceptWarnings = false) {
  const started = await a.post(`/api/imports/${id}/commit`).send({ onExisting, acceptWarnings });
  expect(started.status).toBe(202);
  expect(started.body).toMatchObject({ id, status: 'committing', progress: { done: 0 } });
  return until(
    `import ${id} to finish committing`,
    async () => {
      const res = await a.get(`/api/imports/${id}`);
      return res.body.status !== 'committing' ? res : undefined;
    },
    20_000,
    25,
  );
}
