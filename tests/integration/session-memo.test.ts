import { describe, expect, it } from "vitest";
import { GET as boardRoute } from "@/app/api/homes/[homeId]/board/route";
import type { BoardDto } from "@/lib/board/types";
import { query } from "./helpers/database";
import { homeIdByName } from "./helpers/board";
import { callRoute, people, signInAs } from "./helpers/http";

// Session cookies are verified once every few seconds per cookie (lib/session.ts);
// the role behind them is read on every request, and a cookie that differs in
// a single character is verified on its own.

async function board(cookie: string) {
  const homeId = await homeIdByName("Lindqvist residence");
  return callRoute(boardRoute, { path: `/api/homes/${homeId}/board`, params: { homeId }, cookie });
}

describe("session resolution", () => {
  it("a role change applies to the very next request, even within the memo's few seconds", async () => {
    const cookie = await signInAs(people.integrator);
    const first = await board(cookie);
    expect((first.json as unknown as BoardDto).may.editZone).toBe(true);
    await query(`update member set role = 'support' where user_id = (select id from "user" where email = $1)`, [people.integrator]);
    try {
      const second = await board(cookie);
      expect(second.status).toBe(200);
      expect((second.json as unknown as BoardDto).may).toMatchObject({ editZone: false, lock: true });
      await query(`delete from member where user_id = (select id from "user" where email = $1)`, [people.integrator]);
      const removed = await board(cookie);
      expect(removed.status).toBe(401);
    } finally {
      await query(
        `insert into member (id, organization_id, user_id, role, created_at)
         select gen_random_uuid()::text, o.id, u.id, 'integrator', now() from organization o, "user" u
         where o.slug = 'fernhill-audio-works' and u.email = $1
           and not exists (select 1 from member m where m.user_id = u.id)`,
        [people.integrator],
      );
      await query(`update member set role = 'integrator' where user_id = (select id from "user" where email = $1)`, [people.integrator]);
    }
    expect((await board(cookie)).status).toBe(200);
  });

  it("a tampered or missing session cookie is refused right after a good one was accepted", async () => {
    const cookie = await signInAs(people.support);
    expect((await board(cookie)).status).toBe(200);
    const tampered = cookie.replace(/(better-auth\.session_token=)([^;]{4})/, (_, name: string, head: string) => `${name}${head.split("").reverse().join("")}`);
    expect(tampered).not.toBe(cookie);
    const withoutData = tampered
      .split("; ")
      .filter((c) => !c.startsWith("better-auth.session_data="))
      .join("; ");
    expect((await board(withoutData)).status).toBe(401);
    expect((await board("")).status).toBe(401);
    expect((await board("theme=dark")).status).toBe(401);
  });
});
