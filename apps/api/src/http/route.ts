import type { EntityManager } from '@mikro-orm/postgresql';
import type { Project } from '@earmark/db';
import type { Principal } from '@earmark/domain';
import type { Request, RequestHandler, Response, Router } from 'express';
import type { z } from 'zod';
import type { Access } from '../auth/permissions.js';

/** What a handler gets: the parsed request parts (typed by the route's schemas) and the caller. */
export interface RouteContext<P = unknown, Q = unknown, B = unknown> {
  req: Request;
  res: Response;
  em: EntityManager;
  principal: Principal | null;
  project: Project | null;
  /** Path parameters parsed by the route's `params` schema (422 naming the field otherwise). */
  params: P;
  /** Query parsed by the route's `query` schema. */
  query: Q;
  /** JSON body parsed by the route's `body` schema. */
  body: B;
}

/**
 * One route, declared once: its access rule and the schemas of its params, query, body and
 * answer. The mount parses each part before the handler runs; the OpenAPI document is
 * generated from the same schemas.
 */
// Stored routes are heterogeneous; `route()` checks each handler against its own schemas.
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export interface RouteDef<P = any, Q = any, B = any> {
  method: 'get' | 'post' | 'put' | 'patch' | 'delete';
  /** Express path, e.g. `/api/projects/:project`. */
  path: string;
  access: Access;
  summary: string;
  params?: z.ZodType<P>;
  query?: z.ZodType<Q>;
  body?: z.ZodType<B>;
  /** The JSON answer's schema (documentation; the contracts' tests check the shapes). */
  response?: z.ZodType;
  /** The success status, when not 200. */
  status?: number;
  /** What the OpenAPI document says beyond the schemas. */
  doc?: {
    /** A query the handler parses itself (a capture upload's, which may come as form fields instead). */
    query?: z.ZodObject;
    /** Non-JSON request bodies (capture uploads). */
    bodyContentTypes?: string[];
    /** Non-JSON answers, e.g. audio/wav or application/xml. */
    responseContentType?: string;
    tags?: string[];
  };
  /**
   * For routes without `:project`: finds the project of the resource the path names (e.g. a
   * capture id). `projectKey` is null when there is no such resource; `notFoundDetail` is the one
   * 404 detail for "no such resource" and "not yours" alike (authorize answers it for both).
   */
  resolveProjectKey?: (req: Request, em: EntityManager) => Promise<{ projectKey: string | null; notFoundDetail: string }>;
  /** Runs before authentication (e.g. the sign-in rate limiter). */
  before?: RequestHandler[];
  handle(ctx: RouteContext<P, Q, B>): Promise<void>;
}

/** Declares a route with its handler typed by its schemas. */
export function route<P = Record<string, never>, Q = Record<string, never>, B = undefined>(def: RouteDef<P, Q, B>): RouteDef {
  return def as RouteDef;
}

/** Narrows a route context to a signed-in user. */
export function requireUser(ctx: Pick<RouteContext, 'principal' | 'req'>) {
  if (ctx.principal?.kind !== 'user') throw new Error(`${ctx.req.path}: route expects a signed-in user`);
  return ctx.principal;
}

/** Narrows a route context to its resolved project. */
export function requireProject(ctx: Pick<RouteContext, 'project' | 'req'>): Project {
  if (!ctx.project) throw new Error(`${ctx.req.path}: route expects a resolved project`);
  return ctx.project;
}

export type RouteMounter = (router: Router, routes: RouteDef[]) => void;
