import type { RegisterCommand } from './CommandContext.ts';
import { parseCount } from '../options.ts';
import { UsageError } from '../../UsageError.ts';
import { VIEWER_PORT } from '../../defaults.ts';

export const registerView: RegisterCommand = (program) => {
  program
    .command('view')
    .argument('[rundir]', 'a run directory to open on the timeline')
    .description('the viewer: a web page on 127.0.0.1 to set up, run, brush, analyse and export in the browser')
    .option('--port <n>', 'port on 127.0.0.1 (0: any free one)', String(VIEWER_PORT))
    .option('--rebuild', 'build the page again even if it looks current')
    .action(async (rundir: string | undefined, o: { port: string; rebuild?: boolean }) => {
      const port = parseCount(o.port, '--port');
      const { existsSync, statSync } = await import('node:fs');
      const { join } = await import('node:path');
      const { RUN_FILES } = await import('../../run/runFiles.ts');
      const { SWEEP_FILES } = await import('../../sweep/sweepFiles.ts');
      if (rundir && (!existsSync(rundir) || !statSync(rundir).isDirectory())) throw new UsageError(`${rundir} is not a directory: give a run directory written by placode run`);
      if (rundir && !existsSync(join(rundir, RUN_FILES.record))) {
        throw new UsageError(existsSync(join(rundir, SWEEP_FILES.manifest))
          ? `${rundir} is a sweep: view one of its runs (placode view ${rundir}/runs/ID; placode sweep status ${rundir} --list done lists them), or its contact sheet from placode sweep collect`
          : `${rundir} is not a run directory (no ${RUN_FILES.record})`);
      }
      const { ensureViewerBuilt } = await import('../viewerBuild.ts');
      const { startViewServer } = await import('../viewServer.ts');
      const appDir = await ensureViewerBuilt((s) => process.stderr.write(s + '\n'), o.rebuild);
      const { server, url } = await startViewServer({ appDir, runDir: rundir, port });
      process.stdout.write(`Placode viewer at ${url}${rundir ? ` (run ${rundir})` : ''} — open it in a browser; Ctrl-C stops it\n`);
      await new Promise<void>((done) => {
        const stop = () => {
          process.off('SIGINT', stop);
          process.off('SIGTERM', stop);
          server.closeAllConnections(); // a page's open connections would keep the port (and the process) alive
          server.close(() => done());
        };
        process.on('SIGINT', stop);
        process.on('SIGTERM', stop);
      });
    });
};
