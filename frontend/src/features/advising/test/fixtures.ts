import type {
  AdvisingNote,
  SentSummary,
  ElectiveEstimate,
  ElectiveExplanation,
  ElectivesResponse,
  HistoryEntry,
  RecentStudent,
  Shortlist,
  SignalExplanation,
  StudentHeader,
  SummaryRequest,
  TermsResponse,
} from '@kinpath/contracts';
import { installFakeApi, type FakeHandler } from '../../../test/fake-api';

/** Invented Halden Reach records for the advising screens. */
export const REF = 'st_7Qx2mK9a';
export const STUDENT_NUMBER = 'HR1000542';

export const STUDENT: StudentHeader = {
  ref: REF,
  program: 'Computing BSc',
  status: 'active',
  entryTerm: '2023-FA',
  creditsEarned: 66,
  gradePointAverage: 3.214,
  attempts: 24,
};

export const RECENT: RecentStudent[] = [
  { ...STUDENT, lookedUpAt: '2026-03-02T09:15:00.000Z' },
  {
    ref: 'st_b81LwQe0',
    program: 'Music BA',
    status: 'on_leave',
    entryTerm: '2022-FA',
    lookedUpAt: '2026-03-01T14:40:00.000Z',
  },
];

export const HISTORY: HistoryEntry[] = [
  {
    term: '2025-FA',
    courseCode: 'CMP 2210',
    title: 'Data Structures',
    grade: 'B+',
    gradePoints: 3.3,
    satisfaction: 4,
    creditsAttempted: 3,
  },
  {
    term: '2025-SP',
    courseCode: 'MTH 1120',
    title: 'Discrete Structures',
    grade: 'A-',
    gradePoints: 3.7,
    satisfaction: 5,
    creditsAttempted: 3,
  },
  {
    term: '2025-FA',
    courseCode: 'ART 1050',
    title: 'Drawing from Life',
    grade: 'W',
    gradePoints: null,
    satisfaction: null,
    creditsAttempted: 3,
  },
  {
    term: '2024-FA',
    courseCode: 'CMP 1110',
    title: 'Programming Foundations',
    grade: 'A',
    gradePoints: 4,
    satisfaction: 4,
    creditsAttempted: 4,
  },
];

function elective(overrides: Partial<ElectiveEstimate> & { courseCode: string }): ElectiveEstimate {
  return {
    title: 'Untitled',
    department: 'CMP',
    credits: 3,
    offered: true,
    eligible: true,
    ineligibleReasons: [],
    predictedGrade: 3.12,
    predictedGradeLetter: 'B',
    predictedSatisfaction: 3.84,
    fit: 72.4,
    fitBasis: 'both',
    confidence: 'high',
    basis: 'neighbours',
    bases: { grade: 'neighbours', satisfaction: 'neighbours' },
    neighbours: { grade: 24, satisfaction: 21 },
    kinStrength: { grade: 9.6, satisfaction: 6.3 },
    likelyRange: {
      grade: { low: 2.7, high: 3.55, lowLabel: 'B-', highLabel: 'A-' },
      satisfaction: { low: 3.0, high: 4.6, lowLabel: '3.0', highLabel: '4.6' },
    },
    ...overrides,
  };
}

export const ELECTIVES: ElectiveEstimate[] = [
  elective({
    courseCode: 'CMP 3110',
    title: 'Compilers and Interpreters',
    predictedGrade: 3.41,
    predictedGradeLetter: 'B+',
    predictedSatisfaction: 4.12,
    fit: 81.3,
    neighbours: { grade: 28, satisfaction: 26 },
  }),
  elective({
    courseCode: 'ART 2210',
    title: 'Printmaking Studio',
    department: 'ART',
    predictedGrade: 2.87,
    predictedGradeLetter: 'B-',
    predictedSatisfaction: 3.5,
    fit: 57.9,
    confidence: 'low',
    basis: 'baseline',
    bases: { grade: 'baseline', satisfaction: 'baseline' },
    neighbours: { grade: 3, satisfaction: 2 },
    kinStrength: { grade: 0, satisfaction: 0 },
  }),
  elective({
    courseCode: 'HIS 2040',
    title: 'Harbours and Trade Routes',
    department: 'HIS',
    predictedGrade: null,
    predictedGradeLetter: null,
    predictedSatisfaction: null,
    fit: null,
    fitBasis: null,
    confidence: 'low',
    basis: 'none',
    bases: { grade: 'none', satisfaction: 'none' },
    neighbours: { grade: 0, satisfaction: 0 },
    kinStrength: { grade: 0, satisfaction: 0 },
    likelyRange: { grade: null, satisfaction: null },
  }),
  elective({
    courseCode: 'CMP 3420',
    title: 'Distributed Ledgers',
    eligible: false,
    ineligibleReasons: [
      { code: 'prerequisite_not_passed', message: 'Prerequisite not passed: CMP 2310.' },
    ],
    predictedGrade: 2.95,
    predictedGradeLetter: 'B',
    predictedSatisfaction: 3.7,
    fit: 64.2,
    confidence: 'medium',
    neighbours: { grade: 11, satisfaction: 9 },
    kinStrength: { grade: 2.1, satisfaction: 1.4 },
  }),
  elective({
    courseCode: 'MTH 1120',
    title: 'Discrete Structures',
    department: 'MTH',
    eligible: false,
    ineligibleReasons: [{ code: 'already_passed', message: 'Already passed in 2025-SP.' }],
  }),
];

export const ELECTIVES_RESPONSE: ElectivesResponse = {
  term: '2026-SP',
  settingsVersion: 3,
  confidenceRule:
    'high when the 80 % likely range spans at most 20 % of the scale, medium up to 35 %, low beyond.',
  modelBuiltAt: '2026-02-20T08:00:00.000Z',
  electives: ELECTIVES,
};

export const TERMS: TermsResponse = {
  terms: [
    { term: '2025-FA', records: 4620, offerings: 101 },
    { term: '2026-SP', records: 0, offerings: 98 },
  ],
  current: '2025-FA',
  next: '2026-SP',
};

function signal(overrides: Partial<SignalExplanation>): SignalExplanation {
  return {
    value: 3.41,
    basis: 'neighbours',
    kinCount: 28,
    similarityRange: { min: 0.21, max: 0.78 },
    spread: 0.44,
    outcomes: [
      { value: 4, label: 'A', count: 9 },
      { value: 3.3, label: 'B+', count: 11 },
      { value: 2.7, label: 'B-', count: 8 },
    ],
    outcomesSuppressed: null,
    sharedCourses: [
      { courseCode: 'CMP 2210', title: 'Data Structures', contribution: 0.41 },
      { courseCode: 'MTH 1120', title: 'Discrete Structures', contribution: 0.27 },
    ],
    againstShare: 0.12,
    kinStrength: 9.6,
    likelyRange: { low: 2.7, high: 3.55, lowLabel: 'B-', highLabel: 'A-' },
    confidence: 'medium',
    ...overrides,
  };
}

export function explanation(
  courseCode: string,
  grade: Partial<SignalExplanation> = {},
  satisfaction: Partial<SignalExplanation> = {},
): ElectiveExplanation {
  return {
    courseCode,
    title: ELECTIVES.find((e) => e.courseCode === courseCode)?.title ?? courseCode,
    settingsVersion: 3,
    method: {
      name: 'User-based collaborative filtering',
      similarity: 'cosine similarity with inverse user frequency',
      description:
        "Mean-centred weighted average of the kin's outcomes: each similar past student's result, relative to their own average, weighted by how alike they are.",
    },
    disclosureMinimum: 5,
    grade: signal(grade),
    satisfaction: signal({ value: 4.12, kinCount: 26, outcomes: null, ...satisfaction }),
  };
}

export const EMPTY_SHORTLIST: Shortlist = {
  courseCodes: [],
  items: [],
  updatedAt: null,
  updatedByName: null,
  updatedByEmail: null,
};

export const SENT: SentSummary[] = [
  {
    id: 's1',
    sentAt: '2026-02-27T10:20:00.000Z',
    to: 'student@halden.example',
    term: '2026-SP',
    courseCodes: ['CMP 3110', 'ART 2210'],
    senderName: 'Priya Okonkwo-Hale',
  },
];

export const NOTES: AdvisingNote[] = [
  {
    id: 'n1',
    text: 'Wants a studio course next to the compilers course.',
    createdAt: '2026-02-27T10:05:00.000Z',
    editedAt: null,
    authorName: 'Priya Okonkwo-Hale',
    authorEmail: 'advisor@halden.example',
  },
];

/** The advisor routes as the server answers them, with a shortlist and notes kept in memory. */
export function fakeAdvisingApi(overrides: Record<string, FakeHandler> = {}) {
  let shortlist: Shortlist = { ...EMPTY_SHORTLIST };
  const notes = [...NOTES];
  const path = `/students/${REF}`;
  const api = installFakeApi({
    'GET /terms': () => ({ status: 200, data: TERMS }),
    'GET /students/recent': () => ({ status: 200, data: RECENT }),
    [`GET ${path}`]: () => ({ status: 200, data: STUDENT }),
    [`GET ${path}/history`]: () => ({ status: 200, data: HISTORY }),
    [`GET ${path}/electives`]: () => ({ status: 200, data: ELECTIVES_RESPONSE }),
    [`GET ${path}/electives/${encodeURIComponent('CMP 3110')}/explanation`]: () => ({
      status: 200,
      data: explanation('CMP 3110'),
    }),
    [`GET ${path}/shortlist`]: () => ({ status: 200, data: shortlist }),
    [`PUT ${path}/shortlist`]: ({ body }) => {
      const { courseCodes } = body as { courseCodes: string[] };
      shortlist = {
        courseCodes,
        items: courseCodes.map((code) => ({
          courseCode: code,
          title: ELECTIVES.find((e) => e.courseCode === code)?.title ?? code,
          addedAt: '2026-03-02T09:20:00.000Z',
          addedByName: 'Priya Okonkwo-Hale',
          addedByEmail: 'advisor@halden.example',
        })),
        updatedAt: '2026-03-02T09:20:00.000Z',
        updatedByName: 'Priya Okonkwo-Hale',
        updatedByEmail: 'advisor@halden.example',
      };
      return { status: 200, data: shortlist };
    },
    [`GET ${path}/notes`]: () => ({ status: 200, data: [...notes] }),
    [`GET ${path}/summaries`]: () => ({ status: 200, data: SENT }),
    [`PATCH ${path}/notes/n1`]: ({ body }) => {
      notes[0] = {
        ...notes[0],
        text: (body as { text: string }).text,
        editedAt: '2026-03-02T10:00:00.000Z',
      };
      return { status: 200, data: notes[0] };
    },
    [`DELETE ${path}/notes/n1`]: () => {
      notes.splice(0, 1);
      return { status: 204 };
    },
    [`POST ${path}/notes`]: ({ body }) => {
      const note: AdvisingNote = {
        id: `n${notes.length + 1}`,
        text: (body as { text: string }).text,
        createdAt: '2026-03-02T09:30:00.000Z',
        editedAt: null,
        authorName: 'Priya Okonkwo-Hale',
        authorEmail: 'advisor@halden.example',
      };
      notes.push(note);
      return { status: 201, data: note };
    },
    [`POST ${path}/summary`]: ({ body }) => {
      const request = body as SummaryRequest;
      return {
        status: 201,
        data: {
          to: request.to,
          subject: 'Your electives for 2026-SP',
          term: request.term ?? '2026-SP',
          courseCodes: request.courseCodes,
          sentAt: '2026-03-02T09:40:00.000Z',
        },
      };
    },
    ...overrides,
  });
  return api;
}
