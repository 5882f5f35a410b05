import { expect, test } from "@playwright/test";
import { sineWav } from "./fixtures/wav";
import { BoardPage } from "./pages/board-page";
import { HouseholdPage } from "./pages/household-page";
import { LevelMatchPage } from "./pages/level-match-page";
import { PushDetailPage } from "./pages/pushes-page";
import { signInAs } from "./pages/sign-in-page";
import { TemplatesPage } from "./pages/templates-page";

// The four everyday stories, each from sign-in to the end on the real app,
// database, push worker and fleet fake, as the demo people. This file starts
// from a freshly seeded database (the test runner reseeds per spec file).

test("an integrator level-matches a zone's sources and sets its volume ceiling", async ({ page }) => {
  test.setTimeout(120_000);
  await signInAs(page, "theo@fernhill.example");
  const board = new BoardPage(page);
  await board.open("Lindqvist residence");
  await board.zone("Family room").getByRole("link", { name: "Level match" }).click();
  const levelMatch = new LevelMatchPage(page);
  await expect(page.getByRole("heading", { name: "Level match · Family room" })).toBeVisible();

  // Expected readings: EBU Tech 3341 (v4) Table 1 case 1 — a stereo 1 kHz sine
  // at −23 dBFS reads −23.0 LUFS; 6 dB lower reads 6 LU lower (BS.1770-4 §2:
  // the measure is a mean square, so a gain shifts it one to one).
  await levelMatch.uploadClip("Streaming", { name: "streaming.wav", mimeType: "audio/wav", buffer: sineWav(-23, 4) });
  await expect(levelMatch.row("Streaming").getByTestId("measured-lufs")).toHaveText("−23.0 LUFS");
  await levelMatch.uploadClip("Phone", { name: "phone.wav", mimeType: "audio/wav", buffer: sineWav(-29, 4) });
  await expect(levelMatch.row("Phone").getByTestId("measured-lufs")).toHaveText("−29.0 LUFS");
  await page.getByLabel("Reference source or station").selectOption({ label: "Streaming (−23.0 LUFS)" });
  await expect(levelMatch.row("Phone").getByTestId("suggested-offset")).toContainText("+6 dB");
  await levelMatch.applyAll();
  await expect(levelMatch.row("Phone").getByTestId("current-offset")).toHaveText("+6 dB");

  // Back on the board: the card carries the new offset; the ceiling comes down to 68 %.
  await page.getByRole("link", { name: "Lindqvist residence" }).click();
  await expect(page.getByTestId("zone-board")).toBeVisible();
  await expect(board.sourceCard("Family room", "Phone").getByTestId("card-offset")).toHaveText("+6 dB");
  await board.zone("Family room").getByRole("button", { name: "Edit zone Family room" }).click();
  const dialog = page.getByTestId("zone-dialog");
  await dialog.getByLabel("Volume ceiling (%)").fill("68");
  await dialog.getByRole("button", { name: "Save zone" }).click();
  await expect(dialog).toBeHidden();
  await expect(board.zone("Family room").getByTestId("zone-ceiling")).toHaveText("68 %");
  await board.expectSaved();
  await board.reload();
  await expect(board.zone("Family room").getByTestId("zone-ceiling")).toHaveText("68 %");
  await expect(board.sourceCard("Family room", "Phone").getByTestId("card-offset")).toHaveText("+6 dB");
  // Both changes are in the company's activity, by who and what.
  type Item = { kind: string; actorName: string; zoneName: string | null; changes: { field: string; before: unknown; after: unknown }[] };
  const { items } = (await (await page.request.get("/api/activity")).json()) as { items: Item[] };
  const mine = items.filter((i) => i.actorName === "Theo Banerjee" && i.zoneName === "Family room");
  expect(mine.map((i) => i.kind)).toEqual(expect.arrayContaining(["zone.level-matched", "zone.settings-changed"]));
  const settings = mine.find((i) => i.kind === "zone.settings-changed")!;
  expect(settings.changes).toEqual([{ field: "zone.volumeCeiling", before: 75, after: 68 }]);
});

test("a homeowner reorders favourite stations and sees them applied at home", async ({ page }) => {
  test.setTimeout(120_000);
  await signInAs(page, "elena@lindqvist.example");
  const household = new HouseholdPage(page);
  await household.goto();
  const before = await household.stationNames("Kitchen");
  expect(before.length).toBeGreaterThanOrEqual(3);
  await household.dragStation("Kitchen", before[2], before[0]);
  const expected = [before[2], before[0], before[1], ...before.slice(3)];
  await expect.poll(() => household.stationNames("Kitchen")).toEqual(expected);
  await expect(household.saveResult("Kitchen")).toContainText(`${before[2]} moved to number 1. Saved.`, { timeout: 20_000 });
  // The push goes out on its own; the device takes it and reports back through
  // the fleet's webhook; the view follows until it says so, in plain words.
  await expect(household.delivery("Kitchen")).toHaveAttribute("data-state", "delivered", { timeout: 60_000 });
  await expect(household.delivery("Kitchen")).toHaveText(/Your system has these settings/);
  await page.reload();
  await expect.poll(() => household.stationNames("Kitchen")).toEqual(expected);
  await expect(household.delivery("Kitchen")).toHaveAttribute("data-state", "delivered");
});

test("support locks a zone's guest controls; the installer then cannot change them", async ({ page }) => {
  await signInAs(page, "priya@fernhill.example");
  const board = new BoardPage(page);
  await board.open("Aalto townhouse");
  await board.zone("Gym").getByRole("button", { name: "Lock…", exact: true }).click();
  const dialog = page.getByTestId("lock-dialog");
  await dialog.getByLabel("change the volume").uncheck();
  await dialog.getByLabel("Reason for the lock").fill("Neighbours below complained about late workouts");
  await dialog.getByRole("button", { name: "Lock", exact: true }).click();
  await expect(dialog).toBeHidden();
  await expect(board.zone("Gym").getByTestId("lock-info")).toContainText("Locked by Priya Raman");
  await expect(board.zone("Gym").getByTestId("guest-controls")).toContainText("Change volume: not allowed");
  await board.expectSaved();

  await page.context().clearCookies();
  await signInAs(page, "jonah@fernhill.example");
  await board.open("Aalto townhouse");
  const gym = board.zone("Gym");
  // The board says who locked it, when and why, and offers nothing to change.
  await expect(gym.getByTestId("lock-info")).toContainText("Priya Raman");
  await expect(gym.getByTestId("lock-info")).toContainText("Neighbours below complained about late workouts");
  await expect(gym.getByRole("button", { name: "Edit zone Gym" })).toBeDisabled();
  await expect(gym.getByRole("button", { name: "Unlock…" })).toHaveCount(0);
  await expect(gym.getByTestId("lock-info")).toContainText("only support, an integrator or the owner can change this zone now");
  // A drag is refused on the spot, with the reason, and nothing moves.
  await board.dragByMouse(board.presetCard("Gym", "Velvet Hour Soul"), board.presetCard("Gym", "Night Tram Electronica"), { targetY: "top" });
  await board.drop();
  await expect(board.notices().last()).toContainText("Priya Raman locked “Gym”");
  await board.expectPresets("Gym", ["Night Tram Electronica", "Velvet Hour Soul"]);
  // And the server refuses anyway, even if someone goes around the page.
  const homeId = page.url().replace(/^.*\/homes\//, "").replace(/[?#].*$/, "");
  const fresh = await (await page.request.get(`/api/homes/${homeId}/board`)).json();
  const gymDto = fresh.zones.find((z: { name: string }) => z.name === "Gym");
  const attempt = await page.request.patch(`/api/zones/${gymDto.id}/settings`, {
    data: { version: gymDto.version, guestControls: { volume: true, source: true, wake: true } },
  });
  expect(attempt.status()).toBe(423);
  expect((await attempt.json()).error.message).toContain("Priya Raman locked “Gym”");
  await page.reload();
  await expect(board.zone("Gym").getByTestId("guest-controls")).toContainText("Change volume: not allowed");

  // Support lifts the lock again, with a reason; that is audited too.
  await page.context().clearCookies();
  await signInAs(page, "priya@fernhill.example");
  await board.open("Aalto townhouse");
  await board.zone("Gym").getByRole("button", { name: "Unlock…" }).click();
  await page.getByTestId("lock-dialog").getByLabel("Reason for unlocking").fill("Household agreed to quiet hours");
  await page.getByTestId("lock-dialog").getByRole("button", { name: "Unlock", exact: true }).click();
  await expect(board.zone("Gym").getByTestId("lock-info")).toHaveCount(0);
  await board.expectSaved();
});

test("an installer duplicates a zone template into a new home and pushes it", async ({ page }) => {
  test.setTimeout(120_000);
  await signInAs(page, "jonah@fernhill.example");
  const library = new TemplatesPage(page);
  await library.goto();
  // Installers use and duplicate templates; editing them is for integrators.
  await expect(library.card("Outdoor pair with bass lift").getByRole("button", { name: /Delete/ })).toHaveCount(0);
  const apply = await library.openApply("Outdoor pair with bass lift");
  await apply.newHome("Willow Row house", "Petrov family", "Millbrook");
  await apply.zoneName("Garden terrace");
  // A device that cannot take it is listed with the reason, and cannot be chosen.
  await expect(apply.root.getByTestId("device-choices")).toContainText("FW4-10555");
  await apply.device("FWO-30388").check();
  await apply.submit();
  await expect(apply.root.getByTestId("apply-done")).toContainText("Made zone “Garden terrace” in Willow Row house (new home). Revision 1 is saved and ready to push.");
  await apply.root.getByRole("link", { name: "Open Willow Row house" }).click();
  await expect(page.getByRole("heading", { name: "Willow Row house", level: 1 })).toBeVisible();
  await expect(new BoardPage(page).zone("Garden terrace")).toBeVisible();

  await page.getByRole("button", { name: "Push this home" }).click();
  const preview = page.getByTestId("push-preview");
  await expect(preview.getByTestId("preview-zone")).toHaveCount(1);
  await expect(preview.getByTestId("confirm-push")).toHaveText("Push 1 zone");
  await preview.getByTestId("confirm-push").click();
  await expect(page).toHaveURL(/\/pushes\/[0-9a-f-]{36}$/);
  const detail = new PushDetailPage(page);
  await expect(detail.target("Garden terrace")).toBeVisible();
  await detail.expectAllApplied(1);

  // The library counts the new zone among those made from the template.
  await library.goto();
  await expect(library.card("Outdoor pair with bass lift")).toContainText("4 zones");
});
