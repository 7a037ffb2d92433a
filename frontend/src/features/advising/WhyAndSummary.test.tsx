import { afterEach, describe, expect, it } from 'vitest';
import { configure, screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { renderApp, signInAs } from '../../test/render';
import { explanation, fakeAdvisingApi, REF } from './test/fixtures';

// The whole app renders in jsdom; screens that wait on the (fake) API get time on a busy machine.
configure({ asyncUtilTimeout: 10_000 });

let api: ReturnType<typeof fakeAdvisingApi> | undefined;
afterEach(() => api?.restore());

const explanationRoute = (courseCode: string) =>
  `GET /students/${REF}/electives/${encodeURIComponent(courseCode)}/explanation`;

async function openStudent(overrides: Parameters<typeof fakeAdvisingApi>[0] = {}) {
  api = fakeAdvisingApi(overrides);
  signInAs('advisor');
  renderApp(`/advising/students/${REF}`);
  const table = await screen.findByRole('table', { name: /^Electives for 2026-SP/ });
  return { table, user: userEvent.setup() };
}

// The whole student page renders in jsdom; role queries over it take a few seconds.
describe('why panel', { timeout: 60_000 }, () => {
  it('explains in plain words, then names the method', async () => {
    const { table, user } = await openStudent();
    await user.click(within(table).getByRole('button', { name: /^Why\? CMP 3110/ }));

    const panel = await screen.findByRole('dialog', {
      name: 'Why these estimates for CMP 3110?',
    });
    const grade = await within(panel).findByRole('region', { name: /^Grade/ });
    // Words apart in the accessible name, not "Gradeestimate".
    expect(within(panel).getByRole('heading', { name: /^Grade estimate \d\.\d\d$/ })).toBe(
      within(grade).getByRole('heading'),
    );
    expect(grade).toHaveTextContent(/28 past students whose course histories resemble/);
    expect(grade).toHaveTextContent('Kin count28');
    expect(grade).toHaveTextContent('likely B- to A-: four in five past estimates');
    expect(grade).toHaveTextContent('Kin strength9.60');
    expect(grade).toHaveTextContent('0.21 to 0.78');
    expect(grade).toHaveTextContent('0.44 grade points');
    expect(within(grade).getByRole('figure')).toHaveTextContent(/A: 9 students/);

    const alike = within(panel).getByRole('region', {
      name: 'What made these students alike (grade)',
    });
    expect(within(alike).getAllByRole('listitem')[0]).toHaveTextContent('CMP 2210 Data Structures');
    // Shares of the positive part: never above 100 %, and what pulled it down is said.
    expect(within(alike).getAllByRole('listitem')[0]).toHaveTextContent(
      '41% of the likeness built up',
    );
    expect(alike).toHaveTextContent('took 12% of it away again');
    expect(within(panel).getByRole('region', { name: 'The method' })).toHaveTextContent(
      /User-based collaborative filtering: cosine similarity with inverse user frequency/,
    );

    await user.click(within(panel).getByRole('button', { name: 'Close the explanation' }));
    await waitFor(() => expect(screen.queryByRole('dialog')).toBeNull());
  });

  it('hides the kin’s results under 5 kin and says why', async () => {
    const reason =
      'Fewer than 5 kin contributed, so their results are not shown: each would be nearly identifiable.';
    const { table, user } = await openStudent({
      [explanationRoute('ART 2210')]: () => ({
        status: 200,
        data: explanation(
          'ART 2210',
          {
            value: 2.87,
            basis: 'baseline',
            kinCount: 3,
            outcomes: null,
            outcomesSuppressed: reason,
          },
          {
            value: 3.5,
            basis: 'baseline',
            kinCount: 2,
            outcomes: null,
            outcomesSuppressed: reason,
          },
        ),
      }),
    });
    await user.click(within(table).getByRole('button', { name: /^Why\? ART 2210/ }));

    const panel = await screen.findByRole('dialog', {
      name: 'Why these estimates for ART 2210?',
    });
    const grade = await within(panel).findByRole('region', { name: /^Grade/ });
    // Words apart in the accessible name, not "Gradeestimate".
    expect(within(panel).getByRole('heading', { name: /^Grade estimate \d\.\d\d$/ })).toBe(
      within(grade).getByRole('heading'),
    );
    expect(grade).toHaveTextContent(reason);
    expect(grade).toHaveTextContent(/Only 3 similar past students have a grade in this course/);
    expect(within(panel).queryByRole('figure')).toBeNull();
    expect(within(panel).queryByText(/: \d+ students?$/)).toBeNull();
  });
});

describe('send summary', { timeout: 60_000 }, () => {
  async function shortlistTwoAndOpen() {
    const opened = await openStudent();
    const { table, user } = opened;
    const send = screen.getByRole('button', { name: 'Send summary' });
    expect(send).toBeDisabled();
    await user.click(within(table).getByRole('checkbox', { name: /Shortlist CMP 3110/ }));
    await user.click(within(table).getByRole('checkbox', { name: /Shortlist ART 2210/ }));
    await waitFor(() => expect(send).toBeEnabled());
    await user.click(send);
    const dialog = await screen.findByRole('dialog', { name: 'Send a summary to the student' });
    return { ...opened, dialog };
  }

  const summaryPosts = () =>
    api?.requests.filter((r) => r.method === 'POST' && r.url.endsWith('/summary')) ?? [];

  it('checks the address and the message before sending', async () => {
    const { dialog, user } = await shortlistTwoAndOpen();
    const list = within(dialog).getByRole('list', { name: /Shortlisted electives/ });
    expect(
      within(list)
        .getAllByRole('listitem')
        .map((i) => i.textContent),
    ).toEqual(['CMP 3110 Compilers and Interpreters', 'ART 2210 Printmaking Studio']);

    const submit = within(dialog).getByRole('button', { name: 'Send summary' });
    await user.click(submit);
    expect(await within(dialog).findByText('Enter the student’s e-mail address.')).toBeVisible();

    const address = within(dialog).getByLabelText(/Student’s e-mail address/);
    await user.type(address, 'student@halden');
    await user.click(submit);
    expect(
      await within(dialog).findByText(
        'Enter a complete e-mail address, such as name@university.edu.',
      ),
    ).toBeVisible();
    expect(address).toHaveAttribute('aria-invalid', 'true');

    await user.clear(address);
    await user.type(address, 'student@halden.example');
    await user.click(within(dialog).getByLabelText(/Message/));
    await user.paste('x'.repeat(2001));
    await user.click(submit);
    expect(
      await within(dialog).findByText('Keep the message under 2000 characters.'),
    ).toBeVisible();
    expect(summaryPosts()).toHaveLength(0);
  });

  it('sends the shortlisted electives and says so', async () => {
    const { dialog, user } = await shortlistTwoAndOpen();
    await user.type(
      within(dialog).getByLabelText(/Student’s e-mail address/),
      'student@halden.example',
    );
    await user.type(within(dialog).getByLabelText(/Message/), 'As we discussed today.');
    await user.click(within(dialog).getByRole('button', { name: 'Send summary' }));

    await waitFor(() => expect(screen.queryByRole('dialog')).toBeNull());
    expect(summaryPosts().map((r) => r.body)).toEqual([
      {
        to: 'student@halden.example',
        courseCodes: ['CMP 3110', 'ART 2210'],
        term: '2026-SP',
        message: 'As we discussed today.',
      },
    ]);
    expect(
      await screen.findByText(/Summary sent to student@halden.example at .* \(2 electives\)\./),
    ).toBeInTheDocument();
  });
});
