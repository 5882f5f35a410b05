import { expect, type Locator, type Page } from "@playwright/test";

export class HomesPage {
  readonly table: Locator;

  constructor(private readonly page: Page) {
    this.table = page.getByTestId("homes-table");
  }

  async goto() {
    await this.page.goto("/homes");
    await expect(this.page.getByRole("heading", { name: "Homes", exact: true })).toBeVisible();
  }

  rows() {
    return this.table.locator("tbody tr");
  }

  async search(text: string) {
    await this.page.getByLabel("Search homes").fill(text);
  }

  async sortBy(column: string) {
    await this.table.getByRole("button", { name: column }).click();
  }

  async homeNames() {
    return this.table.locator("tbody tr td:first-child").allInnerTexts();
  }
}
