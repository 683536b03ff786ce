/**
 * Public share links: an unguessable token (32 random bytes, base64url) handed out once;
 * only its SHA-256 is stored, so a database leak does not leak working links. The public
 * payload is built field by field from an allowlist: no prices, contacts, notes or names.
 */
import { createHash, randomBytes } from "node:crypto";
import { partTitle } from "../../src/domain/part-workflow";
import { sharedListResponse, type SharedList } from "../../src/schemas/parts";
import { recordAudit } from "../audit";
import type { Db } from "../db";
import { AppError, notFound } from "../errors";
import * as repo from "./repository";
import { buildRows } from "./rows";
import * as shares from "./share-repository";

export const hashToken = (token: string) => createHash("sha256").update(token).digest("hex");

export async function createShareLink(db: Db, siteId: string, label: string, actorId: string) {
  const token = randomBytes(32).toString("base64url");
  const row = await db.transaction().execute(async (trx) => {
    const r = await shares.insertShareLink(trx, { siteId, tokenHash: hashToken(token), label, createdBy: actorId });
    await recordAudit(trx, {
      siteId,
      entityType: "part_share_link",
      entityId: r.id,
      action: "create",
      actorId,
      after: { label },
    });
    return r;
  });
  return { token, link: { ...row, createdAt: row.createdAt.toISOString(), revokedAt: null, createdByName: null } };
}

export async function listShareLinks(db: Db, siteId: string) {
  const rows = await shares.shareLinksOf(db, siteId);
  return rows.map((r) => ({
    ...r,
    createdAt: r.createdAt.toISOString(),
    revokedAt: r.revokedAt?.toISOString() ?? null,
  }));
}

export async function revokeShareLink(db: Db, siteId: string, id: string, actorId: string) {
  await db.transaction().execute(async (trx) => {
    const r = await shares.revokeLink(trx, siteId, id, actorId);
    if (!r) throw notFound("That share link");
    await recordAudit(trx, { siteId, entityType: "part_share_link", entityId: id, action: "revoke", actorId });
  });
}

/** The site behind a token: unknown → 404, revoked → 410 Gone. */
export async function siteOfToken(db: Db, token: string) {
  const link = await shares.linkByTokenHash(db, hashToken(token));
  if (!link) throw new AppError(404, "not_found", "This share link does not exist.");
  if (link.revokedAt) throw new AppError(410, "revoked", "This share link has been withdrawn by the crew.");
  return link.siteId;
}

/** What a partner reads on a line for a part of a unit (its own words stay on the site). */
export const SUB_PART = "a part of this unit, not the whole unit: ask the crew which";

/** The public list. A read only: it never writes (demand is kept current by the writes). */
export async function sharedList(db: Db, token: string): Promise<SharedList> {
  const siteId = await siteOfToken(db, token);
  const name = await shares.siteName(db, siteId);
  const lines = await buildRows(
    db,
    [
      ...(await repo.listLines(db, siteId, { status: "wanted" })),
      ...(await repo.listLines(db, siteId, { status: "lead_found" })),
    ].sort((a, b) => a.createdAt.getTime() - b.createdAt.getTime() || (a.id < b.id ? -1 : 1)),
  );
  return sharedListResponse.parse({
    siteName: name,
    lines: lines.map((l) => ({
      ref: l.ref,
      kind: l.kind,
      ratingAmps: l.ratingAmps,
      poles: l.poles,
      voltageRating: l.voltageRating,
      frame: l.frame,
      mounting: l.mounting,
      // Structured fields only: a line's "need" and its title's tail are free text typed on a defect
      // (phone numbers and prices have turned up there), so neither leaves the site.
      maker: l.maker,
      model: l.model,
      // …but a line for a part of a unit says it is one, in fixed words: otherwise a partner reads a whole breaker.
      need: l.need.trim() ? SUB_PART : "",
      title: partTitle({ ...l, mustMatch: undefined }),
      qty: l.qty,
      heritageRule: l.heritageRule,
      status: l.status,
      photoUrls: l.photoIds.map((p) => `/api/share/parts/${token}/photos/${p}`),
    })),
  });
}

/** True when the photo is a nameplate photo of a component on a line the token shares (one query). */
export async function photoIsShared(db: Db, token: string, photoId: string) {
  const siteId = await siteOfToken(db, token);
  return shares.isSharedNameplate(db, siteId, photoId);
}
