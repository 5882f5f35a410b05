import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { GET as listRoute, POST as inviteRoute } from "@/app/api/invitations/route";
import { DELETE as revokeRoute } from "@/app/api/invitations/[invitationId]/route";
import { POST as acceptRoute } from "@/app/api/invitations/accept/route";
import { GET as meRoute } from "@/app/api/me/route";
import { GET as householdRoute } from "@/app/api/household/route";
import { GET as homeRoute } from "@/app/api/homes/[homeId]/route";
import { auth } from "@/lib/auth";
import { startSmtpSink, type RunningSmtpSink, type SinkMessage } from "@/mocks/smtp-sink";
import { demoPassword } from "@/db/seed-data";
import { query } from "./helpers/database";
import { callRoute, people, signInAs } from "./helpers/http";

// Invitations go out as real e-mail to the local SMTP sink; the test reads the
// link from the message, as the invited person would.

let sink: RunningSmtpSink;
const savedPort = process.env.SMTP_PORT;

beforeAll(async () => {
  sink = await startSmtpSink({ port: 0, httpPort: 0, dir: `.data/mail-test-${process.env.ZW_TEST_INSTANCE ?? "0"}`, loadExisting: false });
  process.env.SMTP_HOST = "127.0.0.1";
  process.env.SMTP_PORT = String(sink.smtpPort);
});

afterAll(async () => {
  process.env.SMTP_PORT = savedPort;
  await sink.close();
});

type Route = Parameters<typeof callRoute>[0];
async function as(email: string, handler: Route, options: Omit<Parameters<typeof callRoute>[1], "cookie">) {
  return callRoute(handler, { ...options, cookie: await signInAs(email) });
}

async function homeId(name: string) {
  const [row] = await query<{ id: string }>("select id from homes where name = $1", [name]);
  return row.id;
}

function tokenFrom(message: SinkMessage): string {
  const match = /\/invitations\/([A-Za-z0-9_-]{43})/.exec(message.text ?? "");
  if (!match) throw new Error(`no invitation link in: ${message.text}`);
  return match[1];
}

async function mailTo(address: string): Promise<SinkMessage> {
  return sink.waitForMessage((m) => m.to.includes(address), 5000);
}

function accept(body: unknown, cookie?: string) {
  return callRoute(acceptRoute as Route, { method: "POST", path: "/api/invitations/accept", body, cookie });
}

function cookieOf(setCookie: string[]) {
  return setCookie.map((c) => c.split(";")[0]).join("; ");
}

async function acceptRaw(body: unknown) {
  const response = await acceptRoute(
    new Request("http://localhost:3000/api/invitations/accept", {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify(body),
    }),
  );
  return { status: response.status, json: (await response.json()) as Record<string, unknown>, cookie: cookieOf(response.headers.getSetCookie()) };
}

describe("team invitations (owner)", () => {
  it("only the owner invites team members", async () => {
    const res = await as(people.integrator, inviteRoute, { method: "POST", path: "/api/invitations", body: { email: "new.tech@fernhill.example", role: "installer" } });
    expect(res.status).toBe(403);
    expect(sink.messages()).toHaveLength(0);
  });

  it("the owner invites an installer; the e-mail arrives with a single-use link that creates the account", async () => {
    const res = await as(people.owner, inviteRoute, {
      method: "POST",
      path: "/api/invitations",
      body: { email: "  Nadia.Okafor@Fernhill.example ", role: "installer" },
    });
    expect(res.status).toBe(201);
    expect(res.json).toMatchObject({ email: "nadia.okafor@fernhill.example", role: "installer", state: "pending" });
    expect(JSON.stringify(res.json)).not.toMatch(/token/i);

    const mail = await mailTo("nadia.okafor@fernhill.example");
    expect(mail.subject).toBe("Join Fernhill Audio Works on Zonewright");
    expect(mail.text).toContain(`${process.env.APP_URL}/invitations/`);
    const token = tokenFrom(mail);
    // Only the hash is stored.
    const stored = await query<{ token_hash: string }>("select token_hash from access_invitations where email = 'nadia.okafor@fernhill.example'");
    expect(stored[0].token_hash).not.toContain(token);

    const short = await accept({ token, name: "Nadia Okafor", password: "short" });
    expect(short.status).toBe(400);
    expect(short.json.error?.fieldErrors).toHaveProperty("password");

    const ok = await acceptRaw({ token, name: "Nadia Okafor", password: "a-long-new-password" });
    expect(ok.status).toBe(200);
    expect(ok.json).toMatchObject({ ok: true, role: "installer", next: "/homes", signedIn: true, createdAccount: true });
    // The answer signs the person in.
    const me = await callRoute(meRoute, { path: "/api/me", cookie: ok.cookie });
    expect(me.json).toMatchObject({ email: "nadia.okafor@fernhill.example", role: "installer", organization: { name: "Fernhill Audio Works" } });
    // And the password works on the sign-in form from now on.
    const signIn = await auth.api.signInEmail({ body: { email: "nadia.okafor@fernhill.example", password: "a-long-new-password" }, asResponse: true });
    expect(signIn.status).toBe(200);

    const audit = await query<{ kind: string }>("select kind from audit_events where kind like 'invitation.%' order by id");
    expect(audit.map((a) => a.kind)).toEqual(["invitation.team.sent", "invitation.accepted"]);
  });

  it("a second use of the same link is refused and changes nothing", async () => {
    const mail = await mailTo("nadia.okafor@fernhill.example");
    const token = tokenFrom(mail);
    const members = await query("select count(*)::int as n from member");
    const again = await accept({ token, name: "Someone Else", password: "another-long-password" });
    expect(again.status).toBe(410);
    expect(again.json.error?.code).toBe("invitation:used");
    expect(await query("select count(*)::int as n from member")).toEqual(members);
  });

  it("an expired link is refused", async () => {
    const res = await as(people.owner, inviteRoute, { method: "POST", path: "/api/invitations", body: { email: "late@fernhill.example", role: "support" } });
    expect(res.status).toBe(201);
    const token = tokenFrom(await mailTo("late@fernhill.example"));
    await query("update access_invitations set expires_at = now() - interval '1 minute' where email = 'late@fernhill.example'");
    const late = await accept({ token, name: "Late Comer", password: "a-long-new-password" });
    expect(late.status).toBe(410);
    expect(late.json.error?.code).toBe("invitation:expired");
    expect(await query(`select 1 from "user" where email = 'late@fernhill.example'`)).toEqual([]);
  });

  it("a withdrawn or re-sent invitation's old link is refused", async () => {
    const first = await as(people.owner, inviteRoute, { method: "POST", path: "/api/invitations", body: { email: "twice@fernhill.example", role: "support" } });
    const firstToken = tokenFrom(await mailTo("twice@fernhill.example"));
    sink.clear();
    const second = await as(people.owner, inviteRoute, { method: "POST", path: "/api/invitations", body: { email: "twice@fernhill.example", role: "integrator" } });
    expect(second.status).toBe(201);
    const secondToken = tokenFrom(await mailTo("twice@fernhill.example"));
    const old = await accept({ token: firstToken, name: "Twice", password: "a-long-new-password" });
    expect(old.json.error?.code).toBe("invitation:revoked");
    const revoke = await as(people.owner, revokeRoute, { method: "DELETE", path: `/api/invitations/${second.json.id}`, params: { invitationId: second.json.id as string } });
    expect(revoke.status).toBe(200);
    const withdrawn = await accept({ token: secondToken, name: "Twice", password: "a-long-new-password" });
    expect(withdrawn.status).toBe(410);
    expect(withdrawn.json.error?.code).toBe("invitation:revoked");
    expect(first.status).toBe(201);
  });

  it("a made-up or malformed token is refused", async () => {
    expect((await accept({ token: "A".repeat(43), name: "X Y", password: "a-long-new-password" })).status).toBe(404);
    expect((await accept({ token: "nope", name: "X Y", password: "a-long-new-password" })).status).toBe(400);
  });

  it("an existing team member cannot be invited again", async () => {
    const res = await as(people.owner, inviteRoute, { method: "POST", path: "/api/invitations", body: { email: people.support, role: "integrator" } });
    expect(res.status).toBe(409);
    expect(res.json.error?.code).toBe("invitation:already-member");
  });
});

describe("household invitations (integrator)", () => {
  it("an integrator invites a household member to a home; the link creates a homeowner who sees only that home", async () => {
    const aalto = await homeId("Aalto townhouse");
    const res = await as(people.integrator, inviteRoute, {
      method: "POST",
      path: "/api/invitations",
      body: { email: "ines.reyes@aalto.example", role: "homeowner", homeId: aalto },
    });
    expect(res.status).toBe(201);
    const mail = await mailTo("ines.reyes@aalto.example");
    expect(mail.subject).toBe("Fernhill Audio Works invites you to see Aalto townhouse");
    const ok = await acceptRaw({ token: tokenFrom(mail), name: "Inés Reyes", password: "aalto-household-pw" });
    expect(ok.status).toBe(200);
    expect(ok.json.next).toBe("/household");
    const view = await callRoute(householdRoute, { path: "/api/household", cookie: ok.cookie });
    expect((view.json.homes as { name: string }[]).map((h) => h.name)).toEqual(["Aalto townhouse"]);
    const lindqvist = await homeId("Lindqvist residence");
    const other = await callRoute(homeRoute, { path: `/api/homes/${lindqvist}`, params: { homeId: lindqvist }, cookie: ok.cookie });
    expect(other.status).toBe(404);
  });

  it("a household invitation needs a home, and a team invitation may not name one", async () => {
    const noHome = await as(people.integrator, inviteRoute, { method: "POST", path: "/api/invitations", body: { email: "a@b.example", role: "homeowner" } });
    expect(noHome.status).toBe(400);
    expect(noHome.json.error?.fieldErrors).toHaveProperty("homeId");
    const teamWithHome = await as(people.owner, inviteRoute, {
      method: "POST",
      path: "/api/invitations",
      body: { email: "a@b.example", role: "installer", homeId: await homeId("Aalto townhouse") },
    });
    expect(teamWithHome.status).toBe(400);
  });

  it("the wrong home is refused: another company's home is not found, and installers or support may not invite households", async () => {
    const harbour = await homeId("Harbour view apartment");
    const res = await as(people.integrator, inviteRoute, {
      method: "POST",
      path: "/api/invitations",
      body: { email: "intruder@example.test", role: "homeowner", homeId: harbour },
    });
    expect(res.status).toBe(404);
    expect(JSON.stringify(res.json)).not.toContain("Harbour");
    const lindqvist = await homeId("Lindqvist residence");
    for (const who of [people.installer, people.support, people.homeowner]) {
      const refused = await as(who, inviteRoute, { method: "POST", path: "/api/invitations", body: { email: "x@example.test", role: "homeowner", homeId: lindqvist } });
      expect(refused.status).toBe(403);
    }
    expect(await query("select 1 from access_invitations where email in ('intruder@example.test', 'x@example.test')")).toEqual([]);
  });

  it("an existing homeowner is linked to a second home with their own password, not a new account", async () => {
    const marchetti = await homeId("Marchetti lake house");
    const res = await as(people.integrator, inviteRoute, {
      method: "POST",
      path: "/api/invitations",
      body: { email: people.homeowner, role: "homeowner", homeId: marchetti },
    });
    expect(res.status).toBe(201);
    const token = tokenFrom(await mailTo(people.homeowner));
    const users = await query("select count(*)::int as n from \"user\"");
    const wrong = await accept({ token, password: "not-her-password" });
    expect(wrong.status).toBe(401);
    expect(wrong.json.error?.code).toBe("invitation:wrong-password");
    const ok = await acceptRaw({ token, password: demoPassword });
    expect(ok.status).toBe(200);
    expect(ok.json).toMatchObject({ createdAccount: false, signedIn: true });
    expect(await query("select count(*)::int as n from \"user\"")).toEqual(users);
    const view = await callRoute(householdRoute, { path: "/api/household", cookie: ok.cookie });
    expect((view.json.homes as { name: string }[]).map((h) => h.name)).toEqual(["Lindqvist residence", "Marchetti lake house"]);
  });

  it("the invitations list shows owners everything, integrators household invitations, and others nothing", async () => {
    const owner = await as(people.owner, listRoute, { path: "/api/invitations" });
    const states = (owner.json.items as { email: string; state: string }[]).map((i) => `${i.email}:${i.state}`);
    expect(states).toEqual(
      expect.arrayContaining(["nadia.okafor@fernhill.example:accepted", "late@fernhill.example:expired", "twice@fernhill.example:revoked"]),
    );
    const integrator = await as(people.integrator, listRoute, { path: "/api/invitations" });
    expect((integrator.json.items as { role: string }[]).every((i) => i.role === "homeowner")).toBe(true);
    expect((await as(people.installer, listRoute, { path: "/api/invitations" })).status).toBe(403);
  });
});

describe("mail failures", () => {
  it("when the mail server is down, the invitation is not kept", async () => {
    const port = process.env.SMTP_PORT;
    process.env.SMTP_PORT = "1"; // nothing listens there
    try {
      const before = await query("select count(*)::int as n from access_invitations");
      const res = await as(people.owner, inviteRoute, { method: "POST", path: "/api/invitations", body: { email: "nomail@fernhill.example", role: "support" } });
      expect(res.status).toBe(502);
      expect(res.json.error?.code).toBe("mail:unavailable");
      expect(await query("select count(*)::int as n from access_invitations")).toEqual(before);
    } finally {
      process.env.SMTP_PORT = port;
    }
  });
});
