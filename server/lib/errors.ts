/** The one error family of the API. The error middleware turns these into `{ error: { code, message, details } }`. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
  }
}

export const badRequest = (message: string, details?: unknown, code = 'BAD_REQUEST') =>
  new HttpError(400, code, message, details);
export const unauthorized = (message = 'Please sign in.') => new HttpError(401, 'UNAUTHENTICATED', message);
export const forbidden = (message = 'Your role does not allow this.') => new HttpError(403, 'FORBIDDEN', message);
export const notFound = (what = 'Resource') => new HttpError(404, 'NOT_FOUND', `${what} not found.`);
export const conflict = (message: string, details?: unknown, code = 'CONFLICT') =>
  new HttpError(409, code, message, details);
export const unavailable = (message: string) => new HttpError(503, 'SERVICE_UNAVAILABLE', message);
