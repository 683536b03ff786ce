/**
 * The tag-and-return chain a component follows through teardown and back, and the proofs
 * each step needs. Common practice of restoration crews (no single published source):
 * a part comes off only with a tag, goes to the workshop, is made ready (cleaned or
 * rebuilt, its disposition decided) and is refitted only after that — and, where its kind
 * is normally insulation-tested, after a reading that meets its criterion. The kinds that
 * need a reading follow the electrical tests listed for them in ANSI/NETA MTS-2019
 * section 7 (switchgear and bus, dry-type transformers, switches, circuit breakers),
 * from memory. The curator may release a refused move with a written reason.
 * Pure: the server enforces it, the form shows it.
 */
import {
  CUSTODY,
  type ComponentKind,
  type Custody,
  type Disposition,
  type InsulationState,
  type Mechanism,
} from "./vocab";
import { requireOneOf } from "./guards";

/** Moves along or off the chain, from → to (common practice). Anything else is off the chain. */
export const CHAIN: Record<Custody, readonly Custody[]> = {
  in_place: ["removed", "missing"],
  removed: ["in_workshop", "ready_to_refit", "scrapped", "missing"],
  in_workshop: ["ready_to_refit", "scrapped", "missing"],
  ready_to_refit: ["refitted", "in_workshop", "scrapped", "missing"],
  refitted: ["removed", "missing"],
  scrapped: [],
  missing: ["removed", "in_workshop"],
};

/** Kinds normally insulation-tested before return to service (ANSI/NETA MTS-2019 §7, from memory). */
export const READING_REQUIRED_KINDS: ReadonlySet<ComponentKind> = new Set([
  "molded_case_breaker",
  "power_breaker",
  "bus_tie",
  "busbar",
  "switch",
  "transformer",
]);

/** What the rules need to know about the component. */
export interface CustodyFacts {
  from: Custody;
  kind: ComponentKind;
  disposition: Disposition | null;
  /** The tag it already carries, or the one given with this move. */
  tagNumber: string | null;
  /** Newest inspection's insulation and mechanism (null when never inspected or not noted). */
  latestInsulation: InsulationState | null;
  latestMechanism: Mechanism | null;
  /**
   * Verdict of this component's newest insulation reading of each conductor pair, the worst of them (a failing phase
   * is not hidden by a later reading of another); null when none.
   */
  latestReading: "meets" | "below_minimum" | "investigate" | "not_valid" | null;
}

export type CustodyRule =
  | "same_state"
  | "off_chain"
  | "tag_required"
  | "disposition_undecided"
  | "not_ready"
  | "condition_unproven"
  | "reading_required"
  | "reading_failing"
  | "reading_not_valid";

export interface CustodyRefusal {
  rule: CustodyRule;
  /** 409: the move is not on the chain; 422: a proof is missing. */
  status: 409 | 422;
  message: string;
  /** The curator can release this refusal with a written reason (never "same_state" or "tag_required"). */
  releasable: boolean;
}

const BAD_INSULATION: ReadonlySet<InsulationState> = new Set(["tracking", "charred", "swollen"]);

/**
 * Every rule the move `to` breaks, in the order a person would fix them; [] when allowed.
 * @throws RangeError for a state outside CUSTODY
 */
export function checkCustodyMove(f: CustodyFacts, to: Custody): CustodyRefusal[] {
  requireOneOf("from", f.from, CUSTODY);
  requireOneOf("to", to, CUSTODY);
  if (f.from === to)
    return [{ rule: "same_state", status: 409, message: "It is already in that custody state.", releasable: false }];
  const out: CustodyRefusal[] = [];
  const refuse = (rule: CustodyRule, status: 409 | 422, message: string) =>
    out.push({ rule, status, message, releasable: true });
  if (!CHAIN[f.from].includes(to)) {
    if (to === "refitted")
      refuse(
        "not_ready",
        409,
        "A part is refitted only from “ready to refit”: make it ready first (cleaned or rebuilt, its disposition decided).",
      );
    else
      refuse(
        "off_chain",
        409,
        `The chain does not go from “${label(f.from)}” to “${label(to)}”.${CHAIN[f.from].length ? ` Next on the chain: ${CHAIN[f.from].map(label).join(", ")}.` : ""}`,
      );
  }
  // The tag is never released: generating one costs a tap, and the chain back depends on it.
  if (to === "removed" && !f.tagNumber?.trim())
    out.push({
      rule: "tag_required",
      status: 422,
      message: "A part comes off only with a tag: type, scan or generate a tag number.",
      releasable: false,
    });
  if ((to === "ready_to_refit" || to === "refitted") && !f.disposition)
    refuse(
      "disposition_undecided",
      422,
      "Its disposition is not decided yet: the curator decides clean, rebuild, replace or source first.",
    );
  if (to === "refitted") {
    const bad = [
      f.latestInsulation && BAD_INSULATION.has(f.latestInsulation) ? `insulation “${f.latestInsulation}”` : null,
      f.latestMechanism === "seized" ? "mechanism seized" : null,
    ].filter(Boolean);
    if (bad.length)
      refuse(
        "condition_unproven",
        422,
        `Its latest inspection still shows ${bad.join(" and ")}: inspect it again after the work.`,
      );
    if (READING_REQUIRED_KINDS.has(f.kind)) {
      if (f.latestReading === null)
        refuse(
          "reading_required",
          422,
          "This kind needs an insulation-resistance reading meeting its criterion before it is refitted.",
        );
      else if (f.latestReading === "not_valid")
        refuse(
          "reading_not_valid",
          422,
          "Its latest insulation-resistance reading was taken at or near the dew point (or below freezing) and is not valid for judging: re-test in dry conditions.",
        );
      else if (f.latestReading !== "meets")
        refuse(
          "reading_failing",
          422,
          "Its latest insulation-resistance reading does not meet the recorded criterion: re-test after drying or repair.",
        );
    }
  }
  return out;
}

/**
 * The move to offer first: the next step on the chain that breaks no rule, else the next
 * step on the chain (so the form can say what it still needs), else null (nothing sensible,
 * e.g. after a refit or once scrapped — the person chooses).
 */
export function proposeNext(f: CustodyFacts): Custody | null {
  const forward: Record<Custody, Custody[]> = {
    in_place: ["removed"],
    removed: f.disposition === "clean" ? ["ready_to_refit", "in_workshop"] : ["in_workshop"],
    in_workshop: ["ready_to_refit"],
    ready_to_refit: ["refitted"],
    refitted: [],
    scrapped: [],
    missing: ["removed"],
  };
  const steps = forward[f.from];
  return steps.find((s) => checkCustodyMove(f, s).length === 0) ?? steps[0] ?? null;
}

const LABELS: Record<Custody, string> = {
  in_place: "in place",
  removed: "removed (tagged)",
  in_workshop: "in workshop",
  ready_to_refit: "ready to refit",
  refitted: "refitted",
  scrapped: "scrapped",
  missing: "missing",
};
const label = (c: Custody) => LABELS[c];
