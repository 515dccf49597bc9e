import { ACCESS } from '../../shared/roles.js';
import type { Request, Response } from 'express';
import multer from 'multer';
import { z } from 'zod';
import { idOf } from '../core/write-routes.js';
import { DECIMAL_MARKS } from '../../shared/cell-parsers.js';
import { AppError } from '../core/app-error.js';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
import type { AppContext } from '../context.js';
import { IMPORT_KINDS } from './import-types.js';
import { IMPORT_LIMITS } from './import-limits.js';
import { getImport, ImportJobs, listImports, revalidateImport, stageImport, startCommit } from './imports-service.js';

const mappingSchema = z.record(z.string().max(200), z.string().max(500).nullable(), { error: 'Send the mapping as an object { field: column }' });
const deliveryPointSchema = z.string().trim().min(1, 'Name a delivery point').max(120);
const decimalMarkSchema = z.enum(DECIMAL_MARKS, { error: 'Choose how the file writes decimals: point (1234.5) or comma (1234,5)' });

/** The multipart form's text fields (the file itself is `file`). */
const uploadSchema = z.object({
  kind: z.enum(IMPORT_KINDS, { error: `Choose the kind of data: ${IMPORT_KINDS.join(', ')}` }),
  mapping: z
    .string()
    .max(50_000)
    .optional()
    .transform((s, c) => {
      if (s === undefined || s.trim() === '') return undefined;
      try {
        return JSON.parse(s) as unknown;
      } catch {
        c.addIssue({ code: 'custom', message: 'The mapping is not valid JSON' });
        return z.NEVER;
      }
    })
    .pipe(mappingSchema.optional()),
  deliveryPoint: deliveryPointSchema.optional(),
  decimalMark: decimalMarkSchema.optional(),
});
const validateSchema = z.object({ mapping: mappingSchema.optional(), deliveryPoint: deliveryPointSchema.nullable().optional(), decimalMark: decimalMarkSchema.optional() });
const commitSchema = z.object({
  onExisting: z.enum(['update', 'skip'], { error: 'Choose what to do with rows that already exist: update or skip' }),
  /** The planner has seen the warnings (prices far from their history) and accepts them. */
  acceptWarnings: z.boolean().optional(),
});
const listQuery = z.object({ limit: z.coerce.number().int().min(1).max(200).default(50) });

const mb = (n: number) => `${n / 1024 / 1024} MB`;

const upload = multer({
  storage: multer.memoryStorage(),
  // Browsers send UTF-8 file names without saying so.
  defParamCharset: 'utf8',
  limits: { fileSize: IMPORT_LIMITS.maxFileBytes, files: 1, fields: 10, fieldSize: 64 * 1024, parts: 12 },
});

/** Runs multer and turns its errors into the API's error shape (413 for a file over the limit). */
function receiveFile(req: Request, res: Response): Promise<void> {
  return new Promise((resolve, reject) => {
    upload.single('file')(req, res, (err: unknown) => {
      if (!err) return resolve();
      if (err instanceof multer.MulterError) {
        if (err.code === 'LIMIT_FILE_SIZE') {
          return reject(new AppError(413, 'too_large', `The file is larger than ${mb(IMPORT_LIMITS.maxFileBytes)}; split it into smaller files`));
        }
        if (err.code === 'LIMIT_UNEXPECTED_FILE') return reject(AppError.invalid('Send one file, in the form field "file"', [{ path: 'body.file', message: `Unexpected file field "${err.field}"` }]));
        return reject(AppError.invalid(`The upload form is not valid: ${err.message}`));
      }
      reject(AppError.invalid('The upload could not be read; send a multipart form with the file in "file"'));
    });
  });
}

/**
 * Imports of prices, farm records and wide observation files: upload (stage and preview), validate
 * again with another mapping, commit in the background, follow the progress. Writes are the
 * planner's; an administrator may read the list and the outcomes.
 */
export function importsRoutes(ctx: AppContext): RouteDef[] {
  const jobs = new ImportJobs();
  return [
    {
      method: 'get',
      path: '/',
      access: ACCESS.imports,
      handler: async (req, res) => {
        const q = parse(listQuery, req.query, 'query');
        res.json(await listImports(ctx, jobs, q.limit));
      },
    },
    {
      method: 'post',
      path: '/',
      access: ACCESS.dataEdit,
      handler: async (req, res) => {
        await receiveFile(req, res);
        const body = parse(uploadSchema, req.body, 'body');
        if (!req.file) throw AppError.invalid('Attach the file to import', [{ path: 'body.file', message: 'Send the file in the form field "file"' }]);
        const view = await stageImport(
          ctx,
          jobs,
          { bytes: req.file.buffer, fileName: req.file.originalname, kind: body.kind, mapping: body.mapping, deliveryPoint: body.deliveryPoint, decimalMark: body.decimalMark },
          req.user!.id,
        );
        res.status(201).json(view);
      },
    },
    {
      method: 'get',
      path: '/:id',
      access: ACCESS.imports,
      handler: async (req, res) => {
        const id = idOf(req);
        res.json(await getImport(ctx, jobs, id));
      },
    },
    {
      method: 'post',
      path: '/:id/validate',
      access: ACCESS.dataEdit,
      handler: async (req, res) => {
        const id = idOf(req);
        const body = parse(validateSchema, req.body, 'body');
        res.json(await revalidateImport(ctx, jobs, id, body));
      },
    },
    {
      method: 'post',
      path: '/:id/commit',
      access: ACCESS.dataEdit,
      handler: async (req, res) => {
        const id = idOf(req);
        const { onExisting, acceptWarnings } = parse(commitSchema, req.body, 'body');
        const log = (err: unknown) => req.log?.error({ err, importId: id }, 'import commit failed');
        const view = await startCommit(ctx, jobs, id, onExisting, req.user!.id, log, acceptWarnings ?? false);
        res.status(202).json({ id: view.id, status: view.status, progress: view.progress });
      },
    },
  ];
}
