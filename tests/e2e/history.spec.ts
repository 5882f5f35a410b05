import { expect, test, type Page } from "@playwright/test";
import { backupContentHash, type BackupFile } from "@/lib/validation/backup";
import { HistoryPage, openZoneHistoryFromHome } from "./pages/history-page";
import { signInAs } from "./pages/sign-in-page";

// Zone history in the browser: compare two revisions, restore one; the backup
// page's upload → preview → apply. The first change is made through the real
// backup-restore API, so two revisions exist without depending on other screens.

async function homeIdByName(page: Page, name: string) {
  const res = await page.request.get(`/api/homes?search=${encodeURIComponent(name)}`);
  expect(res.ok()).toBe(true);
  const body = (await res.json()) as { items: { id: string; name: string }[] };
  return body.items.find((h) => h.name === name)!.id;
}

/** Change one zone through the backup API (download, edit, re-seal, restore) — a real revision 2. */
async function changeThroughBackup(page: Page, homeId: string, edit: (file: BackupFile) => void) {
  const res = await page.request.get(`/api/homes/${homeId}/backup`);
  expect(res.ok()).toBe(true);
  const file = (await res.json()) as BackupFile;
  edit(file);
  const sealed = { ...file, contentHash: backupContentHash(file) };
  const restore = await page.request.post(`/api/homes/${homeId}/backup/restore`, { data: sealed });
  expect(restore.status(), await restore.text()).toBe(200);
  return file;
}

test.beforeEach(async ({ page }) => {
  await signInAs(page, "theo@fernhill.example");
});

test("compare two revisions and restore one", async ({ page }) => {
  const homeId = await homeIdByName(page, "Brightwater loft");
  await changeThroughBackup(page, homeId, (file) => {
    const studio = file.zones.find((z) => z.config.name === "Studio")!;
    studio.config.volumeCeiling = studio.config.volumeCeiling - 7;
    studio.config.sources[0].loudnessOffsetDb = 2.5;
  });

  const zoneId = await openZoneHistoryFromHome(page, homeId, "Studio");
  const history = new HistoryPage(page);
  await expect(history.rows()).toHaveCount(2);
  await expect(history.row(2)).toContainText("current");
  await expect(history.row(2)).toContainText("Theo Banerjee");
  await expect(history.row(2)).toContainText("2 changes: zone, sources");

  // Default comparison is the previous revision → the current one.
  await expect(history.compare.getByRole("heading", { level: 2 })).toHaveText("Revision 1 → revision 2");
  await expect(history.diffRows()).toHaveCount(2);
  await expect(history.diffRows().filter({ hasText: "Volume ceiling" })).toContainText("→");
  // The other way round reads the other way round.
  await history.pick(2, 1);
  await expect(history.diffRows().filter({ hasText: "Loudness offset" }).getByTestId("diff-before")).toHaveText("+2.5 dB");

  // Restore revision 1, with a note.
  const dialog = await history.openRestore(1);
  await expect(dialog.getByTestId("restore-diff").getByTestId("diff-row")).toHaveCount(2);
  await dialog.getByLabel("Note for the history").fill("Back to the hand-over levels");
  await dialog.getByRole("button", { name: "Restore revision 1" }).click();
  await expect(history.flash).toContainText("Revision 1 restored as revision 3");
  await expect(history.rows()).toHaveCount(3);
  await expect(history.row(3)).toContainText("current");
  await expect(history.row(3)).toContainText("Back to the hand-over levels");

  // Revision 3 is revision 1 again: no differences between them.
  await history.pick(1, 3);
  await expect(history.compare.getByTestId("config-diff")).toContainText("No differences");

  // The restore is in the activity trail, linked back to this zone.
  await page.goto(`/homes/${homeId}/activity?zone=${zoneId}`);
  const restored = page.getByTestId("activity-row").filter({ hasText: "zone.restored" }).first();
  await expect(restored).toContainText("Restored “Studio” to revision 1");
  await expect(restored).toContainText("Theo Banerjee");
  await restored.getByText(/fields? changed/).click();
  await expect(restored).toContainText("Zone · Volume ceiling");
});

test("a restore refused as stale says so and offers to reload", async ({ page }) => {
  const homeId = await homeIdByName(page, "Nakagawa cottage");
  await changeThroughBackup(page, homeId, (file) => {
    file.zones.find((z) => z.config.name === "Den")!.config.turnOnVolume = 12;
  });
  await openZoneHistoryFromHome(page, homeId, "Den");
  const history = new HistoryPage(page);
  await page.route("**/revisions/*/restore", (route) =>
    route.fulfill({ status: 409, json: { error: { code: "zone:stale", message: "Someone else changed this zone. Reload to see their change, then try again." } } }),
  );
  const dialog = await history.openRestore(1);
  await dialog.getByRole("button", { name: "Restore revision 1" }).click();
  await expect(history.flash).toContainText("Someone else changed this zone");
  await expect(history.flash.getByRole("button", { name: "Reload history" })).toBeVisible();
  await expect(history.rows()).toHaveCount(2);
});

test("backup page: upload a changed backup, preview per zone, apply", async ({ page }) => {
  const homeId = await homeIdByName(page, "Aalto townhouse");
  const res = await page.request.get(`/api/homes/${homeId}/backup`);
  const file = (await res.json()) as BackupFile;
  file.zones.find((z) => z.config.name === "Gym")!.config.volumeCeiling = 61;
  const sealed = JSON.stringify({ ...file, contentHash: backupContentHash(file) });

  await page.goto(`/homes/${homeId}/backup`);
  await expect(page.getByRole("heading", { name: "Backup and restore — Aalto townhouse" })).toBeVisible();
  await expect(page.getByTestId("backup-download")).toHaveAttribute("href", `/api/homes/${homeId}/backup`);

  // A broken file first: a clear error naming the problem.
  await page.getByTestId("backup-file").setInputFiles({ name: "broken.json", mimeType: "application/json", buffer: Buffer.from(sealed.slice(0, 200)) });
  await page.getByRole("button", { name: "Preview restore" }).click();
  await expect(page.getByTestId("backup-error")).toContainText("not valid JSON");

  await page.getByTestId("backup-file").setInputFiles({ name: "aalto.json", mimeType: "application/json", buffer: Buffer.from(sealed) });
  await page.getByRole("button", { name: "Preview restore" }).click();
  const preview = page.getByTestId("backup-preview");
  await expect(preview).toBeVisible();
  const gym = page.getByTestId("backup-preview-row").filter({ hasText: "Gym" });
  await expect(gym).toContainText("will change");
  await expect(gym).toContainText("1 change: zone");
  await expect(page.getByTestId("backup-preview-row").filter({ hasText: "Living room" })).toContainText("no change");
  await gym.getByText("Show the changes field by field").click();
  await expect(gym.getByTestId("diff-row")).toContainText("Volume ceiling");

  await page.getByRole("button", { name: "Apply restore…" }).click();
  await page.getByTestId("backup-confirm").getByRole("button", { name: "Apply restore" }).click();
  await expect(page.getByTestId("backup-result")).toContainText("Gym: will change (revision 2)");
});
