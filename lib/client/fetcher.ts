// SWR's fetcher for the JSON API: a non-2xx answer becomes an Error carrying the server's message.
export class ApiError extends Error {
  constructor(
    readonly status: number,
    message: string,
    /** Per-field problems (`{ path, message }`) when the server gave them, for a form to show by its fields. */
    readonly fieldErrors: Array<{ path: string; message: string }> = [],
  ) {
    super(message);
  }
}

function fieldErrorsOf(details: unknown): Array<{ path: string; message: string }> {
  if (!Array.isArray(details)) return [];
  return details.filter(
    (d): d is { path: string; message: string } => typeof d?.path === "string" && typeof d?.message === "string",
  );
}

export async function fetchJson<T>(url: string, init?: RequestInit): Promise<T> {
  const res = await fetch(url, {
    ...init,
    headers: {
      accept: "application/json",
      ...(init?.body ? { "content-type": "application/json" } : {}),
      ...init?.headers,
    },
  });
  if (res.status === 204) return undefined as T;
  const body = await res.json().catch(() => null);
  if (!res.ok)
    throw new ApiError(
      res.status,
      body?.error?.message ?? `Request failed (${res.status})`,
      fieldErrorsOf(body?.error?.details),
    );
  return body as T;
}
