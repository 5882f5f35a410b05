import { expect, test } from "@playwright/test";
import { seriousViolations } from "./fixtures/axe";
import { BoardPage } from "./pages/board-page";
import { signInAs } from "./pages/sign-in-page";

// The zone board on the real app, database and station directory fake.
// Tests run in order on one seeded database; each works on its own zone.
// The guest-control lock story is in stories.spec.ts.

const integrator = "theo@fernhill.example";

test.describe("zone board (integrator)", () => {
  test.beforeEach(async ({ page }) => {
    await signInAs(page, integrator);
  });

  test("shows every zone with device, limits, guest controls, sources and presets", async ({ page }) => {
    const board = new BoardPage(page);
    await board.open("Lindqvist residence");
    await expect(page.getByTestId("zone-column")).toHaveCount(4);
    const family = board.zone("Family room");
    await expect(family.getByTestId("zone-device")).toContainText("online");
    await expect(family.getByTestId("zone-device")).toContainText("FW4-10231");
    await expect(family.getByTestId("zone-ceiling")).toHaveText("75 %");
    await expect(family.getByTestId("guest-controls")).toContainText("Change volume: allowed");
    await expect(board.sourceCard("Family room", "TV").getByTestId("card-offset")).toHaveText("−4 dB");
    await expect(board.sourceCard("Family room", "TV").getByTestId("card-curve")).toContainText("TV dialogue lift");
    // +3 dB turntable with a boosting curve could clip: a caution, not a blocker.
    await expect(board.sourceCard("Family room", "Turntable").getByTestId("card-caution")).toHaveCount(1);
    await expect(page.getByTestId("curve-tray")).toContainText("Gym punch");
  });

  test("reorders presets by mouse, and the order survives a reload", async ({ page }) => {
    const board = new BoardPage(page);
    await board.open("Lindqvist residence");
    await board.expectPresets("Family room", ["Harbor Lantern Jazz", "Quiet Pines Classical", "Copper Kettle Folk", "Night Tram Electronica", "Saltmarsh Blues"]);
    await board.dragByMouse(board.presetCard("Family room", "Copper Kettle Folk"), board.presetCard("Family room", "Harbor Lantern Jazz"), { targetY: "top" });
    await board.drop();
    const moved = ["Copper Kettle Folk", "Harbor Lantern Jazz", "Quiet Pines Classical", "Night Tram Electronica", "Saltmarsh Blues"];
    await board.expectPresets("Family room", moved);
    await board.expectSaved();
    await board.reload();
    await board.expectPresets("Family room", moved);
  });

  test("reorders presets by keyboard with screen-reader announcements", async ({ page }) => {
    const board = new BoardPage(page);
    await board.open("Lindqvist residence");
    await board.expectPresets("Kitchen", ["Morning Orchard Acoustic", "Lighthouse Talk", "Harbor Lantern Jazz"]);
    const handle = board.zone("Kitchen").getByRole("button", { name: "Drag preset Harbor Lantern Jazz" });
    const live = page.locator('[id^="DndLiveRegion"]');
    await handle.focus();
    await page.keyboard.press("Space");
    await expect(live).toContainText("Picked up stream preset “Harbor Lantern Jazz” of Kitchen, position 3 of 3");
    await page.keyboard.press("ArrowUp");
    await page.waitForTimeout(150);
    await page.keyboard.press("ArrowUp");
    await page.waitForTimeout(150);
    await page.keyboard.press("Space");
    await expect(live).toContainText("Dropped stream preset “Harbor Lantern Jazz”");
    const moved = ["Harbor Lantern Jazz", "Morning Orchard Acoustic", "Lighthouse Talk"];
    await board.expectPresets("Kitchen", moved);
    await board.expectSaved();
    await board.reload();
    await board.expectPresets("Kitchen", moved);
  });

  test("attaches a tone curve by dragging it from the tray onto a source", async ({ page }) => {
    const board = new BoardPage(page);
    await board.open("Lindqvist residence");
    const phone = board.sourceCard("Family room", "Phone");
    await expect(phone.getByTestId("card-curve")).toHaveText("no curve");
    await board.dragByMouse(board.trayCurve("Bright hard-surfaced room"), phone);
    await expect(phone).toHaveAttribute("data-drop-state", "accepts");
    await board.drop();
    await expect(phone.getByTestId("card-curve")).toContainText("Bright hard-surfaced room");
    await board.expectSaved();
    await board.reload();
    await expect(board.sourceCard("Family room", "Phone").getByTestId("card-curve")).toContainText("Bright hard-surfaced room");
  });

  test("refuses a drop the device cannot take, with the reason, and changes nothing", async ({ page }) => {
    const board = new BoardPage(page);
    await board.open("Lindqvist residence");
    const streaming = board.sourceCard("Patio", "Streaming");
    await board.dragByMouse(board.trayCurve("In-ceiling speaker voicing"), streaming);
    await expect(streaming).toHaveAttribute("data-drop-state", "refused");
    await expect(streaming.getByTestId("drop-hint")).toContainText("5 EQ bands");
    await board.drop();
    await expect(board.notices().last()).toContainText("Not done: “Patio” has 5 EQ bands");
    await expect(streaming.getByTestId("card-curve")).toHaveText("no curve");
    await board.reload();
    await expect(board.sourceCard("Patio", "Streaming").getByTestId("card-curve")).toHaveText("no curve");
  });

  test("edits a loudness offset in the source dialog", async ({ page }) => {
    const board = new BoardPage(page);
    await board.open("Aalto townhouse");
    await board.zone("Living room").getByRole("button", { name: "Edit source Computer" }).click();
    const dialog = page.getByTestId("source-dialog");
    await expect(dialog).toBeVisible();
    await dialog.getByLabel("Loudness offset (dB)").fill("1.3");
    await dialog.getByRole("button", { name: "Save source" }).click();
    await expect(dialog.getByText("Use steps of 0.5 dB")).toBeVisible();
    await dialog.getByLabel("Loudness offset (dB)").fill("2.5");
    await expect(dialog.getByTestId("clip-caution")).toContainText("Could clip");
    await dialog.getByRole("button", { name: "Save source" }).click();
    await expect(dialog).toBeHidden();
    const computer = board.sourceCard("Living room", "Computer");
    await expect(computer.getByTestId("card-offset")).toHaveText("+2.5 dB");
    await board.expectSaved();
    await board.reload();
    await expect(board.sourceCard("Living room", "Computer").getByTestId("card-offset")).toHaveText("+2.5 dB");
  });

  test("finds a station in the directory and adds it as a preset", async ({ page }) => {
    const board = new BoardPage(page);
    await board.open("Brightwater loft");
    await board.zone("Bedroom").getByRole("button", { name: "Add a stream preset to Bedroom" }).click();
    const dialog = page.getByTestId("preset-dialog");
    const finder = dialog.getByTestId("station-finder");
    await finder.getByLabel("Name").fill("cloudberry");
    await finder.getByRole("button", { name: "Search" }).click();
    await finder.getByRole("button", { name: "Choose Cloudberry Chamber Hour" }).click();
    await expect(dialog.getByLabel("Stream URL")).toHaveValue(/^https:\/\/.*example\.net/);
    await dialog.getByRole("button", { name: "Add preset" }).click();
    await expect(dialog).toBeHidden();
    await board.expectPresets("Bedroom", ["Tidepool Ambient", "Morning Orchard Acoustic", "Cloudberry Chamber Hour"]);
    await board.expectSaved();
    await board.reload();
    await board.expectPresets("Bedroom", ["Tidepool Ambient", "Morning Orchard Acoustic", "Cloudberry Chamber Hour"]);
  });

  test("when the station directory fails, the dialog says so and nothing is added", async ({ page, request }) => {
    const board = new BoardPage(page);
    await board.open("Brightwater loft");
    const stations = process.env.STATIONS_BASE_URL ?? "http://127.0.0.1:4120";
    await request.post(`${stations}/__stations/faults`, { data: { serverErrors: { count: 1, status: 503 } } });
    await board.zone("Studio").getByRole("button", { name: "Add a stream preset to Studio" }).click();
    const finder = page.getByTestId("station-finder");
    await finder.getByLabel("Genre").fill("jazz");
    await finder.getByRole("button", { name: "Search" }).click();
    await expect(finder.getByTestId("station-error")).toContainText("unavailable right now");
    await expect(finder.getByTestId("station-error")).toContainText("Nothing was added.");
    await page.keyboard.press("Escape");
    await board.expectPresets("Studio", ["Night Tram Electronica"]);
  });

  test("copies a preset to another zone by drag", async ({ page }) => {
    const board = new BoardPage(page);
    await board.open("Marchetti lake house");
    await board.dragByMouse(board.presetCard("Great room", "Brass Lantern Big Band"), board.zone("Guest loft").getByTestId("preset-list"));
    await board.drop();
    const dialog = page.getByTestId("transfer-dialog");
    await dialog.getByRole("button", { name: "Copy to Guest loft" }).click();
    await expect(dialog).toBeHidden();
    await board.expectPresets("Guest loft", ["Tidepool Ambient", "Brass Lantern Big Band"]);
    await board.expectSaved();
    await board.reload();
    await board.expectPresets("Guest loft", ["Tidepool Ambient", "Brass Lantern Big Band"]);
    await board.expectPresets("Great room", ["Brass Lantern Big Band", "Saltmarsh Blues", "Lighthouse Talk"]);
  });

  test("makes a curve the zone curve by dragging it onto the zone, and removes it again", async ({ page }) => {
    const board = new BoardPage(page);
    await board.open("Marchetti lake house");
    const zoneCurve = board.zone("Great room").getByTestId("zone-curve");
    await expect(zoneCurve.getByTestId("zone-curve-name")).toHaveText("none");
    await board.dragByMouse(board.trayCurve("Gym punch"), zoneCurve);
    await expect(zoneCurve).toHaveAttribute("data-drop-state", "accepts");
    await expect(zoneCurve.getByTestId("drop-hint")).toHaveText("Drop to make this the zone curve");
    await board.drop();
    await expect(zoneCurve.getByTestId("zone-curve-name")).toHaveText("Gym punch");
    await board.expectSaved();
    await board.reload();
    await expect(board.zone("Great room").getByTestId("zone-curve-name")).toHaveText("Gym punch");
    await board.zone("Great room").getByRole("button", { name: "Remove the zone curve of Great room" }).click();
    await expect(board.zone("Great room").getByTestId("zone-curve-name")).toHaveText("none");
    await board.expectSaved();
  });

  test("attaches a tone curve with the keyboard alone, with what happens read out", async ({ page }) => {
    const board = new BoardPage(page);
    await board.open("Marchetti lake house");
    const live = page.locator('[id^="DndLiveRegion"]');
    await page.getByRole("button", { name: "Drag tone curve Gym punch" }).focus();
    await page.keyboard.press("Space");
    // The pick-up is read out; the nearest place that takes a curve follows at once.
    await expect(live).toContainText(/Picked up tone curve “Gym punch”|^Over /);
    // Arrow keys move only between places that take a curve: cards and zone curves.
    let over = "";
    for (let i = 0; i < 12 && !over.startsWith("Over "); i++) {
      await page.keyboard.press("ArrowDown");
      await page.waitForTimeout(150);
      over = (await live.innerText()).split("\n").filter(Boolean).at(-1) ?? "";
    }
    expect(over).toMatch(/^Over (source|stream preset|the zone curve) .*Drop to (attach the curve|make it the zone curve)\.$/);
    await page.keyboard.press("Space");
    await expect(live).toContainText(/Attached tone curve “Gym punch” to|tone curve “Gym punch” is now the zone curve of/);
    await board.expectSaved();
    // Whatever the keyboard landed on now carries the curve, also after a reload.
    const target = /Over (?:source|stream preset) “(.+?)” of (.+?), position/.exec(over);
    await board.reload();
    if (target) {
      const [, card, zone] = target;
      const cards = board.zone(zone).locator('[data-testid="source-card"], [data-testid="preset-card"]').filter({ has: page.getByTestId("card-title").getByText(card) });
      await expect(cards.first().getByTestId("card-curve")).toContainText("Gym punch");
    } else {
      const zone = /Over the zone curve of (.+?)\./.exec(over)![1];
      await expect(board.zone(zone).getByTestId("zone-curve-name")).toHaveText("Gym punch");
    }
  });

  test("a stale write is refused and the board offers to reload", async ({ page }) => {
    const board = new BoardPage(page);
    await board.open("Nakagawa cottage");
    // Someone else renames the zone behind this board's back.
    const homeUrl = page.url().replace(/^.*\/homes\//, "");
    const fresh = await (await page.request.get(`/api/homes/${homeUrl}/board`)).json();
    const den = fresh.zones.find((z: { name: string }) => z.name === "Den");
    const renamed = await page.request.patch(`/api/zones/${den.id}/settings`, { data: { version: den.version, name: "Den (renamed)" } });
    expect(renamed.status()).toBe(200);
    await board.dragByMouse(board.presetCard("Den", "Saltmarsh Blues"), board.presetCard("Den", "Copper Kettle Folk"), { targetY: "top" });
    await board.drop();
    await expect(page.getByTestId("board-conflict")).toContainText("Someone else changed this zone");
    // Rolled back: the order is as it was.
    await board.expectPresets("Den", ["Copper Kettle Folk", "Saltmarsh Blues"]);
    await page.getByRole("button", { name: "Reload the board" }).click();
    await expect(board.zone("Den (renamed)")).toBeVisible();
  });
});

test.describe("accessibility", () => {
  test("the board passes axe-core with no serious or critical violations, for an integrator and for support", async ({ page }) => {
    await signInAs(page, integrator);
    const board = new BoardPage(page);
    await board.open("Lindqvist residence");
    expect(await seriousViolations(page)).toEqual([]);
    // With a dialog open, too.
    await board.zone("Family room").getByRole("button", { name: "Edit zone Family room" }).click();
    await expect(page.getByTestId("zone-dialog")).toBeVisible();
    expect(await seriousViolations(page)).toEqual([]);
    await page.keyboard.press("Escape");

    await page.context().clearCookies();
    await signInAs(page, "priya@fernhill.example");
    await board.open("Aalto townhouse");
    expect(await seriousViolations(page)).toEqual([]);
  });
});
