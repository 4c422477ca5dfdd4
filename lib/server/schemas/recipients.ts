/**
 * Mail-recipient boundary (API bodies, the set-up form, the CLI). An address is kept trimmed and in
 * lower case, so one person is one row per site whatever the spelling. `minLevel` is the lowest
 * trigger level that mails the person; `digest` collects their mails into one per period instead.
 */
import { z } from "zod";
import { LEVELS } from "../../triggers/rule.ts";

const email = z.string().trim().toLowerCase().min(3, "Not an e-mail address.").max(254).pipe(z.email({ message: "Not an e-mail address." }));
const minLevel = z.enum(LEVELS, { message: `One of ${LEVELS.join(", ")}.` });

export const RecipientCreateBody = z.object({ email, minLevel: minLevel.default("review"), digest: z.boolean().default(false) }).strict();
export type RecipientCreateInput = z.output<typeof RecipientCreateBody>;

export const RecipientPatchBody = z
  .object({ minLevel: minLevel.optional(), digest: z.boolean().optional() })
  .strict()
  .refine((b) => b.minLevel !== undefined || b.digest !== undefined, { message: "Give minLevel or digest (to change the address, remove the recipient and add the new one)." });
export type RecipientPatchInput = z.output<typeof RecipientPatchBody>;
