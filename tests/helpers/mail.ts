import type { Db } from "../../server/db";
import type { DefectStatus } from "../../src/domain/vocab";
import { startFakeSmtp, type FakeSmtp, type StoredMessage } from "../../server/mail/fake-smtp";
import { smtpMailer } from "../../server/mail/mailer";
import { startTestServer, type TestServer } from "./http";

/** The app over HTTP with real SMTP to the local fake server, as in development. */
export async function startMailTestServer(
  db: Db,
): Promise<{ server: TestServer; smtp: FakeSmtp; close(): Promise<void> }> {
  const smtp = await startFakeSmtp({ port: 0 });
  const mailer = smtpMailer({ url: smtp.url });
  const server = await startTestServer({ db, mailer, mailbox: smtp.mailbox });
  return {
    server,
    smtp,
    async close() {
      await server.close();
      mailer.close();
      await smtp.stop();
    },
  };
}

/** The first link to this server in the message's text part. */
export function linkIn(m: StoredMessage, base: string): string {
  const found = m.text.match(new RegExp(`${base.replace(/[.*+?^${}()|[\]\\]/g, "\\$&")}/[^\\s]+`));
  if (!found) throw new Error(`no link to ${base} in: ${m.text}`);
  return found[0];
}

export const tokenOf = (link: string) => link.split("/").pop()!;

/** Rows the defect notifications and the weekly summary read. */
export async function makeBoard(db: Db, siteId: string, name = "Main switchboard") {
  const board = await db.insertInto("boards").values({ siteId, name }).returning("id").executeTakeFirstOrThrow();
  const position = await db
    .insertInto("positions")
    .values({ siteId, boardId: board.id, designation: "2-14", kind: "molded_case_breaker", gridRow: 1, gridCol: 1 })
    .returning("id")
    .executeTakeFirstOrThrow();
  const component = await db
    .insertInto("components")
    .values({ siteId, positionId: position.id, kind: "molded_case_breaker" })
    .returning("id")
    .executeTakeFirstOrThrow();
  return { boardId: board.id, positionId: position.id, componentId: component.id };
}

export async function makeDefect(
  db: Db,
  v: {
    siteId: string;
    boardId: string;
    positionId?: string;
    title?: string;
    assigneeId?: string | null;
    repairedBy?: string | null;
    status?: DefectStatus;
    blocksEnergisation?: boolean;
    safetyCritical?: boolean;
    createdAt?: Date;
    closedAt?: Date | null;
  },
) {
  return db
    .insertInto("defects")
    .values({
      siteId: v.siteId,
      boardId: v.boardId,
      positionId: v.positionId ?? null,
      title: v.title ?? "Tracking on the line-side terminals",
      category: "insulation",
      severity: "impaired",
      assigneeId: v.assigneeId ?? null,
      repairedBy: v.repairedBy ?? null,
      status: v.status ?? "raised",
      blocksEnergisation: v.blocksEnergisation ?? false,
      safetyCritical: v.safetyCritical ?? false,
      createdAt: v.createdAt ?? new Date(),
      closedAt: v.closedAt ?? null,
    })
    .returning("id")
    .executeTakeFirstOrThrow();
}
