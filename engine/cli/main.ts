// `axonloom` — the command table. Each command lives in its own file and stays thin: parse
// options, call the engine, print. Errors the user can fix exit 2 with one clear line.
import { UsageError, type Command } from './args.ts';
import { SceneError } from '../scene/errors.ts';
import { ENGINE_VERSION } from '../version.ts';

const commands: Record<string, () => Promise<Command>> = {
  run: async () => (await import('./run.ts')).command,
  probe: async () => (await import('./probe.ts')).command,
  view: async () => (await import('./view.ts')).command,
  compare: async () => (await import('./compare.ts')).command,
  record: async () => (await import('./record.ts')).command,
};

export async function main(argv: string[]): Promise<number> {
  const [name, ...rest] = argv;
  try {
    if (!name || name === '--help' || name === '-h' || name === 'help') {
      process.stdout.write(await overview());
      return name ? 0 : 2;
    }
    if (name === '--version' || name === '-v') {
      process.stdout.write(`axonloom ${ENGINE_VERSION}\n`);
      return 0;
    }
    const load = commands[name];
    if (!load) throw new UsageError(`unknown command "${name}" (commands: ${Object.keys(commands).join(', ')}; see 'axonloom --help')`);
    const command = await load();
    if (rest.includes('--help') || rest.includes('-h')) {
      process.stdout.write(command.help.trimEnd() + '\n');
      return 0;
    }
    return await command.run(rest);
  } catch (e) {
    if (e instanceof UsageError) {
      process.stderr.write(`axonloom: ${e.message}\n`);
      return 2;
    }
    if (e instanceof SceneError) {
      process.stderr.write(e.message + '\n');
      return 2;
    }
    throw e;
  }
}

async function overview(): Promise<string> {
  const lines = ['axonloom — simulate axon guidance by graded cues, measure the map, replay it.', '', 'Usage: axonloom <command> [options]   (axonloom <command> --help for details)', '', 'Commands:'];
  for (const [name, load] of Object.entries(commands)) lines.push(`  ${name.padEnd(10)} ${(await load()).summary}`);
  lines.push('', 'Results are model hypotheses, not a substitute for experiment.', '');
  return lines.join('\n');
}
