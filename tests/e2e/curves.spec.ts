import { expect, test } from "@playwright/test";
import { CurveEditorPage, CurvesPage } from "./pages/curves-page";
import { signInAs } from "./pages/sign-in-page";

// The tone-curve library in the browser: create a curve, edit a band and watch
// the plot and the largest boost change, save, export; a bad CSV import names
// its problems and saves nothing.

test.beforeEach(async ({ page }) => {
  await signInAs(page, "theo@fernhill.example");
});

test("create a curve, edit a band, see the plot update, save and export", async ({ page }) => {
  const library = new CurvesPage(page);
  await library.goto();
  const name = `Deck speakers ${Date.now()}`;
  await library.create(name);

  const editor = new CurveEditorPage(page);
  await expect(editor.largestBoost()).toContainText("Largest boost: 0 dB");
  await page.getByRole("button", { name: "Add band" }).click();
  await expect(editor.bandRows()).toHaveCount(1);
  const flat = await editor.combinedPath();

  // A +4 dB peaking band at 1 kHz reads +4 dB at its frequency (Web Audio spec: H(f0) = A², A = 10^(G/40)).
  await editor.setBand(0, "gain (dB)", "4");
  await expect(editor.largestBoost()).toContainText("+4 dB near 1 kHz");
  await expect.poll(() => editor.combinedPath()).not.toBe(flat);

  // Bad input is marked beside the field and blocks saving.
  await editor.setBand(0, "frequency (Hz)", "5");
  await expect(page.getByText("Frequency must be at least 10 Hz.")).toBeVisible();
  await expect(page.getByRole("button", { name: "Save curve" })).toBeDisabled();
  await editor.setBand(0, "frequency (Hz)", "250");
  await expect(editor.largestBoost()).toContainText("+4 dB near 250 Hz");

  await editor.save();
  await page.reload();
  await expect(page.getByLabel("Band 1 frequency (Hz)")).toHaveValue("250");

  const download = page.waitForEvent("download");
  await page.getByRole("link", { name: "Export CSV" }).first().click();
  const file = await download;
  expect(file.suggestedFilename()).toMatch(/^deck-speakers-\d+\.csv$/);
  const text = await (await file.createReadStream()).toArray();
  expect(Buffer.concat(text).toString("utf8")).toBe("type,frequency_hz,gain_db,q\npeaking,250,4,1\n");
});

test("importing a bad CSV shows each problem and saves nothing", async ({ page }) => {
  const library = new CurvesPage(page);
  await library.goto();
  const before = await library.rows().count();
  const dialog = await library.importFile(
    { name: "site-visit.csv", mimeType: "text/csv", buffer: Buffer.from("type,frequency_hz,gain_db,q\npeaking,1000,2,1\npeaking,2000,loud,1\n") },
    "Site visit",
  );
  const errors = dialog.getByTestId("import-errors");
  await expect(errors).toContainText("site-visit.csv could not be imported. Nothing was saved.");
  await expect(errors).toContainText('Line 3, gain_db: "loud" is not a number.');
  await dialog.getByRole("button", { name: "Cancel" }).click();
  await page.reload();
  await expect(library.rows()).toHaveCount(before);
  await expect(page.getByText("Site visit")).toHaveCount(0);
});
