import { useId } from 'react';
import Box from '@mui/material/Box';
import Typography from '@mui/material/Typography';
import InfoOutlined from '@mui/icons-material/InfoOutlined';
import { ESTIMATE_CAUTION_TITLE, ESTIMATE_CAUTIONS } from '@kinpath/contracts';

interface EstimateCautionsProps {
  /** Heading level to fit the page's outline; estimates usually sit under an `h2`. */
  headingLevel?: 'h2' | 'h3';
  /** The role's own cautions (default: the advising cautions). */
  cautions?: readonly string[];
}

/**
 * The cautions that go with every estimate, in the words the contracts package keeps. A labelled
 * region rather than a live alert: it is standing text, and screen-reader users can jump to it.
 */
export function EstimateCautions({
  headingLevel = 'h2',
  cautions = ESTIMATE_CAUTIONS,
}: EstimateCautionsProps) {
  const headingId = useId();
  return (
    <Box
      component="section"
      aria-labelledby={headingId}
      sx={{
        display: 'flex',
        gap: 1.5,
        maxWidth: '78ch',
        p: 2,
        border: 1,
        borderColor: 'divider',
        borderLeft: 4,
        borderLeftColor: 'secondary.main',
        borderRadius: 1,
        bgcolor: 'background.paper',
      }}
    >
      <InfoOutlined aria-hidden sx={{ color: 'secondary.main', mt: 0.25 }} />
      <Box>
        <Typography id={headingId} component={headingLevel} variant="h3" sx={{ mb: 0.75 }}>
          {ESTIMATE_CAUTION_TITLE}
        </Typography>
        <Box component="ul" sx={{ m: 0, pl: 2.5, '& li + li': { mt: 0.5 } }}>
          {cautions.map((caution) => (
            <li key={caution}>{caution}</li>
          ))}
        </Box>
      </Box>
    </Box>
  );
}
