// Entry point of the `arcfield` command: dispatches to one module per sub-command.
// Exit codes: 0 success, 2 bad input (every problem listed), 1 internal failure.
// A command module exports `run(args): Promise<number>`; it is imported only when its command
// runs, so a command another layer has not shipped yet (e.g. `serve`) fails with a clear message.

interface CommandModule { run(args: readonly string[]): Promise<number> }

interface CommandEntry {
  summary: string;
  load: () => Promise<unknown>;
}

// Commands owned by other layers are loaded through a variable specifier, so this dispatcher
// type-checks and runs (with a clear message for that command) before their module lands.
const lazy = (specifier: string) => (): Promise<unknown> => import(/* @vite-ignore */ specifier);

const COMMANDS: Record<string, CommandEntry> = {
  fit: { summary: 'fit the figure of the Earth to a campaign file and list suspect readings', load: () => import('./fit-command.ts') },
  demo: { summary: 'write the invented demo campaign (a known ellipsoid with planted blunders)', load: () => import('./demo-command.ts') },
  import: { summary: 'import a CSV table into a campaign file', load: lazy('./import-command.ts') },
  export: { summary: 'export a campaign as CSV, GeoJSON or a campaign file', load: lazy('./export-command.ts') },
  plan: { summary: 'rank candidate next stations and repeats by the 1/f standard error they leave', load: lazy('./plan-command.ts') },
  report: { summary: 'write the printable campaign report (self-contained HTML)', load: lazy('./report-command.ts') },
  serve: { summary: 'run the sync server', load: lazy('./serve.ts') },
};

function usage(): string {
  const width = Math.max(...Object.keys(COMMANDS).map((c) => c.length));
  return [
    'usage: arcfield <command> [options]',
    '',
    'commands:',
    ...Object.entries(COMMANDS).map(([name, c]) => `  ${name.padEnd(width)}  ${c.summary}`),
    '',
    'arcfield <command> --help shows the options of one command.',
    'Exit codes: 0 success, 2 bad input (every problem listed), 1 internal failure.',
    '',
  ].join('\n');
}

function isCommandModule(m: unknown): m is CommandModule {
  return typeof m === 'object' && m !== null && typeof (m as { run?: unknown }).run === 'function';
}

export async function main(argv: readonly string[]): Promise<number> {
  const [command, ...rest] = argv;
  if (!command || command === '--help' || command === '-h' || command === 'help') {
    process.stdout.write(usage());
    return 0;
  }
  const entry = Object.hasOwn(COMMANDS, command) ? COMMANDS[command] : undefined;
  if (!entry) {
    process.stderr.write(`arcfield: unknown command ${JSON.stringify(command)}; try arcfield --help\n`);
    return 2;
  }
  let mod: unknown;
  try {
    mod = await entry.load();
  } catch (err) {
    const code = (err as { code?: unknown }).code;
    if (code === 'ERR_MODULE_NOT_FOUND' && String((err as Error).message).includes(`/src/cli/${command}`)) {
      process.stderr.write(`arcfield: the ${command} command is not part of this build yet\n`);
      return 1;
    }
    throw err;
  }
  if (!isCommandModule(mod)) {
    process.stderr.write(`arcfield: the ${command} command module does not export run(args)\n`);
    return 1;
  }
  try {
    return await mod.run(rest);
  } catch (err) {
    process.stderr.write(`arcfield ${command}: internal error: ${err instanceof Error ? (err.stack ?? err.message) : String(err)}\n`);
    return 1;
  }
}
