import type { RegisterCommand } from './CommandContext.ts';

export const registerShapes: RegisterCommand = (program) => {
  program
    .command('shapes')
    .description('list the built-in shapes and their parameters')
    .option('--json', 'print as JSON')
    .action(async (o: { json?: boolean }) => {
      const { SHAPES } = await import('../../../meshes/shapes/index.ts');
      if (o.json) {
        process.stdout.write(JSON.stringify(SHAPES, (k, v) => (k === 'build' || k === 'check' ? undefined : v), 2) + '\n');
        return;
      }
      for (const s of Object.values(SHAPES)) {
        process.stdout.write(`${s.name}  (${s.closed ? 'closed' : 'open'}) — ${s.description}\n`);
        for (const [k, p] of Object.entries(s.parameters)) {
          process.stdout.write(`    ${k.padEnd(16)} default ${String(p.default).padEnd(6)} ${p.description}\n`);
        }
      }
    });
};
