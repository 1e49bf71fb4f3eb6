// The demo scenario: a fictional university, course, staff and students, all invented for
// Isentrope's demo. Any resemblance to real people or institutions is unintended.

export const DEMO_DOMAIN = 'calder-ridge.example'

/** The demo course; its term is named when it is seeded (see `demoTerm`), as its dates are. */
export const DEMO_COURSE = {
  code: 'PRL 341',
  title: 'Propulsion Laboratory: Nozzles and Blow-down Testing',
  institution: 'Calder Ridge Polytechnic University (fictional)',
  timeZone: 'America/Denver',
}

export const DEMO_ADMIN = { email: `admin@${DEMO_DOMAIN}`, displayName: 'Site Administrator' }
export const DEMO_INSTRUCTOR = { email: `instructor@${DEMO_DOMAIN}`, displayName: 'Dr. Tomasz Reyvant' }

export const DEMO_SECTIONS = [
  {
    name: 'Section A',
    meets: 'Tue 13:00–16:00, Test Bay 2',
    ta: { email: `ta.a@${DEMO_DOMAIN}`, displayName: 'Ines Vallory' },
  },
  {
    name: 'Section B',
    meets: 'Thu 09:00–12:00, Test Bay 2',
    ta: { email: `ta.b@${DEMO_DOMAIN}`, displayName: 'Kofi Brannagh' },
  },
] as const

/** 24 invented students: 12 per section, in lab groups of three. */
const FIRST = [
  'Aletta',
  'Bram',
  'Corin',
  'Dalia',
  'Emeric',
  'Fenna',
  'Galen',
  'Hesper',
  'Ivo',
  'Jorunn',
  'Kasimir',
  'Liesel',
  'Marek',
  'Noor',
  'Osric',
  'Pella',
  'Quillon',
  'Rosalind',
  'Sefton',
  'Talitha',
  'Ulric',
  'Vesna',
  'Wystan',
  'Yselle',
]
const LAST = [
  'Ashgrove',
  'Brightwater',
  'Coldharbour',
  'Dunmere',
  'Elderfield',
  'Farrowby',
  'Glenholt',
  'Hartsmoor',
  'Ivybridge',
  'Juniper',
  'Kestrelton',
  'Larkspur',
  'Millbeck',
  'Northwold',
  'Oakenshaw',
  'Pennick',
  'Quarrendon',
  'Rookhaven',
  'Stonecrop',
  'Thistlewood',
  'Underhill',
  'Vantry',
  'Whinmoor',
  'Yarrowdale',
]

export interface DemoStudent {
  email: string
  displayName: string
  section: string
  labGroup: string
}

export const DEMO_STUDENTS: DemoStudent[] = FIRST.map((first, i) => {
  const last = LAST[i] ?? 'Student'
  const section = i < 12 ? 'Section A' : 'Section B'
  const groupNo = Math.floor((i % 12) / 3) + 1
  return {
    email: `${first.toLowerCase()}.${last.toLowerCase()}@students.${DEMO_DOMAIN}`,
    displayName: `${first} ${last}`,
    section,
    labGroup: `${section.slice(-1)}${groupNo}`,
  }
})

/** The first student: the one the README tells people to sign in as. */
export const DEMO_STUDENT = DEMO_STUDENTS[0]!

export const DEFAULT_DEMO_PASSWORD = 'nozzle-demo-2027'

/** The one lab group whose cold-flow run is not seeded, so people can try the hand-in form. */
export const DEMO_GROUP_WITHOUT_HAND_IN = 'B3'
