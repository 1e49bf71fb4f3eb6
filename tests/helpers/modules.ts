import type { Client } from './app'

/** A small valid module source of our own for API tests. */
export function moduleSource(title: string, body = 'Some text with $p/p_0$ inline.'): string {
  return `---\ntitle: ${title}\nsummary: A test module.\ndue:\n  at: "2027-02-09T17:00"\n  timeZone: America/Denver\n---\n\n# ${title}\n\n${body}\n`
}

export interface CreatedModule {
  id: number
  versionId: number
  /** The lab sheet's key in page addresses, unique within its course. */
  slug: string
}

export async function createModuleAs(c: Client, courseId: number, source: string): Promise<CreatedModule> {
  const res = await c.agent.post(`/api/courses/${courseId}/modules`).set('x-csrf-token', c.csrf).send({ source })
  if (res.status !== 201) throw new Error(`create module failed: ${res.status} ${JSON.stringify(res.body)}`)
  return { id: res.body.id, versionId: res.body.current.id, slug: res.body.slug }
}

export async function publishAs(c: Client, courseId: number, m: CreatedModule): Promise<void> {
  const res = await c.agent
    .post(`/api/courses/${courseId}/modules/${m.id}/publish`)
    .set('x-csrf-token', c.csrf)
    .send({ versionId: m.versionId })
  if (res.status !== 200) throw new Error(`publish failed: ${res.status} ${JSON.stringify(res.body)}`)
}
