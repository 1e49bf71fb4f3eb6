import { readFileSync, readdirSync } from 'node:fs'
import path from 'node:path'
import { and, eq } from 'drizzle-orm'
import { hashPassword } from '../../server/auth/password'
import type { Database } from '../../server/db/client'
import { courses, enrollments, labGroups, moduleVersions, modules, sections, users } from '../../server/db/schema'
import { insertModuleWithVersion, markPublished } from '../../server/repositories/modules'
import { toVersion } from '../../server/services/module-service'
import { handInReceipt, submitHandIn } from '../../server/services/submission-service'
import { createGrader } from '../../server/grading/grading-pool'
import { createLogger } from '../../server/logger'
import type { GradingContext } from '../../server/services/grading-service'
import type { ModuleFrontMatter } from '../../shared/modules/schema'
import { demoRuns } from './demo-runs'
import type { DemoRun } from './demo-runs'
import { hotFireRuns } from './hot-fire-runs'
import { jetRuns } from './jet-runs'
import type { DemoJetRun } from './jet-runs'
import { linkHandInsToRuns, seedStandSessions } from './stand-sessions'
import type { DemoRunLink } from './stand-sessions'
import {
  DEMO_GROUP_WITHOUT_HAND_IN,
  DEFAULT_DEMO_PASSWORD,
  DEMO_ADMIN,
  DEMO_COURSE,
  DEMO_INSTRUCTOR,
  DEMO_SECTIONS,
  DEMO_STUDENTS,
} from './scenario'

/** Inserts the demo course, people, sections and lab groups in one transaction, once. */
export async function seedDemo(
  db: Database,
  password = DEFAULT_DEMO_PASSWORD,
): Promise<{ created: boolean; users: number; courseId: number; addedModules?: boolean }> {
  const existing = await db
    .select({ id: courses.id })
    .from(courses)
    // By code and institution: the term is named from the day of seeding (see demoTerm).
    .where(and(eq(courses.code, DEMO_COURSE.code), eq(courses.institution, DEMO_COURSE.institution)))
  if (existing[0]) {
    // A demo database from before modules existed gets them (and the seeded hand-ins) now.
    const courseId = existing[0].id
    const any = await db.select({ id: modules.id }).from(modules).where(eq(modules.courseId, courseId)).limit(1)
    if (any.length > 0) {
      // A demo database from before stand sessions existed gets them now (nothing if it has them).
      await db.transaction(async (tx) => linkHandInsToRuns(tx, await seedStandSessions(tx, courseId)))
      return { created: false, users: 0, courseId }
    }
    const [inst] = await db.select({ id: users.id }).from(users).where(eq(users.email, DEMO_INSTRUCTOR.email))
    if (!inst) return { created: false, users: 0, courseId }
    await db.transaction((tx) => seedModules(tx, courseId, inst.id))
    const runs = await db.transaction((tx) => seedStandSessions(tx, courseId))
    await seedHandIns(db, courseId, runs)
    return { created: false, users: 0, courseId, addedModules: true }
  }

  // One hash per person (each with its own salt), computed before the transaction opens.
  const people = [DEMO_ADMIN, DEMO_INSTRUCTOR, ...DEMO_SECTIONS.map((s) => s.ta), ...DEMO_STUDENTS]
  const hashes = await Promise.all(people.map(() => hashPassword(password)))

  const courseId = await db.transaction(async (tx) => {
    const userIds = new Map<string, number>()
    for (const [i, p] of people.entries()) {
      const found = await tx.select({ id: users.id }).from(users).where(eq(users.email, p.email))
      if (found[0]) {
        userIds.set(p.email, found[0].id)
        continue
      }
      const [row] = await tx
        .insert(users)
        .values({
          email: p.email,
          displayName: p.displayName,
          passwordHash: hashes[i] ?? null,
          isSiteAdmin: p === DEMO_ADMIN,
        })
        .$returningId()
      userIds.set(p.email, row!.id)
    }
    const id = (
      await tx
        .insert(courses)
        .values({ ...DEMO_COURSE, term: demoTerm() })
        .$returningId()
    )[0]!.id
    const uid = (email: string) => {
      const v = userIds.get(email)
      if (v === undefined) throw new Error(`seed: no user ${email}`)
      return v
    }
    await tx.insert(enrollments).values({ userId: uid(DEMO_INSTRUCTOR.email), courseId: id, role: 'instructor' })
    const sectionIds = new Map<string, number>()
    for (const s of DEMO_SECTIONS) {
      const sid = (await tx.insert(sections).values({ courseId: id, name: s.name, meets: s.meets }).$returningId())[0]!
        .id
      sectionIds.set(s.name, sid)
      await tx.insert(enrollments).values({ userId: uid(s.ta.email), courseId: id, role: 'ta', sectionId: sid })
    }
    const groupIds = new Map<string, number>()
    for (const st of DEMO_STUDENTS) {
      const sectionId = sectionIds.get(st.section) ?? null
      let gid = groupIds.get(st.labGroup)
      if (gid === undefined) {
        gid = (
          await tx
            .insert(labGroups)
            .values({ courseId: id, sectionId, name: `Group ${st.labGroup}` })
            .$returningId()
        )[0]!.id
        groupIds.set(st.labGroup, gid)
      }
      await tx
        .insert(enrollments)
        .values({ userId: uid(st.email), courseId: id, role: 'student', sectionId, labGroupId: gid })
    }
    await seedModules(tx, id, uid(DEMO_INSTRUCTOR.email))
    return id
  })
  // The stand runs first, as at a real stand; each group's hand-in is then linked to its run.
  const runs = await db.transaction((tx) => seedStandSessions(tx, courseId))
  await seedHandIns(db, courseId, runs)
  return { created: true, users: people.length, courseId }
}

/** The four modules (fundamentals, cold flow, hot fire, reading the jet) are published. */
const PUBLISHED_MODULES = 4

const CONTENT = path.resolve(import.meta.dirname, '..', '..', 'content')

/**
 * The demo course's modules from content/*.md, in file-name order. The first four are published
 * (without e-mail: nobody is waiting for them at seed time); any later ones stay drafts.
 */
async function seedModules(
  tx: Parameters<Parameters<Database['transaction']>[0]>[0],
  courseId: number,
  instructorId: number,
) {
  const files = readdirSync(CONTENT)
    .filter((f) => f.endsWith('.md'))
    .sort()
  for (const [i, file] of files.entries()) {
    const source = currentDueDates(readFileSync(path.join(CONTENT, file), 'utf8'))
    const v = toVersion(source, file, DEMO_COURSE.timeZone)
    if (!v.valid)
      throw new Error(
        `seed: content/${file} has problems: ${v.issues.map((x) => `${x.path}: ${x.message}`).join('; ')}`,
      )
    const slug = file.replace(/^\d+-/, '').replace(/\.md$/, '')
    const { moduleId, versionId } = await insertModuleWithVersion(
      tx,
      { courseId, slug, position: i + 1, createdBy: instructorId },
      v,
    )
    if (i < PUBLISHED_MODULES) await markPublished(tx, moduleId, versionId, null, instructorId)
  }
}

/**
 * One cold-flow and one hot-fire hand-in per demo lab group (but one group, left for people to try
 * the forms), and a photograph of the jet from a few groups, made through the real hand-in service
 * so they are stored and graded like any other. Some runs are wrong on purpose
 * (scripts/demo/demo-runs.ts, hot-fire-runs.ts, jet-runs.ts), so the review queue has work.
 */
async function seedHandIns(db: Database, courseId: number, runs: readonly DemoRunLink[]) {
  // The seeded hand-ins go through the real service and are graded as a student's would be.
  const appUrl = process.env.APP_URL ?? 'http://127.0.0.1:3000'
  const grader = createGrader()
  const grading: GradingContext = {
    grader,
    logger: createLogger('warn'),
    receipt: (id, outcome) => handInReceipt(db, id, appUrl, outcome),
  }
  try {
    const cold = await publishedAssignment(db, courseId, 'cold-flow-characterisation')
    const coldRuns = cold ? demoRuns(cold.assignment) : demoRuns()
    if (cold) await seedGroupRuns(db, courseId, cold.moduleId, cold.assignment, coldRuns, 'run', grading, runs)
    // Each group carries its cold-flow specific impulse over to the hot-fire report.
    const hot = await publishedAssignment(db, courseId, 'hot-fire')
    if (hot) {
      const hotRuns = hotFireRuns(hot.assignment, coldRuns)
      await seedGroupRuns(db, courseId, hot.moduleId, hot.assignment, hotRuns, 'hot-fire', grading, runs)
    }
    const jet = await publishedAssignment(db, courseId, 'reading-the-jet')
    if (jet) await seedJetHandIns(db, courseId, jet.moduleId, jet.assignment, await jetRuns(jet.assignment), grading)
  } finally {
    await grader.close()
  }
}

/** The published assignment of the demo course's module with this slug, if it has one. */
async function publishedAssignment(
  db: Database,
  courseId: number,
  slug: string,
): Promise<{ moduleId: number; assignment: NonNullable<ModuleFrontMatter['assignment']> } | undefined> {
  const [mod] = await db
    .select({ id: modules.id, versionId: modules.publishedVersionId })
    .from(modules)
    .where(and(eq(modules.courseId, courseId), eq(modules.slug, slug)))
  if (!mod?.versionId) return undefined
  const [version] = await db
    .select({ fm: moduleVersions.frontMatter })
    .from(moduleVersions)
    .where(eq(moduleVersions.id, mod.versionId))
  const fm = version?.fm as unknown as ModuleFrontMatter | undefined
  return fm?.assignment ? { moduleId: mod.id, assignment: fm.assignment } : undefined
}

async function seedGroupRuns(
  db: Database,
  courseId: number,
  moduleId: number,
  a: NonNullable<ModuleFrontMatter['assignment']>,
  runs: readonly DemoRun[],
  filePrefix: string,
  grading: GradingContext,
  standRuns: readonly DemoRunLink[],
) {
  const table = a.tables[0]!
  for (const run of runs) {
    if (run.group === DEMO_GROUP_WITHOUT_HAND_IN) continue
    const e = await handingInMember(db, courseId, run.group)
    if (!e) continue
    await submitHandIn(
      db,
      e,
      moduleId,
      {
        mappings: { [table.key]: { ...run.mapping } },
        measurements: Object.fromEntries(
          a.measurements.map((m) => [
            m.key,
            { value: run.measurements[m.key]!, unit: m.unit, ...(m.pressure ? { pressure: m.pressure } : {}) },
          ]),
        ),
        reported: Object.fromEntries(a.results.map((r) => [r.key, { value: run.reported[r.key]!, unit: r.unit }])),
      },
      [
        {
          field: `table:${table.key}`,
          filename: `${filePrefix}-${run.group.toLowerCase()}.csv`,
          contentType: 'text/csv',
          bytes: Buffer.from(run.csv, 'utf8'),
        },
      ],
      {
        grading,
        // The signed-off stand run the group's hand-in reports (the hot-fire sheet requires one).
        runRecordId: standRuns.find((l) => l.labGroupId === e.labGroupId && l.moduleId === moduleId)?.runId,
      },
    )
  }
}

/** The student of a demo lab group who hands in for it, as an enrollment of the demo course. */
async function handingInMember(db: Database, courseId: number, group: string) {
  const member = DEMO_STUDENTS.find((s) => s.labGroup === group)
  if (!member) return undefined
  const [e] = await db
    .select({ userId: enrollments.userId, sectionId: enrollments.sectionId, labGroupId: enrollments.labGroupId })
    .from(enrollments)
    .innerJoin(users, eq(users.id, enrollments.userId))
    .where(and(eq(enrollments.courseId, courseId), eq(users.email, member.email)))
  return e
    ? { courseId, userId: e.userId, role: 'student' as const, sectionId: e.sectionId, labGroupId: e.labGroupId }
    : undefined
}

/** The jet photographs: the run log, the picture (file field photo:<key>) and its marks (payload images). */
async function seedJetHandIns(
  db: Database,
  courseId: number,
  moduleId: number,
  a: NonNullable<ModuleFrontMatter['assignment']>,
  runs: readonly DemoJetRun[],
  grading: GradingContext,
) {
  const table = a.tables[0]!
  const image = a.images[0]!
  for (const run of runs) {
    const e = await handingInMember(db, courseId, run.group)
    if (!e) continue
    await submitHandIn(
      db,
      e,
      moduleId,
      {
        mappings: { [table.key]: { ...run.mapping } },
        measurements: Object.fromEntries(
          a.measurements.map((m) => [
            m.key,
            { value: run.measurements[m.key]!, unit: m.unit, ...(m.pressure ? { pressure: m.pressure } : {}) },
          ]),
        ),
        reported: Object.fromEntries(a.results.map((r) => [r.key, { value: run.reported[r.key]!, unit: r.unit }])),
        images: { [image.key]: run.photo.marks },
      },
      [
        {
          field: `table:${table.key}`,
          filename: `jet-run-${run.group.toLowerCase()}.csv`,
          contentType: 'text/csv',
          bytes: Buffer.from(run.csv, 'utf8'),
        },
        {
          field: `photo:${image.key}`,
          filename: run.photo.filename,
          contentType: run.photo.contentType,
          bytes: run.photo.bytes,
        },
      ],
      { grading },
    )
  }
}

/**
 * The demo course's term, named after the weeks its shifted due dates fall in (the first one two to
 * three weeks after `now`, see currentDueDates): Winter for January to April, Summer for May to
 * August, Fall for September to December.
 */
export function demoTerm(now = new Date()): string {
  const firstDue = new Date(now.getTime() + 14 * 86_400_000)
  const month = firstDue.getUTCMonth()
  const season = month < 4 ? 'Winter' : month < 8 ? 'Summer' : 'Fall'
  return `${season} ${firstDue.getUTCFullYear()}`
}

const DATE_TIME_LINE = /^(\s*(?:at|acceptUntil):\s*)(\d{4})-(\d{2})-(\d{2})T(\d{2}:\d{2})/gm

/**
 * The demo modules' dates, moved by whole weeks so the earliest due date lies two to three weeks
 * after `now`: a demo (or a test) seeded any day finds its hand-ins open, with the same weekdays,
 * times and spacing as written in content/.
 */
export function currentDueDates(source: string, now = new Date()): string {
  const dates = [...source.matchAll(DATE_TIME_LINE)].map((m) => Date.UTC(Number(m[2]), Number(m[3]) - 1, Number(m[4])))
  if (dates.length === 0) return source
  const earliest = Math.min(...dates)
  const target = now.getTime() + 14 * 86_400_000
  const weeks = Math.ceil((target - earliest) / (7 * 86_400_000))
  const shift = weeks * 7 * 86_400_000
  return source.replace(DATE_TIME_LINE, (_all, lead: string, y: string, mo: string, d: string, hm: string) => {
    const day = new Date(Date.UTC(Number(y), Number(mo) - 1, Number(d)) + shift)
    return `${lead}${day.toISOString().slice(0, 10)}T${hm}`
  })
}
