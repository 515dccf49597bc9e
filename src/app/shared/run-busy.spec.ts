import { signal } from '@angular/core';
import { ApiRequestError } from '../core/api-error';
import { runBusy } from './run-busy';

describe('runBusy', () => {
  it('is busy while the request is out and not afterwards', async () => {
    const busy = signal(false);
    let during = false;
    const ok = await runBusy(busy, async () => {
      during = busy();
    });
    expect(during).toBe(true);
    expect(busy()).toBe(false);
    expect(ok).toBe(true);
  });

  it("clears the message line first and puts the error's words on it", async () => {
    const busy = signal(false);
    const failure = signal<string | null>('an old problem');
    let seen: string | null = 'unset';
    const error = new ApiRequestError(409, { code: 'conflict', message: 'The season exists already' }, '/api/outlooks');
    const ok = await runBusy(
      busy,
      async () => {
        seen = failure();
        throw error;
      },
      failure,
    );
    expect(seen).toBeNull();
    expect(failure()).toBe('The season exists already');
    expect(busy()).toBe(false);
    expect(ok).toBe(false);
  });

  it('hands the error to a function when given one', async () => {
    const caught: unknown[] = [];
    const error = new Error('offline');
    await runBusy(signal(false), () => Promise.reject(error), (e) => caught.push(e));
    expect(caught).toEqual([error]);
  });

  it('throws the error on when nobody takes it, after it stops being busy', async () => {
    const busy = signal(false);
    await expect(runBusy(busy, () => Promise.reject(new Error('offline')))).rejects.toThrow('offline');
    expect(busy()).toBe(false);
  });
});
