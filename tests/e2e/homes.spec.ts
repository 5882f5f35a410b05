import { expect, test } from "@playwright/test";
import { HomesPage } from "./pages/homes-page";
import { signInAs } from "./pages/sign-in-page";

test.beforeEach(async ({ page }) => {
  await signInAs(page, "theo@fernhill.example");
});

test("the homes table shows the demo homes with zone counts", async ({ page }) => {
  const homes = new HomesPage(page);
  await homes.goto();
  await expect(homes.rows()).toHaveCount(5);
  const lindqvist = homes.rows().filter({ hasText: "Lindqvist residence" });
  await expect(lindqvist).toContainText("Lindqvist family");
  await expect(lindqvist.locator("td").nth(3)).toHaveText("4");
  await expect(homes.rows().filter({ hasText: "Marchetti lake house" })).toContainText("1 offline");
});

test("search, sort and open a home", async ({ page }) => {
  const homes = new HomesPage(page);
  await homes.goto();
  await homes.search("alder bay");
  await expect(homes.rows()).toHaveCount(2);
  await homes.search("");
  await expect(homes.rows()).toHaveCount(5);
  await homes.sortBy("Zones");
  await homes.sortBy("Zones");
  await expect(homes.rows().first()).toContainText("Lindqvist residence");
  await homes.search("zzzz-no-such-home");
  await expect(page.getByText("No home matches")).toBeVisible();
  await homes.search("Aalto");
  await page.getByRole("link", { name: "Aalto townhouse" }).click();
  await expect(page.getByRole("heading", { name: "Aalto townhouse" })).toBeVisible();
  await expect(page.getByTestId("zone-column")).toHaveCount(3);
});

test("when the homes API fails, the table says so and can retry", async ({ page }) => {
  const homes = new HomesPage(page);
  await homes.goto();
  let fail = true;
  await page.route("**/api/homes?*", async (route) => {
    if (fail) {
      await route.fulfill({ status: 503, json: { error: { code: "server:unexpected", message: "Maintenance in progress." } } });
    } else {
      await route.continue();
    }
  });
  await homes.search("Lind");
  await expect(page.getByTestId("homes-error")).toContainText("Maintenance in progress.");
  fail = false;
  await page.getByRole("button", { name: "Retry" }).click();
  await expect(page.getByTestId("homes-error")).toHaveCount(0);
  await expect(homes.rows()).toHaveCount(1);
});

test("navigation reaches every area", async ({ page }) => {
  await page.goto("/homes");
  for (const [link, heading] of [
    ["Library", "Tone curves"],
    ["Pushes", "Pushes"],
    ["Activity", "Activity"],
    ["Team", "Team and households"],
  ] as const) {
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: link }).click();
    await expect(page.getByRole("heading", { name: heading, exact: true })).toBeVisible();
  }
});
