import { auth } from "@/lib/auth";
import { demoPassword } from "@/db/seed-data";

const cookieCache = new Map<string, string>();

/** Sign in through better-auth for real and return the session cookie header. */
export async function signInAs(email: string): Promise<string> {
  const cached = cookieCache.get(email);
  if (cached) return cached;
  const response = await auth.api.signInEmail({ body: { email, password: demoPassword }, asResponse: true });
  if (!response.ok) throw new Error(`sign-in failed for ${email}: ${response.status}`);
  const cookies = response.headers.getSetCookie().map((c) => c.split(";")[0]);
  const header = cookies.join("; ");
  cookieCache.set(email, header);
  return header;
}

export function forgetSessions() {
  cookieCache.clear();
}

type RouteFn = (request: Request, context: { params: Promise<Record<string, string>> }) => Promise<Response>;

/** Call a route handler the way Next.js does, with a real Request. */
export async function callRoute(
  handler: RouteFn,
  options: {
    method?: string;
    path: string;
    params?: Record<string, string>;
    body?: unknown;
    cookie?: string;
    rawBody?: string;
    headers?: Record<string, string>;
  },
) {
  const headers = new Headers({ accept: "application/json", ...options.headers });
  if (options.cookie) headers.set("cookie", options.cookie);
  if (options.body !== undefined || options.rawBody !== undefined) headers.set("content-type", "application/json");
  const request = new Request(`http://localhost:3000${options.path}`, {
    method: options.method ?? "GET",
    headers,
    body: options.rawBody ?? (options.body === undefined ? undefined : JSON.stringify(options.body)),
  });
  const response = await handler(request, { params: Promise.resolve(options.params ?? {}) });
  const text = await response.text();
  let json: unknown = null;
  try {
    json = text ? JSON.parse(text) : null;
  } catch {
    json = text;
  }
  return { status: response.status, headers: response.headers, text, json: json as Record<string, unknown> & { error?: { code: string; message: string; fieldErrors?: Record<string, string[]> } } };
}

export const people = {
  owner: "mira@fernhill.example",
  integrator: "theo@fernhill.example",
  installer: "jonah@fernhill.example",
  support: "priya@fernhill.example",
  homeowner: "elena@lindqvist.example",
  otherHomeowner: "marco@marchetti.example",
  otherCompanyOwner: "rafael@tidewater.example",
} as const;
