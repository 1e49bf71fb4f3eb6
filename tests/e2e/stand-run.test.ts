import { count, eq } from 'drizzle-orm'
import type { Browser } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import {
  bookings,
  enrollments,
  runEntries,
  runPeople,
  runRecords,
  standModules,
  standSlots,
  stands,
  submissions,
} from '../../server/db/schema'
import type { Fixture, TestContext } from '../helpers/app'
import { PASSWORD, seedFixture } from '../helpers/app'
import { apiSignIn, launchBrowser, noSideways, screenshotPath, serveApp, signIn } from '../helpers/browser'

let app: Awaited<ReturnType<typeof serveApp>>
let chrome: Awaited<ReturnType<typeof launchBrowser>>
let browser: Browser
let fx: Fixture
let sheet: { id: number; slug: string }
let bookingId = 0

/**
 * A sheet of our own that runs on the stand and needs a signed-off run: one measurement, one result
 * (the throat area from its diameter), and a checklist with a staff-only hold point, a hold point
 * the group may tick, and a plain item.
 */
const SOURCE = `---
title: Throat check on the stand
due:
  at: "2030-06-01T17:00"
  timeZone: UTC
groupSubmission: true
standRuns: 1
requiresSignedRun: true
checklist:
  - { key: leak-check, text: Leak check passed at working pressure, staff: true, hold: true }
  - { key: barrier, text: Everyone behind the barrier, hold: true }
  - { key: hearing, text: Hearing protection on }
assignment:
  measurements:
    - { key: d_throat, label: Throat diameter, unit: mm, min: 1, max: 10 }
  results:
    - key: throat_area
      label: Throat area
      unit: mm2
      expected: areaFromDiameter(d_throat)
      tolerance: { relative: 0.01 }
      points: 1
---

Invented test sheet.
`
// π/4 · (6 mm)² = 9π mm², worked by hand.
const THROAT_AREA_MM2 = (9 * Math.PI).toFixed(3)

beforeAll(async () => {
  app = await serveApp()
  const db = app.db.db
  fx = await seedFixture({ handle: app.db } as TestContext)
  const inst = await apiAs(fx.instructor.email)
  const made = await inst.agent
    .post(`/api/courses/${fx.courseId}/modules`)
    .set('x-csrf-token', inst.csrf)
    .send({ source: SOURCE })
  if (made.status !== 201) throw new Error(`create failed: ${made.status} ${JSON.stringify(made.body)}`)
  sheet = { id: made.body.id, slug: made.body.slug }
  await inst.agent
    .post(`/api/courses/${fx.courseId}/modules/${sheet.id}/publish`)
    .set('x-csrf-token', inst.csrf)
    .send({ versionId: made.body.current.id })
    .expect(200)
  // The booking as the booking pages would make it (they are built apart from this page).
  const [stand] = await db
    .insert(stands)
    .values({ courseId: fx.courseId, name: 'Stand One', location: 'Bay 2' })
    .$returningId()
  await db.insert(standModules).values({ standId: stand!.id, moduleId: sheet.id })
  const [slot] = await db
    .insert(standSlots)
    .values({ standId: stand!.id, sectionId: fx.sectionA, startsAt: new Date('2027-03-02T14:00:00Z'), minutes: 30 })
    .$returningId()
  const [member] = await db
    .select({ labGroupId: enrollments.labGroupId })
    .from(enrollments)
    .where(eq(enrollments.userId, fx.student.id))
  const [b] = await db
    .insert(bookings)
    .values({ slotId: slot!.id, labGroupId: member!.labGroupId!, moduleId: sheet.id })
    .$returningId()
  bookingId = b!.id
  chrome = await launchBrowser()
  browser = chrome.browser
}, 120_000)

afterAll(async () => {
  await chrome?.close()
  await app?.close()
})

describe('a run at the stand, signed off on a phone, and the hand-in made against it', () => {
  it('the TA opens the run, ticks every item (one by keyboard), signs it off; the student hands in against it; the review page shows the run', async () => {
    const phone = { viewport: { width: 375, height: 812 }, isMobile: true, hasTouch: true }
    const taCtx = await browser.newContext(phone)
    const ta = await taCtx.newPage()
    await signIn(ta, app.url, fx.ta.email, PASSWORD)
    await ta.goto(`${app.url}/c/${fx.courseSlug}/stand-time/${bookingId}`)
    await ta.getByRole('heading', { name: 'The run is not opened yet' }).waitFor()
    const safety = ta.getByTestId('run-safety')
    await expect.poll(() => safety.innerText()).toContain('supports and does not replace')
    const words = await safety.innerText()
    for (const w of [
      'Pressure vessels',
      'Hot fire',
      'hearing protection',
      'Local codes',
      'safety office',
      'licensed practice',
    ]) {
      expect(words).toContain(w)
    }
    await ta.getByRole('button', { name: 'Open the run' }).click()
    await ta.getByRole('heading', { name: 'Pre-run checklist' }).waitFor()
    const list = ta.getByTestId('run-checklist')
    // Hold points are said in words, not by colour alone.
    expect(await list.locator('[data-item="leak-check"]').innerText()).toContain('Hold point')
    expect(await list.locator('[data-item="hearing"]').innerText()).not.toContain('Hold point')

    // The first item by keyboard: focus its box and press Space.
    const leak = ta.getByRole('checkbox', { name: /Leak check passed/ })
    await leak.focus()
    await ta.keyboard.press('Space')
    const ticked = (key: string) =>
      expect.poll(() => list.locator(`[data-item="${key}"] .state`).innerText()).toContain(`Ticked by ta`)
    await ticked('leak-check')
    for (const [key, name] of [
      ['barrier', /Everyone behind the barrier/],
      ['hearing', /Hearing protection on/],
    ] as const) {
      await ta.getByRole('checkbox', { name }).check()
      await ticked(key)
    }
    await noSideways(ta)
    await ta.screenshot({ path: screenshotPath('stand-run-checklist-375'), fullPage: true })

    // Sign-off: the group's student is preselected; the TA marks themself present too.
    const present = ta.getByRole('group', { name: 'Who was at the stand' })
    expect(await present.getByRole('checkbox', { name: /student / }).isChecked()).toBe(true)
    await present.getByRole('checkbox', { name: /ta .*\(TA\)/ }).check()
    await ta.getByRole('button', { name: 'Sign the run off' }).click()
    const signed = ta.getByTestId('run-signed-off')
    await signed.waitFor()
    const signedText = await signed.innerText()
    expect(signedText).toContain('Completed')
    expect(signedText).toMatch(/Signed off by\s+ta /)
    expect(await ta.getByRole('checkbox', { name: /Hearing protection on/ }).isDisabled()).toBe(true)
    expect(await ta.getByTestId('run-history').innerText()).toContain('Signed off')
    await noSideways(ta)
    await ta.screenshot({ path: screenshotPath('stand-run-signed-375'), fullPage: true })

    const [run] = await app.db.db.select().from(runRecords).where(eq(runRecords.bookingId, bookingId))
    expect(run!.outcome).toBe('completed')
    expect(run!.signedOffBy).toBe(fx.ta.id)
    const kinds = await app.db.db
      .select({ kind: runEntries.kind, itemKey: runEntries.itemKey })
      .from(runEntries)
      .where(eq(runEntries.runId, run!.id))
      .orderBy(runEntries.id)
    expect(kinds).toEqual([
      { kind: 'tick', itemKey: 'leak-check' },
      { kind: 'tick', itemKey: 'barrier' },
      { kind: 'tick', itemKey: 'hearing' },
      { kind: 'sign-off', itemKey: null },
    ])
    const there = await app.db.db.select({ id: runPeople.userId }).from(runPeople).where(eq(runPeople.runId, run!.id))
    expect(there.map((p) => p.id).sort()).toEqual([fx.student.id, fx.ta.id].sort())

    // The student hands in against that run.
    const stCtx = await browser.newContext(phone)
    const st = await stCtx.newPage()
    await signIn(st, app.url, fx.student.email, PASSWORD)
    await st.goto(`${app.url}/c/${fx.courseSlug}/sheets/${sheet.slug}/hand-in`)
    const choice = st.getByTestId('hand-in-run')
    await choice.waitFor()
    expect(await choice.innerText()).toContain('signed-off stand run')
    expect(await choice.getByRole('link', { name: 'Stand time' }).getAttribute('href')).toBe(
      `/c/${fx.courseSlug}/stand-time`,
    )
    const option = choice.getByRole('radio', { name: /Stand One: Completed, signed off by ta / })
    await expect.poll(() => option.isChecked()).toBe(true)
    await st.getByRole('textbox', { name: 'Throat diameter', exact: true }).fill('6')
    await st.getByRole('textbox', { name: 'Throat area', exact: true }).fill(THROAT_AREA_MM2)
    await noSideways(st)
    await st.getByRole('button', { name: /Hand in attempt 1 of/ }).click()
    await st.waitForURL(/\/hand-ins\/\d+$/)
    const [sub] = await app.db.db
      .select({ id: submissions.id, run: submissions.runRecordId })
      .from(submissions)
      .where(eq(submissions.moduleId, sheet.id))
    expect(sub!.run).toBe(run!.id)
    const [n] = await app.db.db.select({ n: count() }).from(submissions).where(eq(submissions.moduleId, sheet.id))
    expect(n!.n).toBe(1)

    // The TA's review page shows the run the hand-in was made against.
    await ta.goto(`${app.url}/c/${fx.courseSlug}/review/${sub!.id}`)
    const linked = ta.getByTestId('review-run')
    await linked.waitFor()
    const linkedText = await linked.innerText()
    expect(linkedText).toContain('Completed')
    expect(linkedText).toContain('Tue, Mar 2, 2027')
    expect(linkedText).toMatch(/Signed off by\s+ta /)
    await noSideways(ta)
    await taCtx.close()
    await stCtx.close()
  })
})

const apiAs = (email: string) => apiSignIn(app.url, email, PASSWORD)
