/**
 * The invented demo scenario: MV Kestrel Lantern, a fictional 1946 coastal tender
 * kept by a fictional volunteer trust, flooded by salt water while laid up. Every
 * name here is made up.
 */
import type { Role } from "../../src/domain/vocab";

export const DEMO_PASSWORD = "tideline-demo";

export const DEMO_SITE = {
  name: "MV Kestrel Lantern",
  kind: "vessel" as const,
  location: "Fitting-out berth 3, Saltmarrow Basin (fictional)",
  /** Exports write local times in this zone; the basin is invented, the zone is a real IANA one. */
  timeZone: "America/Halifax",
  /** Every cost on the site is in Canadian dollars (an ISO 4217 code; the amounts are invented). */
  currency: "CAD",
  description:
    "Fictional 1946 coastal tender. Her engine-room switchboards were flooded with harbour water to above the breaker line while laid up; the crew is bringing them back section by section.",
};

export const DEMO_PEOPLE: Array<{ email: string; name: string; role: Role | null; isAdmin: boolean }> = [
  { email: "admin@tideline.test", name: "Harriet Vell (instance admin)", role: null, isAdmin: true },
  { email: "curator@tideline.test", name: "Ines Marrow", role: "curator", isAdmin: false },
  { email: "volunteer@tideline.test", name: "Tobias Quell", role: "volunteer", isAdmin: false },
  { email: "photographer@tideline.test", name: "Ada Fenwright", role: "photographer", isAdmin: false },
  { email: "scrounger@tideline.test", name: "Rufus Lade", role: "scrounger", isAdmin: false },
  { email: "viewer@tideline.test", name: "Pell Arbuthnot", role: "viewer", isAdmin: false },
];
