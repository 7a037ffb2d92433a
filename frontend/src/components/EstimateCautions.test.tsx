import { describe, expect, it } from 'vitest';
import { screen, within } from '@testing-library/react';
import { ESTIMATE_CAUTION_TITLE, ESTIMATE_CAUTIONS } from '@kinpath/contracts';
import { renderWithProviders } from '../test/render';
import { EstimateCautions } from './EstimateCautions';

describe('EstimateCautions', () => {
  it('shows every caution under its heading, as a named region', () => {
    renderWithProviders(<EstimateCautions />);

    const region = screen.getByRole('region', { name: ESTIMATE_CAUTION_TITLE });
    expect(within(region).getByRole('heading', { level: 2 })).toHaveTextContent(
      ESTIMATE_CAUTION_TITLE,
    );
    const items = within(region).getAllByRole('listitem');
    expect(items.map((item) => item.textContent)).toEqual([...ESTIMATE_CAUTIONS]);
    expect(ESTIMATE_CAUTIONS.length).toBeGreaterThanOrEqual(3);
  });

  it('names the laws and keeps estimates advisory', () => {
    renderWithProviders(<EstimateCautions headingLevel="h3" />);
    expect(screen.getByRole('heading', { level: 3 })).toBeInTheDocument();
    expect(screen.getByText(/FERPA/)).toBeInTheDocument();
    expect(screen.getByText(/GDPR/)).toBeInTheDocument();
    expect(
      screen.getByText(/not a decision about admission, placement or eligibility/),
    ).toBeInTheDocument();
  });
});
