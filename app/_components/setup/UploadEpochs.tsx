"use client";
/**
 * Upload of epoch CSV files: parsed in the browser with the same pure parser the server uses
 * (lib/formats/epoch-csv.ts) to show the first rows and every row error before anything is sent;
 * then split by time and posted chunk by chunk to POST /api/v1/sites/{slug}/epochs (session cookie),
 * with a progress bar. Row errors from the server are mapped back to the file's own line numbers.
 */
import { useMemo, useState } from "react";
import { parseEpochCsv, type CsvError, type EpochCsvRow } from "@/lib/formats/epoch-csv.ts";
import { formatSiteTime } from "@/lib/plan/index.ts";

/** Rows per request: large backfills go in several requests, each one transaction on the server. */
const MAX_ROWS_PER_CHUNK = 20_000;
const PREVIEW_ROWS = 8;

type Chunk = { rows: EpochCsvRow[]; times: string[] };
type ServerEpoch = { id: number; time: string; observations: number; revision: number; outcome: string };
type Outcome = { stored: ServerEpoch[]; errors: CsvError[]; message: string | null; conflict: boolean };

function csvCell(s: string): string {
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** A chunk as CSV text; `lines[i]` is the original file line of the chunk's line i + 1 (line 1 = header). */
export function chunkCsv(rows: EpochCsvRow[]): { text: string; lines: number[] } {
  const out = ["point,east,north,height,time,sigma_east,sigma_north,sigma_height"];
  const lines = [1];
  for (const r of rows) {
    const n = (v: number | null) => (v === null ? "" : String(v));
    out.push([csvCell(r.point), String(r.east), String(r.north), String(r.height), r.time ?? "", n(r.sigmaEast), n(r.sigmaNorth), n(r.sigmaHeight)].join(","));
    lines.push(r.line);
  }
  return { text: out.join("\n") + "\n", lines };
}

/** Rows grouped by time (an epoch never straddles two chunks), packed into chunks of at most MAX_ROWS_PER_CHUNK rows. */
export function splitByTime(rows: EpochCsvRow[]): Chunk[] {
  const byTime = new Map<string, EpochCsvRow[]>();
  for (const r of rows) {
    const t = r.time ?? "";
    let list = byTime.get(t);
    if (!list) byTime.set(t, (list = []));
    list.push(r);
  }
  const times = [...byTime.keys()].sort();
  const chunks: Chunk[] = [];
  let cur: Chunk = { rows: [], times: [] };
  for (const t of times) {
    const rs = byTime.get(t)!;
    if (cur.rows.length > 0 && cur.rows.length + rs.length > MAX_ROWS_PER_CHUNK) {
      chunks.push(cur);
      cur = { rows: [], times: [] };
    }
    cur.rows.push(...rs);
    cur.times.push(t);
  }
  if (cur.rows.length) chunks.push(cur);
  return chunks;
}

export function UploadEpochs({ slug, timeZone }: { slug: string; timeZone: string }) {
  const [fileName, setFileName] = useState<string | null>(null);
  const [text, setText] = useState<string | null>(null);
  const [defaultTime, setDefaultTime] = useState("");
  const [revise, setRevise] = useState(false);
  const [progress, setProgress] = useState<{ done: number; total: number } | null>(null);
  const [outcome, setOutcome] = useState<Outcome | null>(null);
  const [busy, setBusy] = useState(false);

  const parsed = useMemo(() => (text === null ? null : parseEpochCsv(text, defaultTime.trim() ? { defaultTime: defaultTime.trim() } : {})), [text, defaultTime]);
  const rows = parsed && parsed.ok ? parsed.rows : [];
  const missingTime = parsed?.ok === true && rows.some((r) => r.time === null);
  const chunks = useMemo(() => (parsed?.ok && !missingTime ? splitByTime(rows) : []), [parsed, rows, missingTime]);
  const epochCount = chunks.reduce((n, c) => n + c.times.length, 0);
  const canUpload = parsed?.ok === true && !missingTime && rows.length > 0 && !busy;

  async function upload() {
    setBusy(true);
    setOutcome(null);
    const stored: ServerEpoch[] = [];
    setProgress({ done: 0, total: rows.length });
    let done = 0;
    for (const chunk of chunks) {
      const { text: body, lines } = chunkCsv(chunk.rows);
      let r: Response;
      try {
        r = await fetch(`/api/v1/sites/${encodeURIComponent(slug)}/epochs${revise ? "?revise=true" : ""}`, { method: "POST", headers: { "Content-Type": "text/csv" }, body, credentials: "same-origin" });
      } catch (e) {
        setOutcome({ stored, errors: [], message: `Network error: ${e instanceof Error ? e.message : String(e)}. Epochs before this chunk were stored.`, conflict: false });
        setBusy(false);
        return;
      }
      const j = (await r.json().catch(() => null)) as { epochs?: ServerEpoch[]; error?: { message: string }; errors?: { line: number | null; field: string | null; message: string }[] } | null;
      if (!r.ok) {
        const errors = (j?.errors ?? []).map((e) => ({ line: e.line !== null && e.line >= 1 && e.line <= lines.length ? lines[e.line - 1] : (e.line ?? 0), field: e.field, message: e.message }));
        const before = stored.length ? ` ${stored.length} epoch(s) before this chunk were stored.` : "";
        setOutcome({ stored, errors, message: `${j?.error?.message ?? `HTTP ${r.status}`}${before}`, conflict: r.status === 409 });
        setBusy(false);
        return;
      }
      stored.push(...(j?.epochs ?? []));
      done += chunk.rows.length;
      setProgress({ done, total: rows.length });
    }
    setOutcome({ stored, errors: [], message: null, conflict: false });
    setBusy(false);
  }

  const errors: CsvError[] = parsed && !parsed.ok ? parsed.errors : [];
  const badLines = new Set(errors.map((e) => e.line));
  const previewLines = text === null ? [] : text.replace(/\r?\n$/, "").split(/\r?\n/).slice(0, PREVIEW_ROWS + 1);

  return (
    <div className="upload">
      <form
        className="panel"
        onSubmit={(e) => {
          e.preventDefault();
          if (canUpload) void upload();
        }}
      >
        <label htmlFor="epoch-file">Epoch file (CSV)</label>
        <input
          id="epoch-file"
          type="file"
          accept=".csv,text/csv,text/plain"
          onChange={async (e) => {
            const f = e.target.files?.[0];
            setOutcome(null);
            setProgress(null);
            if (!f) return;
            setFileName(f.name);
            setText(await f.text());
          }}
        />
        <label htmlFor="default-time">Time for rows without one (ISO 8601 with offset, e.g. 2025-03-01T08:00:00+01:00)</label>
        <input id="default-time" value={defaultTime} onChange={(e) => setDefaultTime(e.target.value)} size={32} placeholder="only needed when the file has no time column" />
        <label className="check block">
          <input type="checkbox" checked={revise} onChange={(e) => setRevise(e.target.checked)} /> Replace epochs already stored at the same time with a new revision (the old one is kept)
        </label>
        <div style={{ marginTop: 10 }}>
          <button type="submit" disabled={!canUpload}>
            {busy ? "Uploading…" : epochCount > 0 ? `Upload ${epochCount} epoch(s), ${rows.length} rows` : "Upload"}
          </button>
        </div>
        {progress ? (
          <div className="upload-progress">
            <progress className="progress" max={progress.total} value={progress.done} aria-label="Upload progress" />
            <span className="small">
              {progress.done} of {progress.total} rows sent
            </span>
          </div>
        ) : null}
      </form>

      {parsed ? (
        <section className="panel" aria-labelledby="preview-h">
          <h2 id="preview-h">Check of {fileName}</h2>
          {parsed.ok ? (
            missingTime ? (
              <p className="notice bad" role="alert">
                Some rows have no time: give the epoch&apos;s time above.
              </p>
            ) : (
              <p className="notice" role="status">
                {rows.length} rows in {epochCount} epoch(s), no errors found
                {chunks.length > 1 ? `; they go in ${chunks.length} requests` : ""}.{" "}
                {epochCount > 0 ? `From ${formatSiteTime(Date.parse(chunks[0].times[0]), timeZone)} to ${formatSiteTime(Date.parse(chunks[chunks.length - 1].times[chunks[chunks.length - 1].times.length - 1]), timeZone)}.` : ""}
              </p>
            )
          ) : (
            <div role="alert">
              <p className="notice bad">
                {errors.length} problem(s) found: nothing can be uploaded until the file is fixed.
              </p>
              <ul className="row-errors" data-testid="row-errors">
                {errors.map((e, i) => (
                  <li key={i}>
                    Line {e.line}
                    {e.field ? `, field “${e.field}”` : ""}: {e.message}
                  </li>
                ))}
              </ul>
            </div>
          )}
          <h3 className="small">First lines of the file</h3>
          <table className="preview-table">
            <tbody>
              {previewLines.map((l, i) => (
                <tr key={i} className={badLines.has(i + 1) ? "bad" : undefined}>
                  <th scope="row" className="muted">
                    {i + 1}
                  </th>
                  <td>
                    <code>{l}</code>
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </section>
      ) : null}

      {outcome ? (
        <section className="panel" aria-labelledby="result-h">
          <h2 id="result-h">Result</h2>
          {outcome.message ? (
            <div role="alert">
              <p className="notice bad">{outcome.message}</p>
              {outcome.conflict ? <p className="small">Tick “Replace epochs already stored” to store this file as a new revision.</p> : null}
              {outcome.errors.length ? (
                <ul className="row-errors" data-testid="server-errors">
                  {outcome.errors.map((e, i) => (
                    <li key={i}>
                      Line {e.line}
                      {e.field ? `, field “${e.field}”` : ""}: {e.message}
                    </li>
                  ))}
                </ul>
              ) : null}
            </div>
          ) : (
            <p className="notice" role="status">
              Done: {outcome.stored.filter((e) => e.outcome !== "unchanged").length} epoch(s) stored, {outcome.stored.filter((e) => e.outcome === "unchanged").length} already there.
            </p>
          )}
          {outcome.stored.length ? (
            <table>
              <thead>
                <tr>
                  <th scope="col">Epoch time</th>
                  <th scope="col" className="num">Observations</th>
                  <th scope="col">Revision</th>
                  <th scope="col">Outcome</th>
                </tr>
              </thead>
              <tbody>
                {outcome.stored.slice(0, 200).map((e) => (
                  <tr key={`${e.id}`}>
                    <td>{formatSiteTime(Date.parse(e.time), timeZone)}</td>
                    <td className="num">{e.observations}</td>
                    <td>{e.revision}</td>
                    <td>{e.outcome}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          ) : null}
        </section>
      ) : null}
    </div>
  );
}
