/** Filters (a GET form: works without JavaScript, submits with Enter), the alert table and the outbox. */
import type { AlertRow, OutboxRow } from "@/lib/server/dashboard/alerts.ts";
import { formatSiteTime } from "@/lib/plan/index.ts";
import { AlertTable } from "./AlertTable.tsx";

export type AlertFilters = { state: "open" | "cleared" | "all"; level: "" | "review" | "alert" | "limit"; site: string; element: string };

export function parseAlertFilters(sp: Record<string, string | string[] | undefined>): AlertFilters {
  const one = (k: string) => {
    const v = sp[k];
    return (Array.isArray(v) ? v[0] : v) ?? "";
  };
  const state = one("state");
  const level = one("level");
  return {
    state: state === "cleared" || state === "all" ? state : "open",
    level: level === "review" || level === "alert" || level === "limit" ? level : "",
    site: one("site"),
    element: one("element"),
  };
}

export function AlertsView(p: {
  action: string;
  filters: AlertFilters;
  alerts: AlertRow[];
  outbox: OutboxRow[];
  sites?: { slug: string; name: string }[];
  elements?: { id: number; name: string }[];
  canAcknowledge: boolean | ((siteId: number) => boolean);
  back: string;
  notice: string | null;
  errorText: string | null;
}) {
  return (
    <>
      {p.notice ? (
        <p className="notice" role="status">
          {p.notice}
        </p>
      ) : null}
      {p.errorText ? (
        <p className="notice bad" role="alert">
          {p.errorText}
        </p>
      ) : null}
      <form method="get" action={p.action} className="filters no-print" aria-label="Filter alerts">
        <label>
          State
          <select name="state" defaultValue={p.filters.state}>
            <option value="open">Open</option>
            <option value="cleared">Past (cleared)</option>
            <option value="all">All</option>
          </select>
        </label>
        <label>
          Level at least
          <select name="level" defaultValue={p.filters.level}>
            <option value="">Any</option>
            <option value="review">Review</option>
            <option value="alert">Alert</option>
            <option value="limit">Limit</option>
          </select>
        </label>
        {p.sites ? (
          <label>
            Site
            <select name="site" defaultValue={p.filters.site}>
              <option value="">All my sites</option>
              {p.sites.map((s) => (
                <option key={s.slug} value={s.slug}>
                  {s.name}
                </option>
              ))}
            </select>
          </label>
        ) : null}
        {p.elements ? (
          <label>
            Element
            <select name="element" defaultValue={p.filters.element}>
              <option value="">All elements</option>
              {p.elements.map((e) => (
                <option key={e.id} value={String(e.id)}>
                  {e.name}
                </option>
              ))}
            </select>
          </label>
        ) : null}
        <button type="submit">Show</button>
      </form>
      <AlertTable alerts={p.alerts} canAcknowledge={p.canAcknowledge} showSite={!!p.sites} back={p.back} />
      <p className="muted small">
        Levels: ◆ review, ▲ alert, ■ limit. “Not significant” alerts crossed a level within the survey precision (|value| ≤ 1.96σ); they are shown, never hidden.
      </p>
      <section className="panel" aria-labelledby="outbox-h">
        <h2 id="outbox-h">Outbox</h2>
        {p.outbox.length === 0 ? (
          <p className="muted">No mail waiting. Mails are kept here when no SMTP server is configured (SMTP_URL), and when delivery failed.</p>
        ) : (
          <>
            <p className="muted small">No SMTP server is configured (or delivery failed): these mails were not sent. Forward them by hand if needed.</p>
            <table>
              <thead>
                <tr>
                  <th scope="col">Created</th>
                  <th scope="col">To</th>
                  <th scope="col">Subject</th>
                  <th scope="col">Status</th>
                </tr>
              </thead>
              <tbody>
                {p.outbox.map((m) => (
                  <tr key={m.id}>
                    <td>{formatSiteTime(m.createdAtMs, m.timeZone)}</td>
                    <td className="small">{m.recipients.join(", ")}</td>
                    <td>
                      <details>
                        <summary>{m.subject}</summary>
                        <pre className="mail-body">{m.body}</pre>
                      </details>
                    </td>
                    <td>{m.status}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </>
        )}
      </section>
    </>
  );
}
