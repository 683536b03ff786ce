import { expect, request, type APIRequestContext } from "@playwright/test";
import { DEMO_PASSWORD } from "./auth";

/** The e2e server's fake mail server, read as the demo admin through /api/admin/mailbox. */
export async function adminApi(baseURL: string): Promise<APIRequestContext> {
  const api = await request.newContext({ baseURL, extraHTTPHeaders: { origin: baseURL } });
  const r = await api.post("/api/auth/sign-in", { data: { email: "admin@tideline.test", password: DEMO_PASSWORD } });
  expect(r.status()).toBe(200);
  return api;
}

type Message = { to: string; subject: string; text: string; html: string | null };

/** Waits until a message to `to` whose subject matches has arrived, and returns it. */
export async function waitForMail(api: APIRequestContext, to: string, subject: RegExp): Promise<Message> {
  let found: Message | undefined;
  await expect
    .poll(
      async () => {
        const r = await api.get("/api/admin/mailbox");
        const { messages } = (await r.json()) as { messages: Message[] };
        found = messages.find((m) => m.to.includes(to) && subject.test(m.subject));
        return !!found;
      },
      { timeout: 10_000 },
    )
    .toBe(true);
  return found!;
}

export function linkIn(m: Message, pathPart: string): string {
  const link = m.text.match(new RegExp(`https?://\\S+${pathPart}\\S+`))?.[0];
  if (!link) throw new Error(`no ${pathPart} link in: ${m.text}`);
  return link;
}

export const uniqueEmail = (what: string) => `${what}-${Date.now()}-${Math.floor(Math.random() * 1e6)}@example.test`;
