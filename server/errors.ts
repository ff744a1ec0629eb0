// Errors that carry their API status and code. Services throw them; the API's
// error handler (api/http.ts) turns them into the JSON error shape.

export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: { path: string; message: string }[],
  ) {
    super(message);
  }
}

export const unauthenticated = (message = 'Sign in first.') => new HttpError(401, 'unauthenticated', message);
export const forbidden = (message = 'Your roles do not allow this.') => new HttpError(403, 'forbidden', message);
export const notFound = (what = 'Resource') => new HttpError(404, 'not-found', `${what} not found.`);
export const conflict = (message: string) => new HttpError(409, 'conflict', message);
