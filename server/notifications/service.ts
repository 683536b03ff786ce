/**
 * E-mail about a defect, sent after the change that caused it has been saved (the
 * defect workflow calls these). Each recipient's switch is respected; a failure is
 * logged and reported in the result, never thrown, so the workflow's action stands.
 */
import { paths } from "../../src/config/paths";
import { DEFECT_SEVERITY_LABELS, DEFECT_STATUS_LABELS } from "../../src/domain/vocab";
import type { NotificationKey } from "../../src/schemas/account";
import { compose, type Composed } from "../mail/compose";
import type { MailDeps } from "../mail/mailer";
import { sendOrQueue } from "../mail/outbox";
import { optedOut } from "./prefs-repository";
import { addressesOf, curatorIds, defectForNotice, isMember } from "./repository";

export interface NotifyResult {
  sent: string[];
  skipped: Array<{ userId: string; reason: "switched_off" | "is_actor" | "no_address" | "not_on_crew" | "suspended" }>;
  failed: Array<{ userId: string; error: string }>;
}

/** Where a defect opens in the client (the defect register's detail page). */
export const defectUrl = (publicUrl: string, siteId: string, defectId: string) =>
  `${publicUrl}${paths.defect.href(siteId, defectId)}`;

const loadDefect = (deps: MailDeps, defectId: string) => defectForNotice(deps.db, defectId);
type Defect = NonNullable<Awaited<ReturnType<typeof loadDefect>>>;

function facts(d: Defect): string[] {
  const where = d.designation ? `${d.boardName}, position ${d.designation}` : d.boardName;
  return [
    `Where: ${where} (${d.siteName})`,
    `Severity: ${DEFECT_SEVERITY_LABELS[d.severity]}`,
    `Status: ${DEFECT_STATUS_LABELS[d.status]}`,
    ...(d.safetyCritical ? ["Marked safety-critical"] : []),
    ...(d.blocksEnergisation ? ["Blocks re-energisation of its section"] : []),
    ...(d.dueOn ? [`Due: ${d.dueOn}`] : []),
  ];
}

const footer = (publicUrl: string, what: string) => [
  `You get this because ${what}. Switch these e-mails off on your account page: ${publicUrl}${paths.account.href()}`,
  "Tideline records and computes; it never declares equipment safe. A qualified person decides.",
];

async function sendTo(
  deps: MailDeps,
  userIds: string[],
  key: NotificationKey,
  actorId: string | null,
  build: (name: string) => Composed,
): Promise<NotifyResult> {
  const out: NotifyResult = { sent: [], skipped: [], failed: [] };
  const off = await optedOut(deps.db, userIds, key);
  const users = userIds.length ? await addressesOf(deps.db, userIds) : [];
  for (const id of userIds) {
    const u = users.find((x) => x.id === id);
    if (id === actorId) out.skipped.push({ userId: id, reason: "is_actor" });
    else if (off.has(id)) out.skipped.push({ userId: id, reason: "switched_off" });
    else if (!u) out.skipped.push({ userId: id, reason: "no_address" });
    else if (u.suspendedAt) out.skipped.push({ userId: id, reason: "suspended" });
    else {
      // Through the outbox when the app runs its job queue: "sent" then means queued for delivery.
      const r = await sendOrQueue(deps, { to: u.email, ...build(u.name) });
      if (r.ok) out.sent.push(id);
      else out.failed.push({ userId: id, error: r.error });
    }
  }
  return out;
}

/** To the defect's assignee, unless they assigned it to themselves or switched this off. */
export async function notifyDefectAssigned(
  deps: MailDeps,
  p: { defectId: string; actorId: string | null },
): Promise<NotifyResult> {
  const d = await loadDefect(deps, p.defectId);
  if (!d?.assigneeId) return { sent: [], skipped: [], failed: [] };
  // Someone since taken off the crew hears nothing more about the site.
  if (!(await isMember(deps.db, d.siteId, d.assigneeId)))
    return { sent: [], skipped: [{ userId: d.assigneeId, reason: "not_on_crew" }], failed: [] };
  return sendTo(deps, [d.assigneeId], "defect_assigned", p.actorId, (name) =>
    compose({
      subject: `Assigned to you: ${d.title} (${d.boardName})`,
      greeting: `Hello ${name},`,
      body: [`This defect on ${d.siteName} is now yours to work on:`, [d.title, ...facts(d)]],
      action: { label: "Open the defect", url: defectUrl(deps.publicUrl, d.siteId, d.id) },
      footer: footer(deps.publicUrl, "a defect was assigned to you"),
    }),
  );
}

/** To the site's curators (who verify repairs), except whoever repaired it and whoever made the change. */
export async function notifyAwaitingVerification(
  deps: MailDeps,
  p: { defectId: string; actorId: string | null },
): Promise<NotifyResult> {
  const d = await loadDefect(deps, p.defectId);
  if (!d) return { sent: [], skipped: [], failed: [] };
  const ids = (await curatorIds(deps.db, d.siteId)).filter((id) => id !== d.repairedBy);
  return sendTo(deps, ids, "awaiting_verification", p.actorId, (name) =>
    compose({
      subject: `Waiting for your check: ${d.title} (${d.boardName})`,
      greeting: `Hello ${name},`,
      body: [
        `A repair on ${d.siteName} is ready for a curator to verify:`,
        [d.title, ...facts(d)],
        "Check the work and the readings before closing it.",
      ],
      action: { label: "Verify the repair", url: defectUrl(deps.publicUrl, d.siteId, d.id) },
      footer: footer(deps.publicUrl, "you are a curator of this site"),
    }),
  );
}
