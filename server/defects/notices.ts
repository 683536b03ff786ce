/**
 * E-mails what a committed defect change asked for (`ctx.notices`, filled by assign() and
 * transition()), after the answer has gone out: a slow or failing mail server never delays or
 * undoes the change (the notifier logs failures). Any route whose use case moves a defect —
 * the defect routes, the parts workflow — calls this once its transaction has committed.
 */
import type { MailDeps } from "../mail/mailer";
import { notifyAwaitingVerification, notifyDefectAssigned } from "../notifications/service";
import { log } from "../log";
import type { Ctx } from "./service";

export function sendDefectNotices(mail: MailDeps | undefined, ctx: Ctx) {
  if (!mail || !ctx.notices?.length) return;
  const notices = ctx.notices;
  void (async () => {
    for (const n of notices) {
      const p = { defectId: n.defectId, actorId: ctx.actor.id };
      await (n.kind === "assigned" ? notifyDefectAssigned(mail, p) : notifyAwaitingVerification(mail, p));
    }
  })().catch((e) => log.error({ err: e }, "defect notification failed"));
}
