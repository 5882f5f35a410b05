import { expect, test } from "@playwright/test";
import { seriousViolations } from "./fixtures/axe";
import { HouseholdPage } from "./pages/household-page";
import { signInAs } from "./pages/sign-in-page";

// The household view: plain words, reordering stations by keyboard, undo,
// refusals, accessibility. The mouse reorder that ends applied at home is the
// homeowner's story in stories.spec.ts.

const homeowner = "elena@lindqvist.example";

test.beforeEach(async ({ page }) => {
  await signInAs(page, homeowner);
});

test("the household sees their own home in plain words, nothing technical", async ({ page }) => {
  const household = new HouseholdPage(page);
  await household.goto();
  await expect(page.getByRole("heading", { level: 1, name: "Lindqvist residence" })).toBeVisible();
  await expect(page.getByTestId("zone-card")).toHaveCount(4);
  const family = household.zone("Family room");
  await expect(family).toContainText("75 % of full volume");
  await expect(family.getByRole("list", { name: "Sources in Family room" })).toContainText("TV · HDMI ARC");
  await expect(household.zone("Patio")).toContainText("Switch the room on: no");
  const text = await page.locator("main").innerText();
  for (const word of ["FW4-", "serial", "Linkwitz", "dB", "Marchetti"]) expect(text).not.toContain(word);
});

test("reorders stations with the keyboard, with what happens read out", async ({ page }) => {
  const household = new HouseholdPage(page);
  await household.goto();
  const before = await household.stationNames("Patio");
  expect(before.length).toBeGreaterThanOrEqual(2);
  const handle = household.handle("Patio", before[0]);
  await handle.focus();
  await page.keyboard.press("Space");
  await expect(page.getByText(`Picked up ${before[0]}, number 1 of ${before.length}`)).toBeAttached();
  await page.keyboard.press("ArrowDown");
  await expect(page.getByText(`${before[0]} would become number 2 of ${before.length}`)).toBeAttached();
  await page.keyboard.press("Space");
  await expect(page.getByText(`${before[0]} put down as number 2 of ${before.length}`)).toBeAttached();
  const expected = [before[1], before[0], ...before.slice(2)];
  await expect.poll(() => household.stationNames("Patio")).toEqual(expected);
  await expect(household.saveResult("Patio")).toContainText("Saved.", { timeout: 20_000 });
  await page.reload();
  await expect.poll(() => household.stationNames("Patio")).toEqual(expected);
  // Undo is one click away after a save.
  await household.handle("Patio", expected[0]).focus();
  await page.keyboard.press("Space");
  await expect(page.getByText(`Picked up ${expected[0]}`)).toBeAttached();
  await page.keyboard.press("ArrowDown");
  await expect(page.getByText(`${expected[0]} would become number 2`)).toBeAttached();
  await page.keyboard.press("Space");
  await expect(household.saveResult("Patio")).toContainText("Saved.");
  await household.zone("Patio").getByRole("button", { name: "Undo" }).click();
  await expect(household.saveResult("Patio")).toContainText("Previous order put back");
  await expect.poll(() => household.stationNames("Patio")).toEqual(expected);
});

test("a refused save puts the old order back and says why", async ({ page }) => {
  const household = new HouseholdPage(page);
  await household.goto();
  const before = await household.stationNames("Primary suite");
  await page.route("**/api/household/zones/*/presets/order", (route) =>
    route.fulfill({ status: 503, json: { error: { code: "server:unexpected", message: "Maintenance in progress." } } }),
  );
  await household.handle("Primary suite", before[0]).focus();
  await page.keyboard.press("Space");
  await expect(page.getByText(`Picked up ${before[0]}`)).toBeAttached();
  await page.keyboard.press("ArrowDown");
  await expect(page.getByText(`${before[0]} would become number 2`)).toBeAttached();
  await page.keyboard.press("Space");
  await expect(household.zone("Primary suite").getByTestId("save-error")).toContainText("Maintenance in progress.");
  await expect.poll(() => household.stationNames("Primary suite")).toEqual(before);
});

test("the household view passes axe-core with no serious or critical violations, on a desktop and on a phone", async ({ page }) => {
  const household = new HouseholdPage(page);
  await household.goto();
  expect(await seriousViolations(page)).toEqual([]);
  await page.setViewportSize({ width: 390, height: 844 });
  await household.goto();
  expect(await seriousViolations(page)).toEqual([]);
  // Good on a phone: nothing wider than the screen.
  const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
  expect(overflow).toBeLessThanOrEqual(0);
});

test("a household member cannot open the studio, another home or the library", async ({ page }) => {
  await page.goto("/homes");
  await expect(page).toHaveURL(/\/household$/);
  await page.goto("/library/templates");
  await expect(page).toHaveURL(/\/household$/);
  const response = await page.request.get("/api/templates");
  expect(response.status()).toBe(403);
});
