import { z } from "zod";

/** A message kept by the local fake mail server (development and tests only). */
export const mailboxMessage = z.object({
  id: z.string(),
  receivedAt: z.string(),
  from: z.string(),
  to: z.string(),
  subject: z.string(),
  text: z.string(),
  html: z.string().nullable(),
});
export type MailboxMessage = z.infer<typeof mailboxMessage>;
export const mailboxResponse = z.object({ messages: z.array(mailboxMessage) });
