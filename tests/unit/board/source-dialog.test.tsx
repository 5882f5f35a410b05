import { render, screen } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { describe, expect, it, vi, type Mock } from "vitest";
import type { WriteOutcome } from "@/components/board/use-board";
import type { SourceForm } from "@/lib/validation/board";
import { SourceDialog } from "@/components/board/source-dialog";
import { ApiError } from "@/lib/fetcher";
import { curves, zone } from "./fixtures";

type Save = (values: SourceForm) => Promise<WriteOutcome>;

function setup(overrides: { onSave?: Mock<Save>; source?: boolean } = {}) {
  const onSave = overrides.onSave ?? vi.fn<Save>().mockResolvedValue({ ok: true });
  const onOpenChange = vi.fn();
  const z = zone();
  render(
    <SourceDialog open onOpenChange={onOpenChange} zone={z} curves={curves} source={overrides.source === false ? undefined : z.sources[0]} onSave={onSave} />,
  );
  return { onSave, onOpenChange, user: userEvent.setup() };
}

describe("source dialog", () => {
  it("shows the source and saves typed values from the shared schema", async () => {
    const { onSave, onOpenChange, user } = setup();
    expect(screen.getByLabelText("Label")).toHaveProperty("value", "Turntable");
    await user.clear(screen.getByLabelText("Loudness offset (dB)"));
    await user.type(screen.getByLabelText("Loudness offset (dB)"), "-3.5");
    await user.selectOptions(screen.getByLabelText("Tone curve"), "Treble trim (2 bands)");
    await user.click(screen.getByRole("button", { name: "Save source" }));
    expect(onSave).toHaveBeenCalledWith({
      label: "Turntable",
      kind: "analog",
      enabled: true,
      loudnessOffsetDb: -3.5,
      toneCurveId: curves[1].id,
      subsonic: true,
    });
    expect(onOpenChange).toHaveBeenCalledWith(false);
  });

  it("puts errors beside the fields and sends nothing", async () => {
    const { onSave, user } = setup();
    await user.clear(screen.getByLabelText("Label"));
    await user.clear(screen.getByLabelText("Loudness offset (dB)"));
    await user.type(screen.getByLabelText("Loudness offset (dB)"), "1.3");
    await user.click(screen.getByRole("button", { name: "Save source" }));
    expect(onSave).not.toHaveBeenCalled();
    const offset = screen.getByLabelText("Loudness offset (dB)");
    expect(offset.getAttribute("aria-invalid")).toBe("true");
    expect(document.getElementById(offset.getAttribute("aria-describedby")!)?.textContent).toMatch(/steps of 0.5 dB/);
    expect(screen.getByText("Give the source a label.")).toBeTruthy();
    await user.clear(offset);
    await user.type(offset, "13");
    await user.click(screen.getByRole("button", { name: "Save source" }));
    expect(screen.getByText("The offset must be at most +12 dB.")).toBeTruthy();
    expect(onSave).not.toHaveBeenCalled();
  });

  it("offers only the device's inputs", () => {
    setup({ source: false });
    const hdmi = screen.getByRole("option", { name: /HDMI ARC/ }) as HTMLOptionElement;
    expect(hdmi.disabled).toBe(true);
    expect(hdmi.textContent).toContain("not on this device");
    expect((screen.getByRole("option", { name: "Optical" }) as HTMLOptionElement).disabled).toBe(false);
  });

  it("keeps the dialog open and shows the server's refusal beside the field", async () => {
    const onSave = vi.fn<Save>().mockResolvedValue({
      ok: false,
      error: new ApiError(422, "zone:rule", "“Sunroom” has 3 EQ bands.", { toneCurveId: ["Needs 2 bands; only 1 is free on this device."] }),
    });
    const { onOpenChange, user } = setup({ onSave });
    await user.selectOptions(screen.getByLabelText("Tone curve"), "Treble trim (2 bands)");
    await user.click(screen.getByRole("button", { name: "Save source" }));
    expect(await screen.findByTestId("form-error")).toHaveProperty("textContent", "“Sunroom” has 3 EQ bands.");
    expect(screen.getByText("Needs 2 bands; only 1 is free on this device.")).toBeTruthy();
    expect(onOpenChange).not.toHaveBeenCalledWith(false);
  });

  it("cautions (without blocking) when offset plus curve boost could clip", async () => {
    const { onSave, user } = setup();
    // +2 dB on material assumed to peak at 0 dBFS → +2 dBTP (lib/audio/headroom.ts arithmetic; full-scale assumption: common practice, no source).
    expect(screen.getByTestId("clip-caution").textContent).toMatch(/Could clip: peaks may reach \+2 dBTP if the material peaks at full scale/);
    const offset = screen.getByLabelText("Loudness offset (dB)");
    await user.clear(offset);
    await user.type(offset, "-6");
    expect(screen.queryByTestId("clip-caution")).toBeNull();
    // A 4 dB low shelf (Audio EQ Cookbook shelf, reaching about its gain) lifts −6 dB to about −2 dBTP: no caution.
    await user.selectOptions(screen.getByLabelText("Tone curve"), "Gentle lift (1 band)");
    expect(screen.queryByTestId("clip-caution")).toBeNull();
    await user.clear(offset);
    await user.type(offset, "-2");
    // −2 dB + about 4 dB of shelf → about +2 dBTP: caution.
    expect(screen.getByTestId("clip-caution").textContent).toMatch(/Could clip/);
    await user.click(screen.getByRole("button", { name: "Save source" }));
    expect(onSave).toHaveBeenCalled();
  });
});
