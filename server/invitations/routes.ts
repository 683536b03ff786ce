import { Router } from "express";
import { z } from "zod";
import { acceptInvitationBody, createInvitationBody } from "../../src/schemas/invitations";
import type { AppLucia } from "../auth/lucia";
import { hit, type Limiters } from "../auth/throttle";
import { requireSiteRole } from "../middleware/roles";
import { setCookie } from "../middleware/session";
import type { MailDeps } from "../mail/mailer";
import { acceptInvitation, previewInvitation } from "./accept";
import * as service from "./service";

const siteParams = z.object({ siteId: z.uuid() });
const invParams = z.object({ siteId: z.uuid(), invitationId: z.uuid({ message: "invitationId must be a UUID" }) });
const tokenParams = z.object({
  token: z.string().regex(/^[A-Za-z0-9_-]{20,100}$/, { message: "That is not an invitation link" }),
});

export function invitationRoutes(deps: MailDeps, lucia: AppLucia, limiters: Limiters) {
  const r = Router();
  const { db } = deps;
  const curator = requireSiteRole(db, "invitations.manage");

  r.get("/sites/:siteId/invitations", curator, async (req, res) => {
    const { siteId } = siteParams.parse(req.params);
    res.json({ invitations: await service.listInvitations(db, siteId, res.locals.user!) });
  });

  r.post("/sites/:siteId/invitations", curator, async (req, res) => {
    const { siteId } = siteParams.parse(req.params);
    const { email, role } = createInvitationBody.parse(req.body);
    await hit(limiters.inviteSender, res.locals.user!.id, "Too many invitations sent in the last hour.");
    const out = await service.createInvitation(deps, siteId, email, role, res.locals.user!);
    res.status(201).json({ ...out, invitations: await service.listInvitations(db, siteId, res.locals.user!) });
  });

  r.post("/sites/:siteId/invitations/:invitationId/resend", curator, async (req, res) => {
    const { siteId, invitationId } = invParams.parse(req.params);
    await hit(limiters.inviteSender, res.locals.user!.id, "Too many invitations sent in the last hour.");
    const invitation = await service.resendInvitation(deps, siteId, invitationId, res.locals.user!);
    res.json({ invitation, invitations: await service.listInvitations(db, siteId, res.locals.user!) });
  });

  r.delete("/sites/:siteId/invitations/:invitationId", curator, async (req, res) => {
    const { siteId, invitationId } = invParams.parse(req.params);
    await service.revokeInvitation(db, siteId, invitationId, res.locals.user!);
    res.json({ invitations: await service.listInvitations(db, siteId, res.locals.user!) });
  });

  // Public: the link itself is the credential.
  r.get("/invitations/:token", async (req, res) => {
    const { token } = tokenParams.parse(req.params);
    res.json({ invitation: await previewInvitation(db, token) });
  });

  r.post("/invitations/:token/accept", async (req, res) => {
    const { token } = tokenParams.parse(req.params);
    await hit(limiters.inviteAccept, req.ip ?? "unknown", "Too many attempts to accept invitations from this network.");
    const { userId, siteId } = await acceptInvitation(db, token, acceptInvitationBody.parse(req.body));
    if (res.locals.session) await lucia.invalidateSession(res.locals.session.id);
    const session = await lucia.createSession(userId, {});
    setCookie(res, lucia.createSessionCookie(session.id));
    res.json({ siteId });
  });

  return r;
}
