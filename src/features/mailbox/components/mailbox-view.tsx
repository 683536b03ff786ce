import { useState } from "react";
import { Button } from "../../../components/button";
import { EmptyState, ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { ApiError } from "../../../lib/api-client";
import type { MailboxMessage } from "../../../schemas/mailbox";
import { useEmptyMailbox, useMailbox } from "../api";
import { stamp as time } from "../../../lib/clock";

const linksIn = (text: string) => [...new Set(text.match(/https?:\/\/[^\s<>"]+/g) ?? [])];

function Message({ m }: { m: MailboxMessage }) {
  const [part, setPart] = useState<"text" | "html">("text");
  // The HTML part in a sandbox with no scripts; <base target=_top> lets a click on its link open here.
  const srcDoc = m.html ? `<base target="_top">${m.html}` : "";
  return (
    <article
      aria-labelledby="msg-subject"
      className="min-w-0 space-y-3 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700"
    >
      <h2 id="msg-subject" className="text-lg font-semibold">
        {m.subject || "(no subject)"}
      </h2>
      <dl className="grid grid-cols-[auto_1fr] gap-x-3 text-sm">
        <dt className="text-mist">From</dt>
        <dd className="break-all">{m.from}</dd>
        <dt className="text-mist">To</dt>
        <dd className="break-all">{m.to}</dd>
        <dt className="text-mist">Received</dt>
        <dd>{time(m.receivedAt)}</dd>
      </dl>
      {linksIn(m.text).length > 0 && (
        <div>
          <h3 className="font-semibold">Links in this message</h3>
          <ul className="list-disc pl-5">
            {linksIn(m.text).map((l) => (
              <li key={l}>
                <a href={l} className="break-all">
                  {l}
                </a>
              </li>
            ))}
          </ul>
        </div>
      )}
      <div role="group" aria-label="Which part to show" className="flex gap-2">
        <Button
          tone={part === "text" ? "primary" : "quiet"}
          aria-pressed={part === "text"}
          onClick={() => setPart("text")}
        >
          Text part
        </Button>
        <Button
          tone={part === "html" ? "primary" : "quiet"}
          aria-pressed={part === "html"}
          onClick={() => setPart("html")}
          disabled={!m.html}
        >
          {m.html ? "HTML part" : "No HTML part"}
        </Button>
      </div>
      {part === "html" && m.html ? (
        // Mounted only when asked for: a sandboxed frame cannot run scripts, nor be scanned by them.
        <iframe
          title={`HTML part of “${m.subject}”`}
          sandbox="allow-top-navigation-by-user-activation"
          srcDoc={srcDoc}
          className="h-96 w-full rounded-md bg-white"
        />
      ) : (
        <pre className="max-h-96 overflow-auto whitespace-pre-wrap break-words rounded-md bg-hull-900 p-3 font-mono text-sm">
          {m.text}
        </pre>
      )}
    </article>
  );
}

export function MailboxView() {
  const box = useMailbox();
  const empty = useEmptyMailbox();
  const [openId, setOpenId] = useState<string | null>(null);
  if (box.isPending) return <Loading what="Opening the mailbox" />;
  if (box.isError && box.error instanceof ApiError && box.error.status === 404)
    return (
      <EmptyState title="No local mailbox">
        E-mail goes to the real mail server named by SMTP_URL, so nothing is kept here.
      </EmptyState>
    );
  if (box.isLoadingError || serverRefused(box.error)) return <ErrorPanel error={box.error} />;
  const open = box.data.find((m) => m.id === openId) ?? box.data[0];
  if (!open)
    return (
      <EmptyState title="No messages yet">
        Invite someone or ask for a password reset: the e-mail shows up here within a few seconds.
      </EmptyState>
    );
  return (
    <div className="grid gap-4 md:grid-cols-[20rem_1fr]">
      <div className="min-w-0 space-y-2">
        <Button tone="quiet" onClick={() => empty.mutate()} disabled={empty.isPending}>
          Empty the mailbox
        </Button>
        <ul
          aria-label="Received messages"
          className="divide-y divide-hull-700 rounded-lg bg-hull-850 ring-1 ring-hull-700"
        >
          {box.data.map((m) => (
            <li key={m.id}>
              <button
                type="button"
                aria-current={m.id === open.id ? "true" : undefined}
                onClick={() => setOpenId(m.id)}
                className={`block min-h-11 w-full p-3 text-left hover:bg-hull-800 ${m.id === open.id ? "border-l-4 border-brass-400 bg-hull-800" : ""}`}
              >
                <span className="block font-semibold">{m.subject || "(no subject)"}</span>
                <span className="block break-all text-sm text-mist">
                  to {m.to} · {time(m.receivedAt)}
                </span>
              </button>
            </li>
          ))}
        </ul>
      </div>
      <Message key={open.id} m={open} />
    </div>
  );
}
