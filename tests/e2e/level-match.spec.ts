import { expect, test } from "@playwright/test";
import { sineWav as sine } from "./fixtures/wav";
import { LevelMatchPage } from "./pages/level-match-page";
import { signInAs } from "./pages/sign-in-page";

// Level match in the browser: upload two clips (generated here with wavefile),
// see what they measure, apply the suggestions. Expected readings: EBU Tech
// 3341 (v4) Table 1 cases 1 and 2 — a stereo 1 kHz sine at −23 dBFS reads
// −23.0 LUFS and at −33 dBFS −33.0 LUFS, so the second needs +10 dB to match.

test("upload two clips and apply the suggestions", async ({ page }) => {
  await signInAs(page, "theo@fernhill.example");
  const homes = await (await page.request.get("/api/homes?search=Aalto")).json();
  const homeId = (homes.items as { id: string; name: string }[]).find((h) => h.name === "Aalto townhouse")!.id;
  const board = await (await page.request.get(`/api/homes/${homeId}/board`)).json();
  const zone = (board.zones as { id: string; name: string }[]).find((z) => z.name === "Living room")!;

  const levelMatch = new LevelMatchPage(page);
  await levelMatch.goto(zone.id, "Living room");
  await levelMatch.uploadClip("Streaming", { name: "streaming.wav", mimeType: "audio/wav", buffer: sine(-23, 5) });
  await expect(levelMatch.row("Streaming").getByTestId("measured-lufs")).toHaveText("−23.0 LUFS");
  await levelMatch.uploadClip("Computer", { name: "computer.wav", mimeType: "audio/wav", buffer: sine(-33, 5) });
  await expect(levelMatch.row("Computer").getByTestId("measured-lufs")).toHaveText("−33.0 LUFS");

  // A non-WAV file is refused with a clear message and nothing is stored.
  await levelMatch.row("Turntable").getByTestId("clip-input").setInputFiles({ name: "notes.wav", mimeType: "audio/wav", buffer: Buffer.from("not audio at all") });
  await expect(levelMatch.row("Turntable").getByTestId("clip-error")).toContainText("This is not a WAV file");
  await expect(levelMatch.row("Turntable").getByTestId("measured-lufs")).toHaveText("–");

  await page.getByLabel("Reference source or station").selectOption({ label: "Streaming (−23.0 LUFS)" });
  await expect(page.getByTestId("target-level")).toContainText("−23.0 LUFS");
  await expect(levelMatch.row("Computer").getByTestId("suggested-offset")).toContainText("+10 dB");
  await expect(levelMatch.row("Streaming").getByTestId("suggested-offset")).toContainText("0 dB");

  await levelMatch.applyAll();
  await expect(levelMatch.row("Computer").getByTestId("current-offset")).toHaveText("+10 dB");
  await expect(levelMatch.row("Streaming").getByTestId("current-offset")).toHaveText("0 dB");
  await expect(page.getByRole("button", { name: /^Apply all suggestions \(0\)/ })).toBeDisabled();

  // The change is in the zone's history as an audited revision.
  const activity = await (await page.request.get("/api/activity")).json();
  expect(JSON.stringify(activity)).toContain("zone.level-matched");
});

/** A 3-minute 48 kHz stereo 24-bit sine (about 52 MB), written directly: canonical 44-byte PCM header. */
function longSine(levelDbfs: number, seconds: number): Buffer {
  const frames = seconds * 48_000;
  const buf = Buffer.alloc(44 + frames * 6);
  buf.write("RIFF", 0, "ascii");
  buf.writeUInt32LE(36 + frames * 6, 4);
  buf.write("WAVEfmt ", 8, "ascii");
  buf.writeUInt32LE(16, 16);
  buf.writeUInt16LE(1, 20);
  buf.writeUInt16LE(2, 22);
  buf.writeUInt32LE(48_000, 24);
  buf.writeUInt32LE(48_000 * 6, 28);
  buf.writeUInt16LE(6, 32);
  buf.writeUInt16LE(24, 34);
  buf.write("data", 36, "ascii");
  buf.writeUInt32LE(frames * 6, 40);
  const amp = Math.pow(10, levelDbfs / 20) * 8388607;
  for (let i = 0, p = 44; i < frames; i++, p += 6) {
    const v = Math.round(amp * Math.sin((2 * Math.PI * 1000 * i) / 48_000));
    buf.writeIntLE(v, p, 3);
    buf.writeIntLE(v, p + 3, 3);
  }
  return buf;
}

test("a 3-minute clip (about 52 MB) goes through the real server and is measured", async ({ page }) => {
  test.setTimeout(120_000);
  await signInAs(page, "theo@fernhill.example");
  const homes = await (await page.request.get("/api/homes?search=Nakagawa")).json();
  const homeId = (homes.items as { id: string; name: string }[]).find((h) => h.name === "Nakagawa cottage")!.id;
  const board = await (await page.request.get(`/api/homes/${homeId}/board`)).json();
  const zone = (board.zones as { id: string; name: string }[]).find((z) => z.name === "Den")!;
  const levelMatch = new LevelMatchPage(page);
  await levelMatch.goto(zone.id, "Den");
  await levelMatch.row("Record player").getByTestId("clip-input").setInputFiles({ name: "side-a.wav", mimeType: "audio/wav", buffer: longSine(-23, 180) });
  // EBU Tech 3341 case 1 again: −23.0 LUFS, whatever the length.
  await expect(levelMatch.row("Record player").getByTestId("measured-lufs")).toHaveText("−23.0 LUFS", { timeout: 90_000 });
});
