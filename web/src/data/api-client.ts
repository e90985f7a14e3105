import { apiUrl } from './page-address.js';

/**
 * The dashboard's one way to the server's JSON API: URLs relative to the page, so
 * the dashboard also works behind a path prefix; the operator token as a bearer header on the
 * requests that change something; and a refusal turned into an ApiError that carries the
 * server's own message (it names the bad field), which the panels show as it is.
 */

/** An error answer from the API, or an answer that is not JSON where JSON was due. */
export class ApiError extends Error {
  override name = 'ApiError';

  constructor(
    message: string,
    /** The HTTP status of the answer. */
    readonly status: number,
  ) {
    super(message);
  }
}

/** GET a JSON endpoint; `signal` abandons it (a newer question made the answer useless). */
export async function getJson<T>(path: string, signal?: AbortSignal): Promise<T> {
  const response = await fetch(apiUrl(path), { signal });
  const body = await answerOf<T>(response, path);
  if (body === null) throw new ApiError(`${path} did not answer with JSON`, response.status);
  return body;
}

/** POST as the operator, with a JSON body when there is one; an accepted request without an answer gives {}. */
export async function postJson(path: string, token: string, body?: unknown): Promise<Record<string, unknown>> {
  const response = await fetch(apiUrl(path), {
    method: 'POST',
    headers: { Authorization: `Bearer ${token}`, ...(body !== undefined ? { 'Content-Type': 'application/json' } : {}) },
    body: body !== undefined ? JSON.stringify(body) : undefined,
  });
  return (await answerOf<Record<string, unknown>>(response, path)) ?? {};
}

/** The answer's JSON (null when it has none); an error status throws with the server's message, or names the status when it gave none. */
async function answerOf<T>(response: Response, path: string): Promise<T | null> {
  const body = (await response.json().catch(() => null)) as (T & { error?: string }) | null;
  if (!response.ok) throw new ApiError(body?.error ?? `HTTP ${response.status} from ${path}`, response.status);
  return body;
}
