import type { ComponentKind } from "../../../domain/vocab";

export type NameplateKey =
  | "maker"
  | "model"
  | "frame"
  | "mounting"
  | "ratingAmps"
  | "poles"
  | "voltageRating"
  | "interruptingKa"
  | "serial"
  | "year"
  | "meterRange"
  | "lampWatts";

export const NAMEPLATE_LABELS: Record<NameplateKey, string> = {
  maker: "Maker",
  model: "Type / model",
  frame: "Frame",
  mounting: "Mounting",
  ratingAmps: "Current rating (A)",
  poles: "Poles",
  voltageRating: "Voltage rating (V)",
  interruptingKa: "Interrupting rating (kA)",
  serial: "Serial",
  year: "Year",
  meterRange: "Meter range",
  lampWatts: "Lamp wattage (W)",
};
export const NUMERIC_NAMEPLATE = new Set<NameplateKey>([
  "ratingAmps",
  "poles",
  "voltageRating",
  "interruptingKa",
  "year",
  "lampWatts",
]);

const COMMON_HEAD: NameplateKey[] = ["maker", "model"];
const COMMON_TAIL: NameplateKey[] = ["serial", "year"];
const BY_KIND: Record<ComponentKind, NameplateKey[]> = {
  molded_case_breaker: ["frame", "ratingAmps", "poles", "voltageRating", "interruptingKa", "mounting"],
  power_breaker: ["frame", "ratingAmps", "poles", "voltageRating", "interruptingKa", "mounting"],
  fuse: ["ratingAmps", "voltageRating", "interruptingKa"],
  switch: ["ratingAmps", "poles", "voltageRating"],
  bus_tie: ["ratingAmps", "poles", "voltageRating"],
  busbar: ["ratingAmps", "voltageRating"],
  meter: ["meterRange"],
  ground_lamp: ["lampWatts", "voltageRating"],
  transformer: ["voltageRating", "ratingAmps"],
  relay: ["voltageRating", "mounting"],
  terminal_strip: ["ratingAmps", "voltageRating"],
  electronic_trip_unit: ["ratingAmps", "frame", "voltageRating"],
  enclosed_switch: ["ratingAmps", "poles", "voltageRating", "mounting"],
  other: ["frame", "ratingAmps", "poles", "voltageRating", "interruptingKa", "meterRange", "lampWatts", "mounting"],
};

/** The nameplate fields that make sense for a kind: a meter has a range, a lamp a wattage, a breaker its frame and kA. */
export const nameplateFieldsFor = (kind: ComponentKind): NameplateKey[] => [
  ...COMMON_HEAD,
  ...BY_KIND[kind],
  ...COMMON_TAIL,
];
