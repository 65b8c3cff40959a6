import type { APIContext, APIRoute } from 'astro';
import { ZodError, type ZodType, type ZodTypeDef } from 'zod';
import { hasRole, type Role } from '~/lib/auth/roles.ts';
import type { SessionUser } from './queries/users.ts';

/** The one error type endpoints throw; `errorResponse` turns it into the one JSON error shape. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields?: Record<string, string>,
  ) {
    super(message);
  }
}

export interface ErrorBody { error: { code: string; message: string; fields?: Record<string, string> } }

export function json(data: unknown, status = 200, headers: Record<string, string> = {}): Response {
  return new Response(JSON.stringify(data), {
    status,
    headers: { 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-store', ...headers },
  });
}

export function errorJson(status: number, code: string, message: string, fields?: Record<string, string>): Response {
  const body: ErrorBody = { error: { code, message, ...(fields ? { fields } : {}) } };
  return json(body, status);
}

/** Field path → reason, from a zod error, in the words the schema gave. */
export function zodFields(err: ZodError): Record<string, string> {
  const fields: Record<string, string> = {};
  for (const issue of err.issues) {
    const key = issue.path.length ? issue.path.join('.') : '_';
    fields[key] ??= issue.message;
  }
  return fields;
}

export function errorResponse(err: unknown): Response {
  if (err instanceof ApiError) return errorJson(err.status, err.code, err.message, err.fields);
  if (err instanceof ZodError) {
    const fields = zodFields(err);
    const summary = Object.entries(fields).map(([k, v]) => `${k}: ${v}`).join('; ');
    return errorJson(400, 'invalid_input', `Some fields need attention — ${summary}`, fields);
  }
  console.error('[api] unexpected error', err);
  return errorJson(500, 'internal_error', 'Something went wrong on the server; nothing was saved.');
}

/** Signed in and holding one of `roles`, or an ApiError (401 / 403). */
export function requireRole(locals: App.Locals, roles: readonly Role[]): SessionUser {
  const user = locals.user;
  if (!user) throw new ApiError(401, 'unauthenticated', 'Sign in first.');
  if (!hasRole(user.role, roles)) throw new ApiError(403, 'forbidden', `This needs one of these roles: ${roles.join(', ')}.`);
  return user;
}

type Schema<T> = ZodType<T, ZodTypeDef, unknown>;

export async function parseBody<T>(request: Request, schema: Schema<T>): Promise<T> {
  const type = request.headers.get('content-type') ?? '';
  if (!type.includes('application/json')) throw new ApiError(415, 'unsupported_media_type', 'Send the body as application/json.');
  let raw: unknown;
  try {
    raw = await request.json();
  } catch {
    throw new ApiError(400, 'invalid_json', 'The body is not valid JSON.');
  }
  return schema.parse(raw);
}

export function parseQuery<T>(url: URL, schema: Schema<T>): T {
  return schema.parse(Object.fromEntries(url.searchParams));
}

export function parseParams<T>(params: APIContext['params'], schema: Schema<T>): T {
  return schema.parse(params);
}

/** Wraps an endpoint so every thrown error leaves as the one JSON error shape. */
export function endpoint(handler: (ctx: APIContext) => Promise<Response>): APIRoute {
  return async (ctx) => {
    try {
      return await handler(ctx);
    } catch (err) {
      return errorResponse(err);
    }
  };
}
