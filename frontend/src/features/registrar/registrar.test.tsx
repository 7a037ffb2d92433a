import { afterEach, describe, expect, it } from 'vitest';
import { configure, screen, within } from '@testing-library/react';
import { navigationFor, PAGES } from '../../app/pages';
import { installFakeApi } from '../../test/fake-api';
import { renderApp, signInAs } from '../../test/render';

configure({ asyncUtilTimeout: 8000 });

let api: ReturnType<typeof installFakeApi> | undefined;
afterEach(() => api?.restore());

describe('the registrar overview', { timeout: 30_000 }, () => {
  it('links every other registrar page, student lookup included', async () => {
    api = installFakeApi({
      'GET /terms': () => ({ status: 200, data: { terms: [], current: null, next: null } }),
    });
    signInAs('registrar');
    renderApp('/registrar');
    const section = within(await screen.findByRole('region', { name: 'Registrar pages' }));
    const linked = section.getAllByRole('link').map((a) => a.getAttribute('href'));
    const others = navigationFor('registrar')
      .map((page) => page.path)
      .filter((path) => path !== PAGES.registrar.path);
    expect(others).toContain(PAGES.advising.path);
    expect(linked.sort()).toEqual(others.sort());
    // Registrar staff reach student lookup from the menu too.
    expect(
      within(screen.getByRole('navigation', { name: 'Main' })).getByRole('link', {
        name: 'Student lookup',
      }),
    ).toBeInTheDocument();
  });

  it('offers to clear the catalogue’s filters when nothing matches', async () => {
    api = installFakeApi({
      'GET /terms': () => ({ status: 200, data: { terms: [], current: null, next: null } }),
      'GET /courses': () => ({
        status: 200,
        data: [
          {
            courseCode: 'CMP 1010',
            title: 'Programming',
            department: 'CMP',
            credits: 3,
            level: '1000',
            elective: false,
            prerequisites: '',
            description: null,
          },
        ],
      }),
    });
    signInAs('registrar');
    renderApp('/registrar/catalogue');
    const search = await screen.findByLabelText('Search code or title');
    const { default: userEvent } = await import('@testing-library/user-event');
    const user = userEvent.setup();
    await user.type(search, 'zzz');
    expect(await screen.findByText('No course matches the filters.')).toBeInTheDocument();
    await user.click(screen.getByRole('button', { name: 'Clear filters' }));
    expect(await screen.findByText('Programming')).toBeInTheDocument();
    expect(search).toHaveValue('');
  });
});
