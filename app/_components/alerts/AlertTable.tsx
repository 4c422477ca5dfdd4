/** Alerts as a table: level by shape + word + colour, value with σ and significance, acknowledgement form for engineers. */
import Link from "next/link";
import type { AlertRow } from "@/lib/server/dashboard/alerts.ts";
import { formatSiteTime, formatStrain } from "@/lib/plan/index.ts";
import { LevelBadge } from "../LevelBadge.tsx";
import { acknowledgeAlertAction } from "@/app/sites/[slug]/alerts/actions.ts";

export function AlertTable({ alerts, canAcknowledge, showSite, back }: { alerts: AlertRow[]; canAcknowledge: boolean | ((siteId: number) => boolean); showSite: boolean; back?: string }) {
  if (alerts.length === 0) return <p className="muted">No alerts match.</p>;
  const can = (siteId: number) => (typeof canAcknowledge === "function" ? canAcknowledge(siteId) : canAcknowledge);
  return (
    <table className="alerts">
      <thead>
        <tr>
          <th scope="col">Level</th>
          {showSite ? <th scope="col">Site</th> : null}
          <th scope="col">Element</th>
          <th scope="col">Rule</th>
          <th scope="col" className="num">Value ± σ</th>
          <th scope="col">Opened</th>
          <th scope="col">State</th>
          <th scope="col">Acknowledgement</th>
        </tr>
      </thead>
      <tbody>
        {alerts.map((a) => {
          const isRate = a.quantity.endsWith(".ratePerDay");
          return (
            <tr key={a.id} className={a.clearedAtMs ? "cleared" : undefined} data-alert-id={a.id}>
              <td>
                <LevelBadge level={a.level} />
                {a.peakLevel !== a.level ? <div className="muted small">peak {a.peakLevel}</div> : null}
              </td>
              {showSite ? (
                <td>
                  <Link href={`/sites/${a.siteSlug}/alerts`}>{a.siteName}</Link>
                </td>
              ) : null}
              <td>
                <Link href={`/sites/${a.siteSlug}/elements/${a.elementId}`}>{a.elementName}</Link>
              </td>
              <td>
                {a.ruleName}
                <div className="muted small">{a.quantity}</div>
              </td>
              <td className="num">
                {formatStrain(a.value, "ue", { signed: true })}
                {isRate ? "/day" : ""}
                {a.sigma !== null ? ` ± ${formatStrain(a.sigma, "ue", { withUnit: false })}` : ""}
                {(() => {
                  // Now: the value and σ the alert holds (its latest epoch); ever: whether it has been significant while open.
                  const now = a.sigma !== null ? Math.abs(a.value) > 1.96 * a.sigma : null;
                  const text = now === null ? (a.isSignificant ? "significant" : "not significant") : now ? "significant" : a.isSignificant ? "not significant now (was)" : "not significant";
                  return <div className={now ?? a.isSignificant ? "sig yes small" : "sig no small"}>{text}</div>;
                })()}
              </td>
              <td>{formatSiteTime(a.openedAtMs, a.timeZone)}</td>
              <td>{a.clearedAtMs ? `cleared ${formatSiteTime(a.clearedAtMs, a.timeZone)}` : a.isSignificant ? "open" : "open (watch)"}</td>
              <td>
                {a.acknowledgedAtMs ? (
                  <div className="small">
                    <strong>{a.acknowledgedBy}</strong>, {formatSiteTime(a.acknowledgedAtMs, a.timeZone)}: “{a.ackComment}”
                  </div>
                ) : (
                  <span className="muted small">not acknowledged</span>
                )}
                {can(a.siteId) && !a.clearedAtMs ? (
                  <form action={acknowledgeAlertAction} className="ack-form no-print">
                    <input type="hidden" name="slug" value={a.siteSlug} />
                    <input type="hidden" name="alertId" value={a.id} />
                    {back ? <input type="hidden" name="back" value={back} /> : null}
                    <label className="visually-hidden" htmlFor={`ack-${a.id}`}>
                      Comment for alert {a.id}
                    </label>
                    <input id={`ack-${a.id}`} name="comment" required maxLength={4000} placeholder="What was checked, what is done" size={26} />
                    <button type="submit" className="small">
                      {a.acknowledgedAtMs ? "Add note" : "Acknowledge"}
                    </button>
                  </form>
                ) : null}
              </td>
            </tr>
          );
        })}
      </tbody>
    </table>
  );
}
