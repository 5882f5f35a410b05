import { render, screen } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { describe, expect, it, vi } from "vitest";
import { LockDialog } from "@/components/board/lock-dialog";
import { ZoneDialog } from "@/components/board/zone-dialog";
import { ApiError } from "@/lib/fetcher";
import { zone } from "./fixtures";

describe("zone dialog", () => {
  function setup(guestRefusal: string | null = null, onSave = vi.fn().mockResolvedValue({ ok: true })) {
    const onOpenChange = vi.fn();
    render(<ZoneDialog open onOpenChange={onOpenChange} zone={zone()} guestRefusal={guestRefusal} onSave={onSave} />);
    return { onSave, onOpenChange, user: userEvent.setup() };
  }

  it("refuses a turn-on volume above the ceiling beside the field, at once and on save", async () => {
    const { onSave, user } = setup();
    const turnOn = screen.getByLabelText("Turn-on volume (%)");
    await user.clear(turnOn);
    await user.type(turnOn, "75");
    expect(turnOn.getAttribute("aria-invalid")).toBe("true");
    expect(screen.getByText("The turn-on volume cannot be above the ceiling (70 %).")).toBeTruthy();
    await user.click(screen.getByRole("button", { name: "Save zone" }));
    expect(onSave).not.toHaveBeenCalled();
  });

  it("cautions about a high ceiling with the NIOSH note, but saves it; only changed fields are sent", async () => {
    const { onSave, user } = setup();
    const ceiling = screen.getByLabelText("Volume ceiling (%)");
    await user.clear(ceiling);
    await user.type(ceiling, "85");
    // Threshold 80 %: common practice, no source. NIOSH REL: 85 dBA over 8 hours.
    expect(screen.getByTestId("ceiling-caution").textContent).toMatch(/above 80 %.*hearing and speakers.*NIOSH recommended exposure limit: 85 dBA over 8 hours/);
    await user.click(screen.getByLabelText("Follow HDMI-CEC power"));
    await user.click(screen.getByRole("button", { name: "Save zone" }));
    expect(onSave).toHaveBeenCalledWith({
      volumeCeiling: 85,
      deviceSettings: { standbyMinutes: 20, displayBrightness: 60, cecPower: true, cecVolume: false, trigger12v: false },
    });
  });

  it("checks device settings with the shared schema", async () => {
    const { onSave, user } = setup();
    const standby = screen.getByLabelText("Standby after (minutes)");
    await user.clear(standby);
    await user.type(standby, "300");
    await user.clear(screen.getByLabelText("Display brightness (%)"));
    await user.click(screen.getByRole("button", { name: "Save zone" }));
    expect(screen.getByText("Standby after at most 240 minutes.")).toBeTruthy();
    expect(screen.getByText("Enter the brightness in percent.")).toBeTruthy();
    expect(onSave).not.toHaveBeenCalled();
  });

  it("changes guest controls, or explains why it cannot", async () => {
    const { onSave, user } = setup();
    await user.click(screen.getByLabelText("wake the zone"));
    await user.click(screen.getByRole("button", { name: "Save zone" }));
    expect(onSave).toHaveBeenCalledWith({ guestControls: { volume: true, source: true, wake: true } });
  });

  it("disables guest controls with the reason when locked for this role", () => {
    setup("Priya Raman locked “Sunroom” on 3 Dec 2025, 14:02: holiday rental.");
    expect((screen.getByLabelText("change the volume") as HTMLInputElement).disabled).toBe(true);
    expect(screen.getByText(/Priya Raman locked “Sunroom”/)).toBeTruthy();
  });

  it("shows a stale-version refusal and stays open", async () => {
    const onSave = vi.fn().mockResolvedValue({ ok: false, error: new ApiError(409, "zone:stale", "Someone else changed this zone. Reload to see their change, then try again.") });
    const { onOpenChange, user } = setup(null, onSave);
    await user.clear(screen.getByLabelText("Name"));
    await user.type(screen.getByLabelText("Name"), "Garden room");
    await user.click(screen.getByRole("button", { name: "Save zone" }));
    expect((await screen.findByTestId("form-error")).textContent).toMatch(/Someone else changed this zone/);
    expect(onOpenChange).not.toHaveBeenCalledWith(false);
  });
});

describe("guest-control lock dialog", () => {
  it("locks with a reason and the controls to lock in", async () => {
    const onLock = vi.fn().mockResolvedValue({ ok: true });
    const onOpenChange = vi.fn();
    render(<LockDialog open onOpenChange={onOpenChange} zone={zone()} mode="lock" onLock={onLock} onUnlock={vi.fn()} />);
    const user = userEvent.setup();
    await user.click(screen.getByRole("button", { name: "Lock" }));
    expect(screen.getByText(/Say why in a few words/)).toBeTruthy();
    expect(onLock).not.toHaveBeenCalled();
    await user.click(screen.getByLabelText("change the volume"));
    await user.type(screen.getByLabelText("Reason for the lock"), "Guests kept turning it up at night");
    await user.click(screen.getByRole("button", { name: "Lock" }));
    expect(onLock).toHaveBeenCalledWith({ reason: "Guests kept turning it up at night", guestControls: { volume: false, source: true, wake: false } });
    expect(onOpenChange).toHaveBeenCalledWith(false);
  });

  it("unlocks with a reason, saying who locked it, when and why", async () => {
    const onUnlock = vi.fn().mockResolvedValue({ ok: true });
    const locked = zone({
      guest: { volume: false, source: true, wake: false, locked: true, lockedAt: "2025-12-03T14:02:00.000Z", lockedByName: "Priya Raman", lockReason: "Holiday rental" },
    });
    render(<LockDialog open onOpenChange={vi.fn()} zone={locked} mode="unlock" onLock={vi.fn()} onUnlock={onUnlock} />);
    expect(screen.getByText(/Priya Raman locked “Sunroom” on 3 Dec 2025.*Holiday rental/)).toBeTruthy();
    const user = userEvent.setup();
    await user.type(screen.getByLabelText("Reason for unlocking"), "Rental period over");
    await user.click(screen.getByRole("button", { name: "Unlock" }));
    expect(onUnlock).toHaveBeenCalledWith({ reason: "Rental period over" });
  });
});
