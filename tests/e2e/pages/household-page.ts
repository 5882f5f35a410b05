import { expect, type Locator, type Page } from "@playwright/test";

/** The homeowner's view of their home: one card per room. */
export class HouseholdPage {
  constructor(private readonly page: Page) {}

  async goto() {
    await this.page.goto("/household");
    await expect(this.page.getByTestId("household-home").first()).toBeVisible();
    // Dragging needs React's handlers attached.
    await expect(this.page.getByTestId("household-view")).toHaveAttribute("data-hydrated", "true");
  }

  zone(name: string): Locator {
    return this.page.getByTestId("zone-card").filter({ has: this.page.getByRole("heading", { name, exact: true }) });
  }

  stations(zone: string): Locator {
    return this.zone(zone).getByTestId("station");
  }

  async stationNames(zone: string): Promise<string[]> {
    return this.stations(zone).evaluateAll((items) => items.map((i) => i.getAttribute("data-station-name") ?? ""));
  }

  handle(zone: string, station: string): Locator {
    return this.zone(zone).getByRole("button", { name: new RegExp(`^Move ${station.replace(/[.*+?^${}()|[\]\\]/g, "\\$&")},`) });
  }

  /** Drag with the mouse, in small steps as a person would (the sensor needs real movement). */
  async dragStation(zone: string, station: string, ontoStation: string) {
    // Mouse coordinates are the viewport's: bring the list to the middle of the screen first
    // (near an edge, dragging scrolls the page, as it should for a person).
    await this.zone(zone).getByTestId("station-list").evaluate((el) => el.scrollIntoView({ block: "center" }));
    const from = await this.handle(zone, station).boundingBox();
    const to = await this.zone(zone).getByTestId("station").filter({ hasText: ontoStation }).boundingBox();
    if (!from || !to) throw new Error("station not on screen");
    const x = from.x + from.width / 2;
    await this.page.mouse.move(x, from.y + from.height / 2);
    await this.page.mouse.down();
    await this.page.mouse.move(x, from.y + from.height / 2 + 8, { steps: 4 });
    const targetY = to.y + (to.y < from.y ? to.height * 0.25 : to.height * 0.75);
    await this.page.mouse.move(x, targetY, { steps: 20 });
    await this.page.mouse.up();
  }

  saveResult(zone: string): Locator {
    return this.zone(zone).getByTestId("save-result");
  }

  delivery(zone: string): Locator {
    return this.zone(zone).getByTestId("delivery");
  }
}
