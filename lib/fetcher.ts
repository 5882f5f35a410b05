import { isErrorBody } from "@/lib/errors";

/** Thrown by the fetcher on any non-2xx, so a failed call is never shown as success. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fieldErrors?: Record<string, string[]>,
    readonly details?: Record<string, unknown>,
  ) {
    super(message);
    this.name = "ApiError";
  }
}

async function toApiError(response: Response): Promise<ApiError> {
  let body: unknown = null;
  try {
    body = await response.json();
  } catch {
    /* not JSON */
  }
  if (isErrorBody(body)) {
    return new ApiError(response.status, body.error.code, body.error.message, body.error.fieldErrors, body.error.details);
  }
  return new ApiError(response.status, "server:unexpected", `The server answered ${response.status}.`);
}

export async function fetcher<T>(url: string): Promise<T> {
  const response = await fetch(url, { headers: { accept: "application/json" } });
  if (!response.ok) throw await toApiError(response);
  return (await response.json()) as T;
}

/** JSON write (POST/PATCH/PUT/DELETE) with the same error contract. */
export async function sendJson<T>(url: string, method: string, body?: unknown): Promise<T> {
  const response = await fetch(url, {
    method,
    headers: { "content-type": "application/json", accept: "application/json" },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  if (!response.ok) throw await toApiError(response);
  return (await response.json()) as T;
}
