import { defineConfig } from "drizzle-kit";
import { databaseUrl } from "./scripts/db-url.mjs";

export default defineConfig({
  dialect: "postgresql",
  schema: "./db/schema/index.ts",
  out: "./db/migrations",
  dbCredentials: { url: databaseUrl() },
  strict: true,
  verbose: true,
});
