// The devices the local fleet fake knows at start-up. The demo seed (db/seed.ts)
// binds each of them to a zone of the invented demo homes, so the two must agree.
export interface DemoFleetDevice {
  fleetDeviceId: string;
  modelProfileId: string;
  serial: string;
  firmwareVersion: string;
  online: boolean;
}

export const demoFleetDevices: DemoFleetDevice[] = [
  // Lindqvist residence
  { fleetDeviceId: "fd-lindqvist-family", modelProfileId: "amp-4x100-sub", serial: "FW4-10231", firmwareVersion: "5.0.3", online: true },
  { fleetDeviceId: "fd-lindqvist-kitchen", modelProfileId: "amp-2x60", serial: "FW2-20877", firmwareVersion: "3.4.2", online: true },
  { fleetDeviceId: "fd-lindqvist-patio", modelProfileId: "amp-outdoor-2x50", serial: "FWO-30012", firmwareVersion: "1.8.0", online: true },
  { fleetDeviceId: "fd-lindqvist-suite", modelProfileId: "amp-2x60", serial: "FW2-20901", firmwareVersion: "3.3.9", online: true },
  // Marchetti lake house
  { fleetDeviceId: "fd-marchetti-great", modelProfileId: "amp-4x100-sub", serial: "FW4-10412", firmwareVersion: "5.1.0", online: true },
  { fleetDeviceId: "fd-marchetti-dock", modelProfileId: "amp-outdoor-2x50", serial: "FWO-30140", firmwareVersion: "1.7.2", online: true },
  { fleetDeviceId: "fd-marchetti-loft", modelProfileId: "amp-2x60", serial: "FW2-21033", firmwareVersion: "3.4.2", online: false },
  // Aalto townhouse
  { fleetDeviceId: "fd-aalto-living", modelProfileId: "preamp-line", serial: "FWP-40077", firmwareVersion: "2.9.7", online: true },
  { fleetDeviceId: "fd-aalto-gym", modelProfileId: "amp-2x60", serial: "FW2-21102", firmwareVersion: "3.4.2", online: true },
  { fleetDeviceId: "fd-aalto-terrace", modelProfileId: "amp-outdoor-2x50", serial: "FWO-30222", firmwareVersion: "1.8.0", online: true },
  // Brightwater loft
  { fleetDeviceId: "fd-brightwater-studio", modelProfileId: "preamp-line", serial: "FWP-40103", firmwareVersion: "2.8.1", online: true },
  { fleetDeviceId: "fd-brightwater-bedroom", modelProfileId: "amp-2x60", serial: "FW2-21250", firmwareVersion: "3.4.2", online: true },
  // Nakagawa cottage
  { fleetDeviceId: "fd-nakagawa-den", modelProfileId: "amp-2x60", serial: "FW2-21311", firmwareVersion: "3.4.2", online: true },
  { fleetDeviceId: "fd-nakagawa-garden", modelProfileId: "amp-outdoor-2x50", serial: "FWO-30301", firmwareVersion: "1.8.0", online: true },
  // Spare units on the shelf, not yet in a home (installers bind these to new zones)
  { fleetDeviceId: "fd-spare-01", modelProfileId: "amp-2x60", serial: "FW2-21400", firmwareVersion: "3.4.2", online: true },
  { fleetDeviceId: "fd-spare-02", modelProfileId: "amp-4x100-sub", serial: "FW4-10555", firmwareVersion: "5.1.0", online: true },
  { fleetDeviceId: "fd-spare-03", modelProfileId: "amp-outdoor-2x50", serial: "FWO-30388", firmwareVersion: "1.8.0", online: true },
  // Other company's home (tenant isolation in tests)
  { fleetDeviceId: "fd-tidewater-lounge", modelProfileId: "amp-2x60", serial: "FW2-29001", firmwareVersion: "3.4.2", online: true },
];
