import { signal } from '@angular/core';
import { FormControl } from '@angular/forms';
import type { MatDialogRef } from '@angular/material/dialog';
import { ApiRequestError } from '../core/api-error';
import { saveAndClose } from './dialog-save';

function dialog() {
  const closed: unknown[] = [];
  const ref = { close: (value: unknown) => closed.push(value) } as unknown as MatDialogRef<unknown, { id: number }>;
  const code = new FormControl('F01');
  return { closed, code, o: { ref, saving: signal(false), failure: signal<string | null>(null), controls: { code } } };
}

describe('saveAndClose', () => {
  it('closes the dialog with what the server saved, and is not saving afterwards', async () => {
    const d = dialog();
    let savingDuring = false;
    await saveAndClose(async () => {
      savingDuring = d.o.saving();
      return { id: 7 };
    }, d.o);
    expect(savingDuring).toBe(true);
    expect(d.closed).toEqual([{ id: 7 }]);
    expect(d.o.saving()).toBe(false);
    expect(d.o.failure()).toBeNull();
  });

  it('puts a field message on its control and keeps the dialog open', async () => {
    const d = dialog();
    const error = new ApiRequestError(400, { code: 'invalid', message: 'Check the fields', details: [{ path: 'body.code', message: 'Use letters and digits' }] }, '/api/farms');
    await saveAndClose(() => Promise.reject(error), d.o);
    expect(d.closed).toEqual([]);
    expect(d.code.getError('server')).toBe('Use letters and digits');
    expect(d.o.failure()).toBeNull();
  });

  it('rewrites detail paths before matching them, when asked', async () => {
    const d = dialog();
    const error = new ApiRequestError(400, { code: 'invalid', message: 'Check the rows', details: [{ path: 'body.rows.0.code', message: 'Too long' }] }, '/api/prices');
    await saveAndClose(() => Promise.reject(error), { ...d.o, detailPath: (p) => p.replace(/^body\.rows\.0\./, '') });
    expect(d.code.getError('server')).toBe('Too long');
  });

  it('says the dialog’s own words for a conflict, and the server’s otherwise', async () => {
    const d = dialog();
    await saveAndClose(() => Promise.reject(new ApiRequestError(409, { code: 'conflict', message: 'duplicate key' }, '/api/farms')), { ...d.o, conflict: 'A farm with the code “F01” exists already.' });
    expect(d.o.failure()).toBe('A farm with the code “F01” exists already.');
    await saveAndClose(() => Promise.reject(new ApiRequestError(503, { code: 'unavailable', message: 'The server is restarting; try again in a minute.' }, '/api/farms')), d.o);
    expect(d.o.failure()).toBe('The server is restarting; try again in a minute.');
    expect(d.closed).toEqual([]);
    expect(d.o.saving()).toBe(false);
  });
});
