// Entry point of the `arcfield` command: dispatches to one module per sub-command.
// Exit codes: 0 success, 2 bad input (every problem listed), 1 internal failure.

export async function main(argv: readonly string[]): Promise<number> {
  const [command] = argv;
  if (!command || command === '--help' || command === '-h') {
    process.stdout.write('usage: arcfield <command> [options]\n');
    return 0;
  }
  process.stderr.write(`arcfield: unknown command ${JSON.stringify(command)}; try arcfield --help\n`);
  return 2;
}
