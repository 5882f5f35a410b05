// The invented demo scenario: one integrator company (Fernhill Audio Works),
// its team, five client homes and their zones; and a second company so tenant
// isolation can be seen. Every name, home, person and station is made up.
import type { SourceKind } from "@/lib/devices/model-profiles";
import type { ConfigBand, OutputLayout } from "@/lib/validation/zone-config";

export const demoPassword = "zonewright-demo";

export interface SeedPerson {
  key: string;
  name: string;
  email: string;
  role: "owner" | "integrator" | "installer" | "support" | "homeowner";
}

export const companies = [
  {
    key: "fernhill",
    name: "Fernhill Audio Works",
    slug: "fernhill-audio-works",
    people: [
      { key: "mira", name: "Mira Castellanos", email: "mira@fernhill.example", role: "owner" },
      { key: "theo", name: "Theo Banerjee", email: "theo@fernhill.example", role: "integrator" },
      { key: "jonah", name: "Jonah Whitlock", email: "jonah@fernhill.example", role: "installer" },
      { key: "priya", name: "Priya Raman", email: "priya@fernhill.example", role: "support" },
      { key: "elena", name: "Elena Lindqvist", email: "elena@lindqvist.example", role: "homeowner" },
      { key: "marco", name: "Marco Marchetti", email: "marco@marchetti.example", role: "homeowner" },
    ] satisfies SeedPerson[],
  },
  {
    key: "tidewater",
    name: "Tidewater Home Tech",
    slug: "tidewater-home-tech",
    people: [{ key: "rafael", name: "Rafael Ouedraogo", email: "rafael@tidewater.example", role: "owner" }] satisfies SeedPerson[],
  },
] as const;

export interface SeedCurve {
  key: string;
  name: string;
  description: string;
  bands: ConfigBand[];
}

const band = (type: ConfigBand["type"], frequencyHz: number, gainDb: number, q: number): ConfigBand => ({
  type,
  frequencyHz,
  gainDb,
  q,
  enabled: true,
});

export const curves: SeedCurve[] = [
  {
    key: "outdoor-lift",
    name: "Small outdoor speakers – bass lift",
    description: "Gentle low-shelf lift with a protective high-pass for compact outdoor speakers.",
    bands: [band("highpass", 55, 0, 0.707), band("lowshelf", 120, 4, 0.707), band("peaking", 3000, -1.5, 1.2)],
  },
  {
    key: "bright-room",
    name: "Bright hard-surfaced room",
    description: "Treble cut for rooms with glass, stone and tile.",
    bands: [band("peaking", 2500, -2, 1.4), band("highshelf", 6000, -3, 0.707)],
  },
  {
    key: "ceiling-voicing",
    name: "In-ceiling speaker voicing",
    description: "Restores warmth lost to ceiling mounting, trims boxiness.",
    bands: [band("lowshelf", 90, 3, 0.707), band("peaking", 400, -2, 1.0), band("highshelf", 10000, 1.5, 0.707)],
  },
  {
    key: "dialogue",
    name: "TV dialogue lift",
    description: "Presence lift for speech, slight low cut to clear up voices.",
    bands: [band("peaking", 2000, 3, 0.9), band("lowshelf", 150, -2, 0.707)],
  },
  {
    key: "vinyl",
    name: "Turntable warmth",
    description: "Subsonic guard plus a touch of low-mid warmth for records.",
    bands: [band("highpass", 20, 0, 0.707), band("peaking", 180, 1.5, 0.8)],
  },
  {
    key: "gym-punch",
    name: "Gym punch",
    description: "Bass and upper-mid lift for workouts; watch the volume ceiling.",
    bands: [band("lowshelf", 80, 5, 0.707), band("peaking", 4000, 2, 1.0)],
  },
];

export interface SeedSource {
  label: string;
  kind: SourceKind;
  offset: number;
  curve?: string;
  subsonic?: boolean;
  enabled?: boolean;
}

export interface SeedPreset {
  name: string;
  genre: string;
  offset?: number;
  curve?: string;
}

export interface SeedZone {
  name: string;
  device: string;
  ceiling: number;
  turnOn: number;
  curve?: string;
  guest?: { volume: boolean; source: boolean; wake: boolean };
  sources: SeedSource[];
  presets: SeedPreset[];
  layout?: OutputLayout;
  template?: string;
}

export interface SeedHome {
  key: string;
  company: "fernhill" | "tidewater";
  name: string;
  householdName: string;
  city: string;
  servicePlan: "essential" | "standard" | "priority";
  household: string[];
  installers: string[];
  zones: SeedZone[];
}

const station = (name: string, genre: string, offset = 0, curve?: string): SeedPreset => ({ name, genre, offset, curve });

export function stationUrl(name: string) {
  return `https://stream.example.net/${name.toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-|-$/g, "")}`;
}

const subLayout = (mainLeftM: number, mainRightM: number, subM: number, subLatencyMs: number): OutputLayout => ({
  crossover: { type: "linkwitz_riley", slopeDbPerOctave: 24, frequencyHz: 80 },
  outputs: [
    { id: "main-left", role: "main_left", label: "Left", distance: { value: mainLeftM, unit: "m" }, latencyMs: 0, trimDb: 0, polarityInverted: false },
    { id: "main-right", role: "main_right", label: "Right", distance: { value: mainRightM, unit: "m" }, latencyMs: 0, trimDb: 0, polarityInverted: false },
    { id: "sub-1", role: "subwoofer", label: "Subwoofer", distance: { value: subM, unit: "m" }, latencyMs: subLatencyMs, trimDb: -2, polarityInverted: false },
  ],
});

export const homes: SeedHome[] = [
  {
    key: "lindqvist",
    company: "fernhill",
    name: "Lindqvist residence",
    householdName: "Lindqvist family",
    city: "Alder Bay",
    servicePlan: "priority",
    household: ["elena"],
    installers: ["jonah"],
    zones: [
      {
        name: "Family room",
        device: "fd-lindqvist-family",
        ceiling: 75,
        turnOn: 25,
        template: "family-tv",
        sources: [
          { label: "TV", kind: "hdmi_arc", offset: -4, curve: "dialogue" },
          { label: "Turntable", kind: "analog", offset: 3, curve: "vinyl", subsonic: true },
          { label: "Streaming", kind: "network_stream", offset: 0 },
          { label: "Phone", kind: "bluetooth", offset: -1.5 },
        ],
        presets: [
          station("Harbor Lantern Jazz", "Jazz"),
          station("Quiet Pines Classical", "Classical", 1.5),
          station("Copper Kettle Folk", "Folk"),
          station("Night Tram Electronica", "Electronic", -2),
          station("Saltmarsh Blues", "Blues"),
        ],
        layout: subLayout(3.2, 3.4, 2.1, 8),
      },
      {
        name: "Kitchen",
        device: "fd-lindqvist-kitchen",
        ceiling: 65,
        turnOn: 20,
        curve: "bright-room",
        sources: [
          { label: "Streaming", kind: "network_stream", offset: 0 },
          { label: "Kitchen radio", kind: "analog", offset: 2 },
          { label: "Phone", kind: "bluetooth", offset: -1 },
        ],
        presets: [station("Morning Orchard Acoustic", "Acoustic"), station("Lighthouse Talk", "Talk", 2), station("Harbor Lantern Jazz", "Jazz")],
      },
      {
        name: "Patio",
        device: "fd-lindqvist-patio",
        ceiling: 60,
        turnOn: 20,
        curve: "outdoor-lift",
        template: "outdoor-pair",
        guest: { volume: true, source: true, wake: false },
        sources: [
          { label: "Streaming", kind: "network_stream", offset: 0 },
          { label: "Guest phone", kind: "bluetooth", offset: -2 },
        ],
        presets: [station("Velvet Hour Soul", "Soul"), station("Tidepool Ambient", "Ambient", 2)],
      },
      {
        name: "Primary suite",
        device: "fd-lindqvist-suite",
        ceiling: 55,
        turnOn: 15,
        curve: "ceiling-voicing",
        guest: { volume: true, source: false, wake: false },
        sources: [
          { label: "Streaming", kind: "network_stream", offset: 0 },
          { label: "Bedside", kind: "bluetooth", offset: -1.5 },
        ],
        presets: [station("Tidepool Ambient", "Ambient", 2), station("Quiet Pines Classical", "Classical", 1.5)],
      },
    ],
  },
  {
    key: "marchetti",
    company: "fernhill",
    name: "Marchetti lake house",
    householdName: "Marchetti household",
    city: "Kestrel Lake",
    servicePlan: "standard",
    household: ["marco"],
    installers: [],
    zones: [
      {
        name: "Great room",
        device: "fd-marchetti-great",
        ceiling: 80,
        turnOn: 30,
        sources: [
          { label: "TV", kind: "hdmi_arc", offset: -3.5, curve: "dialogue" },
          { label: "CD player", kind: "coaxial", offset: -1 },
          { label: "Streaming", kind: "network_stream", offset: 0 },
        ],
        presets: [station("Brass Lantern Big Band", "Big band"), station("Saltmarsh Blues", "Blues"), station("Lighthouse Talk", "Talk", 2)],
        layout: subLayout(4.0, 4.1, 3.0, 6),
      },
      {
        name: "Dock",
        device: "fd-marchetti-dock",
        ceiling: 70,
        turnOn: 25,
        curve: "outdoor-lift",
        template: "outdoor-pair",
        sources: [{ label: "Streaming", kind: "network_stream", offset: 0 }, { label: "Guest phone", kind: "bluetooth", offset: -2 }],
        presets: [station("Velvet Hour Soul", "Soul"), station("Copper Kettle Folk", "Folk")],
      },
      {
        name: "Guest loft",
        device: "fd-marchetti-loft",
        ceiling: 55,
        turnOn: 15,
        sources: [{ label: "Streaming", kind: "network_stream", offset: 0 }],
        presets: [station("Tidepool Ambient", "Ambient", 2)],
      },
    ],
  },
  {
    key: "aalto",
    company: "fernhill",
    name: "Aalto townhouse",
    householdName: "Aalto–Reyes household",
    city: "Millbrook",
    servicePlan: "standard",
    household: [],
    installers: ["jonah"],
    zones: [
      {
        name: "Living room",
        device: "fd-aalto-living",
        ceiling: 72,
        turnOn: 25,
        sources: [
          { label: "Turntable", kind: "analog", offset: 2.5, curve: "vinyl", subsonic: true },
          { label: "Computer", kind: "usb", offset: -0.5 },
          { label: "Streaming", kind: "network_stream", offset: 0 },
        ],
        presets: [station("Quiet Pines Classical", "Classical", 1.5), station("Harbor Lantern Jazz", "Jazz")],
      },
      {
        name: "Gym",
        device: "fd-aalto-gym",
        ceiling: 78,
        turnOn: 30,
        curve: "gym-punch",
        sources: [{ label: "Streaming", kind: "network_stream", offset: 0 }, { label: "Phone", kind: "bluetooth", offset: -1 }],
        presets: [station("Night Tram Electronica", "Electronic", -2), station("Velvet Hour Soul", "Soul")],
      },
      {
        name: "Roof terrace",
        device: "fd-aalto-terrace",
        ceiling: 62,
        turnOn: 20,
        curve: "outdoor-lift",
        template: "outdoor-pair",
        sources: [{ label: "Streaming", kind: "network_stream", offset: 0 }, { label: "Guest phone", kind: "bluetooth", offset: -2 }],
        presets: [station("Tidepool Ambient", "Ambient", 2)],
      },
    ],
  },
  {
    key: "brightwater",
    company: "fernhill",
    name: "Brightwater loft",
    householdName: "Okonjo household",
    city: "Alder Bay",
    servicePlan: "essential",
    household: [],
    installers: [],
    zones: [
      {
        name: "Studio",
        device: "fd-brightwater-studio",
        ceiling: 70,
        turnOn: 20,
        curve: "bright-room",
        sources: [
          { label: "Mixer out", kind: "analog", offset: -3 },
          { label: "Computer", kind: "usb", offset: 0 },
          { label: "Streaming", kind: "network_stream", offset: 0 },
        ],
        presets: [station("Night Tram Electronica", "Electronic", -2)],
      },
      {
        name: "Bedroom",
        device: "fd-brightwater-bedroom",
        ceiling: 50,
        turnOn: 15,
        sources: [{ label: "Streaming", kind: "network_stream", offset: 0 }],
        presets: [station("Tidepool Ambient", "Ambient", 2), station("Morning Orchard Acoustic", "Acoustic")],
      },
    ],
  },
  {
    key: "nakagawa",
    company: "fernhill",
    name: "Nakagawa cottage",
    householdName: "Nakagawa family",
    city: "Fernhill",
    servicePlan: "essential",
    household: [],
    installers: [],
    zones: [
      {
        name: "Den",
        device: "fd-nakagawa-den",
        ceiling: 68,
        turnOn: 22,
        sources: [{ label: "Streaming", kind: "network_stream", offset: 0 }, { label: "Record player", kind: "analog", offset: 3, subsonic: true }],
        presets: [station("Copper Kettle Folk", "Folk"), station("Saltmarsh Blues", "Blues")],
      },
      {
        name: "Garden",
        device: "fd-nakagawa-garden",
        ceiling: 60,
        turnOn: 20,
        curve: "outdoor-lift",
        sources: [{ label: "Streaming", kind: "network_stream", offset: 0 }],
        presets: [station("Morning Orchard Acoustic", "Acoustic")],
      },
    ],
  },
  {
    key: "tidewater-harbour",
    company: "tidewater",
    name: "Harbour view apartment",
    householdName: "Ferreira household",
    city: "Port Wren",
    servicePlan: "standard",
    household: [],
    installers: [],
    zones: [
      {
        name: "Lounge",
        device: "fd-tidewater-lounge",
        ceiling: 70,
        turnOn: 25,
        sources: [{ label: "Streaming", kind: "network_stream", offset: 0 }],
        presets: [station("Saltmarsh Blues", "Blues")],
      },
    ],
  },
];

export const templates = [
  { key: "outdoor-pair", name: "Outdoor pair with bass lift", description: "Patio, dock or terrace: two outdoor speakers, guest streaming and phone, a modest ceiling.", fromZone: "Patio", fromHome: "lindqvist" },
  { key: "family-tv", name: "Family room with TV and subwoofer", description: "TV over HDMI ARC with dialogue lift, turntable, streaming; LR4 crossover at 80 Hz.", fromZone: "Family room", fromHome: "lindqvist" },
] as const;
