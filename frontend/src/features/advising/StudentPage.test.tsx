import { afterEach, describe, expect, it } from 'vitest';
import { configure, screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { ESTIMATE_CAUTION_TITLE } from '@kinpath/contracts';
import { renderApp, signInAs } from '../../test/render';
import { fakeAdvisingApi, REF, STUDENT } from './test/fixtures';

// The whole app renders in jsdom; screens that wait on the (fake) API get time on a busy machine.
configure({ asyncUtilTimeout: 10_000 });

let api: ReturnType<typeof fakeAdvisingApi> | undefined;
afterEach(() => api?.restore());

async function openStudent(overrides: Parameters<typeof fakeAdvisingApi>[0] = {}) {
  api = fakeAdvisingApi(overrides);
  signInAs('advisor');
  const rendered = renderApp(`/advising/students/${REF}`);
  const table = await screen.findByRole('table', { name: /^Electives for 2026-SP/ });
  return { ...rendered, table, user: userEvent.setup() };
}

const bodyRows = (table: HTMLElement) => within(table).getAllByRole('row').slice(1);
const rowFor = (table: HTMLElement, courseCode: string) => {
  const row = bodyRows(table).find((r) => within(r).queryByText(courseCode));
  if (!row) throw new Error(`No row for ${courseCode}`);
  return row;
};
const courseCodes = (table: HTMLElement) =>
  bodyRows(table).map((r) => within(r).getAllByRole('cell')[1].textContent);

// The whole student page renders in jsdom; role queries over it take a few seconds.
describe('student page', { timeout: 60_000 }, () => {
  it('shows the header from the records, with one h1 and the cautions', async () => {
    await openStudent();
    expect(screen.getAllByRole('heading', { level: 1 })).toHaveLength(1);
    expect(
      screen.getByRole('heading', { level: 1, name: 'Computing BSc student, entered 2023-FA' }),
    ).toBeInTheDocument();
    const facts = screen.getAllByRole('definition').map((d) => d.textContent);
    expect(facts).toEqual(expect.arrayContaining(['Active', '66.0', '3.21', '24']));
    expect(screen.getByRole('region', { name: ESTIMATE_CAUTION_TITLE })).toBeInTheDocument();
    expect(screen.getByText(/high when the 80 % likely range/)).toBeInTheDocument();
  });

  it('shows eligible electives only by default, and why the others are closed', async () => {
    const { table, user } = await openStudent();
    const toggle = screen.getByRole('switch', { name: 'Eligible only' });
    expect(toggle).toBeChecked();
    expect(courseCodes(table)).toEqual(['CMP 3110', 'ART 2210', 'HIS 2040']);
    expect(within(table).queryByText(/Not eligible/)).toBeNull();
    expect(screen.getByText('3 of 5 electives for 2026-SP')).toBeInTheDocument();

    await user.click(toggle);
    expect(toggle).not.toBeChecked();
    expect(courseCodes(table)).toHaveLength(5);
    expect(rowFor(table, 'CMP 3420')).toHaveTextContent(
      'Not eligible: Prerequisite not passed: CMP 2310.',
    );
    expect(rowFor(table, 'MTH 1120')).toHaveTextContent('Not eligible: Already passed in 2025-SP.');
    expect(screen.getByText('5 electives for 2026-SP')).toBeInTheDocument();
  });

  it('says baseline in words and in italics, and shows no number without an estimate', async () => {
    const { table } = await openStudent();

    const kin = rowFor(table, 'CMP 3110');
    expect(kin).toHaveTextContent('3.41B+likely B- to A-');
    // Kin strength beside the kin count tells sets of equally many kin apart.
    expect(kin).toHaveTextContent('28strength 9.6');
    expect(within(kin).getByText('kin')).toBeInTheDocument();
    expect(within(kin).queryByText(/baseline/)).toBeNull();

    const baseline = rowFor(table, 'ART 2210');
    expect(within(baseline).getByText('baseline — too few kin')).toBeInTheDocument();
    const grade = within(baseline).getAllByRole('cell')[4];
    expect(grade).toHaveTextContent('2.87B-baselinelikely B- to A-');
    expect(grade.firstElementChild).toHaveStyle({ fontStyle: 'italic' });
    // Kin counts stand right beside the estimates they back.
    expect(within(baseline).getAllByRole('cell')[5]).toHaveTextContent(/^3$/);

    const none = rowFor(table, 'HIS 2040');
    const cells = within(none).getAllByRole('cell');
    expect(within(none).getByText('none — no estimate')).toBeInTheDocument();
    for (const index of [4, 6, 8]) expect(cells[index]).toHaveTextContent(/^no estimate$/);
    expect(cells.slice(4, 9).some((cell) => /\d\.\d/.test(cell.textContent ?? ''))).toBe(false);
  });

  it('filters by department, basis and confidence', async () => {
    const { table, user } = await openStudent();
    await user.selectOptions(screen.getByLabelText('Basis'), 'baseline');
    expect(courseCodes(table)).toEqual(['ART 2210']);
    await user.selectOptions(screen.getByLabelText('Basis'), '');
    await user.selectOptions(screen.getByLabelText('Department'), 'CMP');
    expect(courseCodes(table)).toEqual(['CMP 3110']);
    await user.selectOptions(screen.getByLabelText('Department'), '');
    await user.selectOptions(screen.getByLabelText('Confidence'), 'low');
    expect(courseCodes(table)).toEqual(['ART 2210', 'HIS 2040']);
  });

  it('sorts by any column with buttons in the headers, missing estimates last', async () => {
    const { table, user } = await openStudent();
    const fit = within(table).getByRole('columnheader', { name: 'Fit' });
    expect(fit).toHaveAttribute('aria-sort', 'descending');
    expect(courseCodes(table)).toEqual(['CMP 3110', 'ART 2210', 'HIS 2040']);

    await user.click(within(fit).getByRole('button', { name: 'Fit' }));
    expect(fit).toHaveAttribute('aria-sort', 'ascending');
    expect(courseCodes(table)).toEqual(['ART 2210', 'CMP 3110', 'HIS 2040']);
    // Clicking again flips the order back rather than dropping the sort.
    await user.click(within(fit).getByRole('button', { name: 'Fit' }));
    expect(fit).toHaveAttribute('aria-sort', 'descending');

    await user.click(within(table).getByRole('button', { name: 'Course' }));
    expect(courseCodes(table)).toEqual(['ART 2210', 'CMP 3110', 'HIS 2040']);
    expect(within(table).getByRole('columnheader', { name: 'Course' })).toHaveAttribute(
      'aria-sort',
      'ascending',
    );
    expect(
      within(table).getByRole('button', { name: 'Kin for grade, with kin strength' }),
    ).toBeInTheDocument();
  });

  it('saves the shortlist with PUT and lists it with the estimates', async () => {
    const { table, user } = await openStudent();
    await user.click(within(table).getByRole('checkbox', { name: /Shortlist CMP 3110/ }));
    await user.click(within(table).getByRole('checkbox', { name: /Shortlist ART 2210/ }));

    await waitFor(() =>
      expect(api?.requests.filter((r) => r.method === 'PUT').map((r) => r.body)).toEqual([
        { courseCodes: ['CMP 3110'] },
        { courseCodes: ['CMP 3110', 'ART 2210'] },
      ]),
    );
    const shortlist = await screen.findByRole('table', { name: 'Shortlist for 2026-SP' });
    await waitFor(() => expect(bodyRows(shortlist)).toHaveLength(2));
    expect(rowFor(shortlist, 'ART 2210')).toHaveTextContent('baseline — too few kin');
  });

  it('keeps keyboard focus on a ticked box and on the shortlist after "Remove"', async () => {
    const { table, user } = await openStudent();
    const box = within(table).getByRole('checkbox', { name: /Shortlist CMP 3110/ });
    box.focus();
    await user.keyboard(' ');
    const shortlist = await screen.findByRole('table', { name: 'Shortlist for 2026-SP' });
    await waitFor(() => expect(bodyRows(shortlist)).toHaveLength(1));
    // The same box, still focused: not a new one put in its place.
    expect(within(table).getByRole('checkbox', { name: /Shortlist CMP 3110/ })).toBe(box);
    expect(document.activeElement).toBe(box);

    await user.click(within(table).getByRole('checkbox', { name: /Shortlist ART 2210/ }));
    await waitFor(() => expect(bodyRows(shortlist)).toHaveLength(2));
    await user.click(screen.getByRole('button', { name: 'Remove CMP 3110 from the shortlist' }));
    await waitFor(() =>
      expect(document.activeElement).toBe(
        screen.getByRole('button', { name: 'Remove ART 2210 from the shortlist' }),
      ),
    );
    await user.click(screen.getByRole('button', { name: 'Remove ART 2210 from the shortlist' }));
    await waitFor(() =>
      expect(document.activeElement).toBe(
        screen.getByRole('heading', { name: 'Shortlist for 2026-SP' }),
      ),
    );
  });

  it('says a withdrawn student’s standing above the electives', async () => {
    await openStudent({
      [`GET /students/${REF}`]: () => ({ status: 200, data: { ...STUDENT, status: 'withdrawn' } }),
    });
    const section = screen.getByRole('region', { name: /^Electives for/ });
    const alert = within(section)
      .getByText(/^Withdrawn:/)
      .closest('[role="alert"]');
    expect(alert).toHaveTextContent(
      'Withdrawn: this student has left the university and is not registered for next term.',
    );
    // Above the list, not below it.
    const table = within(section).getByRole('table');
    expect(alert!.compareDocumentPosition(table) & Node.DOCUMENT_POSITION_FOLLOWING).toBeTruthy();
  });

  it('says nothing of standing for an active student', async () => {
    await openStudent();
    const section = screen.getByRole('region', { name: /^Electives for/ });
    expect(within(section).queryByText(/^(Withdrawn|Graduated|On leave):/)).toBeNull();
  });

  it('shows a failed electives request as a failure in the shortlist, and holds the summary', async () => {
    api = fakeAdvisingApi({
      [`GET /students/${REF}/electives`]: () => ({
        status: 500,
        data: { statusCode: 500, message: 'Internal server error', error: 'Internal Server Error' },
      }),
      [`GET /students/${REF}/shortlist`]: () => ({
        status: 200,
        data: {
          courseCodes: ['CMP 3110'],
          items: [
            {
              courseCode: 'CMP 3110',
              title: 'Machine Learning',
              addedAt: '2026-03-02T09:20:00.000Z',
              addedByName: null,
              addedByEmail: 'advisor@halden.example',
            },
          ],
          updatedAt: '2026-03-02T09:20:00.000Z',
          updatedByName: null,
          updatedByEmail: 'advisor@halden.example',
        },
      }),
    });
    signInAs('advisor');
    renderApp(`/advising/students/${REF}`);
    const shortlist = await screen.findByRole('table', { name: /^Shortlist/ });
    const section = screen.getByRole('region', { name: /^Shortlist/ });
    expect(
      await within(section).findByText(/The estimates could not be loaded/),
    ).toBeInTheDocument();
    expect(bodyRows(shortlist)[0]).toHaveTextContent('Estimates not loaded.');
    expect(shortlist).not.toHaveTextContent('Not among the electives');
    expect(within(section).getByRole('button', { name: 'Send summary' })).toBeDisabled();
  });

  it('lets the author edit and delete their own note', async () => {
    const { user } = await openStudent();
    const notes = screen.getByRole('region', { name: 'Notes' });
    await within(notes).findByText('Wants a studio course next to the compilers course.');
    await user.click(within(notes).getByRole('button', { name: 'Edit' }));
    const field = within(notes).getByLabelText('Note');
    await user.clear(field);
    await user.type(field, 'Wants two studio courses.');
    await user.click(within(notes).getByRole('button', { name: 'Save note' }));
    expect(await within(notes).findByText('Wants two studio courses.')).toBeInTheDocument();
    expect(within(notes).getByText(/edited 2026-03-02/)).toBeInTheDocument();
    expect(api?.requests.find((r) => r.method === 'PATCH')?.body).toEqual({
      text: 'Wants two studio courses.',
    });

    await user.click(within(notes).getByRole('button', { name: 'Delete' }));
    const dialog = within(await screen.findByRole('dialog', { name: 'Delete this note?' }));
    await user.click(dialog.getByRole('button', { name: 'Delete note' }));
    expect(await within(notes).findByText('No notes yet.')).toBeInTheDocument();
  });

  it('prints the date and the advisor above the page, on paper only', async () => {
    await openStudent();
    const line = screen.getByText(/^Printed \d{4}-\d{2}-\d{2} \d{2}:\d{2} by /);
    expect(line).toHaveClass('kp-print-only');
  });

  it('lists the summaries sent: date, address and courses', async () => {
    await openStudent();
    const sent = screen.getByRole('region', { name: 'Sent summaries' });
    expect(
      await within(sent).findByText('To student@halden.example, for 2026-SP: CMP 3110, ART 2210'),
    ).toBeInTheDocument();
    expect(sent).toHaveTextContent(/\d{4}-\d{2}-\d{2} \d{2}:\d{2} · Priya Okonkwo-Hale/);
  });

  it('groups the course history by term, newest first', async () => {
    await openStudent();
    const history = await screen.findByRole('table', { name: 'Course history' });
    const groups = within(history)
      .getAllByRole('rowheader')
      .map((h) => h.textContent);
    expect(groups).toEqual(['2025-FA · 2 courses', '2025-SP · 1 course', '2024-FA · 1 course']);
    expect(within(history).getByText('Drawing from Life').closest('tr')).toHaveTextContent(
      /W—?—?$/,
    );
  });

  it('adds a dated note with its author, and refuses an empty one', async () => {
    const { user } = await openStudent();
    const notes = screen.getByRole('region', { name: 'Notes' });
    expect(await within(notes).findByText(/Wants a studio course/)).toBeInTheDocument();

    await user.click(within(notes).getByRole('button', { name: 'Add note' }));
    expect(await within(notes).findByText('Write the note before adding it.')).toBeInTheDocument();
    expect(api?.requests.some((r) => r.method === 'POST' && r.url.endsWith('/notes'))).toBe(false);

    await user.type(within(notes).getByLabelText('New note'), 'Check the studio fee.');
    await user.click(within(notes).getByRole('button', { name: 'Add note' }));
    expect(await within(notes).findByText('Note added.')).toBeInTheDocument();
    expect(await within(notes).findByText('Check the studio fee.')).toBeInTheDocument();
    expect(within(notes).getAllByText(/Priya Okonkwo-Hale/)).toHaveLength(2);
  });
});
