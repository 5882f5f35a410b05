// The import dialog of the tone-curve library: sends the file as a form, shows
// every problem the server names (line and column) and stays open; on success
// it hands over the new curve's id.
import { render, screen } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import { ImportCurveDialog } from "@/components/curves/curve-library";

vi.mock("next/navigation", () => ({ useRouter: () => ({ push: vi.fn() }) }));

const fetchMock = vi.fn();
beforeEach(() => {
  fetchMock.mockReset();
  vi.stubGlobal("fetch", fetchMock);
});
afterEach(() => vi.unstubAllGlobals());

function setup() {
  const onImported = vi.fn();
  const onOpenChange = vi.fn();
  render(<ImportCurveDialog open onOpenChange={onOpenChange} onImported={onImported} />);
  return { onImported, onOpenChange, user: userEvent.setup() };
}

describe("import dialog", () => {
  it("names the file's problems by line and column and stays open", async () => {
    const { onImported, onOpenChange, user } = setup();
    fetchMock.mockResolvedValueOnce(
      new Response(
        JSON.stringify({
          error: {
            code: "curve:import-invalid",
            message: "bad.csv could not be imported: …",
            fieldErrors: { file: ['Line 3, gain_db: "loud" is not a number.', "Line 4, frequency_hz: Frequency must be at least 10 Hz."] },
          },
        }),
        { status: 422 },
      ),
    );
    await user.upload(screen.getByLabelText("File (.json or .csv)"), new File(["type,frequency_hz,gain_db,q\n"], "bad_room.csv", { type: "text/csv" }));
    expect(screen.getByLabelText("Name")).toHaveProperty("value", "bad room");
    await user.click(screen.getByRole("button", { name: "Import" }));
    const errors = await screen.findByTestId("import-errors");
    expect(errors.textContent).toMatch(/bad_room\.csv could not be imported\. Nothing was saved\./);
    expect(Array.from(errors.querySelectorAll("li")).map((li) => li.textContent)).toEqual([
      'Line 3, gain_db: "loud" is not a number.',
      "Line 4, frequency_hz: Frequency must be at least 10 Hz.",
    ]);
    expect(onImported).not.toHaveBeenCalled();
    expect(onOpenChange).not.toHaveBeenCalledWith(false);
    const [url, init] = fetchMock.mock.calls[0]! as [string, RequestInit];
    expect(url).toBe("/api/curves/import");
    const form = init.body as FormData;
    expect((form.get("file") as File).name).toBe("bad_room.csv");
    expect(form.get("name")).toBe("bad room");
  });

  it("refuses a file over the size limit without sending it", async () => {
    const { user } = setup();
    await user.upload(screen.getByLabelText("File (.json or .csv)"), new File([new Uint8Array(300 * 1024)], "huge.json", { type: "application/json" }));
    await user.click(screen.getByRole("button", { name: "Import" }));
    expect(screen.getByTestId("import-errors").textContent).toMatch(/the limit is 256 KB/);
    expect(fetchMock).not.toHaveBeenCalled();
  });

  it("hands over the new curve on success", async () => {
    const { onImported, user } = setup();
    fetchMock.mockResolvedValueOnce(new Response(JSON.stringify({ id: "new-id", name: "Lift" }), { status: 201 }));
    await user.upload(screen.getByLabelText("File (.json or .csv)"), new File(['{"bands":[]}'], "lift.json", { type: "application/json" }));
    await user.click(screen.getByRole("button", { name: "Import" }));
    await vi.waitFor(() => expect(onImported).toHaveBeenCalledWith("new-id"));
  });
});
