import { expect, type Page } from "@playwright/test";

export const demoPassword = "zonewright-demo";

export class SignInPage {
  constructor(private readonly page: Page) {}

  async goto(next?: string) {
    await this.page.goto(next ? `/sign-in?next=${encodeURIComponent(next)}` : "/sign-in");
  }

  async signIn(email: string, password = demoPassword) {
    await this.page.getByLabel("E-mail").fill(email);
    await this.page.getByLabel("Password").fill(password);
    await this.page.getByRole("button", { name: "Sign in" }).click();
  }

  async expectError(text: RegExp | string) {
    await expect(this.page.getByTestId("sign-in-error")).toContainText(text);
  }
}

/** Sign in through the real form and wait until the signed-in header shows. */
export async function signInAs(page: Page, email: string) {
  const signIn = new SignInPage(page);
  await signIn.goto();
  await signIn.signIn(email);
  await expect(page.getByTestId("who-am-i")).toBeVisible();
}
