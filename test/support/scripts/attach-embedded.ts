// Test helper process: attaches to the embedded database in EPOCHAL_DATA_DIR, prints its URL,
// and stays attached until its stdin closes; then detaches (and stops the server when last).
import { attachEmbeddedDatabase } from "../../../lib/server/db/embedded.ts";

const h = await attachEmbeddedDatabase({ log: () => undefined });
process.stdout.write(JSON.stringify({ url: h.url, started: h.started, pid: process.pid }) + "\n");
process.stdin.resume();
process.stdin.on("end", async () => {
  await h.detach();
  process.exit(0);
});
