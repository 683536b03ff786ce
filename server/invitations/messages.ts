import { ROLE_LABELS, type Role } from "../../src/domain/vocab";
import { compose, type Composed } from "../mail/compose";

const when = (d: Date) => d.toISOString().slice(0, 10);

export function invitationMessage(p: { siteName: string; role: Role; inviterName: string | null; url: string; expiresAt: Date }): Composed {
  const who = p.inviterName ?? "The crew's curator";
  return compose({
    subject: `You are invited to the ${p.siteName} crew on Tideline`,
    greeting: "Hello,",
    body: [
      `${who} invites you to join the restoration crew of ${p.siteName} on Tideline as ${ROLE_LABELS[p.role].toLowerCase()}.`,
      "Tideline is where the crew records the survey, photos, test readings and repairs of the flooded switchboards.",
      `Open the link to choose your name and password. It works once and until ${when(p.expiresAt)} (7 days).`,
    ],
    action: { label: "Join the crew", url: p.url },
    footer: ["If you did not expect this, ignore it: nothing happens until the link is opened and a password is set."],
  });
}

export function addedMessage(p: { siteName: string; role: Role; inviterName: string | null; url: string }): Composed {
  const who = p.inviterName ?? "The crew's curator";
  return compose({
    subject: `You were added to the ${p.siteName} crew on Tideline`,
    greeting: "Hello,",
    body: [`${who} added you to the restoration crew of ${p.siteName} as ${ROLE_LABELS[p.role].toLowerCase()}. Sign in with your usual Tideline password.`],
    action: { label: `Open ${p.siteName}`, url: p.url },
  });
}
