/** Reads delivered mail back from the test mail catcher's API (maildev). */
export interface CaughtMail {
  id: string
  subject: string
  text: string
  html: string
  to: { address: string; name: string }[]
}

const api = () => process.env.MAILDEV_API ?? 'http://127.0.0.1:1081'

export async function caughtMail(): Promise<CaughtMail[]> {
  const res = await fetch(`${api()}/api/email`)
  if (!res.ok) throw new Error(`maildev answered ${res.status}`)
  return (await res.json()) as CaughtMail[]
}

/** Waits until `predicate` holds for the caught mail, or fails after `timeoutMs`. */
export async function waitForMail(predicate: (m: CaughtMail[]) => boolean, timeoutMs = 15_000): Promise<CaughtMail[]> {
  const until = Date.now() + timeoutMs
  for (;;) {
    const all = await caughtMail()
    if (predicate(all)) return all
    if (Date.now() > until) throw new Error(`mail did not arrive within ${timeoutMs} ms (have ${all.length})`)
    await new Promise((r) => setTimeout(r, 200))
  }
}
