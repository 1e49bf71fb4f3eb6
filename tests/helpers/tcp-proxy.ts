import net from 'node:net'

/**
 * A TCP relay on 127.0.0.1 in front of the real database, which a test can cut and restore to
 * play "the database went away" without touching the server itself.
 */
export class TcpProxy {
  private server: net.Server | null = null
  private sockets = new Set<net.Socket>()
  port = 0

  constructor(
    private readonly targetHost: string,
    private readonly targetPort: number,
  ) {}

  async up(): Promise<void> {
    const server = net.createServer((client) => {
      const upstream = net.connect(this.targetPort, this.targetHost)
      this.sockets.add(client)
      this.sockets.add(upstream)
      const drop = () => {
        client.destroy()
        upstream.destroy()
        this.sockets.delete(client)
        this.sockets.delete(upstream)
      }
      client.on('error', drop).on('close', drop)
      upstream.on('error', drop).on('close', drop)
      client.pipe(upstream).pipe(client)
    })
    await new Promise<void>((resolve, reject) => {
      server.once('error', reject)
      server.listen(this.port, '127.0.0.1', () => resolve())
    })
    this.port = (server.address() as net.AddressInfo).port
    this.server = server
  }

  /** Refuses new connections and cuts the open ones. */
  async down(): Promise<void> {
    for (const s of this.sockets) s.destroy()
    this.sockets.clear()
    const server = this.server
    this.server = null
    if (server) await new Promise<void>((resolve) => server.close(() => resolve()))
  }
}
