// The tone-curve editor (components/curves/curve-editor.tsx) in jsdom: band
// fields validated beside the field with the shared zod schema, the largest
// boost and the plot recomputed as bands change, a save that sends the
// version it read, and a stale save shown as such. The largest-boost values
// are checked against the Web Audio spec's peaking band, whose gain at its
// own frequency is exactly G dB (H(f0) = A², A = 10^(G/40); W3C Web Audio API,
// BiquadFilterNode "peaking", after the Audio EQ Cookbook).
import { act, render, screen, within } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { SWRConfig } from "swr";
import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import type { CurveDetailDto } from "@/db/queries/curves";
import { CurveEditor } from "@/components/curves/curve-editor";
import { fetcher } from "@/lib/fetcher";

vi.mock("next/navigation", () => ({ useRouter: () => ({ push: vi.fn(), refresh: vi.fn() }) }));
vi.mock("next/link", () => ({
  default: ({ href, children, ...rest }: { href: string; children: React.ReactNode }) => (
    <a href={href} {...rest}>
      {children}
    </a>
  ),
}));

const id = "6c1e2f0a-1111-4222-8333-944455556666";

function curve(overrides: Partial<CurveDetailDto> = {}): CurveDetailDto {
  return {
    id,
    name: "Deck speakers",
    description: "",
    version: 3,
    bandCount: 1,
    largestBoostDb: 3,
    attachedCount: 1,
    misfitZoneCount: 0,
    updatedAt: "2025-01-01T00:00:00.000Z",
    bands: [{ type: "peaking", frequencyHz: 1000, gainDb: 3, q: 1, enabled: true }],
    attachments: [
      { kind: "zone", targetId: "z1", label: "Patio", zoneId: "z1", zoneName: "Patio", homeId: "h1", homeName: "Lindqvist residence", fitProblem: null },
    ],
    maxBands: 10,
    may: { edit: true },
    ...overrides,
  };
}

function setup(c: CurveDetailDto = curve()) {
  render(
    <SWRConfig value={{ fetcher, fallback: { [`/api/curves/${id}`]: c }, revalidateOnMount: false, revalidateOnFocus: false, provider: () => new Map() }}>
      <CurveEditor curveId={id} />
    </SWRConfig>,
  );
  return userEvent.setup();
}

const fetchMock = vi.fn();
beforeEach(() => {
  fetchMock.mockReset();
  vi.stubGlobal("fetch", fetchMock);
  // recharts measures its container; jsdom has no layout.
  vi.stubGlobal(
    "ResizeObserver",
    class {
      observe() {}
      unobserve() {}
      disconnect() {}
    },
  );
});
afterEach(() => vi.unstubAllGlobals());

const boost = () => screen.getByTestId("largest-boost").textContent;

describe("tone-curve editor", () => {
  it("shows the bands, the largest boost (a +3 dB peaking band reads +3 dB) and where the curve is attached", () => {
    setup();
    expect(screen.getAllByTestId("band-row")).toHaveLength(1);
    expect(boost()).toMatch(/Largest boost: \+3 dB near 1 kHz/);
    expect(within(screen.getByTestId("attachment-list")).getByRole("link", { name: "Lindqvist residence" }).getAttribute("href")).toBe("/homes/h1");
  });

  it("recomputes the boost as a gain is typed, and cautions above 6 dB", async () => {
    const user = setup();
    const gain = screen.getByLabelText("Band 1 gain (dB)");
    await user.clear(gain);
    await user.type(gain, "9");
    expect(boost()).toMatch(/\+9 dB/);
    expect(screen.getByTestId("boost-caution").textContent).toMatch(/NIOSH/);
    expect(screen.getByTestId("attached-save-note").textContent).toMatch(/1 zone; each gets a new revision/);
  });

  it("puts band errors beside the field and will not save", async () => {
    const user = setup();
    const freq = screen.getByLabelText("Band 1 frequency (Hz)");
    await user.clear(freq);
    await user.type(freq, "5");
    expect(freq.getAttribute("aria-invalid")).toBe("true");
    expect(document.getElementById(freq.getAttribute("aria-describedby")!)?.textContent).toBe("Frequency must be at least 10 Hz.");
    const q = screen.getByLabelText("Band 1 Q");
    await user.clear(q);
    await user.type(q, "30");
    expect(document.getElementById(q.getAttribute("aria-describedby")!)?.textContent).toBe("Q must be at most 20.");
    expect(screen.getByRole("button", { name: "Save curve" })).toHaveProperty("disabled", true);
  });

  it("adds a band, saves with the version it read and reports the zones that got a revision", async () => {
    const user = setup();
    await user.click(screen.getByRole("button", { name: "Add band" }));
    expect(screen.getAllByTestId("band-row")).toHaveLength(2);
    await user.selectOptions(screen.getByLabelText("Band 2 type"), "highpass");
    const saved = curve({
      version: 4,
      bands: [
        { type: "peaking", frequencyHz: 1000, gainDb: 3, q: 1, enabled: true },
        { type: "highpass", frequencyHz: 1000, gainDb: 0, q: 1, enabled: true },
      ],
    });
    fetchMock.mockResolvedValueOnce(new Response(JSON.stringify({ curve: saved, zones: [{ zoneId: "z1", zoneName: "Patio", version: 8, revisionNumber: 5 }] }), { status: 200 }));
    await user.click(screen.getByRole("button", { name: "Save curve" }));
    expect(fetchMock).toHaveBeenCalledTimes(1);
    const [url, init] = fetchMock.mock.calls[0]! as [string, RequestInit];
    expect(url).toBe(`/api/curves/${id}`);
    expect(init.method).toBe("PATCH");
    expect(JSON.parse(init.body as string)).toEqual({
      version: 3,
      name: "Deck speakers",
      description: "",
      bands: [
        { type: "peaking", frequencyHz: 1000, gainDb: 3, q: 1, enabled: true },
        { type: "highpass", frequencyHz: 1000, gainDb: 0, q: 1, enabled: true },
      ],
    });
    expect((await screen.findByTestId("curve-saved")).textContent).toMatch(/1 zone got a new revision: Patio \(revision 5\)/);
  });

  it("a stale save says someone else changed the curve and offers a reload", async () => {
    const user = setup();
    const gain = screen.getByLabelText("Band 1 gain (dB)");
    await user.clear(gain);
    await user.type(gain, "2");
    fetchMock.mockResolvedValueOnce(
      new Response(JSON.stringify({ error: { code: "curve:stale", message: "Someone else changed this tone curve. Reload to see their change, then try again." } }), { status: 409 }),
    );
    await user.click(screen.getByRole("button", { name: "Save curve" }));
    const stale = await screen.findByTestId("curve-stale");
    expect(stale.textContent).toMatch(/Someone else changed this tone curve/);
    expect(within(stale).getByRole("button", { name: /Reload/ })).toBeTruthy();
  });

  it("read-only for a role that may not edit", () => {
    setup(curve({ may: { edit: false } }));
    expect(screen.getByLabelText("Band 1 gain (dB)")).toHaveProperty("disabled", true);
    expect(screen.queryByRole("button", { name: "Save curve" })).toBeNull();
    expect(screen.queryByRole("button", { name: "Delete" })).toBeNull();
  });

  it("reverts unsaved edits", async () => {
    const user = setup();
    await user.click(screen.getByRole("button", { name: "Remove band 1" }));
    expect(screen.queryAllByTestId("band-row")).toHaveLength(0);
    await act(async () => {
      await user.click(screen.getByRole("button", { name: "Revert changes" }));
    });
    expect(screen.getAllByTestId("band-row")).toHaveLength(1);
  });
});
