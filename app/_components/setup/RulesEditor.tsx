"use client";
/** Trigger rules: the list with enable/disable (PATCH …/rules/{id}) and a form for a new rule (POST …/rules), with the presets. */
import { useState } from "react";
import { useRouter } from "next/navigation";
import { RULE_PRESETS } from "@/lib/triggers/presets.ts";
import { RULE_QUANTITIES, QUANTITY_ELEMENT_KINDS, parseQuantity } from "@/lib/triggers/rule.ts";
import { formatStrain } from "@/lib/plan/index.ts";
import type { RuleJson } from "@/lib/server/rules.ts";

type El = { id: number; name: string; kind: string };

const QUANTITY_TEXT: Record<string, string> = {
  greenMax: "major principal strain (extension)",
  greenMin: "minor principal strain (contraction, compared as −greenMin)",
  maxShear: "maximum shear strain",
  arealStrain: "areal strain |ΔA/A|",
  engineering: "baseline strain |(l − L)/L|",
};
const qText = (q: string) => {
  const { base, isRate } = parseQuantity(q as (typeof RULE_QUANTITIES)[number]);
  return `${QUANTITY_TEXT[base] ?? base}${isRate ? ", rate per day" : ""}`;
};

async function send(url: string, method: string, body: unknown) {
  const r = await fetch(url, { method, headers: { "Content-Type": "application/json" }, body: JSON.stringify(body) });
  const j = (await r.json().catch(() => null)) as { error?: { message: string }; errors?: { field: string | null; message: string }[] } | null;
  if (r.ok) return null;
  return j?.errors?.map((e) => `${e.field ? `${e.field}: ` : ""}${e.message}`).join("; ") || j?.error?.message || `HTTP ${r.status}`;
}

export function RulesEditor({ slug, rules, elements }: { slug: string; rules: RuleJson[]; elements: El[] }) {
  const router = useRouter();
  const base = `/api/v1/sites/${encodeURIComponent(slug)}/rules`;
  const [presetId, setPresetId] = useState("");
  const [name, setName] = useState("");
  const [quantity, setQuantity] = useState<string>("greenMax");
  const [levels, setLevels] = useState({ review: "500", alert: "750", limit: "1500" });
  const [hyst, setHyst] = useState("50");
  const [significantOnly, setSignificantOnly] = useState(true);
  const [responses, setResponses] = useState({ review: "", alert: "", limit: "" });
  const [scope, setScope] = useState<"all" | "chosen">("all");
  const [chosen, setChosen] = useState<number[]>([]);
  const [msg, setMsg] = useState<{ ok: boolean; text: string } | null>(null);
  const [busy, setBusy] = useState(false);

  const kinds = QUANTITY_ELEMENT_KINDS[parseQuantity(quantity as (typeof RULE_QUANTITIES)[number]).base];
  const fitting = elements.filter((e) => kinds.includes(e.kind));
  const preset = RULE_PRESETS.find((p) => p.id === presetId) ?? null;

  function applyPreset(id: string) {
    setPresetId(id);
    const p = RULE_PRESETS.find((x) => x.id === id);
    if (!p) return;
    setName(p.name);
    setQuantity(p.quantity);
    setLevels({ review: String(p.levels.review * 1e6), alert: String(p.levels.alert * 1e6), limit: String(p.levels.limit * 1e6) });
    setHyst(String(p.hysteresis * 1e6));
    setSignificantOnly(p.significantOnly);
    setResponses({ ...p.responses });
  }

  async function create() {
    const elementIds = scope === "all" ? fitting.map((e) => e.id) : chosen;
    if (elementIds.length === 0) return setMsg({ ok: false, text: "Choose at least one element of a kind this quantity applies to." });
    setBusy(true);
    const err = await send(base, "POST", {
      name: name.trim(),
      quantity,
      ...(presetId ? { preset: presetId } : {}),
      elementIds,
      reviewLevel: Number(levels.review) / 1e6,
      alertLevel: Number(levels.alert) / 1e6,
      limitLevel: Number(levels.limit) / 1e6,
      hysteresis: Number(hyst) / 1e6,
      significantOnly,
      responseReview: responses.review,
      responseAlert: responses.alert,
      responseLimit: responses.limit,
    });
    setBusy(false);
    if (err) return setMsg({ ok: false, text: err });
    setMsg({ ok: true, text: `Rule “${name}” created.` });
    router.refresh();
  }

  async function toggle(r: RuleJson) {
    const err = await send(`${base}/${r.id}`, "PATCH", { enabled: !r.enabled });
    if (err) setMsg({ ok: false, text: err });
    else router.refresh();
  }

  return (
    <div className="grid-2">
      <section className="panel">
        <h2>Rules ({rules.length})</h2>
        {rules.length === 0 ? <p className="muted">No rule yet.</p> : null}
        <ul className="rule-list">
          {rules.map((r) => (
            <li key={r.id} className={r.enabled ? undefined : "muted"}>
              <strong>{r.name}</strong> {r.enabled ? "" : "(disabled)"}
              <div className="small">
                {qText(r.quantity)} on {r.elementIds.length} element(s) · review {formatStrain(r.reviewLevel, "ue")} · alert {formatStrain(r.alertLevel, "ue")} · limit {formatStrain(r.limitLevel, "ue")}
                {r.quantity.endsWith(".ratePerDay") ? " per day" : ""} · hysteresis {formatStrain(r.hysteresis, "ue")} · {r.significantOnly ? "significant values only" : "all values"}
                {r.preset ? ` · preset ${r.preset}` : ""}
              </div>
              <button type="button" className="secondary small" onClick={() => void toggle(r)}>
                {r.enabled ? "Disable" : "Enable"}
              </button>
            </li>
          ))}
        </ul>
      </section>
      <form
        className="panel"
        onSubmit={(e) => {
          e.preventDefault();
          void create();
        }}
      >
        <h2>New rule</h2>
        {msg ? (
          <p className={msg.ok ? "notice" : "notice bad"} role={msg.ok ? "status" : "alert"}>
            {msg.text}
          </p>
        ) : null}
        <label htmlFor="rule-preset">Start from a preset</label>
        <select id="rule-preset" value={presetId} onChange={(e) => applyPreset(e.target.value)}>
          <option value="">None (set the levels yourself)</option>
          {RULE_PRESETS.map((p) => (
            <option key={p.id} value={p.id}>
              {p.name}
            </option>
          ))}
        </select>
        {preset ? (
          <p className="notice small">
            Source: {preset.source}. {preset.caution}
          </p>
        ) : null}
        <label htmlFor="rule-name">Name</label>
        <input id="rule-name" value={name} onChange={(e) => setName(e.target.value)} required size={40} />
        <label htmlFor="rule-q">Quantity</label>
        <select id="rule-q" value={quantity} onChange={(e) => setQuantity(e.target.value)}>
          {RULE_QUANTITIES.map((q) => (
            <option key={q} value={q}>
              {q} — {qText(q)}
            </option>
          ))}
        </select>
        <div className="form-row">
          {(["review", "alert", "limit"] as const).map((l) => (
            <div key={l}>
              <label htmlFor={`rule-${l}`}>
                {l} (µε{quantity.endsWith(".ratePerDay") ? "/day" : ""})
              </label>
              <input id={`rule-${l}`} value={levels[l]} onChange={(e) => setLevels({ ...levels, [l]: e.target.value })} inputMode="decimal" size={7} required />
            </div>
          ))}
          <div>
            <label htmlFor="rule-h">hysteresis (µε)</label>
            <input id="rule-h" value={hyst} onChange={(e) => setHyst(e.target.value)} inputMode="decimal" size={6} />
          </div>
        </div>
        <label className="check">
          <input type="checkbox" checked={significantOnly} onChange={(e) => setSignificantOnly(e.target.checked)} /> Only significant values raise the level (|value| &gt; 1.96σ)
        </label>
        {(["review", "alert", "limit"] as const).map((l) => (
          <div key={l}>
            <label htmlFor={`resp-${l}`}>Response at {l}</label>
            <textarea id={`resp-${l}`} value={responses[l]} onChange={(e) => setResponses({ ...responses, [l]: e.target.value })} rows={2} cols={50} />
          </div>
        ))}
        <fieldset className="plain">
          <legend className="small muted">Elements</legend>
          <label className="check">
            <input type="radio" name="scope" checked={scope === "all"} onChange={() => setScope("all")} /> All {fitting.length} {kinds.join("s and ")}s
          </label>
          <label className="check">
            <input type="radio" name="scope" checked={scope === "chosen"} onChange={() => setScope("chosen")} /> Chosen ones
          </label>
          {scope === "chosen" ? (
            <select multiple size={8} value={chosen.map(String)} onChange={(e) => setChosen([...e.target.selectedOptions].map((o) => Number(o.value)))} aria-label="Elements of the rule">
              {fitting.map((e) => (
                <option key={e.id} value={e.id}>
                  {e.name}
                </option>
              ))}
            </select>
          ) : null}
        </fieldset>
        <div style={{ marginTop: 10 }}>
          <button type="submit" disabled={busy}>
            Create rule
          </button>
        </div>
      </form>
    </div>
  );
}
