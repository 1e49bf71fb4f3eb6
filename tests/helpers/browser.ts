import { mkdirSync } from 'node:fs'
import type { Server } from 'node:http'
import type { AddressInfo } from 'node:net'
import path from 'node:path'
import { chromium } from 'playwright-core'
import type { Browser } from 'playwright-core'
import { createApp } from '../../server/app'
import { dbConnectionOptions } from '../../server/config'
import { createDb } from '../../server/db/client'
import { createLogger } from '../../server/logger'
import { testConfig } from './app'

/** Debian's Chromium, never a downloaded browser; playwright gives it a fresh temporary profile. */
export async function launchBrowser(): Promise<{ browser: Browser; close: () => Promise<void> }> {
  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  })
  return {
    browser,
    close: () => browser.close(),
  }
}

/** The real app (API + built client) on 127.0.0.1 and a free port. */
export async function serveApp(): Promise<{ url: string; db: ReturnType<typeof createDb>; close: () => Promise<void> }> {
  const config = testConfig({ CLIENT_DIST: 'dist/client' })
  const handle = createDb(dbConnectionOptions(config))
  const created = createApp({ config, db: handle.db, logger: createLogger(config.LOG_LEVEL) })
  const server: Server = await new Promise((resolve) => {
    const s = created.app.listen(0, '127.0.0.1', () => resolve(s))
  })
  const { port } = server.address() as AddressInfo
  return {
    url: `http://127.0.0.1:${port}`,
    db: handle,
    close: async () => {
      server.closeAllConnections()
      await new Promise<void>((r) => server.close(() => r()))
      await created.close()
      await handle.close()
    },
  }
}

export function screenshotPath(name: string): string {
  const dir = path.join(process.env.ARTIFACTS_DIR ?? '.artifacts', 'screenshots')
  mkdirSync(dir, { recursive: true })
  return path.join(dir, `${name}.png`)
}
