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

async function request<T>(method: string, path: string, body?: unknown, extraHeaders: Record<string, string> = {}): Promise<T> {
  let response: Response;
  try {
    response = await fetch(path, {
      method,
      credentials: 'same-origin',
      headers: { ...(body === undefined ? { Accept: 'application/json' } : { Accept: 'application/json', 'Content-Type': 'application/json' }), ...extraHeaders },
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

function errorFromXhr(xhr: XMLHttpRequest): ApiError {
  let body: ApiErrorBody | undefined;
  try {
    body = JSON.parse(xhr.responseText) as ApiErrorBody;
  } catch {
    // not JSON: reported by status below
  }
  const error = new ApiError(xhr.status, body?.error?.code ?? 'http_error', body?.error?.message ?? `The server answered ${xhr.status}.`, body?.error?.details);
  if (xhr.status === 401) unauthorizedListeners.forEach((l) => l(error));
  return error;
}

/**
 * An upload with progress (fetch cannot report upload progress, XMLHttpRequest can): a multipart form, or one file
 * as the whole body, sent as application/octet-stream whatever type the browser gives the file (a .csv may come as
 * a spreadsheet type, a misnamed one as JSON: the server takes the bytes as they are and the importer judges them).
 * `onProgress` gets the fraction sent, 0 to 1.
 */
function upload<T>(path: string, body: FormData | Blob, onProgress?: (fraction: number) => void, signal?: AbortSignal): Promise<T> {
  return new Promise<T>((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', path);
    xhr.setRequestHeader('Accept', 'application/json');
    if (!(body instanceof FormData)) xhr.setRequestHeader('Content-Type', 'application/octet-stream');
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) onProgress?.(e.loaded / e.total);
    };
    xhr.onload = () => {
      if (xhr.status >= 200 && xhr.status < 300) {
        try {
          resolve(JSON.parse(xhr.responseText) as T);
        } catch {
          reject(new ApiError(xhr.status, 'bad_response', 'The server answered with something that is not JSON.'));
        }
      } else reject(errorFromXhr(xhr));
    };
    xhr.onerror = () => reject(new ApiError(0, 'network', 'The upload was interrupted. Check the connection and try again.'));
    xhr.onabort = () => reject(new ApiError(0, 'aborted', 'Upload cancelled.'));
    signal?.addEventListener('abort', () => xhr.abort());
    xhr.send(body);
  });
}

/** Binary data (raw samples), as an ArrayBuffer. */
async function binary(path: string): Promise<ArrayBuffer> {
  let response: Response;
  try {
    response = await fetch(path, { credentials: 'same-origin' });
  } catch {
    throw new ApiError(0, 'network', 'Gatepost cannot be reached. Check the connection and try again.');
  }
  if (!response.ok) {
    const body = (await response.json().catch(() => undefined)) as ApiErrorBody | undefined;
    throw new ApiError(response.status, body?.error?.code ?? 'http_error', body?.error?.message ?? `The server answered ${response.status}.`);
  }
  return response.arrayBuffer();
}

/** The one API client: every feature's requests go through it, so errors are handled in one way. */
export const api = {
  upload,
  binary,
  get: <T>(path: string) => request<T>('GET', path),
  post: <T>(path: string, body?: unknown, headers?: Record<string, string>) => request<T>('POST', path, body ?? {}, headers),
  patch: <T>(path: string, body: unknown) => request<T>('PATCH', path, body),
  put: <T>(path: string, body: unknown) => request<T>('PUT', path, body),
  delete: <T = void>(path: string) => request<T>('DELETE', path),
};
