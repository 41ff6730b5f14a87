import type { OpenAPIRegistry } from '@asteasolutions/zod-to-openapi';
import type { NextFunction, Request, Response, Router } from 'express';
import { z, type ZodObject, type ZodType } from 'zod';
import { errorBodySchema, hasAnyRole, type Role } from '@nightyard/contracts';
import { forbidden, unauthenticated } from './errors';
import { idempotencyKeyOf, requestHash, type IdempotencyStore } from './idempotency';
import { parseOrThrow } from './validate';
import { checkedTextOf, isChecked } from './checked-answer';
import type { AuthUser } from '../auth/auth-user';
import { assertMayOpenDepot } from '../depots/depot-access';

type Method = 'get' | 'post' | 'patch' | 'put' | 'delete';

/** `public` routes need no sign-in; every other route names the roles that may call it. */
export type Access = 'public' | readonly Role[];

export interface RouteSpec<B extends ZodType, Q extends ZodType, P extends ZodType, R extends ZodType> {
  method: Method;
  /** Express-style path below /api, e.g. `/users/:id`. */
  path: string;
  summary: string;
  tag: string;
  access: Access;
  body?: B;
  query?: Q;
  params?: P;
  response?: R;
  /**
   * The route answers with Server-Sent Events (`text/event-stream`) whose `data:` lines hold this
   * schema's JSON; the handler writes the stream itself.
   */
  eventStream?: ZodType;
  /** Success status; 204 sends no body. */
  status?: number;
  /**
   * Accept an `Idempotency-Key` header: a repeat with the same key and body gets the first
   * answer without the write being done again (for replace-all writes, imports, invitations).
   */
  idempotent?: boolean;
}

export interface RouteContext<B, Q, P> {
  body: B;
  query: Q;
  params: P;
  /** The signed-in caller; always set on routes that are not public. */
  user: AuthUser;
  req: Request;
  res: Response;
}

export interface RegisteredRoute {
  method: Method;
  path: string;
  access: Access;
  summary: string;
}

type Out<T> = T extends ZodType ? z.output<T> : undefined;

/**
 * Registers routes on an Express router, each with its zod schemas and roles, and describes
 * them in the OpenAPI registry from the same schemas. Handlers receive parsed input only.
 */
export class ApiRoutes {
  readonly registered: RegisteredRoute[] = [];

  constructor(
    private readonly router: Router,
    private readonly openapi: OpenAPIRegistry,
    private readonly authenticate: (req: Request, res: Response, next: NextFunction) => void,
    private readonly idempotency?: IdempotencyStore,
    /** Runs after each successful write, before its answer goes out (the caches hear of the change). */
    private readonly afterWrite?: () => Promise<unknown>,
  ) {}

  add<B extends ZodType = never, Q extends ZodType = never, P extends ZodType = never, R extends ZodType = never>(
    spec: RouteSpec<B, Q, P, R>,
    handler: (ctx: RouteContext<Out<B>, Out<Q>, Out<P>>) => Promise<Out<R> | void> | Out<R> | void,
  ): void {
    const status = spec.status ?? 200;
    if (spec.idempotent && (spec.access === 'public' || !this.idempotency)) {
      throw new Error(
        `${spec.method.toUpperCase()} ${spec.path}: idempotent routes need a signed-in caller and an idempotency store`,
      );
    }
    const routeName = `${spec.method.toUpperCase()} ${spec.path}`;
    const run = async (req: Request, res: Response) => {
      const user = req.user as AuthUser | undefined;
      if (spec.access !== 'public') {
        if (!user) throw unauthenticated();
        if (!hasAnyRole(user.roles, spec.access)) throw forbidden();
      }
      const params = (spec.params ? parseOrThrow(spec.params, req.params, 'params') : undefined) as Out<P>;
      // Every /depots/:depotId/... route: a depot the caller may not see is "not found" before the
      // rest of the request is read (the services then read the depot within the organisation).
      const depotId = (params as { depotId?: unknown } | undefined)?.depotId;
      if (user && typeof depotId === 'string') assertMayOpenDepot(user, depotId);
      const query = (spec.query ? parseOrThrow(spec.query, req.query ?? {}, 'query') : undefined) as Out<Q>;
      const body = (spec.body ? parseOrThrow(spec.body, req.body ?? {}, 'body') : undefined) as Out<B>;
      const key = spec.idempotent ? idempotencyKeyOf(req.headers['idempotency-key']) : undefined;
      const execute = async () => {
        const result = await handler({ body, query, params, user: user as AuthUser, req, res });
        // A handler that answered itself (refresh without a cookie: 204) has nothing to check.
        if (res.headersSent || res.writableEnded) return { status: res.statusCode, body: null };
        return {
          status,
          body: status === 204 ? null : spec.response && !isChecked(result) ? spec.response.parse(result) : result,
        };
      };
      let answer: { status: number; body: unknown };
      if (key) {
        const hash = requestHash(req.method, req.originalUrl, req.body);
        const kept = await this.idempotency!.run(
          { userId: (user as AuthUser).id, key, route: routeName, requestHash: hash },
          execute,
        );
        if (kept.replayed) res.setHeader('Idempotent-Replayed', 'true');
        answer = kept;
      } else {
        answer = await execute();
      }
      if (spec.method !== 'get') await this.afterWrite?.();
      if (res.headersSent || res.writableEnded) return;
      if (answer.status === 204) res.status(204).end();
      else {
        const text = checkedTextOf(answer.body);
        if (text === undefined) res.status(answer.status).json(answer.body);
        else if (typeof text === 'string' || Buffer.isBuffer(text)) res.status(answer.status).type('json').send(text);
        else sendParts(res.status(answer.status), text);
      }
    };
    const chain = spec.access === 'public' ? [run] : [this.authenticate, run];
    this.router[spec.method](spec.path, ...chain);
    this.registered.push({ method: spec.method, path: spec.path, access: spec.access, summary: spec.summary });
    this.describe(spec, status);
  }

  private describe(spec: RouteSpec<ZodType, ZodType, ZodType, ZodType>, status: number): void {
    const openapiPath = '/api' + spec.path.replace(/:(\w+)/g, '{$1}');
    const errorContent = { 'application/json': { schema: errorBodySchema } };
    this.openapi.registerPath({
      method: spec.method,
      path: openapiPath,
      summary: spec.summary,
      tags: [spec.tag],
      description: spec.access === 'public' ? 'No sign-in needed.' : `Roles allowed: ${spec.access.join(', ')}.`,
      security: spec.access === 'public' ? [] : [{ bearerAuth: [] }],
      request: {
        params: spec.params as ZodObject | undefined,
        query: spec.query as ZodObject | undefined,
        body: spec.body ? { content: { 'application/json': { schema: spec.body } } } : undefined,
        headers: spec.idempotent
          ? z.object({
              'Idempotency-Key': z
                .string()
                .optional()
                .describe('Send the same key to retry safely: a repeat gets the first answer for 24 hours'),
            })
          : undefined,
      },
      responses: {
        [status]: spec.eventStream
          ? {
              description: 'A stream of Server-Sent Events; each `data:` line is one of these',
              content: { 'text/event-stream': { schema: spec.eventStream } },
            }
          : spec.response
            ? { description: 'Success', content: { 'application/json': { schema: spec.response } } }
            : { description: 'Success' },
        400: { description: 'The input is not valid; `fields` says what to fix', content: errorContent },
        ...(spec.idempotent
          ? {
              409: {
                description:
                  'Conflicts with a change saved at the same moment, or the first request with this key is still running',
                content: errorContent,
              },
              422: { description: 'The Idempotency-Key was used for a different request', content: errorContent },
            }
          : {}),
        ...(spec.access === 'public'
          ? {}
          : {
              401: { description: 'Not signed in, or the token expired', content: errorContent },
              403: { description: "The caller's roles do not allow this", content: errorContent },
            }),
      },
    });
  }
}

/** A JSON answer kept in parts, written as one response (one system call) without joining them. */
function sendParts(res: Response, parts: readonly Buffer[]): void {
  res.type('json');
  res.setHeader(
    'Content-Length',
    parts.reduce((n, p) => n + p.length, 0),
  );
  res.cork();
  for (const part of parts.slice(0, -1)) res.write(part);
  res.end(parts.at(-1));
}
