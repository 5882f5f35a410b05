import "server-only";
import { NextResponse } from "next/server";
import { z, type ZodType } from "zod";
import { AppError, type FieldErrors } from "@/lib/errors";
import type { Actor } from "@/lib/permissions";
import { requireActor } from "@/lib/session";

interface RouteContext {
  params: Promise<Record<string, string | string[]>>;
}

interface HandlerInput<P, Q, B> {
  request: Request;
  actor: Actor;
  params: P;
  query: Q;
  body: B;
}

/** zod issues → { "field.path": ["message"] } for forms. */
export function toFieldErrors(error: z.ZodError): FieldErrors {
  const out: FieldErrors = {};
  for (const issue of error.issues) {
    const key = issue.path.length ? issue.path.join(".") : "_";
    (out[key] ??= []).push(issue.message);
  }
  return out;
}

export function parseOrThrow<T>(schema: ZodType<T>, value: unknown): T {
  const parsed = schema.safeParse(value);
  if (!parsed.success) throw new AppError("request:invalid", { fieldErrors: toFieldErrors(parsed.error) });
  return parsed.data;
}

export function errorResponse(error: unknown): NextResponse {
  if (error instanceof AppError) return NextResponse.json(error.toJSON(), { status: error.status });
  console.error("[api] unexpected error", error);
  const unexpected = new AppError("server:unexpected");
  return NextResponse.json(unexpected.toJSON(), { status: unexpected.status });
}

/**
 * Every JSON route handler goes through here, in a fixed order: parse params,
 * query and body with zod → session → the handler (load → 404 → 403 → change in
 * a transaction → audit → DTO). Any AppError becomes its status and JSON body.
 */
export function apiHandler<P = Record<string, never>, Q = Record<string, never>, B = undefined>(
  spec: { params?: ZodType<P>; query?: ZodType<Q>; body?: ZodType<B>; status?: number },
  fn: (input: HandlerInput<P, Q, B>) => Promise<unknown>,
) {
  return async (request: Request, context: RouteContext): Promise<Response> => {
    try {
      const rawParams = context?.params ? await context.params : {};
      const params = spec.params ? parseOrThrow(spec.params, rawParams) : ({} as P);
      const url = new URL(request.url);
      const query = spec.query ? parseOrThrow(spec.query, Object.fromEntries(url.searchParams)) : ({} as Q);
      let body = undefined as B;
      if (spec.body) {
        let json: unknown;
        try {
          json = await request.json();
        } catch {
          throw new AppError("request:bad-json");
        }
        body = parseOrThrow(spec.body, json);
      }
      const actor = await requireActor(request.headers);
      const result = await fn({ request, actor, params, query, body });
      if (result instanceof Response) return result;
      return NextResponse.json(result ?? { ok: true }, { status: spec.status ?? 200 });
    } catch (error) {
      return errorResponse(error);
    }
  };
}
