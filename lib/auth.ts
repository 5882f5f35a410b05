import { betterAuth } from "better-auth";
import { drizzleAdapter } from "better-auth/adapters/drizzle";
import { nextCookies } from "better-auth/next-js";
import { organization } from "better-auth/plugins";
import { createAccessControl } from "better-auth/plugins/access";
import { defaultStatements, ownerAc } from "better-auth/plugins/organization/access";
import { db } from "@/db/client";
import * as schema from "@/db/schema";
import { env } from "@/lib/env";

// Team management through the organization plugin's own endpoints is the
// owner's alone; everything else is decided by lib/permissions.ts.
const ac = createAccessControl(defaultStatements);
const noTeamRights = ac.newRole({ organization: [], member: [], invitation: [], team: [], ac: [] });

const config = env();

export const auth = betterAuth({
  appName: "Zonewright",
  secret: config.BETTER_AUTH_SECRET,
  baseURL: config.APP_URL,
  trustedOrigins: [config.APP_URL, "http://localhost:3000", "http://127.0.0.1:3000", "http://localhost:3100", "http://127.0.0.1:3100"],
  database: drizzleAdapter(db, {
    provider: "pg",
    schema: {
      user: schema.user,
      session: schema.session,
      account: schema.account,
      verification: schema.verification,
      organization: schema.organization,
      member: schema.member,
      invitation: schema.invitation,
    },
  }),
  emailAndPassword: {
    enabled: true,
    minPasswordLength: 10,
    // Accounts are created by invitation or by the seed, never by open sign-up.
    disableSignUp: true,
  },
  session: {
    expiresIn: 60 * 60 * 24 * 7,
    updateAge: 60 * 60 * 24,
    cookieCache: { enabled: true, maxAge: 60 },
  },
  rateLimit: { enabled: config.ZW_ENV === "production" },
  plugins: [
    organization({
      ac,
      roles: {
        owner: ownerAc,
        integrator: noTeamRights,
        installer: noTeamRights,
        support: noTeamRights,
        homeowner: noTeamRights,
      },
      creatorRole: "owner",
      allowUserToCreateOrganization: false,
    }),
    nextCookies(),
  ],
});

export type Session = typeof auth.$Infer.Session;
