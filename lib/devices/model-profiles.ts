// What each kind of device can take. Invented, generic profiles for the demo
// fleet; real profiles come from the fleet API's device listing.
export const sourceKinds = [
  "analog",
  "optical",
  "coaxial",
  "hdmi_arc",
  "usb",
  "network_stream",
  "bluetooth",
] as const;
export type SourceKind = (typeof sourceKinds)[number];

export const sourceKindLabels: Record<SourceKind, string> = {
  analog: "Analog",
  optical: "Optical",
  coaxial: "Coaxial",
  hdmi_arc: "HDMI ARC",
  usb: "USB",
  network_stream: "Network stream",
  bluetooth: "Bluetooth",
};

export interface ModelProfile {
  id: string;
  name: string;
  presetSlots: number;
  eqBands: number;
  inputs: SourceKind[];
  /** Outputs the device can drive: stereo main pair, subwoofer outs, line out. */
  subwooferOutputs: number;
  hasLineOut: boolean;
  latestFirmware: string;
}

export const modelProfiles: ModelProfile[] = [
  {
    id: "amp-2x60",
    name: "Streaming amplifier, 2 × 60 W",
    presetSlots: 12,
    eqBands: 6,
    inputs: ["analog", "optical", "network_stream", "bluetooth"],
    subwooferOutputs: 1,
    hasLineOut: false,
    latestFirmware: "3.4.2",
  },
  {
    id: "amp-4x100-sub",
    name: "Streaming amplifier, 4 × 100 W with subwoofer outs",
    presetSlots: 20,
    eqBands: 10,
    inputs: ["analog", "optical", "coaxial", "hdmi_arc", "usb", "network_stream", "bluetooth"],
    subwooferOutputs: 2,
    hasLineOut: true,
    latestFirmware: "5.1.0",
  },
  {
    id: "preamp-line",
    name: "Streaming preamplifier, line out",
    presetSlots: 16,
    eqBands: 8,
    inputs: ["analog", "optical", "coaxial", "usb", "network_stream"],
    subwooferOutputs: 1,
    hasLineOut: true,
    latestFirmware: "2.9.7",
  },
  {
    id: "amp-outdoor-2x50",
    name: "Outdoor-rated amplifier, 2 × 50 W",
    presetSlots: 6,
    eqBands: 5,
    inputs: ["analog", "network_stream", "bluetooth"],
    subwooferOutputs: 0,
    hasLineOut: false,
    latestFirmware: "1.8.0",
  },
];

export function findModelProfile(id: string): ModelProfile | undefined {
  return modelProfiles.find((p) => p.id === id);
}
