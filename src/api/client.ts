import type { ApiErrorBody, ErrorCode } from '@shared/types/api'

/** Every failed API call becomes one of these; views read `fields` and `rows` for forms. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: ErrorCode | 'network',
    message: string,
    readonly fields: Record<string, string[]> = {},
    readonly rows: { row: number; errors: string[] }[] = [],
    /** A save refused because the row moved on (409): the revision it is at now. */
    readonly currentRevision?: number,
  ) {
    super(message)
  }
}

let unauthenticatedHandler: () => void = () => {}
export function onUnauthenticated(handler: () => void) {
  unauthenticatedHandler = handler
}

type Query = Record<string, string | number | boolean | undefined | null>

function withQuery(path: string, query?: Query): string {
  if (!query) return path
  const params = new URLSearchParams()
  for (const [k, v] of Object.entries(query)) {
    if (v !== undefined && v !== null && v !== '') params.set(k, String(v))
  }
  const s = params.toString()
  return s ? `${path}?${s}` : path
}

export interface RequestOptions {
  query?: Query
  body?: unknown
  /** A 401 here is an expected answer (sign-in, who-am-I), not an expired session. */
  quiet401?: boolean
  /** Extra request headers, for credentials that must not ride in the URL. */
  headers?: Record<string, string>
}

export async function request<T>(
  method: string,
  path: string,
  options: RequestOptions = {},
): Promise<T> {
  const isForm = options.body instanceof FormData
  let res: Response
  try {
    res = await fetch(withQuery(`/api${path}`, options.query), {
      method,
      credentials: 'same-origin',
      headers: {
        ...(options.body && !isForm ? { 'Content-Type': 'application/json' } : {}),
        ...options.headers,
      },
      body: isForm
        ? (options.body as FormData)
        : options.body !== undefined
          ? JSON.stringify(options.body)
          : undefined,
    })
  } catch {
    throw new ApiError(0, 'network', 'The server cannot be reached. Check your connection.')
  }
  if (res.status === 204) return undefined as T
  const data = (await res.json().catch(() => null)) as unknown
  if (!res.ok) {
    const err = (data as ApiErrorBody | null)?.error
    if (res.status === 401 && !options.quiet401) unauthenticatedHandler()
    throw new ApiError(
      res.status,
      err?.code ?? 'internal',
      err?.message ?? `The server answered ${res.status}`,
      err?.fields,
      err?.rows,
      err?.currentRevision,
    )
  }
  return data as T
}

export const api = {
  get: <T>(path: string, query?: Query, opts: Omit<RequestOptions, 'query'> = {}) =>
    request<T>('GET', path, { ...opts, query }),
  post: <T>(path: string, body?: unknown, opts: RequestOptions = {}) =>
    request<T>('POST', path, { ...opts, body }),
  patch: <T>(path: string, body: unknown) => request<T>('PATCH', path, { body }),
  del: <T>(path: string) => request<T>('DELETE', path),
}
