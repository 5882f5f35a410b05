import type { Station, StationCodec } from "@/lib/stations/api-schema";

// An invented catalogue for the station directory fake. Every name is made up
// (whimsical and generic on purpose) and every URL is on example.net (RFC 2606),
// so nothing here points at a real broadcaster.

type Entry = [name: string, genre: string, tags: string[], country: string, bitrateKbps: number, codec: StationCodec];

const entries: Entry[] = [
  ["Harbor Lantern Jazz", "jazz", ["smooth", "late night"], "US", 128, "mp3"],
  ["Brass Compass Big Band", "jazz", ["swing", "big band"], "US", 128, "mp3"],
  ["Lamplight Torch Songs", "jazz", ["vocal", "ballads"], "US", 96, "aac"],
  ["Copper Kettle Folk", "folk", ["traditional", "fiddle"], "IE", 128, "mp3"],
  ["Driftwood Acoustic", "folk", ["acoustic", "unplugged"], "NZ", 96, "aac"],
  ["Ember and Oak Songwriters", "folk", ["singer-songwriter", "acoustic"], "US", 128, "mp3"],
  ["Midnight Orchard Ambient", "ambient", ["drone", "sleep"], "NO", 128, "opus"],
  ["Birch Canopy Field Sounds", "ambient", ["nature", "birdsong", "sleep"], "SE", 96, "opus"],
  ["Velvet Tramline Soul", "soul", ["classic soul", "rhythm and blues"], "GB", 192, "mp3"],
  ["Riverstone Gospel Morning", "gospel", ["choir", "sunday"], "US", 128, "mp3"],
  ["Paper Kite Indie", "indie", ["alternative", "new releases"], "AU", 128, "aac"],
  ["Saltmarsh Strings", "classical", ["orchestral", "strings"], "NL", 256, "aac"],
  ["Cloudberry Chamber Hour", "classical", ["chamber", "quartet"], "FI", 320, "mp3"],
  ["Quiet Quarry Piano", "classical", ["piano", "solo"], "AT", 192, "aac"],
  ["Wildflower Choir Hour", "classical", ["choral", "a cappella"], "EE", 128, "vorbis"],
  ["Starling Baroque", "classical", ["baroque", "harpsichord"], "IT", 256, "flac"],
  ["Moonlit Ferry Classics", "classical", ["symphonic", "romantic"], "DK", 192, "mp3"],
  ["Granite Stairwell Beats", "hip-hop", ["boom bap", "instrumental"], "US", 128, "mp3"],
  ["Lighthouse Keeper Blues", "blues", ["delta", "slide guitar"], "US", 128, "mp3"],
  ["Tin Roof Bluegrass", "country", ["bluegrass", "banjo"], "US", 96, "mp3"],
  ["Juniper Trail Country", "country", ["classic country", "honky-tonk"], "US", 128, "mp3"],
  ["Maple Porch Americana", "country", ["americana", "roots"], "CA", 128, "aac"],
  ["Glasshouse Lounge", "lounge", ["downtempo", "cocktail"], "DE", 192, "aac"],
  ["Orbiting Teacup Chillout", "lounge", ["chillout", "trip-hop"], "GB", 128, "mp3"],
  ["Marigold Bossa Corner", "latin", ["bossa nova", "samba"], "BR", 128, "aac"],
  ["Lantern Alley Latin", "latin", ["salsa", "cumbia"], "MX", 128, "mp3"],
  ["Sundial Samba Club", "latin", ["samba", "percussion"], "PT", 96, "aac"],
  ["Neon Heron Synthwave", "electronic", ["synthwave", "retro"], "CA", 192, "mp3"],
  ["Polar Moth Techno", "electronic", ["techno", "minimal"], "DE", 256, "opus"],
  ["Tidepool Disco Ball", "electronic", ["disco", "dance"], "IT", 192, "mp3"],
  ["Sleepy Tortoise Lo-Fi", "electronic", ["lo-fi", "study"], "JP", 128, "opus"],
  ["Amber Signal Rock", "rock", ["classic rock", "guitar"], "GB", 192, "mp3"],
  ["Kestrel Desert Rock", "rock", ["stoner", "desert"], "US", 128, "mp3"],
  ["Cinder Block Punk", "rock", ["punk", "garage"], "US", 128, "mp3"],
  ["Rainbarrel Reggae", "reggae", ["roots", "dub"], "JM", 128, "mp3"],
  ["Honeycomb Afrobeat", "world", ["afrobeat", "highlife"], "NG", 128, "aac"],
  ["Saffron Courtyard Grooves", "world", ["fusion", "tabla"], "IN", 96, "aac"],
  ["Cobblestone Chanson", "world", ["chanson", "accordion"], "FR", 128, "mp3"],
  ["Little Foghorn Kids", "kids", ["children", "sing-along"], "CA", 64, "aac"],
  ["Pocket Orchestra Film Scores", "soundtrack", ["film", "orchestral"], "GB", 192, "mp3"],
  ["Gentle Static Talk", "talk", ["conversation", "spoken word"], "GB", 64, "aac"],
  ["Snowglobe Holiday Tunes", "seasonal", ["holiday", "winter"], "CA", 128, "mp3"],
];

const extension: Record<StationCodec, string> = { mp3: "mp3", aac: "aac", opus: "opus", vorbis: "ogg", flac: "flac" };

function slug(name: string): string {
  return name.toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-|-$/g, "");
}

export const stationCatalogue: Station[] = entries.map(([name, genre, tags, country, bitrateKbps, codec], index) => ({
  id: `st-${String(index + 1).padStart(3, "0")}`,
  name,
  genre,
  tags,
  country,
  bitrateKbps,
  codec,
  streamUrl: `https://streams.example.net/live/${slug(name)}.${extension[codec]}`,
  homepageUrl: index % 4 === 3 ? null : `https://www.example.net/stations/${slug(name)}`,
}));
