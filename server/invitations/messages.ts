import { localMinute } from "../../src/domain/local-time";
import { ROLE_LABELS, type Role } from "../../src/domain/vocab";
import { compose, type Composed } from "../mail/compose";

/** The link's last minute on the site's clock, the zone named: "2026-12-12 13:40 (Europe/Lisbon)". */
const when = (d: Date, zone: string) => `${localMinute(d, zone)} (${zone})`;

export function invitationMessage(p: {
  siteName: string;
  role: Role;
  inviterName: string | null;
  url: string;
  expiresAt: Date;
  timeZone: string;
}): Composed {
  const who = p.inviterName ?? "The crew's curator";
  return compose({
    subject: `You are invited to the ${p.siteName} crew on Tideline`,
    greeting: "Hello,",
    body: [
      `${who} invites you to join the restoration crew of ${p.siteName} on Tideline as ${ROLE_LABELS[p.role].toLowerCase()}.`,
      "Tideline is where the crew records the survey, photos, test readings and repairs of the flooded switchboards.",
      `Open the link to accept. It works once and until ${when(p.expiresAt, p.timeZone)} (7 days). If you are new to Tideline you choose your name and password there; if you already have an account, you confirm it with your password.`,
    ],
    action: { label: "Join the crew", url: p.url },
    footer: ["If you did not expect this, ignore it: nothing happens until the link is opened and accepted."],
  });
}
