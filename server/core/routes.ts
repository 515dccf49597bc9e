import type { NextFunction, Request, RequestHandler, Response, Router } from 'express';
import type { Role } from '../../shared/roles.js';
import { AppError } from './app-error.js';

/** Who may call a route: anyone, any signed-in user, or the listed roles. */
export type Access = 'public' | 'signed-in' | readonly Role[];

export interface RouteDef {
  method: 'get' | 'post' | 'put' | 'patch' | 'delete';
  path: string;
  access: Access;
  /** Only mounted in development mode. */
  devOnly?: boolean;
  /**
   * GET only: the answer may be kept in memory until a table it was read from is written
   * (core/read-cache.ts). Only for answers that depend on nothing but the database, the user and
   * the URL (no clock, no in-memory job state, no headers of their own).
   */
  cache?: boolean;
  handler: (req: Request, res: Response, next: NextFunction) => unknown;
}

/** The full table of mounted routes, with their mount prefix: tests walk it so no route is forgotten. */
export interface MountedRoute extends Omit<RouteDef, 'handler'> {
  fullPath: string;
}

export function requireAccess(access: Access): RequestHandler {
  return (req, _res, next) => {
    if (access === 'public') return next();
    const user = req.user;
    if (!user) return next(AppError.unauthenticated());
    if (access === 'signed-in' || access.includes(user.role)) return next();
    next(AppError.forbidden());
  };
}

/** Mounts each definition on the router behind its access check and records it in `table`. */
export function mountRoutes(router: Router, prefix: string, defs: RouteDef[], table: MountedRoute[], cache?: RequestHandler): void {
  for (const def of defs) {
    if (def.cache && def.method !== 'get') throw new Error(`${def.method.toUpperCase()} ${prefix}${def.path}: only GET answers can be cached`);
    const handlers: RequestHandler[] = [requireAccess(def.access)];
    if (def.cache && cache) handlers.push(cache);
    router[def.method](def.path, ...handlers, def.handler as RequestHandler);
    table.push({ method: def.method, path: def.path, access: def.access, devOnly: def.devOnly, cache: def.cache, fullPath: prefix + def.path });
  }
}
