/**
 * Tag numbers: giving untagged components the next free tags before their
 * labels are printed, and finding the position a scanned tag belongs to among the
 * sites a person can see. The inventory domain owns components, so tags are written here.
 */
import type { Db } from "../db";
import { recordAudit } from "../audit";
import { AppError } from "../errors";
import { componentsToTag, lockSiteTags, positionsWithTag, setTagNumber, siteTagNumbers } from "./tags-repository";

const TAIL = /^(.*?)(\d+)$/;

/** The prefix most of the site's tags use ("KL-" for KL-0401), else "T-". */
export function commonPrefix(tags: string[]): string {
  const counts = new Map<string, number>();
  for (const t of tags) {
    const m = TAIL.exec(t);
    if (m) counts.set(m[1], (counts.get(m[1]) ?? 0) + 1);
  }
  let best = "T-";
  let n = 0;
  for (const [p, c] of counts)
    if (c > n) {
      best = p;
      n = c;
    }
  return best;
}

/**
 * Gives each untagged, current component at these positions the next tag number
 * `<prefix><n>` after the highest in use with that prefix (zero-padded like the
 * existing ones, at least 4 digits). One site's assignments run one at a time
 * (an advisory lock), so two people printing at once never get the same tag.
 */
export async function assignTags(db: Db, siteId: string, positionIds: string[], actorId: string, prefix?: string) {
  return db.transaction().execute(async (trx) => {
    await lockSiteTags(trx, siteId);
    const targets = await componentsToTag(trx, siteId, positionIds);
    const found = new Set(targets.map((t) => t.positionId));
    const missing = positionIds.filter((id) => !found.has(id));
    const existing = await siteTagNumbers(trx, siteId);
    const pre = prefix ?? commonPrefix(existing);
    let next = 0;
    let digits = 4;
    for (const t of existing) {
      const m = TAIL.exec(t);
      if (m && m[1].toLowerCase() === pre.toLowerCase()) {
        next = Math.max(next, Number(m[2]));
        digits = Math.max(digits, m[2].length);
      }
    }
    const assigned: Array<{ positionId: string; tagNumber: string }> = [];
    for (const t of targets) {
      if (t.tagNumber) continue;
      next++;
      const tagNumber = `${pre}${String(next).padStart(digits, "0")}`;
      await setTagNumber(trx, t.id, tagNumber);
      await recordAudit(trx, {
        siteId,
        entityType: "component",
        entityId: t.id,
        action: "update",
        actorId,
        boardId: t.boardId,
        positionId: t.positionId,
        before: { tagNumber: null },
        after: { tagNumber },
      });
      assigned.push({ positionId: t.positionId, tagNumber });
    }
    return {
      assigned,
      alreadyTagged: targets
        .filter((t) => t.tagNumber)
        .map((t) => ({ positionId: t.positionId, tagNumber: t.tagNumber! })),
      withoutComponent: missing,
    };
  });
}

/**
 * The positions carrying this tag on the sites the person may see (an instance admin
 * sees every site). A tag on someone else's site is simply not found: nothing about
 * that site is revealed, not even that the tag exists.
 */
export async function findTag(db: Db, user: { id: string; isAdmin: boolean }, tag: string) {
  const rows = await positionsWithTag(db, user, tag);
  if (rows.length === 0)
    throw new AppError(
      404,
      "tag_not_found",
      `No position on the sites you can see carries tag ${tag}. A tag from another crew's site stays hidden: ask that site's curator to add you.`,
    );
  return { tag, matches: rows };
}
