// `npm run dev`: the API with restart on change, and Vite with hot reload proxying /api to it.
import { spawn, type ChildProcess } from 'node:child_process'

const children: ChildProcess[] = [
  spawn('node_modules/.bin/tsx', ['watch', '--clear-screen=false', 'server/index.ts'], {
    stdio: 'inherit',
    // Links in e-mails must open the Vite server, which serves the client in development.
    env: {
      ...process.env,
      RINGDOWN_API_ONLY: '1',
      PUBLIC_URL: process.env.PUBLIC_URL ?? `http://localhost:${process.env.VITE_PORT ?? 5173}`,
    },
  }),
  spawn('node_modules/.bin/vite', [], { stdio: 'inherit', env: process.env }),
]

function stop() {
  for (const c of children) c.kill('SIGTERM')
  process.exit(0)
}
process.on('SIGINT', stop)
process.on('SIGTERM', stop)
for (const c of children) c.on('exit', (code) => code && stop())
