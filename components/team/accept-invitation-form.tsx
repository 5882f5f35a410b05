"use client";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { useHydrated } from "@/components/ui/use-hydrated";
import { ApiError, sendJson } from "@/lib/fetcher";

interface Props {
  token: string;
  email: string;
  accountExists: boolean;
  /** Already signed in as the invited account: one click, no password. */
  signedInAsInvitee: boolean;
}

const input = "mt-1 w-full rounded-md border border-slate-300 px-3 py-2 aria-[invalid=true]:border-danger-600";

export function AcceptInvitationForm({ token, email, accountExists, signedInAsInvitee }: Props) {
  const router = useRouter();
  const hydrated = useHydrated();
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string[]>>({});

  async function submit(event: React.FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = new FormData(event.currentTarget);
    const name = String(form.get("name") ?? "");
    const password = String(form.get("password") ?? "");
    const confirm = String(form.get("confirm") ?? "");
    if (!accountExists && password !== confirm) {
      setFieldErrors({ confirm: ["The two passwords differ."] });
      return;
    }
    setBusy(true);
    setError(null);
    setFieldErrors({});
    try {
      const body = signedInAsInvitee ? { token } : accountExists ? { token, password } : { token, name, password };
      const result = await sendJson<{ next: string }>("/api/invitations/accept", "POST", body);
      router.replace(result.next);
      router.refresh();
    } catch (e) {
      setBusy(false);
      if (e instanceof ApiError) {
        setError(e.message);
        setFieldErrors(e.fieldErrors ?? {});
      } else {
        setError("The invitation could not be accepted. Nothing was changed; try again.");
      }
    }
  }

  const err = (k: string) =>
    fieldErrors[k]?.length ? (
      <p id={`${k}-error`} role="alert" className="mt-1 text-sm text-danger-700">{fieldErrors[k].join(" ")}</p>
    ) : null;

  return (
    <form onSubmit={submit} method="post" noValidate data-hydrated={hydrated} className="mt-6 space-y-4 rounded-lg border border-slate-200 bg-white p-6 shadow-sm" data-testid="accept-form">
      <p className="text-sm">
        For <span className="font-medium">{email}</span>
      </p>
      {!signedInAsInvitee && !accountExists ? (
        <>
          <div>
            <label htmlFor="name" className="block text-sm font-medium">Your name</label>
            <input id="name" name="name" autoComplete="name" required className={input} aria-invalid={Boolean(fieldErrors.name)} aria-describedby="name-error" />
            {err("name")}
          </div>
          <div>
            <label htmlFor="password" className="block text-sm font-medium">Choose a password</label>
            <input id="password" name="password" type="password" autoComplete="new-password" required minLength={10} className={input}
              aria-invalid={Boolean(fieldErrors.password)} aria-describedby="password-help password-error" />
            <p id="password-help" className="mt-1 text-xs text-slate-500">At least 10 characters.</p>
            {err("password")}
          </div>
          <div>
            <label htmlFor="confirm" className="block text-sm font-medium">Repeat the password</label>
            <input id="confirm" name="confirm" type="password" autoComplete="new-password" required className={input}
              aria-invalid={Boolean(fieldErrors.confirm)} aria-describedby="confirm-error" />
            {err("confirm")}
          </div>
        </>
      ) : null}
      {!signedInAsInvitee && accountExists ? (
        <div>
          <label htmlFor="password" className="block text-sm font-medium">Password of your existing account</label>
          <input id="password" name="password" type="password" autoComplete="current-password" required className={input}
            aria-invalid={Boolean(fieldErrors.password)} aria-describedby="password-error" />
          {err("password")}
        </div>
      ) : null}
      {error ? <p role="alert" data-testid="accept-error" className="text-sm text-danger-700">{error}</p> : null}
      <button type="submit" disabled={busy || !hydrated} className="w-full rounded-md bg-accent-600 px-4 py-2 font-medium text-white hover:bg-accent-700 disabled:opacity-60">
        {busy ? "Accepting…" : accountExists || signedInAsInvitee ? "Accept and sign in" : "Create my account"}
      </button>
    </form>
  );
}
