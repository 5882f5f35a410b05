import { expect, type Locator, type Page } from "@playwright/test";

/** The tone-curve library and the curve editor. */
export class CurvesPage {
  constructor(private readonly page: Page) {}

  async goto() {
    await this.page.goto("/library/curves");
    await expect(this.page.getByRole("heading", { name: "Tone curves", exact: true })).toBeVisible();
  }

  rows(): Locator {
    return this.page.getByTestId("curve-row");
  }

  async create(name: string) {
    await this.page.getByRole("button", { name: "New curve" }).click();
    const dialog = this.page.getByTestId("new-curve-dialog");
    await dialog.getByLabel("Name").fill(name);
    await dialog.getByRole("button", { name: "Create and edit" }).click();
    await expect(this.page.getByRole("heading", { name, exact: true })).toBeVisible();
  }

  async importFile(file: { name: string; mimeType: string; buffer: Buffer }, name: string) {
    await this.page.getByRole("button", { name: "Import JSON or CSV" }).click();
    const dialog = this.page.getByTestId("import-curve-dialog");
    await dialog.getByLabel("File (.json or .csv)").setInputFiles(file);
    await dialog.getByLabel("Name").fill(name);
    await dialog.getByRole("button", { name: "Import" }).click();
    return dialog;
  }
}

export class CurveEditorPage {
  constructor(private readonly page: Page) {}

  bandRows(): Locator {
    return this.page.getByTestId("band-row");
  }

  async setBand(index: number, field: "frequency (Hz)" | "gain (dB)" | "Q", value: string) {
    const input = this.page.getByLabel(`Band ${index + 1} ${field}`);
    await input.fill(value);
  }

  largestBoost(): Locator {
    return this.page.getByTestId("largest-boost");
  }

  /** The `d` attribute of the combined curve's line, to see the plot change. */
  async combinedPath(): Promise<string> {
    // A flat line has no height, which Playwright calls hidden: wait for it to be attached instead.
    const path = this.page.getByTestId("response-chart").locator('path.recharts-line-curve[name="Combined"]');
    await expect(path).toBeAttached();
    return (await path.getAttribute("d")) ?? "";
  }

  async save() {
    await this.page.getByRole("button", { name: "Save curve" }).click();
    await expect(this.page.getByTestId("curve-saved")).toBeVisible();
  }
}
