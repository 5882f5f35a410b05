import { expect, type Locator, type Page } from "@playwright/test";

/** The level-match page of one zone. */
export class LevelMatchPage {
  constructor(private readonly page: Page) {}

  async goto(zoneId: string, zoneName: string) {
    await this.page.goto(`/zones/${zoneId}/level-match`);
    await expect(this.page.getByRole("heading", { name: `Level match · ${zoneName}` })).toBeVisible();
  }

  row(label: string): Locator {
    return this.page.getByTestId("level-match-row").filter({ has: this.page.getByRole("rowheader", { name: new RegExp(`^${label}`) }) });
  }

  async uploadClip(label: string, file: { name: string; mimeType: string; buffer: Buffer }) {
    const row = this.row(label);
    await row.getByTestId("clip-input").setInputFiles(file);
    await expect(row.getByTestId("measured-lufs")).not.toHaveText("–", { timeout: 30_000 });
  }

  async applyAll() {
    await this.page.getByRole("button", { name: /^Apply all suggestions/ }).click();
    await expect(this.page.getByTestId("level-match-applied")).toBeVisible();
  }
}
