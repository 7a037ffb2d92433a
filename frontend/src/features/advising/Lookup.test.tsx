import { afterEach, describe, expect, it } from 'vitest';
import { configure, screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { STUDENT_NOT_FOUND_MESSAGE } from '@kinpath/contracts';
import { renderApp, signInAs } from '../../test/render';
import { fakeAdvisingApi, REF, STUDENT, STUDENT_NUMBER } from './test/fixtures';

// The whole app renders in jsdom; screens that wait on the (fake) API get time on a busy machine.
configure({ asyncUtilTimeout: 10_000 });

let api: ReturnType<typeof fakeAdvisingApi> | undefined;
afterEach(() => api?.restore());

describe('student lookup', { timeout: 30_000 }, () => {
  it('says only that there are no records for an unknown number', async () => {
    api = fakeAdvisingApi({
      'POST /students/lookup': () => ({
        status: 404,
        data: { statusCode: 404, message: 'Student HR9999999 not found', error: 'Not Found' },
      }),
    });
    signInAs('advisor');
    const { router } = renderApp('/advising');
    const user = userEvent.setup();

    await user.type(await screen.findByLabelText(/Student number/), 'HR9999999');
    await user.click(screen.getByRole('button', { name: 'Look up' }));

    const status = await screen.findByText(STUDENT_NOT_FOUND_MESSAGE);
    expect(status).toHaveTextContent(/^No records for this student number\.$/);
    // Nothing of the server's own wording, which might echo the number.
    expect(screen.queryByText(/not found/i)).toBeNull();
    expect(router.state.location.pathname).toBe('/advising');
  });

  it('sends the number in the POST body and opens the student by ref alone', async () => {
    api = fakeAdvisingApi({
      'POST /students/lookup': () => ({
        status: 200,
        data: { ref: REF, program: STUDENT.program, status: 'active', entryTerm: '2023-FA' },
      }),
    });
    signInAs('advisor');
    const { router } = renderApp('/advising');
    const user = userEvent.setup();

    await user.type(await screen.findByLabelText(/Student number/), STUDENT_NUMBER);
    await user.click(screen.getByRole('button', { name: 'Look up' }));

    await waitFor(() => expect(router.state.location.pathname).toBe(`/advising/students/${REF}`));
    const lookup = api.requests.find((r) => r.url === '/students/lookup');
    expect(lookup).toMatchObject({ method: 'POST', body: { studentId: STUDENT_NUMBER } });
    const { location } = router.state;
    expect(`${location.pathname}${location.search}${location.hash}`).not.toContain(STUDENT_NUMBER);
    expect(JSON.stringify(location.state ?? null)).not.toContain(STUDENT_NUMBER);
    for (const request of api.requests.filter((r) => r.url !== '/students/lookup')) {
      expect(request.url).not.toContain(STUDENT_NUMBER);
    }
    expect(
      await screen.findByRole('heading', {
        level: 1,
        name: 'Computing BSc student, entered 2023-FA',
      }),
    ).toBeInTheDocument();
  });

  it('asks for a number before sending anything', async () => {
    api = fakeAdvisingApi();
    signInAs('advisor');
    renderApp('/advising');
    const user = userEvent.setup();

    await user.click(await screen.findByRole('button', { name: 'Look up' }));
    expect(await screen.findByText('Enter the student number.')).toBeInTheDocument();
    expect(api.requests.some((r) => r.url === '/students/lookup')).toBe(false);
  });

  it('lists recent lookups by program and entry term, one click from the student', async () => {
    api = fakeAdvisingApi();
    signInAs('advisor');
    const { router } = renderApp('/advising');

    const recent = await screen.findByRole('region', { name: 'Your recent lookups' });
    const links = await within(recent).findAllByRole('link');
    expect(links.map((l) => l.textContent)).toEqual([
      expect.stringContaining('Computing BSc · entered 2023-FA'),
      expect.stringContaining('Music BA · entered 2022-FA'),
    ]);
    expect(recent).not.toHaveTextContent(/HR\d+/);

    await userEvent.setup().click(links[0]);
    await waitFor(() => expect(router.state.location.pathname).toBe(`/advising/students/${REF}`));
  });
});
