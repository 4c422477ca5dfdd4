/**
 * Option parsing shared by the `epochal` subcommands that take named options: `--name value` or
 * `--name=value` for the valued ones, bare `--flag` for the others. A bad option is a UsageError,
 * which the commands print and answer with exit status 2.
 */
export class UsageError extends Error {}

export function parseOptions<V extends string, F extends string>(args: readonly string[], valued: readonly V[], flagNames: readonly F[]): { values: Partial<Record<V, string>>; flags: Set<F> } {
  const values: Partial<Record<V, string>> = {};
  const flags = new Set<F>();
  for (let i = 0; i < args.length; i++) {
    const a = args[i];
    if ((flagNames as readonly string[]).includes(a)) {
      flags.add(a as F);
      continue;
    }
    const eq = a.indexOf("=");
    const name = eq > 0 ? a.slice(0, eq) : a;
    if (!(valued as readonly string[]).includes(name)) throw new UsageError(`unknown option ${JSON.stringify(a)}`);
    const v = eq > 0 ? a.slice(eq + 1) : args[++i];
    if (v === undefined || (eq < 0 && v.startsWith("--"))) throw new UsageError(`option ${name} needs a value`);
    values[name as V] = v;
  }
  return { values, flags };
}
