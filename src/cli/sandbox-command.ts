/** Placeholder until the sandbox command lands (owned by another helper; replace this file freely). */
export async function runSandboxCommand(argv: string[]): Promise<number> {
  void argv;
  process.stderr.write('tailmark: the sandbox command is not available yet\n');
  return 2;
}
