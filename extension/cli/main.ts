/**
 * Headless entry: `metric-triage <command> [args…]`.
 * Exit codes shared by every command: 0 ok, 1 bad input (unreadable or invalid export), 2 usage.
 * To add a command, add one entry to COMMANDS; its module is loaded only when it runs, so a
 * command's dependencies (e.g. the ONNX runtime) cost nothing to the others.
 */

/** One CLI command: a one-line summary for --help and a lazy runner returning the exit code. */
export interface CliCommand {
  readonly summary: string;
  readonly run: (args: string[]) => Promise<number>;
}

export const COMMANDS: Readonly<Record<string, CliCommand>> = {
  inspect: { summary: 'inspect FILE [--json]   what an export holds: format, time range, step, series, gaps', run: async (args) => (await import('./inspect')).runInspect(args) },
  classify: { summary: 'classify FILE [--window START/END] [--baseline START/END] [--json] [--markdown OUT.md] [--library FILE]   estimate the fault type and explain it', run: async (args) => (await import('./classify')).runClassify(args) },
  library: { summary: 'library add|list|rm …   the team\'s labelled past incidents', run: async (args) => (await import('./library')).runLibrary(args) },
};

const HELP = `metric-triage — read metric exports and explain an incident from them (a decision aid).

Usage: metric-triage <command> [args…]   (metric-triage <command> --help for details)

Commands:
${Object.values(COMMANDS).map((c) => `  ${c.summary}`).join('\n')}

Exit codes: 0 ok, 1 bad input, 2 usage error.
`;

/** Dispatches argv (without node and script) to a command; returns the exit code. */
export async function runCli(argv: readonly string[]): Promise<number> {
  const [name, ...rest] = argv;
  if (name === undefined || name === '--help' || name === '-h' || name === 'help') {
    process.stdout.write(HELP);
    return name === undefined ? 2 : 0;
  }
  const command = Object.prototype.hasOwnProperty.call(COMMANDS, name) ? COMMANDS[name] : undefined;
  if (command === undefined) {
    process.stderr.write(`metric-triage: unknown command "${name}"; expected one of ${Object.keys(COMMANDS).join(', ')}\n\n${HELP}`);
    return 2;
  }
  return command.run(rest);
}

if (require.main === module) {
  runCli(process.argv.slice(2)).then(
    (code) => { process.exitCode = code; },
    (err: unknown) => {
      process.stderr.write(`metric-triage: internal error (please report it): ${err instanceof Error ? err.stack ?? err.message : String(err)}\n`);
      process.exitCode = 1;
    },
  );
}
