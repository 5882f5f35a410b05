import { expect, type Locator, type Page } from "@playwright/test";

/** The zone template library and the "use in a home" dialog. */
export class TemplatesPage {
  constructor(private readonly page: Page) {}

  async goto() {
    await this.page.goto("/library/templates");
    await expect(this.page.getByRole("heading", { name: "Zone templates", exact: true })).toBeVisible();
    await expect(this.page.getByTestId("template-library")).toHaveAttribute("data-hydrated", "true");
  }

  /** Open a template's own page from its card. */
  async open(name: string) {
    await this.card(name).getByRole("link", { name, exact: true }).click();
    await expect(this.page.getByTestId("template-name")).toHaveText(name);
    await expect(this.page.getByTestId("template-detail")).toHaveAttribute("data-hydrated", "true");
  }

  card(name: string): Locator {
    return this.page.getByTestId("template-card").filter({ has: this.page.getByRole("heading", { name, exact: true }) });
  }

  async openApply(template: string) {
    await this.card(template).getByRole("button", { name: "Use in a home" }).click();
    const dialog = this.page.getByTestId("apply-template-dialog");
    await expect(dialog).toBeVisible();
    return new ApplyDialog(dialog);
  }
}

export class ApplyDialog {
  constructor(readonly root: Locator) {}

  async newHome(name: string, household: string, city: string) {
    await this.root.getByLabel("A new home").check();
    await this.root.getByLabel("Home name").fill(name);
    await this.root.getByLabel("Household").fill(household);
    await this.root.getByLabel("City").fill(city);
  }

  async zoneName(name: string) {
    await this.root.getByLabel("Zone name").fill(name);
  }

  device(serial: string): Locator {
    return this.root.getByTestId("device-choices").getByRole("radio", { name: new RegExp(serial) });
  }

  async submit() {
    await this.root.getByRole("button", { name: "Make the zone" }).click();
  }
}
