import { z } from "zod";
import { text } from "./common";

/** A message kept by the local fake mail server (development and tests only). */
export const mailboxMessage = z.object({
  id: text(),
  receivedAt: text(),
  from: text(),
  to: text(),
  subject: text(),
  text: text(),
  html: text().nullable(),
});
export type MailboxMessage = z.infer<typeof mailboxMessage>;
export const mailboxResponse = z.object({ messages: z.array(mailboxMessage) });
