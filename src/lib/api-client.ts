import type { ApiErrorBody } from '../../shared/contracts/auth.ts';

/** An error answered by the API, with the message it gave (meant for people) and its HTTP status. */
export class ApiError extends Error {
  constructor(public readonly status: number, public readonly code: string, message: string, public readonly details?: unknown) {
    super(message);
    this.name = 'ApiError';
  }
}

type Listener = (error: ApiError) => void;
const unauthorizedListeners = new Set<Listener>();

/** The app shell subscribes here to send the user to the sign-in page when a session ends. */
export function onUnauthorized(listener: Listener): () => void {
  unauthorizedListeners.add(listener);
  return () => unauthorizedListeners.delete(listener);
}

async function request<T>(method: string, path: string, body?: unknown): Promise<T> {
  let response: Response;
  try {
    response = await fetch(path, {
      method,
      credentials: 'same-origin',
      headers: body === undefined ? { Accept: 'application/json' } : { Accept: 'application/json', 'Content-Type': 'application/json' },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
  } catch {
    throw new ApiError(0, 'network', 'Gatepost cannot be reached. Check the connection and try again.');
  }
  if (response.status === 204) return undefined as T;
  const text = await response.text();
  let json: unknown = undefined;
  try {
    json = text ? JSON.parse(text) : undefined;
  } catch {
    // A proxy's HTML error page, for example; reported below by status.
  }
  if (!response.ok) {
    const error = (json as ApiErrorBody | undefined)?.error;
    const apiError = new ApiError(
      response.status,
      error?.code ?? 'http_error',
      error?.message ?? `The server answered ${response.status} ${response.statusText}.`,
      error?.details,
    );
    if (response.status === 401 && !path.startsWith('/api/auth/login')) unauthorizedListeners.forEach((l) => l(apiError));
    throw apiError;
  }
  return json as T;
}

/** The one API client: every feature's requests go through it, so errors are handled in one way. */
export const api = {
  get: <T>(path: string) => request<T>('GET', path),
  post: <T>(path: string, body?: unknown) => request<T>('POST', path, body ?? {}),
  patch: <T>(path: string, body: unknown) => request<T>('PATCH', path, body),
  delete: <T = void>(path: string) => request<T>('DELETE', path),
};
