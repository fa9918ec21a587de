import path from 'node:path'

const root = path.resolve(import.meta.dirname, '..', '..')

/**
 * How a test starts the real server process: as production does, `node` on the compiled server
 * that `npm test` built into its data folder (FERROLANE_SERVER_ENTRY), with no TypeScript loader,
 * through the launcher that sets node's flags (scripts/node-server.sh; it execs node, so the pid
 * is the server's). The launcher runs the node named by NODE, else the first on PATH.
 */
export function serverCommand(): { cmd: string; args: string[]; cwd: string } {
  const entry = process.env.FERROLANE_SERVER_ENTRY
  if (!entry) throw new Error('FERROLANE_SERVER_ENTRY is not set: run the API tests through npm test, which compiles the server first')
  return { cmd: 'sh', args: [path.join(root, 'scripts/node-server.sh'), entry], cwd: root }
}
