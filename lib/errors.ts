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
  "zone:deleted": { status: 410, message: "This zone was deleted; its history can be read but not restored." },
  "revision:not-found": { status: 404, message: "That revision does not exist for this zone." },
  "backup:invalid": { status: 422, message: "The backup file cannot be used." },
  "backup:unsupported-version": { status: 422, message: "This backup was made by a schema version this Zonewright cannot read." },
  "backup:stale-preview": { status: 409, message: "The home changed since the preview. Preview the file again before applying it." },
  "curve:not-found": { status: 404, message: "That tone curve does not exist." },
  "source:not-found": { status: 404, message: "That source does not exist in this zone." },
  "preset:not-found": { status: 404, message: "That stream preset does not exist in this zone." },
  "curve:in-use": { status: 409, message: "That tone curve is still attached somewhere." },
  "curve:stale": { status: 409, message: "Someone else changed this tone curve. Reload to see their change, then try again." },
  "curve:import-invalid": { status: 422, message: "The file cannot be imported as a tone curve. Nothing was saved." },
  "curve:does-not-fit": { status: 422, message: "A device this tone curve is attached to has fewer EQ bands than that." },
  "clip:invalid": { status: 422, message: "That clip cannot be measured. Nothing was stored." },
  "template:not-found": { status: 404, message: "That zone template does not exist." },
  "device:not-found": { status: 404, message: "That device does not exist." },
  "push:not-found": { status: 404, message: "That push does not exist." },
  "fleet:unavailable": { status: 502, message: "The device fleet service did not answer. Try again shortly." },
  "push:empty": { status: 422, message: "Nothing to push: every zone was refused, skipped or is already in sync." },
  "push:stale-preview": { status: 409, message: "A zone changed since the preview. Look at the preview again before pushing." },
  "push:nothing-to-retry": { status: 409, message: "No target of this push has failed; there is nothing to retry." },
  "push:nothing-to-cancel": { status: 409, message: "No target of this push is waiting to be sent; there is nothing to cancel." },
  "device:no-report": { status: 409, message: "The device has not reported a configuration yet, so there is nothing to adopt." },
  "device:no-firmware": { status: 422, message: "No newer firmware is offered for this device." },
  "fleet:refused": { status: 422, message: "The device fleet refused the request." },
  "webhook:unsigned": { status: 401, message: "The webhook is not signed with our secret (or its timestamp is too old)." },
  "webhook:invalid": { status: 400, message: "The webhook body is not a fleet event." },
  "mailbox:unavailable": { status: 502, message: "The local mail sink did not answer. Is `npm start` running?" },
  "stations:unavailable": { status: 502, message: "The station directory did not answer. Try again shortly." },
  "stations:timeout": { status: 504, message: "The station directory did not answer in time. Try again in a moment." },
  "stations:rate-limited": { status: 429, message: "Too many station searches at once. Wait a few seconds and try again." },
  "template:in-use": { status: 409, message: "Zones still use that template. It can be deleted once no zone uses it." },
  "template:stale": { status: 409, message: "Someone else changed this template. Reload to see their change, then try again." },
  "device:taken": { status: 409, message: "That device already drives a zone. Pick a free device." },
  "device:unsuitable": { status: 422, message: "That device cannot take this configuration." },
  "invitation:not-found": { status: 404, message: "That invitation link is not valid. Ask for a new invitation." },
  "invitation:expired": { status: 410, message: "This invitation has expired. Ask for a new one." },
  "invitation:used": { status: 410, message: "This invitation has already been used. Sign in instead, or ask for a new one." },
  "invitation:revoked": { status: 410, message: "This invitation was withdrawn. Ask for a new one." },
  "invitation:already-member": { status: 409, message: "That person already belongs to your company." },
  "invitation:wrong-password": { status: 401, message: "That password does not match the existing account for this e-mail." },
  "team:member-not-found": { status: 404, message: "That person is not on your team." },
  "team:last-owner": { status: 409, message: "The company must keep at least one owner." },
  "mail:unavailable": { status: 502, message: "The e-mail could not be sent, so nothing was saved. Try again shortly." },
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
