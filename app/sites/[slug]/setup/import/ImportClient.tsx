"use client";
/**
 * The import steps in the browser: the file is read and converted here (lib/formats/mapped-csv.ts,
 * pure), so the preview is immediate; only the converted epoch CSV goes to the server. Server errors
 * name lines of the converted CSV and are mapped back to the source lines with the line map.
 */
import { useMemo, useState } from "react";
import { DateTime } from "luxon";
import {
  applyColumnMapping,
  EPOCH_COLUMN_OF,
  LENGTH_UNITS,
  MAPPED_FIELDS,
  previewColumns,
  REQUIRED_FIELDS,
  sourceLineOf,
  suggestMapping,
  TIME_FORMATS,
  type ColumnMapping,
  type MappedField,
  type TimeFormat,
} from "@/lib/formats/mapped-csv.ts";

type ServerError = { line: number | null; field: string | null; message: string };

const FIELD_LABEL: Record<MappedField, string> = {
  point: "Point code",
  east: "East",
  north: "North",
  height: "Height",
  time: "Time (optional)",
  sigmaEast: "σ east (optional)",
  sigmaNorth: "σ north (optional)",
  sigmaHeight: "σ height (optional)",
};
const TIME_LABEL: Record<TimeFormat, string> = {
  iso: "ISO 8601 with offset or Z",
  "iso-local": "ISO 8601 without offset (in a time zone)",
  pattern: "Pattern (luxon tokens), in a time zone",
  "unix-s": "Unix seconds",
  "unix-ms": "Unix milliseconds",
};
const PREVIEW_ROWS = 25;

/** Does every named column of a mapping exist in this header? */
function fits(m: ColumnMapping, header: string[]): boolean {
  const names = new Set(header.map((h) => h.trim().toLowerCase()));
  return REQUIRED_FIELDS.every((f) => {
    const ref = m.columns[f];
    return typeof ref === "number" ? ref <= header.length : typeof ref === "string" && names.has(ref.trim().toLowerCase());
  });
}

export function ImportClient({ slug, timeZone, saved }: { slug: string; timeZone: string; saved: ColumnMapping | null }) {
  const [fileName, setFileName] = useState<string | null>(null);
  const [text, setText] = useState("");
  const [mapping, setMapping] = useState<ColumnMapping | null>(saved);
  const [epochTime, setEpochTime] = useState("");
  const [status, setStatus] = useState<{ kind: "ok" | "error" | "info"; text: string } | null>(null);
  const [serverErrors, setServerErrors] = useState<ServerError[]>([]);
  const [busy, setBusy] = useState(false);

  const preview = useMemo(() => (text ? previewColumns(text, 3) : null), [text]);
  const result = useMemo(() => (text && mapping ? applyColumnMapping(text, mapping) : null), [text, mapping]);
  const header = preview?.header ?? [];
  const width = Math.max(header.length, ...(preview?.sample.map((r) => r.length) ?? [0]));
  const hasTime = mapping ? mapping.columns.time !== undefined && mapping.columns.time !== null && mapping.columns.time !== "" : false;

  async function onFile(f: File | null) {
    setStatus(null);
    setServerErrors([]);
    if (!f) return;
    const t = await f.text();
    setFileName(f.name);
    setText(t);
    const h = previewColumns(t, 1).header;
    setMapping((m) => (m && (!m.hasHeader || fits(m, h)) ? m : { ...suggestMapping(h), timeZone }));
  }

  const set = (patch: Partial<ColumnMapping>) => setMapping((m) => (m ? { ...m, ...patch } : m));
  const setColumn = (f: MappedField, v: string) =>
    setMapping((m) => (m ? { ...m, columns: { ...m.columns, [f]: v === "" ? null : m.hasHeader ? v : Number(v) } } : m));

  async function save() {
    if (!mapping) return;
    setBusy(true);
    try {
      const r = await fetch(`/api/v1/sites/${encodeURIComponent(slug)}/column-mapping`, { method: "PUT", headers: { "content-type": "application/json" }, body: JSON.stringify(mapping) });
      const j = (await r.json()) as { error?: { message: string }; errors?: ServerError[] };
      setStatus(r.ok ? { kind: "ok", text: "Mapping saved for this site." } : { kind: "error", text: `${j.error?.message ?? r.statusText} ${(j.errors ?? []).map((e) => `${e.field}: ${e.message}`).join("; ")}` });
    } finally {
      setBusy(false);
    }
  }

  async function upload() {
    if (!result?.csv) return;
    setBusy(true);
    setServerErrors([]);
    setStatus({ kind: "info", text: "Uploading…" });
    try {
      const q = new URLSearchParams();
      if (!hasTime) {
        const dt = DateTime.fromISO(epochTime, { zone: timeZone });
        if (!epochTime || !dt.isValid) {
          setStatus({ kind: "error", text: "The file has no time column: give the epoch's time." });
          return;
        }
        q.set("time", dt.toUTC().toISO() ?? "");
      }
      const r = await fetch(`/api/v1/sites/${encodeURIComponent(slug)}/epochs${q.size ? `?${q}` : ""}`, { method: "POST", headers: { "content-type": "text/csv" }, body: result.csv });
      const j = (await r.json()) as { epochs?: { time: string; observations: number; outcome: string }[]; newPoints?: string[]; error?: { message: string }; errors?: ServerError[] };
      if (r.ok) {
        const eps = j.epochs ?? [];
        setStatus({
          kind: "ok",
          text: `${r.status === 201 ? "Stored" : "Already stored"}: ${eps.length} epoch${eps.length === 1 ? "" : "s"} (${eps.map((e) => `${e.time} ${e.outcome}, ${e.observations} observations`).join("; ")}).${j.newPoints?.length ? ` New points: ${j.newPoints.join(", ")}.` : ""}`,
        });
      } else {
        setStatus({ kind: "error", text: j.error?.message ?? `Upload failed (${r.status}).` });
        setServerErrors((j.errors ?? []).map((e) => ({ ...e, line: sourceLineOf(result.lineMap, e.line) })));
      }
    } finally {
      setBusy(false);
    }
  }

  const errorsByLine = new Map<number, string[]>();
  for (const e of [...(result?.errors ?? []), ...serverErrors]) if (e.line !== null) errorsByLine.set(e.line, [...(errorsByLine.get(e.line) ?? []), e.message]);

  return (
    <div className="import">
      <section className="panel" aria-labelledby="step1">
        <h2 id="step1">1 · File</h2>
        <label htmlFor="file">CSV file (comma separated, UTF-8)</label>
        <input id="file" type="file" accept=".csv,.txt,text/csv" onChange={(e) => void onFile(e.target.files?.[0] ?? null)} />
        {fileName && preview ? (
          <>
            <p className="small">
              {fileName}: {header.length} columns in the first row{preview.syntaxErrors.length ? ` · ${preview.syntaxErrors.length} syntax errors` : ""}.
            </p>
            <div style={{ overflowX: "auto" }}>
              <table className="small" data-testid="source-preview">
                <thead>
                  <tr>
                    {Array.from({ length: width }, (_, i) => (
                      <th key={i}>
                        {i + 1}
                        {mapping?.hasHeader !== false && header[i] ? ` · ${header[i]}` : ""}
                      </th>
                    ))}
                  </tr>
                </thead>
                <tbody>
                  {(mapping?.hasHeader === false ? [header, ...preview.sample] : preview.sample).slice(0, 3).map((r, k) => (
                    <tr key={k}>
                      {Array.from({ length: width }, (_, i) => (
                        <td key={i}>{r[i] ?? ""}</td>
                      ))}
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          </>
        ) : null}
      </section>

      {text && mapping ? (
        <section className="panel" aria-labelledby="step2" style={{ marginTop: 12 }}>
          <h2 id="step2">2 · Columns</h2>
          <label style={{ display: "flex", gap: 6, alignItems: "center" }}>
            <input type="checkbox" checked={mapping.hasHeader} onChange={(e) => set({ hasHeader: e.target.checked, columns: {} })} /> The first row is a header
          </label>
          <div style={{ display: "grid", gridTemplateColumns: "repeat(auto-fill, minmax(200px, 1fr))", gap: "4px 16px" }}>
            {MAPPED_FIELDS.map((f) => (
              <div key={f}>
                <label htmlFor={`col-${f}`}>
                  {FIELD_LABEL[f]} → <code>{EPOCH_COLUMN_OF[f]}</code>
                </label>
                <select id={`col-${f}`} value={mapping.columns[f] === null || mapping.columns[f] === undefined ? "" : String(mapping.columns[f])} onChange={(e) => setColumn(f, e.target.value)}>
                  <option value="">{REQUIRED_FIELDS.includes(f) ? "— pick a column —" : "(none)"}</option>
                  {Array.from({ length: width }, (_, i) => (mapping.hasHeader ? (header[i] ? <option key={i} value={header[i]}>{`${i + 1} · ${header[i]}`}</option> : null) : <option key={i} value={String(i + 1)}>{`column ${i + 1}`}</option>))}
                </select>
              </div>
            ))}
          </div>
          <div style={{ display: "flex", gap: 16, flexWrap: "wrap", marginTop: 6 }}>
            <div>
              <label htmlFor="cu">Coordinates in</label>
              <select id="cu" value={mapping.coordinateUnit} onChange={(e) => set({ coordinateUnit: e.target.value as ColumnMapping["coordinateUnit"] })}>
                {LENGTH_UNITS.map((u) => (
                  <option key={u} value={u}>
                    {u === "m" ? "metres" : "millimetres"}
                  </option>
                ))}
              </select>
            </div>
            <div>
              <label htmlFor="su">σ in</label>
              <select id="su" value={mapping.sigmaUnit} onChange={(e) => set({ sigmaUnit: e.target.value as ColumnMapping["sigmaUnit"] })}>
                {LENGTH_UNITS.map((u) => (
                  <option key={u} value={u}>
                    {u === "m" ? "metres" : "millimetres"}
                  </option>
                ))}
              </select>
            </div>
            {hasTime ? (
              <>
                <div>
                  <label htmlFor="tf">Time format</label>
                  <select id="tf" value={mapping.timeFormat} onChange={(e) => set({ timeFormat: e.target.value as TimeFormat })}>
                    {TIME_FORMATS.map((t) => (
                      <option key={t} value={t}>
                        {TIME_LABEL[t]}
                      </option>
                    ))}
                  </select>
                </div>
                {mapping.timeFormat === "pattern" ? (
                  <div>
                    <label htmlFor="tp">Pattern</label>
                    <input id="tp" value={mapping.timePattern ?? ""} placeholder="dd.MM.yyyy HH:mm:ss" onChange={(e) => set({ timePattern: e.target.value })} />
                  </div>
                ) : null}
                {mapping.timeFormat === "pattern" || mapping.timeFormat === "iso-local" ? (
                  <div>
                    <label htmlFor="tz">Time zone of the file</label>
                    <input id="tz" value={mapping.timeZone ?? timeZone} onChange={(e) => set({ timeZone: e.target.value })} />
                  </div>
                ) : null}
              </>
            ) : (
              <div>
                <label htmlFor="et">Epoch time ({timeZone})</label>
                <input id="et" type="datetime-local" step="1" value={epochTime} onChange={(e) => setEpochTime(e.target.value)} />
              </div>
            )}
          </div>
          <p>
            <button type="button" className="secondary" onClick={() => void save()} disabled={busy}>
              Save this mapping for the site
            </button>
          </p>
        </section>
      ) : null}

      {result ? (
        <section className="panel" aria-labelledby="step3" style={{ marginTop: 12 }}>
          <h2 id="step3">3 · Preview</h2>
          <p data-testid="mapped-summary">
            {result.rows.length} row{result.rows.length === 1 ? "" : "s"} converted
            {result.errors.length ? `, ${result.errors.length} error${result.errors.length === 1 ? "" : "s"} — fix the mapping or the file` : ""}.
          </p>
          {result.errors.length || serverErrors.length ? (
            <ul className="error" role="alert" data-testid="mapped-errors">
              {[...result.errors, ...serverErrors].slice(0, 50).map((e, i) => (
                <li key={i}>
                  {e.line !== null ? `line ${e.line}` : "file"}
                  {e.field ? `, ${e.field}` : ""}: {e.message}
                </li>
              ))}
            </ul>
          ) : null}
          <div style={{ overflowX: "auto" }}>
            <table className="small">
              <thead>
                <tr>
                  <th>Line</th>
                  <th>point</th>
                  <th className="num">east (m)</th>
                  <th className="num">north (m)</th>
                  <th className="num">height (m)</th>
                  <th>time (UTC)</th>
                  <th className="num">σ E, N, H (m)</th>
                </tr>
              </thead>
              <tbody>
                {result.rows.slice(0, PREVIEW_ROWS).map((r) => (
                  <tr key={r.sourceLine} className={errorsByLine.has(r.sourceLine) ? "error" : undefined}>
                    <td>{r.sourceLine}</td>
                    <td>{r.point}</td>
                    <td className="num">{r.east}</td>
                    <td className="num">{r.north}</td>
                    <td className="num">{r.height}</td>
                    <td>{r.time ?? "—"}</td>
                    <td className="num">{[r.sigmaEast, r.sigmaNorth, r.sigmaHeight].map((v) => (v === null ? "–" : v)).join(", ")}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          {result.rows.length > PREVIEW_ROWS ? <p className="muted small">First {PREVIEW_ROWS} of {result.rows.length} rows.</p> : null}
          <p>
            <button type="button" onClick={() => void upload()} disabled={busy || !result.csv} data-testid="import-upload">
              Import {result.rows.length} row{result.rows.length === 1 ? "" : "s"}
            </button>
          </p>
        </section>
      ) : null}
      {status ? (
        <p role="status" className={status.kind === "error" ? "error" : undefined} data-testid="import-status">
          {status.text}
        </p>
      ) : null}
    </div>
  );
}
