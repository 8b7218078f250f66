// Errors a route answers with: a status, a stable machine code and a plain message (never a stack).
import type { FastifyError, FastifyReply, FastifyRequest } from 'fastify';

export class HttpError extends Error {
  override name = 'HttpError';
  constructor(readonly statusCode: number, readonly code: string, message: string, readonly field?: string, readonly retryAfterS?: number) {
    super(message);
  }
}

/** Fastify's own client errors (parser, size limit, media type) keep their status; the code is ours. */
const FASTIFY_CODES: Record<string, string> = {
  FST_ERR_CTP_BODY_TOO_LARGE: 'body-too-large',
  FST_ERR_CTP_INVALID_MEDIA_TYPE: 'unsupported-media-type',
  FST_ERR_CTP_EMPTY_JSON_BODY: 'malformed-body',
  FST_ERR_CTP_INVALID_JSON_BODY: 'malformed-body',
  FST_ERR_CTP_INVALID_CONTENT_LENGTH: 'malformed-body',
};

export function errorHandler(err: FastifyError | HttpError | Error, req: FastifyRequest, reply: FastifyReply): void {
  if (err instanceof HttpError) {
    if (err.retryAfterS !== undefined) void reply.header('retry-after', String(err.retryAfterS));
    void reply.code(err.statusCode).send(err.field ? { error: err.code, message: err.message, field: err.field } : { error: err.code, message: err.message });
    return;
  }
  const status = (err as FastifyError).statusCode;
  if (typeof status === 'number' && status >= 400 && status < 500) {
    const code = FASTIFY_CODES[(err as FastifyError).code] ?? 'bad-request';
    // Parser messages may quote the body; ours stays generic.
    const message = code === 'body-too-large' ? 'request body is larger than this server accepts'
      : code === 'unsupported-media-type' ? 'send application/json' : 'the request body is not valid JSON';
    void reply.code(status).send({ error: code, message });
    return;
  }
  req.log.error({ err }, 'request failed');
  void reply.code(500).send({ error: 'internal', message: `internal error (request ${req.id}); the server log has the details` });
}
