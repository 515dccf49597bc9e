/**
 * Record ids, declared once: every table's key is a PostgreSQL `integer`, so an id is a whole number
 * from 1 to 2^31 − 1. A larger one is refused here with a message naming the field, instead of
 * reaching the database and failing there (issue 15, item 5).
 */
import { z } from 'zod';

/** The largest value of a PostgreSQL `integer` (and of every id column). */
export const MAX_ID = 2 ** 31 - 1;
const ID_MESSAGE = `Use a record id: a whole number from 1 to ${MAX_ID.toLocaleString('en')}`;

/** An id in a JSON body. */
export const idSchema = z.number({ error: ID_MESSAGE }).int(ID_MESSAGE).min(1, ID_MESSAGE).max(MAX_ID, ID_MESSAGE);

/** An id in a path or query string (text of digits). */
export const idTextSchema = z
  .string({ error: ID_MESSAGE })
  .regex(/^\d{1,10}$/, ID_MESSAGE)
  .transform(Number)
  .pipe(idSchema);

/** `?items=1,2,3`: a comma-separated list of ids, optional. */
export const idListSchema = z
  .string()
  .regex(/^\d{1,10}(,\d{1,10}){0,999}$/, 'Use comma-separated record ids such as 1,2,3 (at most 1,000)')
  .transform((s) => s.split(',').map(Number))
  .pipe(z.array(z.number().int().min(1, ID_MESSAGE).max(MAX_ID, ID_MESSAGE)))
  .optional();

export const idParamSchema = z.object({ id: idTextSchema });
