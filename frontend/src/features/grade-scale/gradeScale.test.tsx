import { afterEach, describe, expect, it } from 'vitest';
import { configure, screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import type { GradeScale, UpdateGradeScaleRequest } from '@kinpath/contracts';
import { installFakeApi, type FakeHandler } from '../../test/fake-api';
import { renderApp, signInAs } from '../../test/render';
import { confirmationText } from './components/GradeScaleForm';

// Whole pages in jsdom answer slowly on a busy machine; wait longer than the default second.
configure({ asyncUtilTimeout: 8000 });

let api: ReturnType<typeof installFakeApi> | undefined;
afterEach(() => api?.restore());

const SCALE: GradeScale = {
  letters: [
    { letter: 'A', points: 4 },
    { letter: 'B', points: 3 },
    { letter: 'C', points: 2 },
    { letter: 'D', points: 1 },
    { letter: 'F', points: 0 },
  ],
  marks: [
    { letter: 'W', passing: false },
    { letter: 'P', passing: true },
  ],
  passingThreshold: 'D',
  minPoints: 0,
  maxPoints: 4,
};

function scaleApi(put?: FakeHandler) {
  return installFakeApi({
    'GET /grade-scale': () => ({ status: 200, data: SCALE }),
    'GET /terms': () => ({
      status: 200,
      data: {
        terms: [
          { term: '2026-SP', records: 4100, offerings: 90 },
          { term: '2026-FA', records: 4620, offerings: 101 },
        ],
        current: '2026-FA',
        next: '2027-SP',
      },
    }),
    ...(put ? { 'PUT /grade-scale': put } : {}),
  });
}

const puts = () => api?.requests.filter((r) => r.method === 'PUT') ?? [];

async function openPage() {
  signInAs('registrar');
  renderApp('/registrar/grade-scale');
  await screen.findByRole('heading', { level: 1, name: 'Grade scale' });
  return {
    user: userEvent.setup(),
    form: within(await screen.findByRole('form', { name: 'Grade scale' })),
  };
}

describe('the grade-scale form', { timeout: 40_000 }, () => {
  it('shows the stored scale with fixed decimals and which letters pass', async () => {
    api = scaleApi();
    const { form } = await openPage();
    expect(form.getByLabelText('Grade points of B')).toHaveValue('3.0');
    expect(form.getByLabelText('Lowest passing letter')).toHaveValue('D');
    const letters = within(form.getByRole('table', { name: 'Letters' }));
    const passes = letters
      .getAllByRole('row')
      .slice(1)
      .map((row) => within(row).getAllByRole('cell')[2].textContent);
    expect(passes).toEqual(['Passes', 'Passes', 'Passes', 'Passes', 'Does not pass']);
    expect(form.getByLabelText('P passes')).toBeChecked();
    expect(form.getByLabelText('W passes')).not.toBeChecked();
  });

  it('keeps each letter once on the scale and sends nothing until it is', async () => {
    api = scaleApi(() => ({ status: 200, data: { ...SCALE, recordsUpdated: 0 } }));
    const { user, form } = await openPage();

    await user.clear(form.getByLabelText('Mark, row 1'));
    await user.type(form.getByLabelText('Mark, row 1'), 'b');
    await user.click(form.getByRole('button', { name: 'Save grade scale' }));

    expect(await form.findAllByText('B appears more than once on the scale.')).toHaveLength(2);
    expect(screen.queryByRole('dialog')).toBeNull();
    expect(puts()).toEqual([]);
  });

  it('hides the remove columns’ headings from sight only, one pixel wide', async () => {
    api = scaleApi();
    const { form } = await openPage();
    const headings = form.getAllByRole('columnheader', { name: 'Remove' });
    expect(headings).toHaveLength(2);
    for (const heading of headings) {
      const text = heading.firstElementChild as HTMLElement;
      // In MUI's sx a bare 1 is 100 %: the hidden text would be as wide as the page.
      expect(getComputedStyle(text).width).toBe('1px');
      expect(getComputedStyle(text).position).toBe('absolute');
    }
  });

  it('rejects points that are not a number and an empty letter', async () => {
    api = scaleApi();
    const { user, form } = await openPage();
    await user.clear(form.getByLabelText('Grade points of A'));
    await user.type(form.getByLabelText('Grade points of A'), 'four');
    await user.click(form.getByRole('button', { name: 'Add a letter' }));
    await user.click(form.getByRole('button', { name: 'Save grade scale' }));

    expect(
      await form.findByText('Use a number from 0 to 999 with at most two decimals.'),
    ).toBeInTheDocument();
    expect(form.getByText('Enter the letter.')).toBeInTheDocument();
    expect(form.getByText('Enter the grade points.')).toBeInTheDocument();
    expect(puts()).toEqual([]);
  });

  it('confirms that saving re-derives stored grade points, then saves', async () => {
    let body: UpdateGradeScaleRequest | undefined;
    api = scaleApi(({ body: sent }) => {
      body = sent as UpdateGradeScaleRequest;
      return { status: 200, data: { ...SCALE, ...body, recordsUpdated: 8720 } };
    });
    const { user, form } = await openPage();

    await user.click(form.getByRole('button', { name: 'Add a letter' }));
    await user.type(form.getByLabelText('Letter, row 6'), 'a+');
    await user.type(form.getByLabelText('Grade points of A+'), '4.3');
    await user.selectOptions(form.getByLabelText('Lowest passing letter'), 'C');
    await user.click(form.getByRole('button', { name: 'Remove mark W' }));
    await user.click(form.getByRole('button', { name: 'Save grade scale' }));

    const dialog = within(await screen.findByRole('dialog', { name: 'Save the grade scale?' }));
    expect(
      dialog.getByText(/re-derives the grade points of all 8,720 stored records of term data/),
    ).toBeInTheDocument();
    expect(puts()).toEqual([]);
    await user.click(dialog.getByRole('button', { name: 'Save and re-derive' }));

    expect(
      await screen.findByText(
        'Grade scale saved. The grade points of 8,720 stored records were derived again from it.',
      ),
    ).toBeInTheDocument();
    await waitFor(() => expect(screen.queryByRole('dialog')).toBeNull());
    expect(body).toEqual({
      // Added at the bottom, sent at the top: the scale goes out best first.
      letters: [
        { letter: 'A+', points: 4.3 },
        { letter: 'A', points: 4 },
        { letter: 'B', points: 3 },
        { letter: 'C', points: 2 },
        { letter: 'D', points: 1 },
        { letter: 'F', points: 0 },
      ],
      marks: [{ letter: 'P', passing: true }],
      passingThreshold: 'C',
    });
  });

  it('shows the server’s reason when stored records still use a letter', async () => {
    api = scaleApi(() => ({
      status: 409,
      data: {
        statusCode: 409,
        message: 'Stored records use W (212 records); keep this on the scale.',
        error: 'Conflict',
      },
    }));
    const { user, form } = await openPage();
    await user.click(form.getByRole('button', { name: 'Remove mark W' }));
    await user.click(form.getByRole('button', { name: 'Save grade scale' }));
    const dialog = within(await screen.findByRole('dialog'));
    await user.click(dialog.getByRole('button', { name: 'Save and re-derive' }));
    expect(await dialog.findByRole('alert')).toHaveTextContent(
      'Stored records use W (212 records); keep this on the scale.',
    );
  });

  it('words the confirmation when the number of records is not known', () => {
    expect(confirmationText(null)).toMatch(
      /^Saving re-derives the grade points of every stored record of term data from the new scale/,
    );
    expect(confirmationText(1)).toContain('all 1 stored record of term data');
  });
});
