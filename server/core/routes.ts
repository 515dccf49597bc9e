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
export function mountRoutes(router: Router, prefix: string, defs: RouteDef[], table: MountedRoute[]): void {
  for (const def of defs) {
    router[def.method](def.path, requireAccess(def.access), def.handler as RequestHandler);
    table.push({ method: def.method, path: def.path, access: def.access, devOnly: def.devOnly, fullPath: prefix + def.path });
  }
}
