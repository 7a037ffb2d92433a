import type { ReactNode } from 'react';
import Box from '@mui/material/Box';
import Typography from '@mui/material/Typography';
import { PageTitle } from './PageTitle';

interface PageHeaderProps {
  /** The page's one `h1`, also used for the browser tab's title. */
  title: string;
  /** A short line under the heading: what this page is for. */
  lead?: ReactNode;
  actions?: ReactNode;
}

export function PageHeader({ title, lead, actions }: PageHeaderProps) {
  return (
    <Box
      sx={{
        display: 'flex',
        alignItems: 'flex-end',
        justifyContent: 'space-between',
        gap: 2,
        flexWrap: 'wrap',
        mb: 3,
      }}
    >
      <PageTitle title={title} />
      <Box>
        <Typography variant="h1">{title}</Typography>
        {lead ? (
          <Typography sx={{ mt: 0.75, color: 'text.secondary', maxWidth: '70ch' }}>
            {lead}
          </Typography>
        ) : null}
      </Box>
      {actions}
    </Box>
  );
}
