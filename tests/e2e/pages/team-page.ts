import { expect, type Locator, type Page } from "@playwright/test";

export class TeamPage {
  constructor(private readonly page: Page) {}

  async goto() {
    await this.page.goto("/team");
    await expect(this.page.getByRole("heading", { name: "Team and households", exact: true })).toBeVisible();
    await expect(this.page.getByTestId("team-manager")).toHaveAttribute("data-hydrated", "true");
  }

  async inviteTeamMember(email: string, role: string) {
    const form = this.page.getByTestId("team-invite-form");
    await form.getByLabel("E-mail address").fill(email);
    await form.getByLabel("Role").selectOption({ label: role });
    await form.getByRole("button", { name: "Send invitation" }).click();
  }

  notice(): Locator {
    return this.page.getByTestId("team-notice");
  }

  invitationRow(email: string): Locator {
    return this.page.getByTestId("invitations-table").getByRole("row").filter({ hasText: email });
  }
}

/** The page an invitation link opens. */
export class InvitationPage {
  constructor(private readonly page: Page) {}

  async createAccount(name: string, password: string) {
    await this.page.getByLabel("Your name").fill(name);
    await this.page.getByLabel("Choose a password").fill(password);
    await this.page.getByLabel("Repeat the password").fill(password);
    await this.page.getByRole("button", { name: "Create my account" }).click();
  }

  refusal(): Locator {
    return this.page.getByTestId("invitation-refused");
  }
}

/** Reads messages from the local SMTP sink the app sends through (see mocks/smtp-sink.ts). */
export async function invitationLinkFor(email: string, timeoutMs = 10_000): Promise<string> {
  const port = process.env.SMTP_SINK_HTTP_PORT ?? "2526";
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    const res = await fetch(`http://127.0.0.1:${port}/messages?to=${encodeURIComponent(email)}`);
    const { messages } = (await res.json()) as { messages: { text: string | null; subject: string }[] };
    const link = messages[0]?.text?.match(/https?:\/\/\S+\/invitations\/[A-Za-z0-9_-]{43}/)?.[0];
    if (link) return link;
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error(`no invitation e-mail for ${email} in the sink`);
}
