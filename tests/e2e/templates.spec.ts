import { expect, test } from "@playwright/test";
import { signInAs } from "./pages/sign-in-page";
import { TemplatesPage } from "./pages/templates-page";

// The template library. The installer's story (duplicate a template into a new
// home and push it) is in stories.spec.ts.

test("a device that cannot take the template is shown with the reason and cannot be picked", async ({ page }) => {
  await signInAs(page, "jonah@fernhill.example");
  const library = new TemplatesPage(page);
  await library.goto();
  const dialog = await library.openApply("Family room with TV and subwoofer");
  await dialog.newHome("Should not be made", "Nobody", "");
  await expect(dialog.root.getByText(/Cannot take this template: .*HDMI ARC/).first()).toBeVisible();
  await expect(dialog.root.getByRole("radio", { name: /FW2-21400 cannot take this template/ })).toBeDisabled();
  await dialog.zoneName("Den");
  await dialog.submit();
  await expect(dialog.root.getByTestId("form-error")).toBeVisible();
  await dialog.root.getByRole("button", { name: "Cancel" }).click();
});

test("an integrator edits a template, sees the zones behind, previews and updates them keeping local fields", async ({ page }) => {
  await signInAs(page, "theo@fernhill.example");
  const library = new TemplatesPage(page);
  await library.goto();
  await library.open("Outdoor pair with bass lift");

  // The Dock keeps its own ceiling.
  const dockRow = page.getByTestId("template-zones").getByRole("row").filter({ hasText: "Dock" });
  await dockRow.getByRole("button", { name: /Choose the fields Dock/ }).click();
  const overrides = page.getByTestId("overrides-dialog");
  await overrides.getByLabel("Volume ceiling").check();
  await overrides.getByRole("button", { name: "Save" }).click();
  await expect(dockRow).toContainText("Volume ceiling");

  await page.getByRole("button", { name: "Edit configuration" }).click();
  const editor = page.getByTestId("template-editor");
  const version = Number((await page.getByText(/^version \d+$/).first().innerText()).replace("version ", ""));
  await editor.getByLabel("Volume ceiling (%)").fill("57");
  await editor.getByRole("button", { name: /Save as version/ }).click();
  await expect(page.getByTestId("template-saved")).toContainText(`Saved as version ${version + 1}.`);

  const panel = page.getByTestId("update-panel");
  const patio = panel.getByTestId("preview-zone").filter({ hasText: "Patio" });
  await expect(patio).toContainText("Volume ceiling");
  await expect(patio).toContainText("57 %");
  const dock = panel.getByTestId("preview-zone").filter({ hasText: "Dock" });
  await expect(dock.getByTestId("kept-fields")).toContainText("Volume ceiling (%): keeps 70 % (set in this zone; template: 57 %)");
  await panel.getByRole("button", { name: /^Update \d+ zones? to version/ }).click();
  await expect(panel.getByTestId("update-results")).toContainText("ready to push");
  // Ready to push means one click away.
  await panel.getByRole("button", { name: /^Push (it|these \d+) now$/ }).click();
  await expect(panel.getByTestId("push-started")).toContainText(/Push started to \d+ devices?\./);
  await expect(page.getByTestId("template-zones").getByRole("row").filter({ hasText: "Patio" })).toContainText("up to date");
});
