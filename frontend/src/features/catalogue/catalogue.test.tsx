import { afterEach, describe, expect, it } from 'vitest';
import { configure, screen, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import type { CourseSummary, TermsResponse } from '@kinpath/contracts';
import { installFakeApi } from '../../test/fake-api';
import { renderApp, signInAs } from '../../test/render';

// Whole pages in jsdom answer slowly on a busy machine; wait longer than the default second.
configure({ asyncUtilTimeout: 8000 });

let api: ReturnType<typeof installFakeApi> | undefined;
afterEach(() => api?.restore());

const course = (
  courseCode: string,
  title: string,
  elective: boolean,
  prerequisites = '',
): CourseSummary => ({
  courseCode,
  title,
  department: courseCode.slice(0, 3),
  credits: 3,
  level: courseCode.slice(4, 5) + '000',
  elective,
  prerequisites,
  description: null,
});

const COURSES: CourseSummary[] = [
  course('CMP 1100', 'Programming Foundations', false),
  course('CMP 3310', 'Networks', true, 'CMP 1100'),
  course('TDL 2200', 'Estuary Ecology', true),
  course('TDL 1100', 'Tides and Shores', false),
];

const TERMS: TermsResponse = {
  terms: [
    { term: '2026-SP', records: 4310, offerings: 95 },
    { term: '2026-FA', records: 4620, offerings: 101 },
    { term: '2027-SP', records: 0, offerings: 98 },
  ],
  current: '2026-FA',
  next: '2027-SP',
};

const codes = (table: HTMLElement) =>
  within(table)
    .getAllByRole('row')
    .slice(1)
    .map((row) => within(row).getAllByRole('cell')[0].textContent);

describe('the catalogue and terms page', { timeout: 40_000 }, () => {
  it('filters courses by department and by elective', async () => {
    api = installFakeApi({
      'GET /courses': () => ({ status: 200, data: COURSES }),
      'GET /terms': () => ({ status: 200, data: TERMS }),
    });
    signInAs('registrar');
    renderApp('/registrar/catalogue');
    const table = await screen.findByRole('table', { name: 'Courses' });
    const user = userEvent.setup();
    expect(codes(table)).toEqual(['CMP 1100', 'CMP 3310', 'TDL 1100', 'TDL 2200']);

    await user.selectOptions(screen.getByLabelText('Department'), 'TDL');
    expect(codes(table)).toEqual(['TDL 1100', 'TDL 2200']);
    await user.selectOptions(screen.getByLabelText('Electives'), 'elective');
    expect(codes(table)).toEqual(['TDL 2200']);
    expect(screen.getByText('1 of 4 courses')).toBeInTheDocument();

    await user.selectOptions(screen.getByLabelText('Department'), '');
    expect(codes(table)).toEqual(['CMP 3310', 'TDL 2200']);
    await user.selectOptions(screen.getByLabelText('Electives'), 'required');
    expect(codes(table)).toEqual(['CMP 1100', 'TDL 1100']);
    // One request: filters work on the loaded catalogue.
    expect(api.requests.filter((r) => r.url === '/courses')).toHaveLength(1);
  });

  it('marks the current and the next term in words, newest first', async () => {
    api = installFakeApi({
      'GET /courses': () => ({ status: 200, data: COURSES }),
      'GET /terms': () => ({ status: 200, data: TERMS }),
    });
    signInAs('registrar');
    renderApp('/registrar/catalogue');
    const table = await screen.findByRole('table', { name: 'Terms' });
    const rows = within(table).getAllByRole('row').slice(1);
    expect(rows.map((row) => within(row).getByRole('rowheader').textContent)).toEqual([
      '2027-SPNext',
      '2026-FACurrent',
      '2026-SP',
    ]);
    expect(within(rows[1]).getAllByRole('cell')[0]).toHaveTextContent('4,620');
  });

  it('says what to import first when there is no catalogue yet', async () => {
    api = installFakeApi({
      'GET /courses': () => ({ status: 200, data: [] }),
      'GET /terms': () => ({ status: 200, data: { terms: [], current: null, next: null } }),
    });
    signInAs('registrar');
    renderApp('/registrar/catalogue');
    expect(
      await screen.findByRole('heading', { level: 2, name: 'No catalogue yet' }),
    ).toBeInTheDocument();
    expect(screen.getByRole('link', { name: 'Import a catalogue' })).toHaveAttribute(
      'href',
      '/registrar/imports',
    );
    expect(screen.getByRole('heading', { level: 2, name: 'No terms yet' })).toBeInTheDocument();
  });
});
