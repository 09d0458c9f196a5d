"use client";
// The signed-in navigation at every width: inline links from 768 px up; below that a "Menu"
// button that folds the links into a panel under the header, so on a phone the navigation takes
// one line instead of a third of the screen. The panel closes when a link is followed or Escape
// is pressed. Also shows an honest "offline" strip when the browser reports no network (the
// service worker serves the shell from its cache; live values are never shown as live then).
import Link from "next/link";
import { usePathname } from "next/navigation";
import { useEffect, useId, useState, useSyncExternalStore } from "react";
import clsx from "clsx";
import { NavLinks, type NavItem } from "./nav-links";

function subscribeOnline(cb: () => void) {
  window.addEventListener("online", cb);
  window.addEventListener("offline", cb);
  return () => {
    window.removeEventListener("online", cb);
    window.removeEventListener("offline", cb);
  };
}

export function useOnline(): boolean {
  return useSyncExternalStore(subscribeOnline, () => navigator.onLine, () => true);
}

export function NavMenu({ items }: { items: NavItem[] }) {
  const [open, setOpen] = useState(false);
  const pathname = usePathname();
  const panelId = useId();
  const current = items.find((i) => pathname === i.href || pathname.startsWith(`${i.href}/`));

  useEffect(() => {
    if (!open) return;
    const onKey = (e: KeyboardEvent) => {
      if (e.key === "Escape") setOpen(false);
    };
    window.addEventListener("keydown", onKey);
    return () => window.removeEventListener("keydown", onKey);
  }, [open]);

  return (
    <>
      <div className="hidden md:block">
        <NavLinks items={items} />
      </div>
      <button
        type="button"
        className="inline-flex min-h-11 items-center gap-2 rounded border border-paper-line bg-paper-raised px-3 text-sm text-ink md:hidden"
        aria-expanded={open}
        aria-controls={panelId}
        onClick={() => setOpen((o) => !o)}
        data-testid="nav-menu-button"
      >
        <svg viewBox="0 0 16 16" className="h-4 w-4" aria-hidden="true">
          <rect x="2" y="3" width="12" height="1.6" rx="0.8" fill="currentColor" />
          <rect x="2" y="7.2" width="12" height="1.6" rx="0.8" fill="currentColor" />
          <rect x="2" y="11.4" width="12" height="1.6" rx="0.8" fill="currentColor" />
        </svg>
        Menu{current ? <span className="text-ink-soft">· {current.label}</span> : null}
      </button>
      {open ? (
        <nav id={panelId} aria-label="Main" className="order-last w-full md:hidden" data-testid="nav-menu-panel">
          <ul className="grid grid-cols-2 gap-1 pb-2">
            {items.map((item) => {
              const active = item === current;
              return (
                <li key={item.href}>
                  <Link
                    href={item.href}
                    onClick={() => setOpen(false)}
                    aria-current={active ? "page" : undefined}
                    className={clsx(
                      "flex min-h-11 items-center rounded px-3 text-sm",
                      active ? "bg-brand text-white" : "bg-paper text-ink hover:bg-paper-sunk",
                    )}
                  >
                    {item.label}
                  </Link>
                </li>
              );
            })}
          </ul>
        </nav>
      ) : null}
    </>
  );
}

/** A strip under the header while the browser is offline: what is on screen may be old. */
export function OfflineNotice() {
  const online = useOnline();
  if (online) return null;
  return (
    <div role="status" className="border-b border-paper-line bg-silent-soft px-4 py-1.5 text-sm text-ink" data-testid="offline-notice">
      Offline — no connection to Stillfield. Values on this page are not live and may be old; they update when the connection returns.
    </div>
  );
}
