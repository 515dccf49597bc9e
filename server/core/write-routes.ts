/**
 * The write routes most features share, as data: create from a body (`POST /`, 201 with what the
 * service returns), replace by id (`PUT /:id`) and delete by id (`DELETE /:id`, 204). Each parses
 * the id and the body with `parse` (a 400 naming the field) and hands the service the caller's user
 * id for the audit; the service does the rest (transaction, version check, audit). `actionRoute` and
 * `jobRoute` are the `POST /:id/<action>` routes (a resent invitation, a cancelled or queued run).
 */
import type { Request } from 'express';
import { z } from 'zod';
import { idParamSchema } from '../../shared/schemas.js';
import type { Access, RouteDef } from './routes.js';
import { parse } from './validate.js';

/** The `:id` of the path, parsed (a 400 naming `params.id` when it is not a record id). Every router reads ids with it. */
export const idOf = (req: Pick<Request, 'params'>): number => parse(idParamSchema, req.params, 'params').id;

export function createRoute<S extends z.ZodType>(access: Access, schema: S, create: (body: z.output<S>, actorUserId: number) => Promise<unknown>): RouteDef {
  return {
    method: 'post',
    path: '/',
    access,
    handler: async (req, res) => res.status(201).json(await create(parse(schema, req.body, 'body'), req.user!.id)),
  };
}

export function replaceRoute<S extends z.ZodType>(
  access: Access,
  schema: S,
  replace: (id: number, body: z.output<S>, actorUserId: number) => Promise<unknown>,
): RouteDef {
  return {
    method: 'put',
    path: '/:id',
    access,
    // The id is parsed before the body, so a bad id is the one reported.
    handler: async (req, res) => res.json(await replace(idOf(req), parse(schema, req.body, 'body'), req.user!.id)),
  };
}

export function deleteRoute(access: Access, remove: (id: number, actorUserId: number) => Promise<void>): RouteDef {
  return {
    method: 'delete',
    path: '/:id',
    access,
    handler: async (req, res) => {
      await remove(idOf(req), req.user!.id);
      res.status(204).end();
    },
  };
}

/**
 * `POST <path>` on one record (the path names `:id`): the service gets the id and the caller's user
 * id, and the answer is `status` with what it returns (202 where the work goes on after the answer).
 */
export function actionRoute(access: Access, path: string, act: (id: number, actorUserId: number) => Promise<unknown>, status: 200 | 202 = 200): RouteDef {
  return {
    method: 'post',
    path,
    access,
    handler: async (req, res) => res.status(status).json(await act(idOf(req), req.user!.id)),
  };
}

/** An `actionRoute` whose service queues a job (a fit, a projection): the job runner is woken at once, and the answer is 202. */
export function jobRoute(jobs: { poke(): void } | undefined, access: Access, path: string, start: (id: number, actorUserId: number) => Promise<unknown>): RouteDef {
  return actionRoute(
    access,
    path,
    async (id, actor) => {
      const started = await start(id, actor);
      jobs?.poke();
      return started;
    },
    202,
  );
}

/** The `version` an edit names (the one it started from), so a stale edit is refused with 409 `stale`. */
export function versionField(what: string, readFrom: string) {
  return z.number({ error: `Send the version of the ${what} you edited (from ${readFrom})` }).int().positive();
}
