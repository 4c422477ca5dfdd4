/** Per-request memo of the site header: the layout and the page both need it, the database is asked once. */
import "server-only";
import { cache } from "react";
import { getSiteHeader } from "@/lib/server/dashboard/site.ts";

export const siteHeaderOnce = cache(getSiteHeader);
