import { env } from '../config/env';

/** One field's problem, as the API lists it. */
export interface FieldProblem {
  path: string;
  message: string;
}

/** An error answered by the API (`{ error: { status, code, message, fields? } }`) or the network. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields: FieldProblem[] = [],
  ) {
    super(message);
    this.name = 'ApiError';
  }

  /** The message for one form field, if the API named it. */
  fieldMessage(path: string): string | undefined {
    return this.fields.find((f) => f.path === path)?.message;
  }
}

type Query = Record<string, string | number | boolean | undefined | null>;

export interface RequestOptions {
  method?: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  query?: Query;
  /** JSON body (objects) or a FormData for multipart uploads. */
  body?: unknown;
  signal?: AbortSignal;
  /** Called with 0–1 while a FormData body uploads (uses XHR: fetch has no upload progress). */
  onUploadProgress?: (fraction: number) => void;
}

// Paths whose 401 means "wrong credentials", not "session expired".
const NO_REFRESH = ['/auth/sign-in', '/auth/refresh', '/auth/sign-out', '/auth/invitations/accept'];

let sessionExpiredHandler: (() => void) | undefined;
/** Set once by the providers: what to do when the session cannot be renewed. */
export function onSessionExpired(handler: () => void): void {
  sessionExpiredHandler = handler;
}

let refreshing: Promise<boolean> | undefined;
/** Renews the session once for all requests that hit 401 at the same time. */
function refreshSession(): Promise<boolean> {
  refreshing ??= fetch(`${env.apiBase}/auth/refresh`, {
    method: 'POST',
    credentials: 'same-origin',
  })
    .then((r) => r.ok)
    .catch(() => false)
    .finally(() => {
      refreshing = undefined;
    });
  return refreshing;
}

export function apiUrl(path: string, query?: Query): string {
  const params = new URLSearchParams();
  for (const [k, v] of Object.entries(query ?? {})) {
    if (v !== undefined && v !== null && v !== '') params.set(k, String(v));
  }
  const qs = params.toString();
  return `${env.apiBase}${path}${qs ? `?${qs}` : ''}`;
}

interface RawResponse {
  status: number;
  contentType: string;
  text: string;
}

function send(path: string, options: RequestOptions): Promise<RawResponse> {
  const url = apiUrl(path, options.query);
  const method = options.method ?? 'GET';
  const isForm = options.body instanceof FormData;
  if (isForm && options.onUploadProgress) return sendWithProgress(url, method, options);
  return fetch(url, {
    method,
    credentials: 'same-origin',
    signal: options.signal,
    headers: options.body !== undefined && !isForm ? { 'content-type': 'application/json' } : {},
    body: isForm
      ? (options.body as FormData)
      : options.body !== undefined
        ? JSON.stringify(options.body)
        : undefined,
  }).then(async (r) => ({
    status: r.status,
    contentType: r.headers.get('content-type') ?? '',
    text: await r.text(),
  }));
}

function sendWithProgress(url: string, method: string, options: RequestOptions) {
  return new Promise<RawResponse>((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open(method, url);
    xhr.withCredentials = true;
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) options.onUploadProgress?.(e.loaded / e.total);
    };
    xhr.onload = () =>
      resolve({
        status: xhr.status,
        contentType: xhr.getResponseHeader('content-type') ?? '',
        text: xhr.responseText,
      });
    xhr.onerror = () => reject(new ApiError(0, 'network', 'The upload could not reach Wellkept'));
    options.signal?.addEventListener('abort', () => xhr.abort());
    xhr.send(options.body as FormData);
  });
}

function toError(res: RawResponse): ApiError {
  if (res.contentType.includes('application/json')) {
    try {
      const body = JSON.parse(res.text) as {
        error?: { status?: number; code?: string; message?: string; fields?: FieldProblem[] };
      };
      if (body.error) {
        return new ApiError(
          body.error.status ?? res.status,
          body.error.code ?? 'error',
          body.error.message ?? 'Something went wrong',
          body.error.fields ?? [],
        );
      }
    } catch {
      // fall through to the generic message
    }
  }
  if (res.status === 502 || res.status === 503 || res.status === 504) {
    return new ApiError(res.status, 'unavailable', 'Wellkept’s server is not answering just now');
  }
  return new ApiError(res.status, 'error', `The server answered ${res.status}`);
}

/**
 * The one way the dashboard calls the API. A 401 renews the session once (POST /auth/refresh)
 * and repeats the request; if that fails too, the session-expired handler runs (back to sign-in).
 */
export async function request<T>(path: string, options: RequestOptions = {}): Promise<T> {
  let res: RawResponse;
  try {
    res = await send(path, options);
  } catch (error) {
    if (error instanceof ApiError) throw error;
    if (error instanceof DOMException && error.name === 'AbortError') throw error;
    throw new ApiError(0, 'network', 'Wellkept could not be reached. Check the connection.');
  }
  if (res.status === 401 && !NO_REFRESH.includes(path)) {
    if (await refreshSession()) res = await send(path, options);
    if (res.status === 401) {
      sessionExpiredHandler?.();
      throw toError(res);
    }
  }
  if (res.status < 200 || res.status >= 300) throw toError(res);
  if (res.status === 204 || res.text === '') return undefined as T;
  return (res.contentType.includes('application/json') ? JSON.parse(res.text) : res.text) as T;
}
