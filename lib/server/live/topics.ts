/** MQTT topic names of the live feed (layout documented at the top of ./mqtt.ts). */

export const TOPIC_ROOT = "epochal/v1/sites";
/** What the server subscribes to: every site's epochs topic. */
export const EPOCHS_SUBSCRIPTION = `${TOPIC_ROOT}/+/epochs`;

/** A slug as the sites table allows it, and a client reference: one topic level, no wildcards. */
const LEVEL = /^[A-Za-z0-9][A-Za-z0-9._-]{0,99}$/;

export function epochsTopic(slug: string): string {
  return `${TOPIC_ROOT}/${slug}/epochs`;
}

export function repliesPrefix(slug: string): string {
  return `${TOPIC_ROOT}/${slug}/replies/`;
}

export function replyTopic(slug: string, clientRef: string): string {
  return `${repliesPrefix(slug)}${clientRef}`;
}

/** The site slug of an epochs topic, or null when the topic is not one. */
export function slugOfEpochsTopic(topic: string): string | null {
  const parts = topic.split("/");
  if (parts.length !== 5 || `${parts[0]}/${parts[1]}/${parts[2]}` !== TOPIC_ROOT || parts[4] !== "epochs") return null;
  return LEVEL.test(parts[3]) ? parts[3] : null;
}

export function isClientRef(s: string): boolean {
  return LEVEL.test(s);
}

/**
 * True when `topic` may receive a reply for `slug`: under the site's replies prefix, no wildcard,
 * no empty level. Replies never go elsewhere, so a publisher cannot make the server write into
 * another site's or an unrelated topic.
 */
export function isAllowedReplyTopic(slug: string, topic: string): boolean {
  const prefix = repliesPrefix(slug);
  if (!topic.startsWith(prefix) || topic.length === prefix.length || topic.length > 500) return false;
  return topic
    .slice(prefix.length)
    .split("/")
    .every((level) => level.length > 0 && !/[+#\u0000]/.test(level));
}
