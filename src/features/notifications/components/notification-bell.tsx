import clsx from "clsx";
import { useEffect, useId, useRef, useState } from "react";
import { Link } from "react-router-dom";
import { UtcTime } from "@/components/ui/utc-time";
import { buttonClass } from "@/components/ui/button";
import { useMarkRead, useNotifications } from "../api/notifications";

/** A bell with the unread count in the header; opens the latest notices. Each notice links to its page. */
export function NotificationBell() {
  const { data } = useNotifications(true);
  const mark = useMarkRead();
  const [open, setOpen] = useState(false);
  const panelId = useId();
  const ref = useRef<HTMLDivElement>(null);
  const unread = data?.unreadCount ?? 0;

  useEffect(() => {
    if (!open) return;
    const onKey = (e: KeyboardEvent) => e.key === "Escape" && setOpen(false);
    const onClick = (e: MouseEvent) => ref.current && !ref.current.contains(e.target as Node) && setOpen(false);
    document.addEventListener("keydown", onKey);
    document.addEventListener("mousedown", onClick);
    return () => {
      document.removeEventListener("keydown", onKey);
      document.removeEventListener("mousedown", onClick);
    };
  }, [open]);

  return (
    <div className="relative" ref={ref}>
      <button
        type="button"
        className={buttonClass("secondary", "sm", "relative")}
        aria-expanded={open}
        aria-controls={panelId}
        aria-label={unread ? `Notices, ${unread} unread` : "Notices"}
        data-testid="notification-bell"
        onClick={() => setOpen((o) => !o)}
      >
        <svg aria-hidden viewBox="0 0 16 16" className="size-4 fill-none stroke-current" strokeWidth="1.5">
          <path d="M4 11V7a4 4 0 0 1 8 0v4l1.2 1.5H2.8z" />
          <path d="M6.5 14a1.6 1.6 0 0 0 3 0" />
        </svg>
        {unread ? (
          <span className="num rounded-full bg-signal-fill px-1.5 text-xs font-bold text-[#2a1500]" data-testid="unread-count">
            {unread > 99 ? "99+" : unread}
          </span>
        ) : null}
      </button>
      {open ? (
        <div id={panelId} role="region" aria-label="Notices" className="absolute right-0 z-40 mt-2 w-[min(26rem,90vw)] rounded-lg border border-line bg-surface shadow-lg">
          <div className="flex items-center justify-between border-b border-line px-3 py-2">
            <h2 className="font-semibold">Notices</h2>
            {unread ? (
              <button type="button" className="text-sm font-semibold text-accent underline-offset-2 hover:underline" onClick={() => mark.mutate({ all: true })}>
                Mark all as read
              </button>
            ) : null}
          </div>
          {!data || data.items.length === 0 ? (
            <p className="px-3 py-4 text-sm text-muted">No notices yet. Submissions, decisions and releases that concern you appear here.</p>
          ) : (
            <ul className="max-h-[60vh] overflow-y-auto">
              {data.items.map((n) => (
                <li key={n.id} className="border-b border-line/70 last:border-b-0">
                  <Link
                    to={n.link}
                    className={clsx("block px-3 py-2 text-fg no-underline hover:bg-sunken", !n.readAt && "bg-sunken/50")}
                    onClick={() => {
                      if (!n.readAt) mark.mutate({ ids: [n.id] });
                      setOpen(false);
                    }}
                  >
                    <span className="flex items-start gap-2">
                      <span aria-hidden className={clsx("mt-1.5 size-2 shrink-0 rounded-full", n.readAt ? "border border-line" : "bg-signal-fill")} />
                      <span className="min-w-0">
                        <span className={clsx("block", !n.readAt && "font-semibold")}>
                          {n.title}
                          {!n.readAt ? <span className="sr-only"> (unread)</span> : null}
                        </span>
                        <span className="line-clamp-2 block text-sm text-muted">{n.body}</span>
                        <span className="block text-xs text-muted">
                          <UtcTime iso={n.createdAt} />
                        </span>
                      </span>
                    </span>
                  </Link>
                </li>
              ))}
            </ul>
          )}
        </div>
      ) : null}
    </div>
  );
}
