import { afterEach, describe, expect, it } from 'vitest';
import { screen } from '@testing-library/react';
import type { TermsResponse } from '@kinpath/contracts';
import { summariseTerms } from './api/useTerms';
import { installFakeApi } from '../../test/fake-api';
import { renderApp, signInAs } from '../../test/render';

let api: ReturnType<typeof installFakeApi> | undefined;
afterEach(() => api?.restore());

const NO_TERM_DATA: TermsResponse = {
  terms: [{ term: '2026-FA', records: 0, offerings: 120 }],
  current: null,
  next: '2026-FA',
};

const THREE_TERMS: TermsResponse = {
  terms: [
    { term: '2025-WI', records: 4100, offerings: 90 },
    { term: '2025-SP', records: 4310, offerings: 95 },
    { term: '2025-FA', records: 4620, offerings: 101 },
    { term: '2026-WI', records: 0, offerings: 98 },
  ],
  current: '2025-FA',
  next: '2026-WI',
};

describe('term data on the landing pages', () => {
  it('counts only terms with records as term data', () => {
    expect(summariseTerms(THREE_TERMS)).toEqual({
      termsWithRecords: ['2025-WI', '2025-SP', '2025-FA'],
      current: '2025-FA',
      next: '2026-WI',
    });
  });

  it('tells an advisor that the registrar must import term data first', async () => {
    api = installFakeApi({ 'GET /terms': () => ({ status: 200, data: NO_TERM_DATA }) });
    signInAs('advisor');
    renderApp('/advising');
    expect(await screen.findByText(/No term data has been imported yet/)).toBeInTheDocument();
    expect(screen.getByText(/Ask the registrar's office to import it/)).toBeInTheDocument();
  });

  it('says which terms are held once they are', async () => {
    api = installFakeApi({ 'GET /terms': () => ({ status: 200, data: THREE_TERMS }) });
    signInAs('registrar');
    renderApp('/registrar');
    expect(
      await screen.findByText(
        'Term data covers 3 terms, 2025-WI to 2025-FA. The next term is 2026-WI.',
      ),
    ).toBeInTheDocument();
    expect(screen.getByRole('heading', { level: 2, name: 'Imports' })).toBeInTheDocument();
  });

  it('asks the registrar for a catalogue first while there is no term data', async () => {
    api = installFakeApi({ 'GET /terms': () => ({ status: 200, data: NO_TERM_DATA }) });
    signInAs('registrar');
    renderApp('/registrar');
    expect(
      await screen.findByRole('heading', { level: 2, name: 'Import a catalogue first' }),
    ).toBeInTheDocument();
    expect(await screen.findByText(/No term data has been imported yet/)).toBeInTheDocument();
  });

  it('does not guess when the term list cannot be read', async () => {
    api = installFakeApi({ 'GET /terms': () => ({ status: 500, data: {} }) });
    signInAs('advisor');
    renderApp('/advising');
    expect(await screen.findByText(/could not check its term data just now/)).toBeInTheDocument();
  });
});
