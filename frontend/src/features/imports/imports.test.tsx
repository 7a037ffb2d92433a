import { afterEach, describe, expect, it, vi } from 'vitest';
import { configure, screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import type {
  ImportPreview,
  ImportRejection,
  ImportSummary,
  SavedImportMapping,
} from '@kinpath/contracts';
import { installFakeApi, type FakeHandler } from '../../test/fake-api';
import { renderApp, renderWithProviders, signInAs } from '../../test/render';
import { ValidationReport } from './components/ValidationReport';
import { commitConfirmation, rollbackConfirmation, uploadFailure } from './messages';
import { awaitingModel } from './words';
import { modelCaughtUp } from './components/ImportHistory';

// Whole pages in jsdom answer slowly on a busy machine; wait longer than the default second.
configure({ asyncUtilTimeout: 8000 });

let api: ReturnType<typeof installFakeApi> | undefined;
afterEach(() => {
  api?.restore();
  vi.restoreAllMocks();
});

const TERM_DATA_ID = '5b0e7c1a-3f7d-4c59-9a57-2f1c0f6d9e11';

function summary(overrides: Partial<ImportSummary> = {}): ImportSummary {
  return {
    id: TERM_DATA_ID,
    kind: 'records',
    status: 'validated',
    fileName: 'term-data-2026-FA.csv',
    fileDigest: 'ab'.repeat(32),
    mapping: null,
    rowsTotal: 1207,
    rowsAccepted: 1204,
    rowsRejected: 3,
    progress: { phase: null, done: 1207, total: 1207 },
    partial: false,
    commitRequested: false,
    message: null,
    createdAt: '2026-11-30T09:15:00.000Z',
    createdBy: 'registrar@halden.example',
    committedAt: null,
    committedBy: null,
    rolledBackAt: null,
    rolledBackBy: null,
    discardedAt: null,
    discardedBy: null,
    leftOut: { columns: [], fields: [] },
    rejectedRowsAvailable: true,
    durationMs: 840,
    validationMs: 840,
    commitMs: null,
    modelRefreshedAt: null,
    ...overrides,
  };
}

const REJECTIONS: ImportRejection[] = [
  {
    line: 17,
    column: 'grade',
    value: 'Q',
    reason: "'Q' is not on the grade scale (A … F) nor a mark (W, I, IP, AU, P, NP)",
  },
  {
    line: 40,
    column: 'grade',
    value: 'Z',
    reason: "'Z' is not on the grade scale (A … F) nor a mark (W, I, IP, AU, P, NP)",
  },
  {
    line: 52,
    column: 'course_code',
    value: 'HRX 9999',
    reason: "course 'HRX 9999' is not in the catalogue",
  },
  {
    line: 61,
    column: 'term',
    value: '2026-XX',
    reason: "'2026-XX' is not a term of the form YYYY-XX",
  },
];

const DEFAULT_HEADERS_PREVIEW: ImportPreview = {
  delimiter: ',',
  headers: ['course_code', 'title', 'department'],
  rows: [['HRX 1101', 'Tidal Studies', 'HRX']],
  suggestedMappings: {
    catalogue: { course_code: 'course_code', title: 'title', department: 'department' },
    offerings: { course_code: 'course_code' },
    students: {},
    records: { course_code: 'course_code' },
  },
  missingFields: {
    catalogue: [],
    offerings: ['term', 'capacity'],
    students: ['student_id'],
    records: ['student_id', 'term', 'grade'],
  },
  likelyKind: 'catalogue',
  encoding: 'utf-8',
};

const OTHER_HEADERS_PREVIEW: ImportPreview = {
  delimiter: ';',
  headers: ['Student No', 'Semester', 'Course', 'Result'],
  rows: [
    ['900114', '2026-FA', 'HRX 1101', 'B+'],
    ['900277', '2026-FA', 'HRX 1102', 'A-'],
  ],
  suggestedMappings: {
    catalogue: { Course: 'course_code' },
    offerings: { Semester: 'term', Course: 'course_code' },
    students: { 'Student No': 'student_id' },
    records: { 'Student No': 'student_id', Semester: 'term', Course: 'course_code' },
  },
  missingFields: {
    catalogue: ['title', 'department'],
    offerings: ['capacity'],
    students: [],
    records: ['grade'],
  },
  likelyKind: 'students',
  encoding: 'utf-8',
};

function importsApi(extra: Record<string, FakeHandler> = {}) {
  return installFakeApi({
    'GET /imports': () => ({ status: 200, data: [] }),
    'GET /imports/mappings': () => ({ status: 200, data: [] }),
    'GET /terms': () => ({ status: 200, data: { terms: [], current: null, next: null } }),
    ...extra,
  });
}

const csv = (name: string, text: string) => new File([text], name, { type: 'text/csv' });
const uploadForm = () => within(screen.getByRole('form', { name: 'New import' }));

// Whole-page tests with MUI in jsdom take a few seconds each.
describe('the upload form', { timeout: 40_000 }, () => {
  it('asks for a kind and a file before anything is sent', async () => {
    api = importsApi();
    signInAs('registrar');
    renderApp('/registrar/imports');
    const user = userEvent.setup();
    await screen.findByRole('heading', { level: 1, name: 'Imports' });

    await user.click(uploadForm().getByRole('button', { name: 'Upload and check' }));

    expect(await uploadForm().findByText('Choose what kind of file this is.')).toBeInTheDocument();
    expect(uploadForm().getByText('Choose a CSV file to import.')).toBeInTheDocument();
    expect(uploadForm().getByLabelText('Kind of file')).toHaveAttribute('aria-invalid', 'true');

    await user.selectOptions(uploadForm().getByLabelText('Kind of file'), 'catalogue');
    await user.click(uploadForm().getByRole('button', { name: 'Upload and check' }));
    await waitFor(() =>
      expect(uploadForm().queryByText('Choose what kind of file this is.')).toBeNull(),
    );
    expect(uploadForm().getByText('Choose a CSV file to import.')).toBeInTheDocument();
    expect(api.requests.filter((r) => r.method === 'POST')).toEqual([]);
  });

  it('asks to confirm the encoding of a file that is not UTF-8, then sends it with that encoding', async () => {
    let sent: FormData | undefined;
    const previews: (string | null)[] = [];
    api = importsApi({
      'POST /imports/preview': ({ body }) => {
        const encoding = (body as FormData).get('encoding') as string | null;
        previews.push(encoding);
        return encoding === 'windows-1252'
          ? { status: 200, data: { ...DEFAULT_HEADERS_PREVIEW, encoding: 'windows-1252' } }
          : {
              status: 422,
              data: {
                statusCode: 422,
                message:
                  'The file is not UTF-8; it looks like Windows-1252 (Western European). Confirm the encoding to read it in, or save the file as UTF-8.',
                error: 'Unprocessable Entity',
                details: {
                  detectedEncoding: 'windows-1252',
                  encodingName: 'Windows-1252 (Western European)',
                },
              },
            };
      },
      'POST /imports': ({ body }) => {
        sent = body as FormData;
        return { status: 202, data: { id: TERM_DATA_ID, status: 'queued' } };
      },
      [`GET /imports/${TERM_DATA_ID}`]: () => ({
        status: 200,
        data: summary({ kind: 'catalogue' }),
      }),
      [`GET /imports/${TERM_DATA_ID}/errors`]: () => ({ status: 200, data: [] }),
    });
    signInAs('registrar');
    renderApp('/registrar/imports');
    const user = userEvent.setup();
    await screen.findByRole('heading', { level: 1, name: 'Imports' });
    await user.selectOptions(uploadForm().getByLabelText('Kind of file'), 'catalogue');
    await user.upload(uploadForm().getByLabelText('Choose a CSV file'), csv('latin.csv', 'x'));
    const question = await uploadForm().findByText(/it looks like Windows-1252/);
    expect(question).toHaveTextContent('Characters are never replaced');
    await user.click(
      uploadForm().getByRole('button', { name: 'Read it as Windows-1252 (Western European)' }),
    );
    expect(await uploadForm().findByText(/Every catalogue column was found/)).toBeInTheDocument();
    expect(previews).toEqual([null, 'windows-1252']);
    await user.click(uploadForm().getByLabelText('Import without them'));
    await user.click(uploadForm().getByRole('button', { name: 'Upload and check' }));
    await screen.findByRole('heading', { level: 2, name: /Catalogue import/ });
    expect(sent?.get('encoding')).toBe('windows-1252');
  });

  it('sends the file with its kind and shows the new import', async () => {
    let sent: FormData | undefined;
    api = importsApi({
      'POST /imports/preview': () => ({ status: 200, data: DEFAULT_HEADERS_PREVIEW }),
      'POST /imports': ({ body }) => {
        sent = body as FormData;
        return { status: 202, data: { id: TERM_DATA_ID, status: 'queued' } };
      },
      [`GET /imports/${TERM_DATA_ID}`]: () => ({
        status: 200,
        data: summary({ kind: 'catalogue', fileName: 'catalogue.csv', rowsRejected: 0 }),
      }),
    });
    signInAs('registrar');
    const { router } = renderApp('/registrar/imports');
    const user = userEvent.setup();
    await screen.findByRole('heading', { level: 1, name: 'Imports' });

    await user.selectOptions(uploadForm().getByLabelText('Kind of file'), 'catalogue');
    await user.upload(
      uploadForm().getByLabelText('Choose a CSV file'),
      csv('catalogue.csv', 'course_code,title,department\nHRX 1101,Tidal Studies,HRX\n'),
    );
    expect(await uploadForm().findByText(/Every catalogue column was found/)).toBeInTheDocument();
    await user.click(uploadForm().getByLabelText('Commit at once when no row is rejected'));
    // Optional fields the file does not give are named; nothing is sent until that is confirmed.
    await user.click(uploadForm().getByRole('button', { name: 'Upload and check' }));
    expect(
      await uploadForm().findByText(
        'Left empty in every row: credits, level, elective, prerequisites, description (no column of the file gave them).',
      ),
    ).toBeInTheDocument();
    expect(sent).toBeUndefined();
    await user.click(uploadForm().getByLabelText('Import without them'));
    await user.click(uploadForm().getByRole('button', { name: 'Upload and check' }));

    expect(
      await screen.findByRole('heading', { level: 2, name: 'Catalogue import: catalogue.csv' }),
    ).toBeInTheDocument();
    expect(router.state.location.search).toBe(`?import=${TERM_DATA_ID}`);
    expect(sent?.get('kind')).toBe('catalogue');
    expect(sent?.get('commit')).toBe('true');
    expect((sent?.get('file') as File).name).toBe('catalogue.csv');
    expect(JSON.parse(sent?.get('mapping') as string)).toEqual({
      course_code: 'course_code',
      title: 'title',
      department: 'department',
    });
  });

  it('maps a file with other headers, from its first rows, and saves the mapping', async () => {
    let sent: FormData | undefined;
    const saved: SavedImportMapping[] = [];
    api = importsApi({
      'POST /imports/preview': () => ({ status: 200, data: OTHER_HEADERS_PREVIEW }),
      'POST /imports/mappings': ({ body }) => {
        const request = body as SavedImportMapping;
        saved.push({ ...request, id: 'm1', createdAt: '', createdBy: null });
        return { status: 201, data: saved[0] };
      },
      'POST /imports': ({ body }) => {
        sent = body as FormData;
        return { status: 202, data: { id: TERM_DATA_ID, status: 'queued' } };
      },
      [`GET /imports/${TERM_DATA_ID}`]: () => ({ status: 200, data: summary() }),
      [`GET /imports/${TERM_DATA_ID}/errors`]: () => ({ status: 200, data: REJECTIONS }),
    });
    signInAs('registrar');
    renderApp('/registrar/imports');
    const user = userEvent.setup();
    await screen.findByRole('heading', { level: 1, name: 'Imports' });

    await user.selectOptions(uploadForm().getByLabelText('Kind of file'), 'records');
    await user.upload(
      uploadForm().getByLabelText('Choose a CSV file'),
      csv('sis-export.csv', 'Student No;Semester;Course;Result\n900114;2026-FA;HRX 1101;B+\n'),
    );
    const columns = within(await screen.findByRole('region', { name: 'Columns' }));
    expect(columns.getByText(/headers differ from the term data defaults/)).toBeInTheDocument();
    expect(
      within(columns.getByRole('table', { name: 'First rows of the file' })).getByText('B+'),
    ).toBeInTheDocument();
    expect(columns.getByLabelText('student_id (required)')).toHaveValue('Student No');

    // The grade column was not recognised: the upload waits for it.
    await user.click(uploadForm().getByRole('button', { name: 'Upload and check' }));
    expect(await columns.findByText('Choose the column that holds grade.')).toBeInTheDocument();
    expect(sent).toBeUndefined();

    await user.selectOptions(columns.getByLabelText('grade (required)'), 'Result');
    await user.type(columns.getByLabelText('Save this mapping as'), 'SIS export, autumn');
    await user.click(columns.getByRole('button', { name: 'Save mapping' }));
    expect(await columns.findByText(/Mapping saved as “SIS export, autumn”/)).toBeInTheDocument();
    expect(saved[0]).toMatchObject({
      name: 'SIS export, autumn',
      kind: 'records',
      mapping: {
        'Student No': 'student_id',
        Semester: 'term',
        Course: 'course_code',
        Result: 'grade',
      },
    });

    await user.click(uploadForm().getByLabelText('Import without them'));
    await user.click(uploadForm().getByRole('button', { name: 'Upload and check' }));
    await screen.findByRole('heading', { level: 2, name: /Term data import/ });
    expect(JSON.parse(sent?.get('mapping') as string)).toEqual({
      'Student No': 'student_id',
      Semester: 'term',
      Course: 'course_code',
      Result: 'grade',
    });
  });

  it('links a file imported before to that import (409)', async () => {
    const earlier = '0f3c2a9e-8d41-4b7a-9c55-1e2d3f4a5b6c';
    api = importsApi({
      'POST /imports/preview': () => ({ status: 200, data: DEFAULT_HEADERS_PREVIEW }),
      'POST /imports': () => ({
        status: 409,
        data: {
          statusCode: 409,
          message:
            "This file was committed already: the catalogue import of 'catalogue.csv' committed 2026-11-02 10:00 UTC. Roll that import back first to import the same file again.",
          error: 'Conflict',
          details: { earlierImportId: earlier },
        },
      }),
      [`GET /imports/${earlier}`]: () => ({
        status: 200,
        data: summary({ id: earlier, kind: 'catalogue', fileName: 'catalogue.csv' }),
      }),
      [`GET /imports/${earlier}/errors`]: () => ({ status: 200, data: [] }),
    });
    signInAs('registrar');
    const { router } = renderApp('/registrar/imports');
    const user = userEvent.setup();
    await screen.findByRole('heading', { level: 1, name: 'Imports' });
    await user.selectOptions(uploadForm().getByLabelText('Kind of file'), 'catalogue');
    await user.upload(uploadForm().getByLabelText('Choose a CSV file'), csv('catalogue.csv', 'x'));
    await user.click(uploadForm().getByLabelText('Import without them'));
    await user.click(uploadForm().getByRole('button', { name: 'Upload and check' }));

    const alert = await uploadForm().findByText(/^This file was committed already/);
    expect(alert).toHaveTextContent(
      "the catalogue import of 'catalogue.csv' committed 2026-11-02 10:00 UTC",
    );
    await user.click(within(alert).getByRole('link', { name: 'Open the earlier import' }));
    expect(router.state.location.search).toBe(`?import=${earlier}`);
    expect(
      await screen.findByRole('heading', { level: 2, name: 'Catalogue import: catalogue.csv' }),
    ).toBeInTheDocument();
  });

  it('says the upload limit when a file is too large (413) and the reason for a 400', () => {
    const failure = (status: number, message: string) => ({
      isAxiosError: true,
      response: { status, data: { statusCode: status, message, error: 'x' } },
    });
    expect(
      uploadFailure(
        failure(
          413,
          'The file is larger than the upload limit of 200 MB (KINPATH_UPLOAD_LIMIT_MB).',
        ),
      ).text,
    ).toMatch(/^The file is larger than the upload limit of 200 MB\./);
    expect(uploadFailure(failure(400, 'mapping is not valid JSON')).text).toBe(
      'The server could not take this upload: mapping is not valid JSON',
    );
  });
});

describe('the validation report', { timeout: 40_000 }, () => {
  const bodyRows = () =>
    within(screen.getByRole('table', { name: 'Report' }))
      .getAllByRole('row')
      .slice(1);

  function renderReport() {
    renderWithProviders(
      <>
        <h2 id="report-heading">Report</h2>
        <ValidationReport rejections={REJECTIONS} labelledBy="report-heading" />
      </>,
    );
  }

  it('filters by column', async () => {
    renderReport();
    const user = userEvent.setup();
    expect(bodyRows()).toHaveLength(4);
    expect(screen.getByRole('status')).toHaveTextContent('4 rejected cells');

    await user.selectOptions(screen.getByLabelText('Column'), 'grade');
    expect(bodyRows().map((row) => within(row).getAllByRole('cell')[0].textContent)).toEqual([
      '17',
      '40',
    ]);
    expect(screen.getByRole('status')).toHaveTextContent('2 of 4 rejected cells');
  });

  it('filters by reason, grouping reasons that differ only in the value', async () => {
    renderReport();
    const user = userEvent.setup();
    const reasons = within(screen.getByLabelText('Reason'))
      .getAllByRole('option')
      .map((o) => o.textContent);
    // The commonest reason first.
    expect(reasons).toEqual([
      'All reasons',
      '… is not on the grade scale (A … F) nor a mark (W, I, IP, AU, P, NP)',
      '… is not a term of the form YYYY-XX',
      'course … is not in the catalogue',
    ]);

    await user.selectOptions(screen.getByLabelText('Reason'), 'course … is not in the catalogue');
    expect(bodyRows()).toHaveLength(1);
    expect(bodyRows()[0]).toHaveTextContent('HRX 9999');

    await user.selectOptions(screen.getByLabelText('Column'), 'grade');
    expect(bodyRows()).toHaveLength(1);
    expect(bodyRows()[0]).toHaveTextContent('No rejected cell matches the filters.');
  });
});

describe('commit and rollback', { timeout: 40_000 }, () => {
  it('says what a commit changes', () => {
    expect(commitConfirmation(summary())).toBe(
      'Commit 1,204 accepted rows of term data; 3 rejected rows stay out. ' +
        'Existing rows with the same student, term and course are replaced; rollback restores them. ' +
        'Estimates are rebuilt from the new term data afterwards.',
    );
    expect(
      commitConfirmation(
        summary({ kind: 'catalogue', rowsAccepted: 1, rowsRejected: 0, rowsTotal: 1 }),
      ),
    ).toBe(
      'Commit 1 accepted row of catalogue data; no row was rejected. ' +
        'Existing rows with the same course code are replaced; rollback restores them.',
    );
    expect(
      rollbackConfirmation(summary({ status: 'committed', committedAt: '2026-11-30T09:20:00Z' })),
    ).toMatch(
      /^Roll back the term data import of term-data-2026-FA\.csv \(1,204 rows committed .+\)\. The rows it added are removed and the rows it replaced get their earlier values back\./,
    );
  });

  it('commits the accepted rows after a confirmation, and reports the rejected ones', async () => {
    let state = summary();
    const createObjectURL = vi.fn(() => 'blob:rejected');
    Object.assign(URL, { createObjectURL, revokeObjectURL: vi.fn() });
    const click = vi.spyOn(HTMLAnchorElement.prototype, 'click').mockImplementation(() => {});
    let csvAccept: unknown;
    api = importsApi({
      'GET /imports': () => ({ status: 200, data: [state] }),
      [`GET /imports/${TERM_DATA_ID}`]: () => ({ status: 200, data: state }),
      [`GET /imports/${TERM_DATA_ID}/errors`]: ({ headers }) => {
        if (String(headers.get('Accept')).includes('text/csv')) {
          csvAccept = headers.get('Accept');
          return { status: 200, data: 'line,column,value,reason\r\n17,grade,Q,bad\r\n' };
        }
        return { status: 200, data: REJECTIONS };
      },
      [`POST /imports/${TERM_DATA_ID}/commit`]: () => {
        state = summary({
          status: 'committed',
          partial: true,
          committedAt: '2026-11-30T09:20:00.000Z',
          committedBy: 'registrar@halden.example',
        });
        return { status: 202, data: state };
      },
    });
    signInAs('registrar');
    renderApp(`/registrar/imports?import=${TERM_DATA_ID}`);
    const user = userEvent.setup();
    const detail = within(
      await screen.findByRole('region', { name: 'Term data import: term-data-2026-FA.csv' }),
    );
    expect(detail.getAllByRole('status')[0]).toHaveTextContent(
      'Checked: 1,204 rows accepted, 3 rejected. Not committed yet.',
    );
    expect(await detail.findByText('HRX 9999')).toBeInTheDocument();

    await user.click(detail.getByRole('button', { name: 'Download validation report (CSV)' }));
    await waitFor(() => expect(click).toHaveBeenCalled());
    expect(csvAccept).toBe('text/csv');
    expect(createObjectURL).toHaveBeenCalled();

    await user.click(detail.getByRole('button', { name: 'Commit 1,204 rows' }));
    const dialog = within(await screen.findByRole('dialog', { name: 'Commit this import?' }));
    expect(
      dialog.getByText(/^Commit 1,204 accepted rows of term data; 3 rejected rows stay out\./),
    ).toBeInTheDocument();
    expect(api.requests.some((r) => r.url.endsWith('/commit'))).toBe(false);
    await user.click(dialog.getByRole('button', { name: 'Commit 1,204 rows' }));

    await waitFor(() => expect(screen.queryByRole('dialog')).toBeNull());
    expect(api.requests.filter((r) => r.url.endsWith('/commit'))).toHaveLength(1);
    expect(
      await detail.findByText('Committed 1,204 rows; 3 rejected rows stayed out.'),
    ).toBeInTheDocument();
    const history = within(await screen.findByRole('table', { name: 'Import history' }));
    expect(await history.findByText('Committed, partial')).toBeInTheDocument();
    expect(detail.getByRole('button', { name: 'Roll back this import' })).toBeInTheDocument();
  });

  it('shows why a rollback was refused, inside the dialog', async () => {
    const state = summary({ status: 'committed', committedAt: '2026-11-30T09:20:00.000Z' });
    api = importsApi({
      'GET /imports': () => ({ status: 200, data: [state] }),
      [`GET /imports/${TERM_DATA_ID}`]: () => ({ status: 200, data: state }),
      [`GET /imports/${TERM_DATA_ID}/errors`]: () => ({ status: 200, data: REJECTIONS }),
      [`POST /imports/${TERM_DATA_ID}/rollback`]: () => ({
        status: 409,
        data: {
          statusCode: 409,
          message: 'A later import replaced rows it wrote. Roll back the later import first.',
          error: 'Conflict',
        },
      }),
    });
    signInAs('registrar');
    renderApp(`/registrar/imports?import=${TERM_DATA_ID}`);
    const user = userEvent.setup();
    await user.click(await screen.findByRole('button', { name: 'Roll back this import' }));
    const dialog = within(await screen.findByRole('dialog', { name: 'Roll back this import?' }));
    expect(dialog.getByText(/get their earlier values back/)).toBeInTheDocument();
    await user.click(dialog.getByRole('button', { name: 'Roll back' }));
    expect(await dialog.findByRole('alert')).toHaveTextContent(
      'A later import replaced rows it wrote. Roll back the later import first.',
    );
  });
});

describe('the imports page', { timeout: 40_000 }, () => {
  it('explains the order of imports while there are none', async () => {
    api = importsApi();
    signInAs('registrar');
    renderApp('/registrar/imports');
    expect(
      await screen.findByRole('heading', { level: 2, name: 'No imports yet' }),
    ).toBeInTheDocument();
    expect(
      screen.getByText(/Import a catalogue first, then offerings, students and term data/),
    ).toBeInTheDocument();
    expect(screen.getAllByRole('heading', { level: 1 })).toHaveLength(1);
  });

  it('shows a running job’s progress as rows done of total', async () => {
    api = importsApi({
      [`GET /imports/${TERM_DATA_ID}`]: () => ({
        status: 200,
        data: summary({
          status: 'committing',
          rowsTotal: null,
          rowsAccepted: null,
          rowsRejected: null,
          progress: { phase: 'committing', done: 600, total: 1204 },
        }),
      }),
    });
    signInAs('registrar');
    renderApp(`/registrar/imports?import=${TERM_DATA_ID}`);
    const bar = await screen.findByRole('progressbar', {
      name: 'Committing rows of term-data-2026-FA.csv',
    });
    expect(bar).toHaveAttribute('aria-valuenow', '50');
    expect(bar).toHaveAttribute('aria-valuetext', '600 of 1,204 rows');
  });

  it('waits for the estimates to catch up only after a recent commit or rollback', () => {
    const now = Date.parse('2026-11-30T09:25:00Z');
    const committed = summary({ status: 'committed', committedAt: '2026-11-30T09:20:00Z' });
    expect(awaitingModel(committed, now)).toBe(true);
    expect(awaitingModel({ ...committed, modelRefreshedAt: '2026-11-30T09:21:00Z' }, now)).toBe(
      false,
    );
    // A rollback needs a rebuild after the rollback, not the one after the commit.
    const rolledBack = {
      ...committed,
      status: 'rolled_back' as const,
      modelRefreshedAt: '2026-11-30T09:21:00Z',
      rolledBackAt: '2026-11-30T09:24:00Z',
    };
    expect(awaitingModel(rolledBack, now)).toBe(true);
    expect(modelCaughtUp(rolledBack)).toBe('Not yet');
    expect(modelCaughtUp({ ...rolledBack, modelRefreshedAt: '2026-11-30T09:24:30Z' })).toMatch(
      /^Yes, \d{4}-\d{2}-\d{2} \d{2}:\d{2}$/,
    );
    expect(awaitingModel(committed, now + 60 * 60_000)).toBe(false);
    expect(awaitingModel(summary(), now)).toBe(false);
  });

  it('marks Imports, not the overview, as the current page', async () => {
    api = importsApi();
    signInAs('registrar');
    renderApp('/registrar/imports');
    const nav = within(await screen.findByRole('navigation', { name: 'Main' }));
    expect(nav.getByRole('link', { name: 'Imports' })).toHaveAttribute('aria-current', 'page');
    expect(nav.getByRole('link', { name: 'Registrar overview' })).not.toHaveAttribute(
      'aria-current',
    );
  });

  it('keeps the imports page from an advisor and asks for nothing', async () => {
    api = importsApi();
    signInAs('advisor');
    renderApp('/registrar/imports');
    expect(
      await screen.findByRole('heading', { level: 1, name: 'Not available for your role' }),
    ).toBeInTheDocument();
    expect(api.requests.map((r) => r.url)).not.toContain('/imports');
  });
});
