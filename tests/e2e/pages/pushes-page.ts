import { expect, type Locator, type Page } from "@playwright/test";

export class PushesPage {
  constructor(private readonly page: Page) {}

  async goto() {
    await this.page.goto("/pushes");
    await expect(this.page.getByRole("heading", { name: "Pushes", exact: true })).toBeVisible();
  }

  /** Opens the preview of a whole-home push and returns the dialog. */
  async previewHome(homeName: string): Promise<Locator> {
    const select = this.page.getByTestId("push-home-select");
    const value = await select.locator("option", { hasText: homeName }).getAttribute("value");
    await select.selectOption(value!);
    await this.page.getByRole("button", { name: "Preview push…" }).click();
    const dialog = this.page.getByTestId("push-preview");
    await expect(dialog).toBeVisible();
    return dialog;
  }
}

export class PushDetailPage {
  readonly targets: Locator;

  constructor(private readonly page: Page) {
    this.targets = page.getByTestId("target-row");
  }

  target(zoneName: string) {
    return this.page.locator(`[data-testid="target-row"][data-zone="${zoneName}"]`);
  }

  async expectAllApplied(count: number, timeout = 60_000) {
    await expect(this.page.locator('[data-testid="target-state"][data-state="applied"]')).toHaveCount(count, { timeout });
    await expect(this.page.getByTestId("push-status")).toHaveAttribute("data-status", "finished", { timeout });
  }
}

export class DevicePage {
  constructor(private readonly page: Page) {}

  driftBadge() {
    return this.page.getByTestId("drift-badge").first();
  }

  async expectDrift(state: string, timeout = 20_000) {
    // Reports arrive through the fleet's webhook; reload until the page shows the new state.
    await expect(async () => {
      await this.page.reload();
      await expect(this.driftBadge().getByTestId("drift-state")).toHaveAttribute("data-state", state, { timeout: 1000 });
    }).toPass({ timeout });
  }
}
