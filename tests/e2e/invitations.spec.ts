import { expect, test } from "@playwright/test";
import { signInAs } from "./pages/sign-in-page";
import { InvitationPage, TeamPage, invitationLinkFor } from "./pages/team-page";

// The owner invites a team member; the invitation arrives as real e-mail in the
// local SMTP sink; the link creates the account once, and only once.

test("owner invites, the e-mail arrives, the link accepts once and a second use is refused", async ({ page, browser }) => {
  const email = `sam.ortiz.${Date.now()}@fernhill.example`;
  await signInAs(page, "mira@fernhill.example");
  const team = new TeamPage(page);
  await team.goto();
  await team.inviteTeamMember(email, "Support");
  await expect(team.notice()).toContainText(`Invitation sent to ${email} as support.`);
  await expect(team.invitationRow(email)).toContainText("pending");

  const link = await invitationLinkFor(email);
  const guest = await browser.newContext();
  const invited = await guest.newPage();
  await invited.goto(link);
  await expect(invited.getByRole("heading", { name: "Join Fernhill Audio Works" })).toBeVisible();
  const accept = new InvitationPage(invited);
  await accept.createAccount("Sam Ortiz", "a-long-enough-password");
  await expect(invited).toHaveURL(/\/homes$/);
  await expect(invited.getByTestId("who-am-i")).toContainText("Sam Ortiz");
  await expect(invited.getByTestId("who-am-i")).toContainText("Support");
  await guest.close();

  const again = await browser.newContext();
  const second = await again.newPage();
  await second.goto(link);
  await expect(new InvitationPage(second).refusal()).toContainText("This invitation has already been used");
  await again.close();

  await team.goto();
  await expect(team.invitationRow(email)).toContainText("accepted");
  await expect(page.getByTestId("team-table")).toContainText("Sam Ortiz");
});

test("the owner cannot demote or remove the only owner; a role change shows at once", async ({ page }) => {
  await signInAs(page, "mira@fernhill.example");
  const team = new TeamPage(page);
  await team.goto();
  const mira = page.getByTestId("team-row").filter({ hasText: "Mira Castellanos" });
  await expect(mira.getByRole("button", { name: "Remove Mira Castellanos" })).toBeDisabled();
  await expect(mira).toContainText("only owner");
  const priya = page.getByTestId("team-row").filter({ hasText: "Priya Raman" });
  await priya.getByLabel("Role of Priya Raman").selectOption({ label: "Integrator" });
  await expect(team.notice()).toContainText("Priya Raman is now integrator.");
  await priya.getByLabel("Role of Priya Raman").selectOption({ label: "Support" });
  await expect(team.notice()).toContainText("Priya Raman is now support.");
});

test("households are found by home, household or city, and listed a page at a time", async ({ page }) => {
  await signInAs(page, "mira@fernhill.example");
  const team = new TeamPage(page);
  await team.goto();
  await expect(page.getByTestId("household-range")).toContainText(/Homes 1–\d+ of \d+/);
  await page.getByLabel("Find a home").fill("kestrel");
  await page.getByRole("button", { name: "Search", exact: true }).click();
  await expect(page.getByTestId("household-card")).toHaveCount(1);
  await expect(page.getByTestId("household-card")).toContainText("Marchetti lake house");
  await expect(page.getByTestId("household-card")).toContainText("marco@marchetti.example");
  await page.getByLabel("Find a home").fill("nowhere at all");
  await page.getByRole("button", { name: "Search", exact: true }).click();
  await expect(page.getByTestId("households-empty")).toHaveText("No home matches “nowhere at all”.");
  await page.getByRole("button", { name: "Show all homes" }).click();
  await expect(page.getByTestId("household-card").first()).toBeVisible();
  await expect(page.getByTestId("households-empty")).toHaveCount(0);
});

test("a made-up invitation link is refused in plain words", async ({ page }) => {
  await page.goto(`/invitations/${"x".repeat(43)}`);
  await expect(new InvitationPage(page).refusal()).toContainText("This invitation link is not valid");
});
