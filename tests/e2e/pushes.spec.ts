import { expect, test } from "@playwright/test";
import { DevicePage, PushDetailPage, PushesPage } from "./pages/pushes-page";
import { signInAs } from "./pages/sign-in-page";

// Push a home through the real app, the real worker and the local fleet fake;
// watch every target reach applied; change a device on its own at the fake and
// see the drift, field by field; push again and see it back in sync.
// Other specs share this database and may have pushed some of the home's zones
// already: those show as in sync in the preview and are left out of the push.

const fleetUrl = process.env.FLEET_BASE_URL ?? "http://127.0.0.1:4110";

test("push a home, watch it apply, see drift after a change at the device, push again", async ({ page, request }) => {
  test.setTimeout(180_000);
  await signInAs(page, "theo@fernhill.example");

  const pushes = new PushesPage(page);
  await pushes.goto();
  const preview = await pushes.previewHome("Lindqvist residence");
  await expect(preview.getByTestId("preview-zone")).toHaveCount(4);
  const toPush = preview.locator('[data-testid="preview-zone"][data-outcome="push"]');
  await expect(preview.getByTestId("confirm-push")).toBeEnabled();
  const count = await toPush.count();
  expect(count).toBeGreaterThan(0);
  await expect(preview.getByTestId("confirm-push")).toHaveText(`Push ${count} zone${count === 1 ? "" : "s"}`);
  await preview.getByTestId("confirm-push").click();

  await expect(page).toHaveURL(/\/pushes\/[0-9a-f-]{36}$/);
  const detail = new PushDetailPage(page);
  await expect(detail.targets).toHaveCount(count);
  await detail.expectAllApplied(count);
  await expect(page.getByTestId("push-status")).toContainText("Finished");

  // Open the device of the first zone pushed.
  await detail.targets.first().getByRole("link").click();
  await expect(page.getByTestId("fleet-device-id")).toBeVisible();
  const fleetDeviceId = (await page.getByTestId("fleet-device-id").innerText()).trim();
  const device = new DevicePage(page);
  await device.expectDrift("in_sync");

  // Someone turns the amplifier's volume ceiling up at the device itself.
  const tamper = await request.post(`${fleetUrl}/__fleet/devices/${fleetDeviceId}/tamper`, { data: { volumeCeiling: 83 } });
  expect(tamper.ok()).toBe(true);
  await device.expectDrift("drifted");
  await expect(page.getByTestId("reports-table")).toContainText("changed at the device");

  await device.driftBadge().click();
  const dialog = page.getByTestId("drift-dialog");
  const row = dialog.getByTestId("drift-changes").getByRole("row", { name: /Volume ceiling/ });
  await expect(row).toContainText("83 %");

  await dialog.getByRole("button", { name: "Push again" }).click();
  await expect(dialog.getByRole("status")).toContainText("Push started.");
  await dialog.getByRole("link", { name: "See the push" }).click();
  await new PushDetailPage(page).expectAllApplied(1);

  await page.goBack();
  await device.expectDrift("in_sync");
});

test("the pushes page lists the push with who, scope and counts; support sees it but may not start a home push", async ({ page }) => {
  await signInAs(page, "priya@fernhill.example");
  await page.goto("/pushes");
  // Runs after the test above (one worker, in file order), which pushed the Lindqvist home.
  const row = page
    .getByTestId("pushes-table")
    .locator("tbody tr")
    .filter({ has: page.getByRole("link", { name: "Lindqvist residence", exact: true }) })
    .first();
  await expect(row).toContainText("Theo Banerjee");
  await expect(row).toContainText(/\d+ applied/);
  await expect(row).toContainText("Finished");
  await expect(page.getByRole("button", { name: "Preview push…" })).toHaveCount(0);
});
