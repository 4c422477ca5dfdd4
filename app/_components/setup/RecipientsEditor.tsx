"use client";
/**
 * Mail recipients of the site (GET/POST …/recipients, PATCH/DELETE …/recipients/{id}): one form per
 * recipient (Enter saves that row; errors shown on the row), and a form to add one.
 */
import { useRef, useState } from "react";
import { LEVELS } from "@/lib/triggers/rule.ts";
import type { RecipientJson } from "@/lib/server/mail/recipients.ts";

type RowState = { busy: boolean; message: string | null; error: string | null; confirming: boolean };
type Reply = { ok: true; recipient: RecipientJson } | { ok: false; message: string };

const IDLE: RowState = { busy: false, message: null, error: null, confirming: false };
const LEVEL_TEXT: Record<string, string> = { review: "review, alert and limit", alert: "alert and limit", limit: "limit only" };

async function send(url: string, method: string, body?: unknown): Promise<Reply> {
  const r = await fetch(url, { method, headers: body === undefined ? undefined : { "Content-Type": "application/json" }, body: body === undefined ? undefined : JSON.stringify(body) });
  const j = (await r.json().catch(() => null)) as { recipient?: RecipientJson; error?: { message: string }; errors?: { field: string | null; message: string }[] } | null;
  if (r.ok && j?.recipient) return { ok: true, recipient: j.recipient };
  const detail = j?.errors?.map((e) => `${e.field ? `${e.field}: ` : ""}${e.message}`).join("; ");
  return { ok: false, message: detail || j?.error?.message || `HTTP ${r.status}` };
}

export function RecipientsEditor({ slug, recipients, hasSmtp, digestMinutes }: { slug: string; recipients: RecipientJson[]; hasSmtp: boolean; digestMinutes: number }) {
  const base = `/api/v1/sites/${encodeURIComponent(slug)}/recipients`;
  const [rows, setRows] = useState(recipients);
  const [state, setState] = useState<Record<number, RowState>>({});
  const [email, setEmail] = useState("");
  const [minLevel, setMinLevel] = useState<string>("review");
  const [digest, setDigest] = useState(false);
  const [addMsg, setAddMsg] = useState<{ ok: boolean; text: string } | null>(null);
  const [adding, setAdding] = useState(false);
  const emailRef = useRef<HTMLInputElement>(null);

  const setRow = (id: number, s: Partial<RowState>) => setState((all) => ({ ...all, [id]: { ...(all[id] ?? IDLE), ...s } }));

  async function save(id: number, form: HTMLFormElement) {
    const fd = new FormData(form);
    setRow(id, { busy: true, message: null, error: null });
    const r = await send(`${base}/${id}`, "PATCH", { minLevel: String(fd.get("minLevel")), digest: fd.get("digest") === "on" });
    if (r.ok) {
      setRows((rs) => rs.map((x) => (x.id === id ? r.recipient : x)));
      setRow(id, { busy: false, message: "Saved", error: null });
    } else setRow(id, { busy: false, message: null, error: r.message });
  }

  async function remove(id: number) {
    setRow(id, { busy: true, error: null, message: null });
    const r = await send(`${base}/${id}`, "DELETE");
    if (r.ok) {
      setRows((rs) => rs.filter((x) => x.id !== id));
      setAddMsg({ ok: true, text: `${r.recipient.email} removed; no more mails go to this address.` });
      emailRef.current?.focus();
    } else setRow(id, { busy: false, error: r.message, confirming: false });
  }

  async function add() {
    setAdding(true);
    const r = await send(base, "POST", { email, minLevel, digest });
    setAdding(false);
    if (!r.ok) {
      setAddMsg({ ok: false, text: r.message });
      emailRef.current?.focus();
      return;
    }
    setRows((rs) => [...rs, r.recipient].sort((a, b) => a.email.localeCompare(b.email) || a.id - b.id));
    setAddMsg({ ok: true, text: `${r.recipient.email} added: mails from ${r.recipient.minLevel}${r.recipient.digest ? ", as a digest" : ""}.` });
    setEmail("");
    emailRef.current?.focus();
  }

  return (
    <div className="grid-2" style={{ marginTop: 16 }}>
      <section className="panel" aria-labelledby="recipients-h">
        <h2 id="recipients-h">Mail recipients ({rows.length})</h2>
        <p className="muted small">
          Who is mailed when an alert opens or escalates, from which level on. A digest collects a recipient&apos;s mails into one every {digestMinutes} minutes.{" "}
          {hasSmtp ? "Mails go out over the configured mail server." : "No mail server is configured (SMTP_URL): mails are kept in the outbox on the Alerts page."}
        </p>
        {rows.length === 0 ? <p className="muted">No recipient yet: alerts are recorded, but nobody is mailed.</p> : null}
        <ul className="rule-list" aria-label="Mail recipients">
          {rows.map((r) => {
            const st = state[r.id];
            return (
              <li key={r.id} data-recipient={r.email}>
                <form
                  className="form-row"
                  onSubmit={(e) => {
                    e.preventDefault();
                    void save(r.id, e.currentTarget);
                  }}
                  onKeyDown={(e) => {
                    // Browsers submit on Enter only from text fields; this row has a list and a box.
                    const t = e.target as HTMLElement;
                    if (e.key === "Enter" && (t instanceof HTMLSelectElement || (t instanceof HTMLInputElement && t.type === "checkbox"))) {
                      e.preventDefault();
                      e.currentTarget.requestSubmit();
                    }
                  }}
                >
                  <div>
                    <strong>{r.email}</strong>
                    <span className="small muted">mails at {LEVEL_TEXT[r.minLevel] ?? r.minLevel}</span>
                  </div>
                  <div>
                    <label htmlFor={`rcpt-level-${r.id}`}>From level</label>
                    <select id={`rcpt-level-${r.id}`} name="minLevel" defaultValue={r.minLevel}>
                      {LEVELS.map((l) => (
                        <option key={l} value={l}>
                          {l}
                        </option>
                      ))}
                    </select>
                  </div>
                  <label className="check">
                    <input type="checkbox" name="digest" defaultChecked={r.digest} aria-label={`${r.email}: collect mails into a digest`} /> Digest
                  </label>
                  <div>
                    <span>
                      <button type="submit" className="small" disabled={st?.busy}>
                        Save
                      </button>{" "}
                      {st?.confirming ? (
                        <>
                          <button type="button" className="small" disabled={st?.busy} onClick={() => void remove(r.id)} autoFocus>
                            Remove {r.email}
                          </button>{" "}
                          <button type="button" className="secondary small" onClick={() => setRow(r.id, { confirming: false })}>
                            Keep
                          </button>
                        </>
                      ) : (
                        <button type="button" className="secondary small" disabled={st?.busy} onClick={() => setRow(r.id, { confirming: true, message: null, error: null })}>
                          Remove…
                        </button>
                      )}
                    </span>
                    {st?.message ? (
                      <span className="small" role="status">
                        {st.message}
                      </span>
                    ) : null}
                    {st?.error ? (
                      <span className="small error" role="alert">
                        {st.error}
                      </span>
                    ) : null}
                  </div>
                </form>
              </li>
            );
          })}
        </ul>
      </section>
      <form
        className="panel"
        aria-labelledby="recipient-new-h"
        onSubmit={(e) => {
          e.preventDefault();
          void add();
        }}
      >
        <h2 id="recipient-new-h">New recipient</h2>
        {addMsg ? (
          <p className={addMsg.ok ? "notice" : "notice bad"} role={addMsg.ok ? "status" : "alert"}>
            {addMsg.text}
          </p>
        ) : null}
        <label htmlFor="rcpt-email">E-mail address</label>
        <input id="rcpt-email" ref={emailRef} type="email" value={email} onChange={(e) => setEmail(e.target.value)} required size={36} autoComplete="off" />
        <label htmlFor="rcpt-level">Mail from level</label>
        <select id="rcpt-level" value={minLevel} onChange={(e) => setMinLevel(e.target.value)}>
          {LEVELS.map((l) => (
            <option key={l} value={l}>
              {l} — {LEVEL_TEXT[l]}
            </option>
          ))}
        </select>
        <label className="check block">
          <input type="checkbox" checked={digest} onChange={(e) => setDigest(e.target.checked)} /> Collect into a digest instead of one mail per event
        </label>
        <div style={{ marginTop: 10 }}>
          <button type="submit" disabled={adding}>
            Add recipient
          </button>
        </div>
      </form>
    </div>
  );
}
