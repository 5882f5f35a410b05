// One error type for the whole app. Codes are "area:reason"; each maps to an
// HTTP status and a message a person can act on. Route handlers, server actions
// and the SWR fetcher all speak it.

export const errorCatalog = {
  "auth:unauthenticated": { status: 401, message: "Please sign in to continue." },
  "auth:forbidden": { status: 403, message: "Your role does not allow this." },
  "request:invalid": { status: 400, message: "Some fields need attention." },
  "request:bad-json": { status: 400, message: "The request body is not valid JSON." },
  "request:too-large": { status: 413, message: "The upload is too large." },
  "home:not-found": { status: 404, message: "That home does not exist or is not yours to see." },
  "zone:not-found": { status: 404, message: "That zone does not exist or is not yours to see." },
  "zone:stale": { status: 409, message: "Someone else changed this zone. Reload to see their change, then try again." },
  "zone:locked": { status: 423, message: "Guest controls are locked by support." },
  "zone:rule": { status: 422, message: "That change breaks a rule of this zone." },
  "curve:not-found": { status: 404, message: "That tone curve does not exist." },
  "curve:in-use": { status: 409, message: "That tone curve is still attached somewhere." },
  "template:not-found": { status: 404, message: "That zone template does not exist." },
  "device:not-found": { status: 404, message: "That device does not exist." },
  "push:not-found": { status: 404, message: "That push does not exist." },
  "fleet:unavailable": { status: 502, message: "The device fleet service did not answer. Try again shortly." },
  "stations:unavailable": { status: 502, message: "The station directory did not answer. Try again shortly." },
  "server:unexpected": { status: 500, message: "Something went wrong on our side. Nothing was changed." },
} as const;

export type ErrorCode = keyof typeof errorCatalog;
export type FieldErrors = Record<string, string[]>;

export class AppError extends Error {
  readonly code: ErrorCode;
  readonly status: number;
  readonly fieldErrors?: FieldErrors;
  readonly details?: Record<string, unknown>;

  constructor(code: ErrorCode, options: { message?: string; fieldErrors?: FieldErrors; details?: Record<string, unknown> } = {}) {
    super(options.message ?? errorCatalog[code].message);
    this.name = "AppError";
    this.code = code;
    this.status = errorCatalog[code].status;
    this.fieldErrors = options.fieldErrors;
    this.details = options.details;
  }

  toJSON(): ErrorBody {
    return {
      error: { code: this.code, message: this.message, fieldErrors: this.fieldErrors, details: this.details },
    };
  }
}

export interface ErrorBody {
  error: { code: string; message: string; fieldErrors?: FieldErrors; details?: Record<string, unknown> };
}

export function isErrorBody(value: unknown): value is ErrorBody {
  return (
    typeof value === "object" &&
    value !== null &&
    "error" in value &&
    typeof (value as ErrorBody).error?.code === "string"
  );
}
