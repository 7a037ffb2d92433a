import type { ReactNode } from 'react';
import Box from '@mui/material/Box';
import Chip from '@mui/material/Chip';
import type {
  ElectiveEstimate,
  EstimateBasis,
  EstimateConfidence,
  LikelyRange,
} from '@kinpath/contracts';
import { satisfactionText } from '../../../lib/format';
import { BASIS_DESCRIPTIONS, BASIS_LABELS, CONFIDENCE_LABELS, fixed } from '../format';

/** Kept here too, for the screens that import it from the estimate cells. */
export { VisuallyHidden } from '../../../components/VisuallyHidden';

/** Baseline values are set in italics and say "baseline": never shown as if kin gave them. */
function Estimate({
  basis,
  children,
  note,
}: {
  basis: EstimateBasis;
  children: ReactNode;
  /** A line under the value, e.g. the likely range. */
  note?: ReactNode;
}) {
  if (basis === 'none') {
    return (
      <Box component="span" sx={{ color: 'text.secondary' }}>
        no estimate
      </Box>
    );
  }
  return (
    <Box
      component="span"
      className="kp-figures"
      sx={{ whiteSpace: 'nowrap', fontStyle: basis === 'baseline' ? 'italic' : 'normal' }}
    >
      {children}
      {basis === 'baseline' ? (
        <Box component="span" sx={{ color: 'text.secondary', fontSize: '0.8em', ml: 0.5 }}>
          baseline
        </Box>
      ) : null}
      {note}
    </Box>
  );
}

/** "likely B- to A-": the 80 % likely range in the estimate's own units. */
export function likelyText(range: LikelyRange | null): string | null {
  if (!range) return null;
  return range.lowLabel === range.highLabel
    ? `likely ${range.lowLabel}`
    : `likely ${range.lowLabel} to ${range.highLabel}`;
}

function Likely({ range }: { range: LikelyRange | null }) {
  const text = likelyText(range);
  if (!text) return null;
  return (
    <Box
      component="span"
      sx={{ display: 'block', color: 'text.secondary', fontSize: '0.8em', fontStyle: 'normal' }}
    >
      {text}
    </Box>
  );
}

export function PredictedGrade({ elective }: { elective: ElectiveEstimate }) {
  const basis = elective.predictedGrade === null ? 'none' : elective.bases.grade;
  return (
    <Estimate basis={basis} note={<Likely range={elective.likelyRange.grade} />}>
      {fixed(elective.predictedGrade, 2)}
      {elective.predictedGradeLetter ? (
        <Box component="span" sx={{ display: 'inline-block', minWidth: '2.2em', ml: 0.75 }}>
          {elective.predictedGradeLetter}
        </Box>
      ) : null}
    </Estimate>
  );
}

export function PredictedSatisfaction({ elective }: { elective: ElectiveEstimate }) {
  const basis = elective.predictedSatisfaction === null ? 'none' : elective.bases.satisfaction;
  const value = elective.predictedSatisfaction;
  return (
    <Estimate basis={basis} note={<Likely range={elective.likelyRange.satisfaction} />}>
      {value === null ? null : satisfactionText(value)}
    </Estimate>
  );
}

const FIT_BASIS_NOTE = { grade: 'grade only', satisfaction: 'satisfaction only' } as const;

export function Fit({ elective }: { elective: ElectiveEstimate }) {
  if (elective.fit === null) return <Estimate basis="none">{null}</Estimate>;
  return (
    <Estimate basis={elective.basis === 'baseline' ? 'baseline' : 'neighbours'}>
      <Box component="span" sx={{ fontWeight: 700 }}>
        {fixed(elective.fit, 0)}
      </Box>
      {elective.fitBasis && elective.fitBasis !== 'both' ? (
        <Box component="span" sx={{ color: 'text.secondary', fontSize: '0.8em', ml: 0.5 }}>
          ({FIT_BASIS_NOTE[elective.fitBasis]})
        </Box>
      ) : null}
    </Estimate>
  );
}

/**
 * The kin count beside each estimate (a count under the minimum is why the baseline served),
 * with the kin strength when given: the kin's summed similarity, so two sets of 30 kin that
 * are not equally alike are told apart.
 */
export function KinCount({ count, strength }: { count: number; strength?: number }) {
  return (
    <Box component="span" className="kp-figures" sx={{ color: 'text.secondary' }}>
      {count}
      {strength !== undefined && strength > 0 ? (
        <Box component="span" sx={{ display: 'block', fontSize: '0.8em' }}>
          strength {fixed(strength, 1)}
        </Box>
      ) : null}
    </Box>
  );
}

export function BasisChip({ basis }: { basis: EstimateBasis }) {
  return (
    <Chip
      size="small"
      label={BASIS_LABELS[basis]}
      title={BASIS_DESCRIPTIONS[basis]}
      variant={basis === 'neighbours' ? 'filled' : 'outlined'}
      sx={{
        fontStyle: basis === 'baseline' ? 'italic' : 'normal',
        borderStyle: basis === 'none' ? 'dashed' : 'solid',
        bgcolor: basis === 'neighbours' ? 'primary.main' : 'transparent',
        color: basis === 'neighbours' ? 'primary.contrastText' : 'text.primary',
        borderColor: 'text.secondary',
      }}
    />
  );
}

/** Confidence in words, with bars (1-3) as a second cue that does not rely on colour. */
export function ConfidenceLabel({ confidence }: { confidence: EstimateConfidence }) {
  const level = confidence === 'high' ? 3 : confidence === 'medium' ? 2 : 1;
  return (
    <Box component="span" sx={{ display: 'inline-flex', alignItems: 'center', gap: 0.75 }}>
      <Box
        component="span"
        aria-hidden
        sx={{ display: 'inline-flex', alignItems: 'flex-end', gap: '2px', height: 12 }}
      >
        {[1, 2, 3].map((bar) => (
          <Box
            key={bar}
            component="span"
            sx={{
              width: 4,
              height: 4 * bar,
              bgcolor: bar <= level ? 'text.primary' : 'transparent',
              border: 1,
              borderColor: 'text.secondary',
            }}
          />
        ))}
      </Box>
      {CONFIDENCE_LABELS[confidence]}
    </Box>
  );
}
