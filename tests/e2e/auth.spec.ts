import { expect, test } from "@playwright/test";
import { SignInPage, signInAs } from "./pages/sign-in-page";

const roles = [
  { email: "mira@fernhill.example", role: "Owner", lands: "/homes" },
  { email: "theo@fernhill.example", role: "Integrator", lands: "/homes" },
  { email: "jonah@fernhill.example", role: "Installer", lands: "/homes" },
  { email: "priya@fernhill.example", role: "Support", lands: "/homes" },
  { email: "elena@lindqvist.example", role: "Homeowner", lands: "/household" },
];

for (const { email, role, lands } of roles) {
  test(`${role} signs in and sees who they are`, async ({ page }) => {
    await signInAs(page, email);
    await expect(page).toHaveURL(new RegExp(`${lands}$`));
    await expect(page.getByTestId("who-am-i")).toContainText(role);
    await expect(page.getByTestId("who-am-i")).toContainText("Fernhill Audio Works");
  });
}

test("a wrong password shows a clear message and no session", async ({ page }) => {
  const signIn = new SignInPage(page);
  await signIn.goto();
  await signIn.signIn("theo@fernhill.example", "wrong-password-123");
  await signIn.expectError("do not match");
  await page.goto("/homes");
  await expect(page).toHaveURL(/\/sign-in/);
});

test("without a session, pages redirect to sign-in and come back after", async ({ page }) => {
  await page.goto("/library");
  await expect(page).toHaveURL(/\/sign-in\?next=%2Flibrary/);
  await new SignInPage(page).signIn("theo@fernhill.example");
  await expect(page).toHaveURL(/\/library$/);
  await expect(page.getByRole("heading", { name: "Tone curves" })).toBeVisible();
});

test("sign-out ends the session", async ({ page }) => {
  await signInAs(page, "priya@fernhill.example");
  await page.getByRole("button", { name: "Sign out" }).click();
  await expect(page).toHaveURL(/\/sign-in/);
  await page.goto("/homes");
  await expect(page).toHaveURL(/\/sign-in/);
});

test("the API refuses a role that may not: 403 JSON", async ({ page }) => {
  await signInAs(page, "priya@fernhill.example");
  const response = await page.request.post("/api/homes", { data: { name: "Not allowed", householdName: "Nobody" } });
  expect(response.status()).toBe(403);
  expect((await response.json()).error.code).toBe("auth:forbidden");
});

test("a homeowner sees only their own home, read-only, and no studio pages", async ({ page }) => {
  await signInAs(page, "elena@lindqvist.example");
  await expect(page.getByRole("heading", { name: "Lindqvist residence" })).toBeVisible();
  await expect(page.getByTestId("zone-card")).toHaveCount(4);
  await expect(page.getByText("Marchetti")).toHaveCount(0);
  await page.goto("/homes");
  await expect(page).toHaveURL(/\/household$/);
});

test("another company's owner cannot open this company's home", async ({ page, browser }) => {
  // Find a Fernhill home id as its integrator…
  await signInAs(page, "theo@fernhill.example");
  const list = await (await page.request.get("/api/homes?search=Lindqvist")).json();
  const homeId = list.items[0].id as string;
  // …then ask for it as Tidewater's owner.
  const other = await browser.newPage();
  await signInAs(other, "rafael@tidewater.example");
  const api = await other.request.get(`/api/homes/${homeId}`);
  expect(api.status()).toBe(404);
  await other.goto(`/homes/${homeId}`);
  await expect(other.getByRole("heading", { name: "Not found" })).toBeVisible();
  await other.close();
});
