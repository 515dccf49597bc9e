import type { BookingDeps } from '../bookings/bookings-service.js';
import { reconcilePayments, sendBookingReminders } from '../bookings/payment-events.js';

/**
 * The payment reconciliation job: every `intervalMs` it settles pending prepayments whose webhook
 * never arrived by asking the payment service (server/bookings/payment-events.ts), and queues the
 * booking reminders that are due. Each pass is idempotent, so two instances may run it side by side.
 */
export function startPaymentReconciler(deps: BookingDeps, intervalMs: number, minAgeMs = Math.min(60_000, intervalMs)) {
  let running: Promise<unknown> | null = null;
  let stopped = false;
  const pass = async () => {
    try {
      await reconcilePayments(deps, minAgeMs);
      await sendBookingReminders(deps);
    } catch (err) {
      console.warn(`Payment reconciliation failed: ${(err as Error).message}`);
    }
  };
  const timer = setInterval(() => {
    if (stopped || running) return;
    running = pass().finally(() => (running = null));
  }, intervalMs);
  timer.unref?.();
  return {
    /** One pass now (tests). */
    runOnce: pass,
    async stop() {
      stopped = true;
      clearInterval(timer);
      await running;
    },
  };
}
