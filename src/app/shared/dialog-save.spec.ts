import { signal } from '@angular/core';
import { FormControl, FormGroup, Validators } from '@angular/forms';
import type { MatDialogRef } from '@angular/material/dialog';
import { ApiRequestError } from '../core/api-error';
import { formToSave, saveAndClose } from './dialog-save';

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

  it('puts the server’s words for a conflict on the conflict control, when given one', async () => {
    const d = dialog();
    await saveAndClose(() => Promise.reject(new ApiRequestError(409, { code: 'conflict', message: 'A product named “CAN 27” exists already.' }, '/api/products')), { ...d.o, conflictControl: d.code });
    expect(d.code.getError('server')).toBe('A product named “CAN 27” exists already.');
    expect(d.o.failure()).toBeNull();
    expect(d.closed).toEqual([]);
  });
});

describe('formToSave', () => {
  it('gives the raw value of a valid form, including disabled fields', () => {
    const form = new FormGroup({ code: new FormControl('F01', Validators.required), region: new FormControl({ value: 'North', disabled: true }) });
    expect(formToSave(form)).toEqual({ code: 'F01', region: 'North' });
  });

  it('gives null for an invalid form and marks every field touched so its problem shows', () => {
    const form = new FormGroup({ code: new FormControl('', Validators.required), name: new FormControl('') });
    expect(formToSave(form)).toBeNull();
    expect(form.controls.code.touched).toBe(true);
    expect(form.controls.name.touched).toBe(true);
  });
});
