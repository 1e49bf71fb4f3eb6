import { hashPassword } from '../../server/auth/password'
import { enrollments, labGroups, users } from '../../server/db/schema'
import type { Client, TestContext } from './app'
import { PASSWORD, signedInAs, uniq } from './app'
import type { CreatedModule } from './modules'
import { createModuleAs, publishAs } from './modules'

/** A lab sheet of our own that runs on a stand `standRuns` times (0: not a stand sheet). */
export function standSheetSource(title: string, standRuns: number): string {
  return `---\ntitle: ${title}\nsummary: A stand test sheet.\nstandRuns: ${standRuns}\n---\n\n# ${title}\n\nCold-flow runs on the stand.\n`
}

/** Creates and issues a stand sheet as the instructor. */
export async function issuedStandSheet(
  inst: Client,
  courseId: number,
  title: string,
  standRuns: number,
): Promise<CreatedModule> {
  const m = await createModuleAs(inst, courseId, standSheetSource(title, standRuns))
  await publishAs(inst, courseId, m)
  return m
}

/** A new lab group in a section with `members` signed-in students of that section. */
export async function groupWithStudents(
  ctx: TestContext,
  courseId: number,
  sectionId: number,
  members = 1,
): Promise<{ groupId: number; name: string; students: { id: number; email: string; client: Client }[] }> {
  const db = ctx.handle.db
  const tag = uniq()
  const name = `Group ${tag}`
  const [g] = await db.insert(labGroups).values({ courseId, sectionId, name }).$returningId()
  const hash = await hashPassword(PASSWORD)
  const students = []
  for (let i = 0; i < members; i++) {
    const email = `stand.${tag}.${i}@test.example`
    const [u] = await db
      .insert(users)
      .values({ email, displayName: `Student ${tag} ${i}`, passwordHash: hash })
      .$returningId()
    await db.insert(enrollments).values({ userId: u!.id, courseId, role: 'student', sectionId, labGroupId: g!.id })
    students.push({ id: u!.id, email, client: await signedInAs(ctx, email) })
  }
  return { groupId: g!.id, name, students }
}

/** A date and clock time in UTC (the test courses' zone) `hours` from now, on a whole hour. */
export function utcSoon(hours: number): { date: string; start: string } {
  const t = new Date(Math.ceil(Date.now() / 3_600_000) * 3_600_000 + hours * 3_600_000)
  const iso = t.toISOString()
  return { date: iso.slice(0, 10), start: iso.slice(11, 16) }
}
