import { expect, type Locator, type Page } from "@playwright/test";

/** A zone's history page: revisions table, compare panel, restore dialog. */
export class HistoryPage {
  readonly table: Locator;
  readonly compare: Locator;
  readonly flash: Locator;

  constructor(private readonly page: Page) {
    this.table = page.getByTestId("revisions-table");
    this.compare = page.getByTestId("compare-panel");
    this.flash = page.getByTestId("history-flash");
  }

  async goto(zoneId: string, zoneName: string) {
    await this.page.goto(`/zones/${zoneId}/history`);
    await expect(this.page.getByRole("heading", { name: `History of ${zoneName}` })).toBeVisible();
  }

  rows() {
    return this.table.getByTestId("revision-row");
  }

  row(number: number) {
    return this.table.locator(`[data-testid="revision-row"][data-number="${number}"]`);
  }

  async pick(from: number, to: number) {
    await this.page.getByRole("radio", { name: `Compare from revision ${from}`, exact: true }).check();
    await this.page.getByRole("radio", { name: `Compare to revision ${to}`, exact: true }).check();
    await expect(this.compare.getByRole("heading", { level: 2 })).toHaveText(`Revision ${from} → revision ${to}`);
  }

  diffRows() {
    return this.compare.getByTestId("diff-row");
  }

  async openRestore(number: number) {
    await this.page.getByRole("button", { name: `Restore revision ${number}` }).click();
    const dialog = this.page.getByTestId("restore-dialog");
    await expect(dialog).toBeVisible();
    return dialog;
  }
}

/** A home's history page, where each zone's history is linked. */
export async function openZoneHistoryFromHome(page: Page, homeId: string, zoneName: string) {
  await page.goto(`/homes/${homeId}/activity`);
  await page.getByTestId("zone-histories").getByRole("link", { name: zoneName, exact: true }).click();
  await expect(page.getByRole("heading", { name: `History of ${zoneName}` })).toBeVisible();
  return page.url().match(/\/zones\/([0-9a-f-]{36})\/history/)![1];
}
