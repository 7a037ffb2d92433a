import Box from '@mui/material/Box';
import CheckCircleOutline from '@mui/icons-material/CheckCircleOutline';
import GroupAdd from '@mui/icons-material/GroupAdd';
import NewReleasesOutlined from '@mui/icons-material/NewReleasesOutlined';
import TrendingDown from '@mui/icons-material/TrendingDown';
import type { ForecastFlag } from '@kinpath/contracts';
import { FORECAST_FLAG_LABELS } from '@kinpath/contracts';

const ICONS = {
  over_subscribed: GroupAdd,
  at_risk: TrendingDown,
  no_history: NewReleasesOutlined,
  balanced: CheckCircleOutline,
} as const;

const COLOURS: Record<ForecastFlag, string> = {
  over_subscribed: 'error.main',
  at_risk: 'warning.main',
  no_history: 'info.main',
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
  no_history:
    'a new elective (or one not offered lately): its estimate rests on electives of its level, so it is not flagged at risk for that alone',
  balanced: 'none of the above',
};
