/**
 * The alert evaluations this process has pending, per site (backlog.ts adds them), and the wait that
 * reads of alerts and alert mails go through first, so what a client posted is evaluated before it
 * reads. Without imports of its own, so any reader can use it cheaply.
 */
const KEY = Symbol.for("epochal.alerts.pending");
type Holder = { [KEY]?: Map<number, Promise<void>> };

/** On globalThis: every copy of this module (Next.js bundles) shares it. The value settles when the site's last queued evaluation has run. */
export function pendingEvaluations(): Map<number, Promise<void>> {
  const h = globalThis as Holder;
  h[KEY] ??= new Map();
  return h[KEY];
}

/** Waits (at most `timeoutMs`) for the evaluations of these sites that this process has pending. */
export async function alertsSettled(siteIds: number | readonly number[], timeoutMs = 15_000): Promise<void> {
  const m = pendingEvaluations();
  const waits = (typeof siteIds === "number" ? [siteIds] : siteIds).map((id) => m.get(id)).filter((p): p is Promise<void> => p !== undefined);
  if (waits.length === 0) return;
  let timer: NodeJS.Timeout | undefined;
  await Promise.race([Promise.all(waits), new Promise<void>((resolve) => (timer = setTimeout(resolve, timeoutMs)))]);
  clearTimeout(timer);
}
