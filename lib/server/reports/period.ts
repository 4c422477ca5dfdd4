/** The site's latest current epoch (the default end of a report or export period). */
import { getDb, type Db } from "../db/client.ts";

export async function latestEpochMs(siteId: number, db: Db = getDb()): Promise<number | null> {
  const e = await db.epoch.findFirst({ where: { siteId, isCurrent: true }, orderBy: [{ time: "desc" }, { id: "desc" }], select: { time: true } });
  return e ? e.time.getTime() : null;
}
