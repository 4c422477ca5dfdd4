import { defineConfig } from "prisma/config";

// The URL is read here and not in schema.prisma (Prisma 7). `env()` would throw when it is
// unset and break `prisma generate`, so an empty string stands in.
export default defineConfig({
  schema: "prisma/schema.prisma",
  migrations: { path: "prisma/migrations" },
  datasource: { url: process.env.DATABASE_URL ?? "" },
});
