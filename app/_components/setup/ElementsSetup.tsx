"use client";
/**
 * Elements set-up: the triangulation with its settings, previewed on the plan before saving
 * (POST …/elements/preview-triangulation, then POST …/elements {generate}), and elements drawn by
 * hand by clicking points on the plan (or typing their codes) and POST …/elements.
 */
import { useMemo, useState } from "react";
import { useRouter } from "next/navigation";
import { fitViewBox } from "@/lib/plan/index.ts";

type P = { code: string; east: number; north: number; isReference: boolean };
type E = { id: number; name: string; kind: string; mode: string; points: string[] };
type Preview = {
  triangles: { id: string; name: string; codes: string[]; minAngleDeg: number; exists: boolean }[];
  dropped: { id: string; codes: string[]; reason: string; minAngleDeg: number }[];
  skippedPoints: { code: string; reason: string }[];
  quality: { minAngleDeg: number | null; meanMinAngleDeg: number | null };
};

async function postJson(url: string, body: unknown): Promise<{ ok: boolean; status: number; json: Record<string, unknown> | null }> {
  const r = await fetch(url, { method: "POST", headers: { "Content-Type": "application/json" }, body: JSON.stringify(body) });
  return { ok: r.ok, status: r.status, json: (await r.json().catch(() => null)) as Record<string, unknown> | null };
}

function errorText(j: Record<string, unknown> | null, status: number): string {
  const e = j?.error as { message?: string } | undefined;
  const list = (j?.errors as { field: string | null; message: string }[] | undefined)?.map((x) => `${x.field ? `${x.field}: ` : ""}${x.message}`).join("; ");
  return list || e?.message || `HTTP ${status}`;
}

export function ElementsSetup({ slug, points, elements, groups }: { slug: string; points: P[]; elements: E[]; groups: string[] }) {
  const router = useRouter();
  const base = `/api/v1/sites/${encodeURIComponent(slug)}/elements`;
  const [minAngle, setMinAngle] = useState("20");
  const [maxEdge, setMaxEdge] = useState("");
  const [group, setGroup] = useState("");
  const [prefix, setPrefix] = useState("");
  const [preview, setPreview] = useState<Preview | null>(null);
  const [busy, setBusy] = useState(false);
  const [message, setMessage] = useState<{ ok: boolean; text: string } | null>(null);
  const [kind, setKind] = useState<"triangle" | "baseline">("triangle");
  const [picked, setPicked] = useState<string[]>([]);
  const [name, setName] = useState("");

  const byCode = useMemo(() => new Map(points.map((p) => [p.code, p])), [points]);
  const view = useMemo(() => fitViewBox(points, 1.6), [points]);
  const r = view.width / 180;
  const need = kind === "triangle" ? 3 : 2;

  const opts = () => ({
    ...(minAngle.trim() ? { minAngleDeg: Number(minAngle) } : {}),
    ...(maxEdge.trim() ? { maxEdgeM: Number(maxEdge) } : {}),
    ...(group ? { pointGroup: group } : {}),
    ...(prefix ? { namePrefix: prefix } : {}),
  });

  async function runPreview() {
    setBusy(true);
    setMessage(null);
    const res = await postJson(`${base}/preview-triangulation`, opts());
    setBusy(false);
    if (!res.ok) return setMessage({ ok: false, text: errorText(res.json, res.status) });
    setPreview(res.json as unknown as Preview);
  }

  async function saveTriangulation() {
    setBusy(true);
    const res = await postJson(base, { generate: opts() });
    setBusy(false);
    if (!res.ok) return setMessage({ ok: false, text: errorText(res.json, res.status) });
    const created = (res.json?.created as unknown[] | undefined)?.length ?? 0;
    const skipped = (res.json?.skipped as unknown[] | undefined)?.length ?? 0;
    setMessage({ ok: true, text: `Saved ${created} triangle(s)${skipped ? `; ${skipped} already existed` : ""}. Results were computed for every epoch.` });
    setPreview(null);
    router.refresh();
  }

  function pick(code: string) {
    setPicked((cur) => {
      const next = cur.includes(code) ? cur.filter((c) => c !== code) : [...cur, code].slice(-need);
      setName(next.join("-"));
      return next;
    });
  }

  async function createManual() {
    if (picked.length !== need) return setMessage({ ok: false, text: `A ${kind} needs ${need} points; ${picked.length} chosen.` });
    setBusy(true);
    const res = await postJson(base, { name: name.trim() || picked.join("-"), kind, points: picked });
    setBusy(false);
    if (!res.ok) return setMessage({ ok: false, text: errorText(res.json, res.status) });
    setMessage({ ok: true, text: `Created ${kind} ${name || picked.join("-")}.` });
    setPicked([]);
    setName("");
    router.refresh();
  }

  const seg = (codes: string[]) => codes.map((c) => byCode.get(c)).filter((p): p is P => !!p);
  const poly = (codes: string[]) => seg(codes).map((p) => `${p.east},${-p.north}`).join(" ");

  return (
    <div className="grid-setup">
      <div>
        <div className="plan-canvas">
          <svg viewBox={`${view.x} ${view.y} ${view.width} ${view.height}`} className="plan-svg setup-plan" role="group" aria-label="Plan for choosing points; each point is a button">
            <g>
              {elements.map((e) =>
                e.kind === "baseline" ? (
                  (() => {
                    const s = seg(e.points);
                    return s.length === 2 ? <line key={e.id} x1={s[0].east} y1={-s[0].north} x2={s[1].east} y2={-s[1].north} stroke="#9aa3ab" strokeWidth={2} vectorEffect="non-scaling-stroke" /> : null;
                  })()
                ) : (
                  <polygon key={e.id} points={poly(e.points)} fill="#e9e5dc" stroke="#9aa3ab" strokeWidth={0.8} vectorEffect="non-scaling-stroke" />
                ),
              )}
            </g>
            {preview ? (
              <g data-testid="preview-layer">
                {preview.triangles.map((t) => (
                  <polygon key={t.id} points={poly(t.codes)} fill={t.exists ? "none" : "rgba(15,110,115,0.18)"} stroke="#0f6e73" strokeWidth={1.4} vectorEffect="non-scaling-stroke" className="preview-triangle" />
                ))}
                {preview.dropped.map((t) => (
                  <polygon key={`d-${t.id}`} points={poly(t.codes)} fill="none" stroke="#a4161a" strokeDasharray="4 3" strokeWidth={1.2} vectorEffect="non-scaling-stroke" />
                ))}
              </g>
            ) : null}
            {picked.length >= 2 ? <polygon points={poly(picked)} fill="rgba(213,94,0,0.25)" stroke="#d55e00" strokeWidth={2.5} vectorEffect="non-scaling-stroke" /> : null}
            {points.map((p) => {
              const on = picked.includes(p.code);
              return (
                <g
                  key={p.code}
                  role="button"
                  tabIndex={0}
                  aria-pressed={on}
                  aria-label={`Point ${p.code}`}
                  onClick={() => pick(p.code)}
                  onKeyDown={(e) => {
                    if (e.key === "Enter" || e.key === " ") {
                      e.preventDefault();
                      pick(p.code);
                    }
                  }}
                  className="pick-point"
                  data-point={p.code}
                >
                  <circle cx={p.east} cy={-p.north} r={r * 2.2} fill="transparent" />
                  <circle cx={p.east} cy={-p.north} r={on ? r * 1.4 : r} fill={on ? "#d55e00" : p.isReference ? "#fff" : "#1f2a33"} stroke="#1f2a33" strokeWidth={1} vectorEffect="non-scaling-stroke" />
                  {points.length <= 200 ? (
                    <text x={p.east + r * 1.5} y={-p.north - r * 1.5} fontSize={r * 3} fill="#1f2a33">
                      {p.code}
                    </text>
                  ) : null}
                </g>
              );
            })}
          </svg>
        </div>
        <p className="muted small">
          Grey: existing elements. {preview ? "Teal: triangles the triangulation would save (outlined only: already exist); red dashed: dropped. " : ""}Click points (or Tab to them and press Enter) to draw an element by hand.
        </p>
      </div>
      <div>
        {message ? (
          <p className={message.ok ? "notice" : "notice bad"} role={message.ok ? "status" : "alert"}>
            {message.text}
          </p>
        ) : null}
        <form
          className="panel"
          onSubmit={(e) => {
            e.preventDefault();
            void runPreview();
          }}
        >
          <h2>Triangulation</h2>
          <p className="muted small">Delaunay triangles of the points at the reference epoch; slivers below the smallest angle are dropped (thin triangles amplify survey noise).</p>
          <label htmlFor="tri-min">Smallest interior angle (°)</label>
          <input id="tri-min" value={minAngle} onChange={(e) => setMinAngle(e.target.value)} inputMode="decimal" size={6} />
          <label htmlFor="tri-max">Longest edge (m, optional)</label>
          <input id="tri-max" value={maxEdge} onChange={(e) => setMaxEdge(e.target.value)} inputMode="decimal" size={8} />
          {groups.length ? (
            <>
              <label htmlFor="tri-group">Only points of group</label>
              <select id="tri-group" value={group} onChange={(e) => setGroup(e.target.value)}>
                <option value="">All points</option>
                {groups.map((g) => (
                  <option key={g}>{g}</option>
                ))}
              </select>
            </>
          ) : null}
          <label htmlFor="tri-prefix">Name prefix (optional)</label>
          <input id="tri-prefix" value={prefix} onChange={(e) => setPrefix(e.target.value)} size={12} />
          <div className="form-row" style={{ marginTop: 10 }}>
            <button type="submit" disabled={busy}>
              Preview
            </button>
            {preview ? (
              <button type="button" className="secondary" onClick={() => void saveTriangulation()} disabled={busy || preview.triangles.every((t) => t.exists)}>
                Save {preview.triangles.filter((t) => !t.exists).length} new triangle(s)
              </button>
            ) : null}
          </div>
          {preview ? (
            <p className="small" role="status">
              {preview.triangles.length} triangles kept ({preview.triangles.filter((t) => t.exists).length} already exist), {preview.dropped.length} dropped
              {preview.quality.minAngleDeg !== null ? `; smallest angle ${preview.quality.minAngleDeg.toFixed(1)}°, mean of the smallest angles ${preview.quality.meanMinAngleDeg?.toFixed(1)}°` : ""}.
              {preview.skippedPoints.length ? ` Skipped points: ${preview.skippedPoints.map((s) => `${s.code} (${s.reason})`).join(", ")}.` : ""}
            </p>
          ) : null}
        </form>
        <form
          className="panel"
          onSubmit={(e) => {
            e.preventDefault();
            void createManual();
          }}
        >
          <h2>Draw by hand</h2>
          <fieldset className="plain">
            <legend className="small muted">Kind</legend>
            <label className="check">
              <input type="radio" name="kind" checked={kind === "triangle"} onChange={() => { setKind("triangle"); setPicked([]); }} /> Triangle (3 points, plan)
            </label>
            <label className="check">
              <input type="radio" name="kind" checked={kind === "baseline"} onChange={() => { setKind("baseline"); setPicked([]); }} /> Baseline (2 points, slope distance)
            </label>
          </fieldset>
          <label htmlFor="man-points">Points (click on the plan, or type codes separated by spaces)</label>
          <input
            id="man-points"
            value={picked.join(" ")}
            onChange={(e) => {
              const codes = e.target.value.split(/\s+/).filter(Boolean).slice(0, need);
              setPicked(codes);
              setName(codes.join("-"));
            }}
            size={24}
          />
          <label htmlFor="man-name">Name</label>
          <input id="man-name" value={name} onChange={(e) => setName(e.target.value)} size={24} />
          <div style={{ marginTop: 10 }}>
            <button type="submit" disabled={busy || picked.length !== need}>
              Create {kind}
            </button>
          </div>
        </form>
      </div>
    </div>
  );
}
