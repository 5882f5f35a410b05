import { render, screen, within } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { http, HttpResponse } from "msw";
import { setupServer } from "msw/node";
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from "vitest";
import { SWRConfig } from "swr";
import { PresetDialog } from "@/components/board/preset-dialog";
import { createStationDirectoryState } from "@/mocks/stations/state";
import { curves, zone } from "./fixtures";

// Our /api/stations answered by msw from the station directory fake's own
// catalogue and search (mocks/stations/state.ts), or with our error bodies.
const directory = createStationDirectoryState();
let mode: "ok" | "timeout" | "unavailable" = "ok";
const requests: string[] = [];
const server = setupServer(
  http.get("*/api/stations", ({ request }) => {
    requests.push(request.url);
    if (mode === "timeout") {
      return HttpResponse.json(
        { error: { code: "stations:timeout", message: "The station directory did not answer in time. Try again in a moment." } },
        { status: 504 },
      );
    }
    if (mode === "unavailable") {
      return HttpResponse.json(
        { error: { code: "stations:unavailable", message: "The station directory is unavailable right now. Try again later." } },
        { status: 502 },
      );
    }
    const url = new URL(request.url);
    return HttpResponse.json(directory.search({ q: url.searchParams.get("q") ?? undefined, genre: url.searchParams.get("genre") ?? undefined, limit: 20 }));
  }),
);
beforeAll(() => server.listen({ onUnhandledRequest: "error" }));
afterEach(() => {
  mode = "ok";
  requests.length = 0;
  server.resetHandlers();
});
afterAll(() => server.close());

function setup(z = zone(), preset?: ReturnType<typeof zone>["presets"][number]) {
  const onSave = vi.fn().mockResolvedValue({ ok: true });
  const onOpenChange = vi.fn();
  render(
    <SWRConfig value={{ provider: () => new Map(), dedupingInterval: 0 }}>
      <PresetDialog open onOpenChange={onOpenChange} zone={z} curves={curves} preset={preset} onSave={onSave} />
    </SWRConfig>,
  );
  return { onSave, onOpenChange, user: userEvent.setup() };
}

describe("stream preset dialog", () => {
  it("finds a station by name, fills the form from it and adds it as a preset", async () => {
    const { onSave, onOpenChange, user } = setup();
    const finder = screen.getByTestId("station-finder");
    await user.type(within(finder).getByLabelText("Name"), "lantern");
    await user.click(within(finder).getByRole("button", { name: "Search" }));
    const results = await screen.findByTestId("station-results");
    expect(requests[0]).toContain("/api/stations?q=lantern");
    await user.click(within(results).getByRole("button", { name: "Choose Harbor Lantern Jazz" }));
    const form = screen.getByRole("button", { name: "Add preset" }).closest("form")!;
    expect(within(form).getByLabelText("Name")).toHaveProperty("value", "Harbor Lantern Jazz");
    expect(within(form).getByLabelText("Genre")).toHaveProperty("value", "jazz");
    await user.click(screen.getByRole("button", { name: "Add preset" }));
    expect(onSave).toHaveBeenCalledTimes(1);
    const saved = onSave.mock.calls[0][0];
    expect(saved).toMatchObject({ name: "Harbor Lantern Jazz", genre: "jazz", loudnessOffsetDb: 0, toneCurveId: null });
    expect(saved.streamUrl).toMatch(/^https:\/\/.*example\.net\//);
    expect(saved.directoryId).toMatch(/\S/);
    expect(onOpenChange).toHaveBeenCalledWith(false);
  });

  it("searches by genre too, and says so when nothing matches", async () => {
    const { user } = setup();
    const finder = screen.getByTestId("station-finder");
    await user.type(within(finder).getByLabelText("Genre"), "classical");
    await user.keyboard("{Enter}");
    const results = await screen.findByTestId("station-results");
    expect(within(results).getAllByRole("listitem").length).toBeGreaterThan(3);
    await user.clear(within(finder).getByLabelText("Genre"));
    await user.type(within(finder).getByLabelText("Name"), "zzzz no such station");
    await user.click(within(finder).getByRole("button", { name: "Search" }));
    expect(await screen.findByText(/No station matches/)).toBeTruthy();
  });

  it.each([
    ["timeout", /did not answer in time/],
    ["unavailable", /unavailable right now/],
  ] as const)("when the directory fails (%s): a clear message, nothing added", async (failure, message) => {
    mode = failure;
    const { onSave, user } = setup();
    const finder = screen.getByTestId("station-finder");
    await user.type(within(finder).getByLabelText("Name"), "jazz");
    await user.click(within(finder).getByRole("button", { name: "Search" }));
    const error = await screen.findByTestId("station-error");
    expect(error.textContent).toMatch(message);
    expect(error.textContent).toContain("Nothing was added.");
    expect(onSave).not.toHaveBeenCalled();
  });

  it("asks for a name or genre before searching", async () => {
    const { user } = setup();
    await user.click(within(screen.getByTestId("station-finder")).getByRole("button", { name: "Search" }));
    expect(screen.getByText("Type part of a station name or a genre.")).toBeTruthy();
    expect(requests).toHaveLength(0);
  });

  it("accepts http and https stream URLs only", async () => {
    const { onSave, user } = setup();
    const form = screen.getByRole("button", { name: "Add preset" }).closest("form")!;
    await user.type(within(form).getByLabelText("Name"), "Backyard test stream");
    await user.type(within(form).getByLabelText("Stream URL"), "ftp://stream.example.net/a");
    await user.click(screen.getByRole("button", { name: "Add preset" }));
    expect(screen.getByText("Enter a stream URL that starts with http:// or https://.")).toBeTruthy();
    expect(onSave).not.toHaveBeenCalled();
    await user.clear(within(form).getByLabelText("Stream URL"));
    await user.type(within(form).getByLabelText("Stream URL"), "http://stream.example.net/a");
    await user.click(screen.getByRole("button", { name: "Add preset" }));
    expect(onSave).toHaveBeenCalledWith(expect.objectContaining({ streamUrl: "http://stream.example.net/a", genre: null, directoryId: null }));
  });

  it("edits an existing preset without the finder, and warns when the zone is full", () => {
    const full = zone({ presetSlots: 1 });
    setup(full, full.presets[0]);
    expect(screen.queryByTestId("station-finder")).toBeNull();
    expect(screen.getByLabelText("Name")).toHaveProperty("value", "Morning Fog Radio");
  });

  it("says so when every preset slot is used", () => {
    setup(zone({ presetSlots: 1 }));
    expect(screen.getByRole("alert").textContent).toMatch(/All 1 preset slots of this zone are used/);
  });
});
