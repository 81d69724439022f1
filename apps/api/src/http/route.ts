import type { EntityManager } from '@mikro-orm/postgresql';
import type { Project } from '@earmark/db';
import type { Request, RequestHandler, Response, Router } from 'express';
import type { z } from 'zod';
import type { Access } from '../auth/permissions.js';
import type { Principal } from '@earmark/domain';

export interface RouteContext {
  req: Request;
  res: Response;
  em: EntityManager;
  principal: Principal | null;
  project: Project | null;
}

export interface RouteDef {
  method: 'get' | 'post' | 'put' | 'patch' | 'delete';
  /** Express path, e.g. `/api/projects/:project`. */
  path: string;
  access: Access;
  summary: string;
  /** What the OpenAPI document says about the route's body and answer. */
  doc?: {
    body?: z.ZodType;
    bodyContentTypes?: string[];
    query?: z.ZodObject;
    response?: z.ZodType;
    /** Non-JSON answers, e.g. audio/wav or application/xml. */
    responseContentType?: string;
    status?: number;
    tags?: string[];
  };
  /** For routes without `:project`: finds the project key from the path (e.g. a capture id). */
  resolveProjectKey?: (req: Request, em: EntityManager) => Promise<string | undefined>;
  /** Runs before authentication (e.g. the sign-in rate limiter). */
  before?: RequestHandler[];
  handle(ctx: RouteContext): Promise<void>;
}

/** Narrows a route context to a signed-in user. */
export function requireUser(ctx: RouteContext) {
  if (ctx.principal?.kind !== 'user') throw new Error(`${ctx.req.path}: route expects a signed-in user`);
  return ctx.principal;
}

/** Narrows a route context to its resolved project. */
export function requireProject(ctx: RouteContext): Project {
  if (!ctx.project) throw new Error(`${ctx.req.path}: route expects a resolved project`);
  return ctx.project;
}

export type RouteMounter = (router: Router, routes: RouteDef[]) => void;
