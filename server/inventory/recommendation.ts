/**
 * Builds the flood-guidance input for one component from what the site has recorded
 * (latest flood event, the component's newest inspection, its position on the board)
 * and calls recommendDisposition() of src/domain/flood-guidance.ts.
 */
import type { Selectable } from "kysely";
import type { ComponentsTable } from "../../db/types";
import { tileBelowWaterLine } from "../../src/domain/board-geometry";
import { recommendDisposition, type FloodInput } from "../../src/domain/flood-guidance";
import type { RecommendationResponse } from "../../src/schemas/inventory";
import type { Db } from "../db";
import { latestFloodEvent } from "./boards-repository";
import { positionGeometry } from "./positions-repository";
import { latestInspection } from "./survey-repository";

type Component = Selectable<ComponentsTable>;

/**
 * Below the water line? The inspection says so when it can; otherwise the position's
 * bottom edge is compared with the board's water line (face height split evenly into the
 * grid rows); with neither, it is treated as below — the cautious reading.
 */
async function belowFromBoard(db: Db, positionId: string): Promise<boolean | null> {
  const r = await positionGeometry(db, positionId);
  if (!r || r.faceHeightMm === null || r.waterLineMm === null) return null;
  try {
    // The same geometry the board elevation draws (src/domain/board-geometry.ts).
    return tileBelowWaterLine(r, { gridRows: r.gridRows, faceHeightMm: r.faceHeightMm, waterLineMm: r.waterLineMm });
  } catch (e) {
    if (e instanceof RangeError) return null; // a tile off its grid or a face of no height: no geometry to go by
    throw e;
  }
}

export async function recommendFor(db: Db, siteId: string, c: Component): Promise<RecommendationResponse> {
  const flood = await latestFloodEvent(db, siteId);
  const insp = await latestInspection(db, c.id);
  const assumptions: string[] = [];
  const basis = {
    floodEventId: flood?.id ?? null,
    waterType: flood?.waterType ?? null,
    inspectionId: insp?.id ?? null,
    belowWaterLine: null as boolean | null,
  };
  if (!flood)
    return {
      recommendation: null,
      assumptions: ["No flood event is recorded for this site yet, so there is nothing to base a recommendation on."],
      basis,
    };
  let below = insp?.belowWaterLine ?? null;
  if (below === null) {
    below = await belowFromBoard(db, c.positionId);
    if (below !== null)
      assumptions.push(
        `No inspection says whether it was below the water line: judged from its place on the board (${below ? "below" : "above"} the recorded water line).`,
      );
    else {
      below = true;
      assumptions.push(
        "Nothing records whether it was below the water line: treated as below it (the cautious reading).",
      );
    }
  }
  if (!insp) assumptions.push("Not inspected yet: the recommendation uses the flood and the kind of part only.");
  basis.belowWaterLine = below;
  const input: FloodInput = {
    kind: c.kind,
    waterType: flood.waterType,
    belowWaterLine: below,
    hoursSubmerged: below && flood.hoursSubmerged !== null ? flood.hoursSubmerged : undefined,
    contaminants: insp?.contaminants ?? [],
    insulation: insp?.insulation ?? undefined,
    mechanism: insp?.mechanism ?? undefined,
    percentRusted: insp?.percentRusted ?? undefined,
    heritage: c.heritage,
  };
  return { recommendation: recommendDisposition(input), assumptions, basis };
}
