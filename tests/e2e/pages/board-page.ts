import { expect, type Locator, type Page } from "@playwright/test";

/** The zone board of one home (app/(studio)/homes/[homeId]). */
export class BoardPage {
  constructor(readonly page: Page) {}

  async open(homeName: string) {
    await this.page.goto("/homes");
    await this.page.getByRole("link", { name: homeName }).click();
    await expect(this.page.getByRole("heading", { name: homeName, level: 1 })).toBeVisible();
    await expect(this.page.getByTestId("zone-board")).toBeVisible();
  }

  async reload() {
    await this.page.reload();
    await expect(this.page.getByTestId("zone-board")).toBeVisible();
  }

  zone(name: string): Locator {
    return this.page.locator(`[data-testid="zone-column"][data-zone-name="${name}"]`);
  }

  presetCard(zone: string, name: string): Locator {
    return this.zone(zone).getByTestId("preset-card").filter({ has: this.page.getByTestId("card-title").getByText(name, { exact: false }) });
  }

  sourceCard(zone: string, label: string): Locator {
    return this.zone(zone)
      .getByTestId("source-card")
      .filter({ has: this.page.getByTestId("card-title").getByText(label, { exact: true }) });
  }

  trayCurve(name: string): Locator {
    return this.page.getByTestId("tray-curve").filter({ hasText: name });
  }

  async presetNames(zone: string): Promise<string[]> {
    const titles = await this.zone(zone).getByTestId("preset-card").getByTestId("card-title").allInnerTexts();
    return titles.map((t) => t.replace(/^\s*\d+\.\s*/, "").trim());
  }

  async expectPresets(zone: string, names: string[]) {
    await expect.poll(() => this.presetNames(zone)).toEqual(names);
  }

  async expectSaved() {
    await expect(this.page.getByTestId("save-state")).toHaveText("All changes saved.");
  }

  /** A real pointer drag: press, move past the activation distance in steps, hover the target, release. */
  async dragByMouse(from: Locator, to: Locator, options: { targetY?: "center" | "top" } = {}) {
    // Bring the target into view; the source must be visible too (the curve tray is sticky).
    await to.scrollIntoViewIfNeeded();
    const viewport = this.page.viewportSize()!;
    let start = (await from.boundingBox())!;
    // Off screen either way (the curve tray scrolls sideways): bring it into view first.
    if (start.y < 0 || start.y + start.height > viewport.height || start.x < 0 || start.x + start.width > viewport.width) {
      await from.scrollIntoViewIfNeeded();
      start = (await from.boundingBox())!;
    }
    const sx = start.x + Math.min(start.width / 2, 40);
    const sy = start.y + start.height / 2;
    await this.page.mouse.move(sx, sy);
    await this.page.mouse.down();
    await this.page.mouse.move(sx + 4, sy + 4, { steps: 4 });
    await this.page.mouse.move(sx + 12, sy + 12, { steps: 4 });
    const end = (await to.boundingBox())!;
    const ex = end.x + end.width / 2;
    const ey = options.targetY === "top" ? end.y + 4 : end.y + end.height / 2;
    await this.page.mouse.move(ex, ey, { steps: 20 });
    await this.page.mouse.move(ex, ey + 1, { steps: 2 });
  }

  async drop() {
    await this.page.mouse.up();
  }

  /** Keyboard drag from a card's (or chip's) handle: Space, arrows, Space. */
  async dragByKeyboard(handle: Locator, keys: string[]) {
    await handle.focus();
    await this.page.keyboard.press("Space");
    for (const key of keys) {
      await this.page.keyboard.press(key);
      // dnd-kit moves on the next frame; let it measure before the next key.
      await this.page.waitForTimeout(150);
    }
    await this.page.keyboard.press("Space");
  }

  notices(): Locator {
    return this.page.getByTestId("board-notice");
  }
}
