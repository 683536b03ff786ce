/**
 * Overdue watch checks: for every stage live under watch whose next check is overdue, one
 * e-mail to the stage's qualified person per overdue check (idempotent: the notice is
 * claimed in rts_overdue_notices under (stage, attempt, due time) before it is sent, so a
 * second run, or two runs at once, send nothing more). Respects the person's
 * "watch_overdue" switch. Run by `npm run rts:overdue` from a scheduler.
 */
import { localMinute } from "../../src/domain/local-time";
import { watchSchedule } from "../../src/domain/rts-watch";
import { paths } from "../../src/config/paths";
import { compose } from "../mail/compose";
import type { MailDeps } from "../mail/mailer";
import { accountById } from "../auth/service";
import { optedOutOf } from "../notifications/prefs-service";
import * as repo from "./repository";

export interface OverdueResult {
  checked: number;
  overdue: number;
  sent: number;
  failed: number;
  skipped: number;
}

export async function sendOverdueWatchNotices(deps: MailDeps, now: Date): Promise<OverdueResult> {
  const out: OverdueResult = { checked: 0, overdue: 0, sent: 0, failed: 0, skipped: 0 };
  for (const s of await repo.energisedStages(deps.db)) {
    out.checked++;
    if (!s.energisedAt) continue;
    const checks = (await repo.checkTimes(deps.db, s.id, s.attempt)).map((d) => d.toISOString());
    const w = watchSchedule(
      {
        energisedAt: s.energisedAt.toISOString(),
        watchHours: s.watchHours,
        checkEveryHours: s.checkEveryHours,
        checks,
      },
      now.getTime(),
    );
    if (!w.overdueSince) continue;
    out.overdue++;
    const dueAt = new Date(w.overdueSince);
    const base = { siteId: s.siteId, stageId: s.id, attempt: s.attempt, dueAt };
    const qp = s.qualifiedPersonId;
    if (!qp) {
      if (await repo.claimNotice(deps.db, { ...base, sentTo: null, outcome: "no_qualified_person" })) out.skipped++;
      continue;
    }
    const off = (await optedOutOf(deps.db, [qp], "watch_overdue")).has(qp);
    const user = await accountById(deps.db, qp);
    // A suspended account gets no e-mail (server/auth/suspension.ts); the notice says why none went.
    const outcome = user?.suspendedAt ? "suspended" : off ? "switched_off" : "sent";
    if (!(await repo.claimNotice(deps.db, { ...base, sentTo: qp, outcome }))) continue; // already noticed
    if (outcome !== "sent") {
      out.skipped++;
      continue;
    }
    if (!user) continue;
    const url = `${deps.publicUrl}${paths.rtsWatch.href(s.siteId, s.boardId, s.id)}`;
    const late = Math.max(1, Math.round((now.getTime() - dueAt.getTime()) / 60_000));
    const r = await deps.mailer.send({
      to: user.email,
      ...compose({
        subject: `Watch check overdue: ${s.name} (${s.boardName})`,
        greeting: `Hello ${user.name},`,
        body: [
          `The watch check on “${s.name}” of ${s.boardName} (${s.siteName}) was due at ${localMinute(dueAt, s.siteTimeZone)} ${s.siteTimeZone} and has not been recorded (${late} min ago).`,
          "You are named as the qualified person for this stage. Someone should look at the stage and record the check, or de-energise it.",
        ],
        action: { label: "Open the watch checks", url },
        footer: [
          `You get this because you are the qualified person for this stage. Switch these e-mails off on your account page: ${deps.publicUrl}${paths.account.href()}`,
          "Tideline records and computes; it never authorises energisation. NFPA 70E, local codes and qualified persons decide.",
        ],
      }),
    });
    if (r.ok) out.sent++;
    else {
      out.failed++;
      await repo.setNoticeOutcome(deps.db, s.id, s.attempt, dueAt, "failed", r.error);
    }
  }
  return out;
}
