import net from 'node:net'
import getPort from 'get-port'

export { getPort }

/** Resolves when nothing answers on 127.0.0.1:port; otherwise throws a message naming the port and its use. */
export async function assertPortFree(port: number, what: string, envName: string): Promise<void> {
  const free = await new Promise<boolean>((resolve) => {
    const server = net.createServer()
    server.once('error', () => resolve(false))
    server.listen({ host: '127.0.0.1', port, exclusive: true }, () => server.close(() => resolve(true)))
  })
  if (!free) {
    throw new PortInUseError(
      `Port ${port} on 127.0.0.1 (${what}) is already in use. Stop the program using it, or choose another port with ${envName}=<port>.`,
    )
  }
}

export class PortInUseError extends Error {}

export async function waitForPort(port: number, timeoutMs = 90_000): Promise<void> {
  const deadline = Date.now() + timeoutMs
  while (Date.now() < deadline) {
    const open = await new Promise<boolean>((resolve) => {
      const socket = net.connect({ host: '127.0.0.1', port })
      socket.once('connect', () => {
        socket.destroy()
        resolve(true)
      })
      socket.once('error', () => resolve(false))
    })
    if (open) return
    await new Promise((r) => setTimeout(r, 100))
  }
  throw new Error(`Nothing answered on 127.0.0.1:${port} within ${timeoutMs} ms`)
}
