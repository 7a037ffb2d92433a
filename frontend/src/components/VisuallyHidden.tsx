import type { ReactNode } from 'react';
import Box from '@mui/material/Box';
import { visuallyHidden } from '@mui/utils';

/**
 * The one style for text read out but not shown (MUI's, in pixels: in `sx` a bare 1 would
 * mean 100 % and stretch the page). Use it, or this component, wherever something is hidden
 * from sight only.
 */
export { visuallyHidden };

/** Text for screen readers only, e.g. which signal a "Kin" column counts for. */
export function VisuallyHidden({ children }: { children: ReactNode }) {
  return (
    <Box component="span" sx={visuallyHidden}>
      {children}
    </Box>
  );
}
