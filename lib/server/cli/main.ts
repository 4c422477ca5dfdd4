/**
 * `epochal` command dispatcher. Each command lives in ./commands/<name>.ts and exports
 * `run(args: string[]): Promise<number>` (the exit status) and `help: string`.
 * Exit status 2 means bad input or usage; 1 an unexpected failure.
 */
const COMMANDS = {
  strain: "Compute strain between two epoch files (reference and current).",
  serve: "Start the dashboard (embedded database when DATABASE_URL is unset).",
  demo: "Seed the demo site through the ingest service and start the dashboard.",
  db: "Database: migrate, new-migration, status, stop (embedded).",
  site: "Create and list sites.",
  token: "Create and revoke API tokens for a site.",
  user: "Create users and grant site roles.",
  recipient: "Mail recipients of a site's alerts: list, add, update, remove.",
  push: "Post epoch files to a server (HTTP or MQTT).",
  seed: "Write or load the demo scenario.",
  bench: "Run the benchmarks and print one table.",
  worker: "Run the job queue and mail worker on its own (alert mails, digests).",
} as const;

type CommandName = keyof typeof COMMANDS;

function isCommand(name: string): name is CommandName {
  return Object.prototype.hasOwnProperty.call(COMMANDS, name);
}

export function usage(): string {
  const width = Math.max(...Object.keys(COMMANDS).map((n) => n.length));
  const rows = Object.entries(COMMANDS).map(([n, d]) => `  ${n.padEnd(width)} ${d}`);
  return ["Usage: epochal <command> [options]", "", "Commands:", ...rows, "", "Run `epochal <command> --help` for a command's options."].join("\n");
}

export async function main(argv: string[]): Promise<number> {
  const [name, ...rest] = argv;
  if (!name || name === "--help" || name === "-h" || name === "help") {
    console.log(usage());
    return name ? 0 : 2;
  }
  if (!isCommand(name)) {
    console.error(`epochal: unknown command "${name}"\n\n${usage()}`);
    return 2;
  }
  let mod: { run: (args: string[]) => Promise<number>; help: string };
  try {
    mod = await import(`./commands/${name}.ts`);
  } catch (err) {
    console.error(`epochal: command "${name}" is not available in this build: ${(err as Error).message}`);
    return 1;
  }
  if (rest.includes("--help") || rest.includes("-h")) {
    console.log(mod.help);
    return 0;
  }
  try {
    return await mod.run(rest);
  } catch (err) {
    console.error(`epochal ${name}: ${(err as Error).stack ?? err}`);
    return 1;
  }
}
