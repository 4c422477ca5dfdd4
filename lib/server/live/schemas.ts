/**
 * Boundary schemas of the live feed. (Kept beside the feed rather than in lib/server/schemas/,
 * whose files belong to other owners; move it there when convenient.)
 */
import { z } from "zod";

/** Query of GET /api/v1/sites/{slug}/events. */
export const eventsQuerySchema = z.strictObject({
  maxS: z.coerce.number().int().min(0).max(24 * 3600).optional(),
});

/** The environment the live feed reads (parsed once per start). */
export const liveEnvSchema = z.object({
  MQTT_URL: z.string().trim().min(1).optional(),
  EPOCHAL_INSTANCE: z.string().trim().min(1).optional(),
  MQTT_SESSION_EXPIRY_S: z.coerce.number().int().min(0).max(0xffffffff).optional(),
  MQTT_RECEIVE_MAXIMUM: z.coerce.number().int().min(1).max(65535).optional(),
});
export type LiveEnv = z.infer<typeof liveEnvSchema>;
