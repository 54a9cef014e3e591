import type { RegisterCommand } from './CommandContext.ts';

export const registerDemo: RegisterCommand = (program) => {
  program
    .command('demo')
    .description('the built-in demonstration: a limb-bud paddle, its first eigenmodes, then a pattern forming while it grows')
    .option('--out-dir <dir>', 'where to write the outputs', 'placode-demo')
    .action(async (o: { outDir: string }) => {
      const { runDemo } = await import('../demo.ts');
      await runDemo(o.outDir);
    });
};
