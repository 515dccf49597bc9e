import type { DestinationStream } from 'pino';
import type { Config } from './config.js';
import type { ChangeTracker } from './db/change-tracker.js';
import type { Db } from './db/client.js';
import type { Mailer } from './mail/mailer.js';
import type { FakeSmtp } from './mail/fake-smtp.js';
import type { JobRunner } from './jobs/job-runner.js';
import type { PaymentGateway } from './bookings/payment-gateway.js';
import type { FakePayments } from './bookings/fake-payments.js';

/** What every router and service is given: built once by main.ts, or by a test with its own database. */
export interface AppContext {
  db: Db;
  dbKind: 'pglite' | 'postgres';
  /** This process's view of database writes (PGlite), for the in-memory caches; absent: no caching. */
  changes?: ChangeTracker | null;
  config: Config;
  mailer: Mailer;
  /** Present when the server runs its own fake SMTP server (development and tests). */
  fakeSmtp?: FakeSmtp;
  /** The payment service (the real one, or the local fake); absent: bookings cannot be prepaid. */
  payments?: PaymentGateway;
  /** Present when the server runs its own fake payment service (development and tests). */
  fakePayments?: FakePayments;
  /** The background job runner of this instance, when it runs one. */
  jobs?: JobRunner;
  /** Where the request log goes (default: standard output); tests read it from a stream. */
  logDestination?: DestinationStream;
}
