/**
 * Errors in one place: every 4xx/5xx the API gives is application/problem+json (RFC 9457) with a
 * stable `code`, a `detail` that says what is wrong and what to do, and the dotted `field` of the
 * offending input when there is one. 5xx hide internals (the log has them).
 */
import type { FastifyError, FastifyInstance, FastifyReply } from 'fastify';
import fp from 'fastify-plugin';
import { isInputError } from '../../shared/errors.ts';
import type { Problem } from '../../shared/schemas/api.ts';
import { QueueFullError, TaskFailure } from '../jobs/runner.ts';
import { InUseError } from '../storage/store.ts';

/** An error a route raises with its HTTP status. */
export class HttpError extends Error {
  override readonly name = 'HttpError';
  constructor(
    readonly status: number,
    readonly code: string,
    detail: string,
    readonly field?: string,
    readonly headers: Record<string, string> = {},
  ) {
    super(detail);
  }
}

export const notFound = (what: string, id: string): HttpError => new HttpError(404, 'not-found', `no ${what} with id ${id}; list them with GET /api/${what === 'analysis' ? 'clips/{id}/analyses' : `${what}s`}`, 'id');

const TITLES: Record<number, string> = {
  400: 'Bad request',
  401: 'Sign-in needed',
  404: 'Not found',
  409: 'Conflict',
  413: 'Too large',
  415: 'Unsupported media type',
  422: 'Cannot be processed',
  429: 'Too many requests',
  500: 'Internal error',
  503: 'Busy',
};

/** Dotted path of a JSON pointer ("/secondary/turns" → "secondary.turns"). */
export const dottedPath = (pointer: string): string =>
  pointer
    .split('/')
    .slice(1)
    .map((p) => p.replace(/~1/g, '/').replace(/~0/g, '~'))
    .join('.');

interface ValidationIssue {
  instancePath?: string;
  keyword?: string;
  params?: Record<string, unknown>;
  message?: string;
}

function validationProblem(e: { validation?: ValidationIssue[]; validationContext?: string }): Problem {
  const first: ValidationIssue = e.validation?.[0] ?? {};
  let field = dottedPath(first.instancePath ?? '');
  const missingProp = (first.params?.requiredProperties as string[] | undefined)?.[0] ?? (first.params?.missingProperty as string | undefined);
  const extra = (first.params?.additionalProperties as string[] | undefined)?.[0] ?? (first.params?.additionalProperty as string | undefined);
  if (first.keyword === 'required' && missingProp) field = field ? `${field}.${missingProp}` : missingProp;
  if (first.keyword === 'additionalProperties' && extra) field = field ? `${field}.${extra}` : extra;
  const where = e.validationContext ?? 'body';
  const what = field || where;
  const why =
    first.keyword === 'required'
      ? 'is missing'
      : first.keyword === 'additionalProperties'
        ? 'is not a known field (remove it or correct its spelling)'
        : (first.message ?? 'is not valid');
  return {
    type: 'https://coilcue.invalid/problems/bad-request',
    title: TITLES[400],
    status: 400,
    code: 'bad-request',
    detail: `${where === 'body' ? '' : `${where} `}${what} ${why}; see GET /api/openapi.json for the allowed values`,
    ...(field ? { field } : { field: where }),
  };
}

const problem = (status: number, code: string, detail: string, field?: string): Problem => ({
  type: status >= 500 && code === 'internal' ? 'about:blank' : `https://coilcue.invalid/problems/${code}`,
  title: TITLES[status] ?? 'Error',
  status,
  code,
  detail,
  ...(field ? { field } : {}),
});

const INPUT_STATUS: Record<string, number> = { 'too-large': 413, 'too-long': 413 };

/** Maps any error to a problem and its headers. */
export function toProblem(e: unknown): { problem: Problem; headers: Record<string, string>; internal: boolean } {
  if (e instanceof HttpError) return { problem: problem(e.status, e.code, e.message, e.field), headers: e.headers, internal: false };
  if (isInputError(e)) return { problem: problem(INPUT_STATUS[e.code] ?? 400, e.code, e.message, e.field), headers: {}, internal: false };
  if (e instanceof TaskFailure) return { problem: problem(e.code === 'timeout' ? 503 : 400, e.code, e.message, e.field), headers: {}, internal: false };
  if (e instanceof QueueFullError) return { problem: problem(503, 'queue-full', e.message), headers: { 'retry-after': String(e.retryAfterS) }, internal: false };
  if (e instanceof InUseError) return { problem: problem(409, 'in-use', `${e.message}; remove it from the set or delete the set first`), headers: {}, internal: false };
  const fe = e as FastifyError & { validation?: ValidationIssue[] };
  if (fe?.validation) return { problem: validationProblem(fe), headers: {}, internal: false };
  switch (fe?.code) {
    case 'FST_ERR_CTP_BODY_TOO_LARGE':
      return { problem: problem(413, 'body-too-large', 'the request body is larger than the server accepts; send a smaller profile or set'), headers: {}, internal: false };
    case 'FST_REQ_FILE_TOO_LARGE':
      return { problem: problem(413, 'too-large', 'the file is larger than the upload limit; cut a shorter excerpt or use a compressed format (FLAC, Ogg Vorbis, MP3)', 'file'), headers: {}, internal: false };
    case 'FST_FILES_LIMIT':
      return { problem: problem(400, 'one-file', 'send exactly one file per upload, in the field "file"', 'file'), headers: {}, internal: false };
    case 'FST_INVALID_MULTIPART_CONTENT_TYPE':
      return { problem: problem(415, 'not-multipart', 'upload the file as multipart/form-data with one field "file"', 'file'), headers: {}, internal: false };
    case 'FST_ERR_CTP_INVALID_MEDIA_TYPE':
      return { problem: problem(415, 'media-type', 'send JSON (Content-Type: application/json), or multipart/form-data for an upload'), headers: {}, internal: false };
    case 'FST_ERR_CTP_EMPTY_JSON_BODY':
      return { problem: problem(400, 'empty-body', 'the request body is empty; send the JSON object this route takes'), headers: {}, internal: false };
  }
  if (e instanceof SyntaxError || fe?.code === 'FST_ERR_CTP_INVALID_JSON_BODY') {
    return { problem: problem(400, 'bad-json', `the request body is not valid JSON (${(e as Error).message}); fix it and send it again`), headers: {}, internal: false };
  }
  const status = fe?.statusCode;
  if (typeof status === 'number' && status >= 400 && status < 500) {
    return { problem: problem(status, 'bad-request', fe.message), headers: {}, internal: false };
  }
  return { problem: problem(500, 'internal', 'internal error; the server log has the details'), headers: {}, internal: true };
}

/** Sends a problem answer. */
export function sendProblem(reply: FastifyReply, p: Problem, headers: Record<string, string> = {}): FastifyReply {
  return reply.code(p.status).headers(headers).type('application/problem+json').send(p);
}

function createErrors(app: FastifyInstance): void {
  app.setErrorHandler((err, req, reply) => {
    const { problem: p, headers, internal } = toProblem(err);
    if (internal) req.log.error({ err }, 'request failed');
    else req.log.info({ code: p.code, status: p.status }, 'request refused');
    return sendProblem(reply, p, headers);
  });
  app.setNotFoundHandler((req, reply) =>
    sendProblem(reply, problem(404, 'no-route', `no route ${req.method} ${req.url.split('?')[0]}; GET /api/openapi.json lists every route`)),
  );
}

export default fp(async (app) => createErrors(app), { name: 'errors' });
