// Client-side fetch that turns the API's one error shape into a typed error the forms can show per field.
export class ApiRequestError extends Error {
  constructor(
    message: string,
    readonly status: number,
    readonly code: string,
    readonly fieldErrors?: Record<string, string[]>,
    readonly details?: unknown,
  ) {
    super(message);
  }
}

export async function fetchJson<T = unknown>(url: string, init: { method?: string; body?: unknown; signal?: AbortSignal } = {}): Promise<T> {
  const res = await fetch(url, {
    method: init.method ?? 'GET',
    headers: init.body !== undefined ? { 'content-type': 'application/json' } : undefined,
    body: init.body !== undefined ? JSON.stringify(init.body) : undefined,
    signal: init.signal,
  });
  if (res.status === 204) return undefined as T;
  const body = (await res.json().catch(() => null)) as { error?: { message: string; code: string; fieldErrors?: Record<string, string[]>; details?: unknown } } | null;
  if (!res.ok) {
    const e = body?.error;
    throw new ApiRequestError(e?.message ?? `Request failed (${res.status})`, res.status, e?.code ?? 'error', e?.fieldErrors, e?.details);
  }
  return body as T;
}
