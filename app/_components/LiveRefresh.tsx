"use client";
/**
 * Keeps a site page current: listens to GET /api/v1/sites/{slug}/events (server-sent events) and
 * re-renders the page's server components (router.refresh) when new epochs are committed. Shows a
 * small "live" indicator (shape and text, never colour alone). Refreshes are coalesced to at most
 * one per REFRESH_MIN_MS, and deferred while the tab is hidden. EventSource reconnects by itself.
 *
 *   <LiveRefresh slug={slug} />
 */
import { useEffect, useRef, useState } from "react";
import { useRouter } from "next/navigation";

const REFRESH_MIN_MS = 2000;

type LiveStatus = "connecting" | "live" | "reconnecting";

const LABEL: Record<LiveStatus, { mark: string; text: string; title: string }> = {
  connecting: { mark: "○", text: "connecting", title: "Connecting to live updates" },
  live: { mark: "●", text: "live", title: "Live: the page updates when new epochs arrive" },
  reconnecting: { mark: "◌", text: "reconnecting", title: "Live updates interrupted; reconnecting" },
};

export function LiveRefresh({ slug }: { slug: string }) {
  const router = useRouter();
  const [status, setStatus] = useState<LiveStatus>("connecting");
  const [lastEpoch, setLastEpoch] = useState<string | null>(null);
  const lastRefresh = useRef(0);
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const pending = useRef(false);

  useEffect(() => {
    const refresh = (): void => {
      if (document.visibilityState === "hidden") {
        pending.current = true;
        return;
      }
      pending.current = false;
      lastRefresh.current = Date.now();
      router.refresh();
    };
    const schedule = (): void => {
      if (timer.current) return;
      const wait = Math.max(0, lastRefresh.current + REFRESH_MIN_MS - Date.now());
      timer.current = setTimeout(() => {
        timer.current = null;
        refresh();
      }, wait);
    };
    const es = new EventSource(`/api/v1/sites/${encodeURIComponent(slug)}/events`);
    const onReady = (): void => setStatus("live");
    const onEpoch = (ev: MessageEvent<string>): void => {
      setStatus("live");
      try {
        const data = JSON.parse(ev.data) as { time?: string | null };
        if (data.time) setLastEpoch(data.time);
      } catch {
        /* the refresh is what matters */
      }
      schedule();
    };
    const onVisible = (): void => {
      if (document.visibilityState === "visible" && pending.current) schedule();
    };
    es.addEventListener("ready", onReady);
    es.addEventListener("epoch", onEpoch as EventListener);
    es.onerror = () => setStatus("reconnecting");
    es.onopen = () => setStatus("live");
    document.addEventListener("visibilitychange", onVisible);
    return () => {
      es.close();
      document.removeEventListener("visibilitychange", onVisible);
      if (timer.current) clearTimeout(timer.current);
      timer.current = null;
    };
  }, [slug, router]);

  const l = LABEL[status];
  return (
    <span
      className={`live-indicator live-${status}`}
      role="status"
      aria-live="polite"
      title={lastEpoch ? `${l.title}. Last epoch received: ${lastEpoch}` : l.title}
      style={{ display: "inline-flex", alignItems: "center", gap: "0.3em", fontSize: "0.85em", padding: "0.1em 0.5em", border: "1px solid currentColor", borderRadius: "1em", whiteSpace: "nowrap" }}
    >
      <span aria-hidden="true">{l.mark}</span>
      <span>{l.text}</span>
    </span>
  );
}
