import Box from '@mui/material/Box';
import CheckCircleOutline from '@mui/icons-material/CheckCircleOutline';
import GroupAdd from '@mui/icons-material/GroupAdd';
import TrendingDown from '@mui/icons-material/TrendingDown';
import type { ForecastFlag } from '@kinpath/contracts';
import { FORECAST_FLAG_LABELS } from '@kinpath/contracts';

const ICONS = {
  over_subscribed: GroupAdd,
  at_risk: TrendingDown,
  balanced: CheckCircleOutline,
} as const;

const COLOURS: Record<ForecastFlag, string> = {
  over_subscribed: 'error.main',
  at_risk: 'warning.main',
  balanced: 'text.secondary',
};

/** A flag in words with its icon: colour is never the only signal. */
export function FlagLabel({ flag }: { flag: ForecastFlag }) {
  const Icon = ICONS[flag];
  return (
    <Box
      component="span"
      data-flag={flag}
      sx={{ display: 'inline-flex', alignItems: 'center', gap: 0.5, color: COLOURS[flag] }}
    >
      <Icon aria-hidden fontSize="small" />
      <span>{FORECAST_FLAG_LABELS[flag]}</span>
    </Box>
  );
}

export const FLAG_EXPLANATIONS: Record<ForecastFlag, string> = {
  over_subscribed: 'even the low end of the 80 % interval is above the seats',
  at_risk: 'expected enrolment below the threshold you set',
  balanced: 'neither of the above',
};
