import { createServer, type IncomingMessage, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { fleetWebhookEventSchema, type FleetWebhookEvent } from "@/lib/fleet/api-schema";
import { createFleetClient } from "@/lib/fleet/client";
import { verifyWebhook } from "@/lib/fleet/webhook-signature";
import { startFleetServer, type RunningFleetServer } from "@/mocks/fleet-server";
import { zoneConfig } from "./zone-config-fixture";

// The fake as a real HTTP server (no msw interception in this file): the client
// talks to it over TCP and its webhooks reach a real HTTP receiver.

const secret = "server-test-secret";
const apiKey = "server-test-key";

let fleet: RunningFleetServer;
let receiver: Server;
const events: FleetWebhookEvent[] = [];
const verdicts: string[] = [];

function readBody(req: IncomingMessage): Promise<string> {
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = [];
    req.on("data", (c: Buffer) => chunks.push(c));
    req.on("end", () => resolve(Buffer.concat(chunks).toString("utf8")));
    req.on("error", reject);
  });
}

beforeAll(async () => {
  receiver = createServer((req, res) => {
    readBody(req).then((rawBody) => {
      const verdict = verifyWebhook({
        secret,
        timestampHeader: req.headers["x-fleet-timestamp"] as string | undefined,
        signatureHeader: req.headers["x-fleet-signature"] as string | undefined,
        rawBody,
      });
      verdicts.push(verdict.ok ? "ok" : verdict.reason);
      if (!verdict.ok) {
        res.writeHead(401).end();
        return;
      }
      events.push(fleetWebhookEventSchema.parse(JSON.parse(rawBody)));
      res.writeHead(204).end();
    }, () => res.writeHead(400).end());
  });
  await new Promise<void>((resolve) => receiver.listen(0, "127.0.0.1", resolve));
  const webhookUrl = `http://127.0.0.1:${(receiver.address() as AddressInfo).port}/api/fleet/webhook`;
  fleet = await startFleetServer({ port: 0, webhookUrl, webhookSecret: secret, apiKey, applyDelayMs: 30 });
});

afterAll(async () => {
  await fleet?.close();
  await new Promise<void>((resolve) => receiver.close(() => resolve()));
});

describe("startFleetServer", () => {
  it("serves the API over real HTTP and delivers signed webhooks over real HTTP", async () => {
    expect(fleet.url).toMatch(/^http:\/\/127\.0\.0\.1:\d+$/);
    const client = createFleetClient({ baseUrl: fleet.url, apiKey, timeoutMs: 2000, maxRetries: 2, baseDelayMs: 10 });

    const devices = await client.listAllDevices({ pageSize: 4 });
    expect(devices.length).toBeGreaterThan(10);

    const config = zoneConfig({ name: "Den" });
    const accepted = await client.putDesired(
      "fd-nakagawa-den",
      { expectedVersion: 0, config, reference: "server-test" },
      { idempotencyKey: "srv-1" },
    );
    expect(accepted).toEqual({ version: 1, accepted: true, duplicate: false });

    await fleet.store.idle();
    expect(verdicts).toEqual(["ok"]);
    expect(events).toHaveLength(1);
    expect(events[0]).toMatchObject({ kind: "reported", deviceId: "fd-nakagawa-den", reportedVersion: 1, status: "applied", config });
    expect((await client.getDevice("fd-nakagawa-den")).reported.version).toBe(1);
  });

  it("takes faults through its control endpoint and the client rides them out", async () => {
    const set = await fetch(`${fleet.url}/__fleet/faults`, {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({ deviceId: "fd-spare-01", serverErrors: { count: 2 } }),
    });
    expect(set.status).toBe(200);
    const client = createFleetClient({ baseUrl: fleet.url, apiKey, timeoutMs: 2000, maxRetries: 3, baseDelayMs: 5 });
    expect((await client.getFirmware("fd-spare-01")).current).toBe("3.4.2");

    const hang = await fetch(`${fleet.url}/__fleet/faults`, {
      method: "POST",
      body: JSON.stringify({ deviceId: "fd-spare-01", hang: { ms: 30_000, calls: 1 } }),
    });
    expect(hang.status).toBe(200);
    await expect(
      createFleetClient({ baseUrl: fleet.url, apiKey, timeoutMs: 150, maxRetries: 0 }).getDevice("fd-spare-01"),
    ).rejects.toMatchObject({ code: "fleet:timeout" });

    const logs = await client.getLogs("fd-spare-01");
    expect(logs).toContain("# device fd-spare-01");
    await expect(createFleetClient({ baseUrl: fleet.url, apiKey: "wrong", maxRetries: 0 }).listDevices()).rejects.toMatchObject({
      code: "fleet:unauthorized",
    });
  });
});
