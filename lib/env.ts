import { z } from "zod";

// Environment, validated once. Defaults make the local demo work; in a real
// deployment (ZW_ENV=production) the secrets must be given explicitly.
const schema = z
  .object({
    ZW_ENV: z.enum(["local", "test", "production"]).default("local"),
    DATABASE_URL: z.string().url().default("postgres://zonewright@127.0.0.1:54329/zonewright"),
    DATABASE_POOL_MAX: z.coerce.number().int().min(1).max(200).default(10),
    BETTER_AUTH_SECRET: z.string().min(32).default("local-demo-secret-change-me-in-production-0001"),
    APP_URL: z.string().url().default("http://localhost:3000"),
    FLEET_BASE_URL: z.string().url().default("http://127.0.0.1:4010"),
    FLEET_API_KEY: z.string().min(1).default("dev-fleet-api-key"),
    FLEET_WEBHOOK_SECRET: z.string().min(16).default("dev-fleet-webhook-secret"),
    STATIONS_BASE_URL: z.string().url().default("http://127.0.0.1:4020"),
    SMTP_HOST: z.string().default("127.0.0.1"),
    SMTP_PORT: z.coerce.number().int().default(2525),
    MAIL_FROM: z.string().default("Zonewright <no-reply@zonewright.test>"),
  })
  .superRefine((env, ctx) => {
    if (env.ZW_ENV !== "production") return;
    for (const key of ["BETTER_AUTH_SECRET", "FLEET_API_KEY", "FLEET_WEBHOOK_SECRET", "DATABASE_URL"] as const) {
      if (!process.env[key]) {
        ctx.addIssue({ code: "custom", path: [key], message: `${key} must be set when ZW_ENV=production` });
      }
    }
  });

export type Env = z.infer<typeof schema>;

let cached: Env | undefined;

export function env(): Env {
  if (cached) return cached;
  const parsed = schema.safeParse(process.env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`).join("\n");
    throw new Error(`Invalid environment:\n${lines}`);
  }
  cached = parsed.data;
  return cached;
}
