"use client";
/** One form per point row (Enter saves that row) posting PATCH /api/v1/sites/{slug}/points/{code}. */
import { useState } from "react";
import type { PointView } from "@/lib/server/points.ts";

type RowState = { saving: boolean; message: string | null; error: string | null };

async function patchPoint(slug: string, code: string, body: Record<string, unknown>): Promise<{ ok: true; point: PointView } | { ok: false; message: string }> {
  const r = await fetch(`/api/v1/sites/${encodeURIComponent(slug)}/points/${encodeURIComponent(code)}`, {
    method: "PATCH",
    headers: { "Content-Type": "application/json" },
    body: JSON.stringify(body),
  });
  const j = (await r.json().catch(() => null)) as { point?: PointView; error?: { message: string }; errors?: { field: string | null; message: string }[] } | null;
  if (r.ok && j?.point) return { ok: true, point: j.point };
  const detail = j?.errors?.map((e) => `${e.field ?? ""}: ${e.message}`).join("; ");
  return { ok: false, message: detail || j?.error?.message || `HTTP ${r.status}` };
}

const mm = (m: number | null) => (m === null ? "" : String(Math.round(m * 1e5) / 100));

export function PointsEditor({ slug, points }: { slug: string; points: PointView[] }) {
  const [rows, setRows] = useState(points);
  const [state, setState] = useState<Record<string, RowState>>({});
  const [filter, setFilter] = useState("");

  async function save(code: string, form: HTMLFormElement) {
    const fd = new FormData(form);
    const num = (k: string) => {
      const t = String(fd.get(k) ?? "").trim();
      return t === "" ? null : Number(t) / 1000;
    };
    const body = {
      isReference: fd.get("isReference") === "on",
      group: String(fd.get("group") ?? "").trim() || null,
      kind: String(fd.get("kind") ?? "prism"),
      sigmaHM: num("sigmaHmm"),
      sigmaVM: num("sigmaVmm"),
      note: String(fd.get("note") ?? "").trim() || null,
    };
    setState((s) => ({ ...s, [code]: { saving: true, message: null, error: null } }));
    const r = await patchPoint(slug, code, body);
    if (r.ok) {
      setRows((rs) => rs.map((p) => (p.code === code ? r.point : p)));
      setState((s) => ({ ...s, [code]: { saving: false, message: "Saved", error: null } }));
    } else setState((s) => ({ ...s, [code]: { saving: false, message: null, error: r.message } }));
  }

  const shown = rows.filter((p) => !filter || p.code.toLowerCase().includes(filter.toLowerCase()) || (p.group ?? "").toLowerCase().includes(filter.toLowerCase()));
  return (
    <div>
      <label>
        Find a point or group{" "}
        <input value={filter} onChange={(e) => setFilter(e.target.value)} placeholder="code or group" />
      </label>
      <p className="muted small">
        {rows.length} points, {rows.filter((p) => p.isReference).length} marked as stable references. Showing {shown.length}.
      </p>
      <div className="points-table" role="table" aria-label="Points">
        <div className="points-head" role="row">
          <span role="columnheader">Point</span>
          <span role="columnheader">Stable reference</span>
          <span role="columnheader">Kind</span>
          <span role="columnheader">Group</span>
          <span role="columnheader">σ horiz. (mm)</span>
          <span role="columnheader">σ vert. (mm)</span>
          <span role="columnheader">Note</span>
          <span role="columnheader" />
        </div>
        {shown.slice(0, 500).map((p) => {
          const st = state[p.code];
          return (
            <form
              key={p.code}
              role="row"
              className="points-row"
              data-point={p.code}
              onSubmit={(e) => {
                e.preventDefault();
                void save(p.code, e.currentTarget);
              }}
            >
              <span role="cell">
                <strong>{p.code}</strong>
                <span className="muted small"> {p.observations} obs.</span>
              </span>
              <span role="cell">
                <input type="checkbox" name="isReference" defaultChecked={p.isReference} aria-label={`${p.code} is a stable reference point`} />
              </span>
              <span role="cell">
                <select name="kind" defaultValue={p.kind} aria-label={`${p.code} kind`}>
                  <option value="prism">prism</option>
                  <option value="gnss">GNSS</option>
                  <option value="levelling">levelling</option>
                  <option value="other">other</option>
                </select>
              </span>
              <span role="cell">
                <input name="group" defaultValue={p.group ?? ""} size={10} aria-label={`${p.code} group`} />
              </span>
              <span role="cell">
                <input name="sigmaHmm" defaultValue={mm(p.sigmaHM)} size={5} inputMode="decimal" placeholder="site" aria-label={`${p.code} sigma horizontal in mm`} />
              </span>
              <span role="cell">
                <input name="sigmaVmm" defaultValue={mm(p.sigmaVM)} size={5} inputMode="decimal" placeholder="site" aria-label={`${p.code} sigma vertical in mm`} />
              </span>
              <span role="cell">
                <input name="note" defaultValue={p.note ?? ""} size={18} aria-label={`${p.code} note`} />
              </span>
              <span role="cell">
                <button type="submit" className="small" disabled={st?.saving}>
                  Save
                </button>{" "}
                {st?.message ? <span className="small" role="status">{st.message}</span> : null}
                {st?.error ? <span className="small error" role="alert">{st.error}</span> : null}
              </span>
            </form>
          );
        })}
      </div>
      {shown.length > 500 ? <p className="muted small">Showing the first 500; narrow the search to see the rest.</p> : null}
    </div>
  );
}
