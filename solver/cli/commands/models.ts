import type { RegisterCommand } from './CommandContext.ts';

export const registerModels: RegisterCommand = (program) => {
  program
    .command('models')
    .description('list the built-in kinetics with their equations, parameters and sources')
    .option('--json', 'print as JSON')
    .action(async (o: { json?: boolean }) => {
      const { MODELS } = await import('../../kinetics/models/index.ts');
      if (o.json) {
        process.stdout.write(JSON.stringify(Object.values(MODELS), null, 2) + '\n'); // steadyStates functions drop out
        return;
      }
      for (const m of Object.values(MODELS)) {
        process.stdout.write(`${m.name} — ${m.title}: ${m.description}\n`);
        for (const s of m.species) process.stdout.write(`    d${s}/dt = ${m.reactions[s]}   + ∇·(${m.diffusion[s]} ∇${s})\n`);
        for (const [k, p] of Object.entries(m.parameters)) process.stdout.write(`    ${k.padEnd(8)} default ${String(p.default).padEnd(8)} ${p.description}\n`);
        process.stdout.write(`    source: ${m.citation}\n`);
      }
    });
};
