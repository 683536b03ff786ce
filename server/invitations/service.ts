import { INVITATION_DAYS } from "../../src/schemas/invitations";
import type { Role } from "../../src/domain/vocab";
import { recordAudit } from "../audit";
import { accountByEmail } from "../auth/service";
import { siteName, siteTimeZone } from "../sites/reads";
import type { Db } from "../db";
import { AppError, conflict, notFound } from "../errors";
import type { MailDeps } from "../mail/mailer";
import { latestDelivery, queueMail, type Delivery } from "../mail/outbox";
import { newToken } from "../one-time-token";
import { invitationMessage } from "./messages";
import * as repo from "./repository";
import { paths } from "../../src/config/paths";

type Actor = { id: string; name: string; isAdmin: boolean };
type Row = Awaited<ReturnType<typeof repo.listLive>>[number];

const expiry = () => new Date(Date.now() + INVITATION_DAYS * 24 * 3600 * 1000);
export const inviteUrl = (publicUrl: string, token: string) => `${publicUrl}${paths.invite.href(token)}`;

/**
 * A queued message is "pending"; one whose first try failed is "not sent" at once (the
 * curator can resend, or wait: the outbox keeps retrying and turns it "sent" when it goes).
 */
const SEND_STATUS = { queued: "pending", retrying: "failed", sent: "sent", failed: "failed" } as const;

/**
 * The curator's view; the SMTP reason is for instance admins only (it can name hosts and accounts).
 * Delivery comes from the e-mail outbox when the invitation went through it (the app with its
 * job queue), else from the invitation's own columns (sent at once, without a queue).
 */
export function toView(r: Row, viewer: { isAdmin: boolean }, now = new Date(), d?: Delivery) {
  const sendStatus = d ? SEND_STATUS[d.status] : r.sendStatus;
  const sendError = d ? d.lastError : r.sendError;
  const lastSentAt = d ? d.sentAt : r.lastSentAt;
  return {
    id: r.id,
    email: r.email,
    role: r.role,
    invitedByName: r.invitedByName,
    createdAt: new Date(r.createdAt).toISOString(),
    expiresAt: r.expiresAt.toISOString(),
    expired: r.expiresAt.getTime() <= now.getTime(),
    sendStatus,
    sendError: viewer.isAdmin ? sendError : null,
    lastSentAt: lastSentAt ? lastSentAt.toISOString() : null,
  };
}

export const INVITATION_REF = "invitation";

export async function listInvitations(db: Db, siteId: string, viewer: { isAdmin: boolean }) {
  const rows = await repo.listLive(db, siteId);
  const deliveries = await latestDelivery(
    db,
    INVITATION_REF,
    rows.map((r) => r.id),
  );
  const now = new Date();
  return rows.map((r) => toView(r, viewer, now, deliveries.get(r.id)));
}

async function viewOf(db: Db, siteId: string, id: string, viewer: { isAdmin: boolean }) {
  const row = (await repo.findInvitation(db, siteId, id))!;
  return toView(row, viewer, new Date(), (await latestDelivery(db, INVITATION_REF, [id])).get(id));
}

type Delivering = { siteId: string; email: string; role: Role; token: string; inviterName: string; expiresAt: Date };

async function message(deps: MailDeps, db: Db, p: Delivering) {
  const msg = invitationMessage({
    siteName: await siteName(db, p.siteId),
    role: p.role,
    inviterName: p.inviterName,
    url: inviteUrl(deps.publicUrl, p.token),
    expiresAt: p.expiresAt,
    timeZone: await siteTimeZone(db, p.siteId),
  });
  return { to: p.email, ...msg, fromName: `${p.inviterName} via Tideline` };
}

/**
 * The invitation's e-mail: with the job queue, queued in the outbox inside the caller's
 * transaction (it commits with the invitation); without one, sent after the commit and the
 * outcome recorded on the invitation. The invitation stays either way.
 */
async function queueDelivery(deps: MailDeps, trx: Db, id: string, p: Delivering) {
  if (deps.jobs) await queueMail(trx, deps.jobs, await message(deps, trx, p), { type: INVITATION_REF, id });
}

async function deliverNow(deps: MailDeps, id: string, p: Delivering) {
  if (deps.jobs) return;
  const r = await deps.mailer.send(await message(deps, deps.db, p));
  await repo.markSent(deps.db, id, r.ok ? "sent" : "failed", r.ok ? null : r.error);
}

export async function createInvitation(deps: MailDeps, siteId: string, email: string, role: Role, actor: Actor) {
  const { db } = deps;
  // Everyone joins by accepting: an address with an account gets the same invitation and
  // the same answer as one without (the link then asks for that account's password).
  const existing = await accountByEmail(db, email);
  // No e-mail goes to a suspended account (server/auth/suspension.ts); the curator hears why and whom to ask.
  if (existing?.suspendedAt)
    throw new AppError(
      409,
      "account_suspended",
      "That address belongs to an account the instance's admin has suspended. Ask them whether it should come back.",
      { email: "Account suspended" },
    );
  if (existing && (await repo.isMember(db, siteId, existing.id)))
    throw new AppError(409, "already_member", "That person is already on this site's crew.", {
      email: "Already on the crew",
    });
  const { token, hash } = newToken();
  const expiresAt = expiry();
  const id = await db
    .transaction()
    .execute(async (trx) => {
      const live = await repo.findLiveByEmail(trx, siteId, email);
      if (live) await repo.renewInvitation(trx, live.id, { role, tokenHash: hash, invitedBy: actor.id, expiresAt });
      const invId =
        live?.id ??
        (await repo.insertInvitation(trx, { siteId, email, role, tokenHash: hash, invitedBy: actor.id, expiresAt })).id;
      await recordAudit(trx, {
        siteId,
        entityType: "invitation",
        entityId: invId,
        action: live ? "reinvited" : "invited",
        actorId: actor.id,
        after: { email, role },
      });
      await queueDelivery(deps, trx, invId, { siteId, email, role, token, inviterName: actor.name, expiresAt });
      return invId;
    })
    .catch((e) => {
      // Two curators inviting the same address at the same moment: the unique index keeps one.
      if ((e as { code?: string }).code === "23505")
        throw conflict("An invitation to that address is already being sent. Refresh the list.");
      throw e;
    });
  await deliverNow(deps, id, { siteId, email, role, token, inviterName: actor.name, expiresAt });
  return { outcome: "invited" as const, invitation: await viewOf(db, siteId, id, actor) };
}

async function liveOrConflict(db: Db, siteId: string, id: string, actor: Actor) {
  const row = await repo.findInvitation(db, siteId, id);
  if (!row) throw notFound("That invitation");
  if (row.acceptedAt) throw conflict("That invitation has already been accepted.", await viewOf(db, siteId, id, actor));
  if (row.revokedAt) throw conflict("That invitation was revoked.", await viewOf(db, siteId, id, actor));
  return row;
}

/** A fresh link (the old one stops working) and seven more days, sent again. */
export async function resendInvitation(deps: MailDeps, siteId: string, id: string, actor: Actor) {
  const row = await liveOrConflict(deps.db, siteId, id, actor);
  const { token, hash } = newToken();
  const expiresAt = expiry();
  await deps.db.transaction().execute(async (trx) => {
    await repo.renewInvitation(trx, id, { tokenHash: hash, invitedBy: actor.id, expiresAt });
    await recordAudit(trx, { siteId, entityType: "invitation", entityId: id, action: "resent", actorId: actor.id });
    await queueDelivery(deps, trx, id, {
      siteId,
      email: row.email,
      role: row.role,
      token,
      inviterName: actor.name,
      expiresAt,
    });
  });
  await deliverNow(deps, id, { siteId, email: row.email, role: row.role, token, inviterName: actor.name, expiresAt });
  return viewOf(deps.db, siteId, id, actor);
}

export async function revokeInvitation(db: Db, siteId: string, id: string, actor: Actor) {
  await liveOrConflict(db, siteId, id, actor);
  await db.transaction().execute(async (trx) => {
    await repo.markRevoked(trx, id);
    await recordAudit(trx, { siteId, entityType: "invitation", entityId: id, action: "revoked", actorId: actor.id });
  });
}
