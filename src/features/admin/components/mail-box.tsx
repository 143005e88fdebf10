import clsx from "clsx";
import { Fragment } from "react";
import { Link } from "react-router-dom";
import type { MailMessage } from "@shared/schemas/users";
import { paths } from "@/config/paths";
import { UtcTime } from "@/components/ui/utc-time";

export function MailList({ items, selectedId }: { items: MailMessage[]; selectedId?: string }) {
  const sorted = [...items].sort((a, b) => b.receivedAt.localeCompare(a.receivedAt));
  return (
    <ul aria-label="Messages" className="self-start divide-y divide-line overflow-hidden rounded-lg border border-line bg-surface">
      {sorted.map((m) => (
        <li key={m.id}>
          <Link
            to={paths.adminMailMessage(m.id)}
            aria-current={m.id === selectedId ? "true" : undefined}
            className={clsx("block px-4 py-2.5 text-fg no-underline hover:bg-sunken hover:text-fg", m.id === selectedId && "bg-sunken shadow-[inset_3px_0_0_var(--t-signal-fill)]")}
          >
            <span className="block font-semibold">{m.subject || "(no subject)"}</span>
            <span className="block truncate text-sm text-muted">To {m.to.join(", ")}</span>
            <span className="block text-xs text-muted">
              <UtcTime iso={m.receivedAt} />
            </span>
          </Link>
        </li>
      ))}
    </ul>
  );
}

const urlPattern = /(https?:\/\/[^\s<>"')\]]+)/g;

/** Plain-text body with web links made clickable (only http and https). */
function Linkified({ text }: { text: string }) {
  const parts = text.split(urlPattern);
  return (
    <>
      {parts.map((part, i) =>
        i % 2 === 1 ? (
          <a key={i} href={part} className="break-all" rel="noreferrer noopener">
            {part}
          </a>
        ) : (
          <Fragment key={i}>{part}</Fragment>
        ),
      )}
    </>
  );
}

export function MailMessageView({ message }: { message: MailMessage }) {
  return (
    <article aria-labelledby="mail-subject" className="rounded-lg border border-line bg-surface">
      <header className="border-b border-line px-5 py-4">
        <h2 id="mail-subject" className="text-xl font-semibold">
          {message.subject || "(no subject)"}
        </h2>
        <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-3 gap-y-0.5 text-sm">
          <dt className="text-muted">From</dt>
          <dd className="break-all">{message.from}</dd>
          <dt className="text-muted">To</dt>
          <dd className="break-all">{message.to.join(", ")}</dd>
          <dt className="text-muted">Received</dt>
          <dd>
            <UtcTime iso={message.receivedAt} seconds />
          </dd>
        </dl>
      </header>
      <div className="whitespace-pre-wrap break-words px-5 py-4 text-[0.95rem]">
        <Linkified text={message.text} />
      </div>
    </article>
  );
}
