import type { APIContext, APIRoute } from 'astro';
import { ZodError, type ZodType, type ZodTypeDef } from 'zod';
import { hasRole, type Role } from '~/lib/auth/roles.ts';
import type { SessionUser } from './queries/users.ts';
import { isDatabaseUnavailable, isDuplicateKey, isRetryableTransactionError } from './queries/transaction.ts';
import { strictJsonSchema, strictTextSchema } from './strict-input.ts';
import { bodyLimitFor, DEFAULT_BODY_LIMIT } from './body-limits.ts';

export const DATABASE_UNAVAILABLE_MESSAGE =
  'The database is not answering; readings cannot be charted or shown until it is back.';

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

export interface ErrorBody {
  error: { code: string; message: string; fields?: Record<string, string> };
}

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
    if (issue.code === 'unrecognized_keys') {
      // Name each unknown field itself (a typo such as `heartrate` must not pass as "no heart rate").
      for (const k of issue.keys) fields[[...issue.path, k].join('.')] ??= 'is not a field this route takes';
      continue;
    }
    const key = issue.path.length ? issue.path.join('.') : '_';
    fields[key] ??= issue.message;
  }
  return fields;
}

export function errorResponse(err: unknown): Response {
  if (err instanceof ApiError) {
    const res = errorJson(err.status, err.code, err.message, err.fields);
    if (err.status === 413) res.headers.set('connection', 'close'); // the rest of the body may still be arriving
    return res;
  }
  if (err instanceof ZodError) {
    const fields = zodFields(err);
    const summary = Object.entries(fields)
      .map(([k, v]) => `${k}: ${v}`)
      .join('; ');
    return errorJson(400, 'invalid_input', `Some fields need attention — ${summary}`, fields);
  }
  if (isDatabaseUnavailable(err)) return errorJson(503, 'database_unavailable', DATABASE_UNAVAILABLE_MESSAGE);
  if (isRetryableTransactionError(err)) {
    // Lost to other writers on every re-run: busy, not broken. Nothing was saved; send again.
    const res = errorJson(
      503,
      'database_busy',
      'The database was too busy to save this; nothing was saved. Send it again.',
    );
    res.headers.set('retry-after', '1');
    return res;
  }
  console.error('[api] unexpected error', err);
  return errorJson(500, 'internal_error', 'Something went wrong on the server; nothing was saved.');
}

/** Signed in and holding one of `roles`, or an ApiError (401 / 403). */
export function requireRole(locals: App.Locals, roles: readonly Role[]): SessionUser {
  const user = locals.user;
  if (!user) throw new ApiError(401, 'unauthenticated', 'Sign in first.');
  if (!hasRole(user.role, roles))
    throw new ApiError(403, 'forbidden', `This needs one of these roles: ${roles.join(', ')}.`);
  return user;
}

type Schema<T> = ZodType<T, ZodTypeDef, unknown>;

/** The body's bytes, throwing `tooLarge()` as soon as they pass `maxBytes` (the JSON routes and the uploads share it). */
export async function readBodyBytes(
  body: ReadableStream<Uint8Array>,
  maxBytes: number,
  tooLarge: () => ApiError,
): Promise<Buffer> {
  const reader = body.getReader();
  const chunks: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    size += value.byteLength;
    if (size > maxBytes) {
      await reader.cancel();
      throw tooLarge();
    }
    chunks.push(value);
  }
  return Buffer.concat(chunks, size);
}

/** The body as text, stopping with 413 past `maxBytes` (the middleware has already checked Content-Length). */
export async function readBodyText(request: Request, maxBytes = DEFAULT_BODY_LIMIT): Promise<string> {
  if (!request.body) return '';
  const bytes = await readBodyBytes(
    request.body,
    maxBytes,
    () =>
      new ApiError(
        413,
        'body_too_large',
        `The body is larger than this route takes (${Math.round(maxBytes / 1024)} KB).`,
      ),
  );
  return new TextDecoder('utf-8').decode(bytes);
}

/**
 * A JSON body, parsed strictly: numbers must be JSON numbers (no strings, arrays, hex or booleans
 * coerced), times ISO 8601 with a zone and a real calendar date, unknown fields refused by name,
 * text in Unicode NFC. Shared schemas stay lenient for the browser forms; the strictness is added
 * here, once, for every JSON route (see strict-input.ts).
 */
export async function parseBody<T>(
  request: Request,
  schema: Schema<T>,
  maxBytes = bodyLimitFor(new URL(request.url).pathname),
): Promise<T> {
  const type = request.headers.get('content-type') ?? '';
  if (!type.includes('application/json'))
    throw new ApiError(415, 'unsupported_media_type', 'Send the body as application/json.');
  const text = await readBodyText(request, maxBytes);
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch {
    throw new ApiError(400, 'invalid_json', 'The body is not valid JSON.');
  }
  return strictJsonSchema(schema).parse(raw);
}

/** Query strings: numbers only as plain decimals ("0x10", "1e3", " 7" refused), unknown parameters ignored. */
export function parseQuery<T>(url: URL, schema: Schema<T>): T {
  return strictTextSchema(schema).parse(Object.fromEntries(url.searchParams));
}

/** Path parameters: ids as plain decimals only (`/api/patients/0x10` is not patient 16). */
export function parseParams<T>(params: APIContext['params'], schema: Schema<T>): T {
  return strictTextSchema(schema).parse(params);
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

/**
 * Runs `work`; a duplicate key from the database (a unique index settling a race or a repeat)
 * becomes the given 409 with its own code, words and fields.
 */
export async function conflictOnDuplicate<T>(
  work: () => Promise<T>,
  code: string,
  message: string,
  fields?: Record<string, string>,
): Promise<T> {
  try {
    return await work();
  } catch (err) {
    if (isDuplicateKey(err)) throw new ApiError(409, code, message, fields);
    throw err;
  }
}
