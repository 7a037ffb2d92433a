import type { ReactNode } from 'react';
import Box from '@mui/material/Box';
import Paper from '@mui/material/Paper';
import Typography from '@mui/material/Typography';
import { Brand } from '../../../components/Brand';
import { PageTitle } from '../../../components/PageTitle';
import { MAIN_CONTENT_ID, SkipLink } from '../../../components/SkipLink';

/** The frame of the pages reached without signing in: brand, one card, one heading. */
export function PublicFrame({
  title,
  lead,
  children,
}: {
  title: string;
  lead: ReactNode;
  children: ReactNode;
}) {
  return (
    <Box sx={{ minHeight: '100vh', display: 'flex', flexDirection: 'column' }}>
      <PageTitle title={title} />
      <SkipLink />
      <Box component="header" sx={{ px: { xs: 2, sm: 4 }, py: 2 }}>
        <Brand size={32} />
      </Box>
      <Box
        component="main"
        id={MAIN_CONTENT_ID}
        tabIndex={-1}
        sx={{
          flex: 1,
          display: 'flex',
          justifyContent: 'center',
          px: 2,
          pt: { xs: 2, sm: 8 },
          pb: 4,
          outline: 'none',
        }}
      >
        <Paper
          variant="outlined"
          sx={{
            width: '100%',
            maxWidth: 460,
            alignSelf: 'flex-start',
            p: { xs: 3, sm: 4 },
            borderTop: 4,
            borderTopColor: 'primary.main',
          }}
        >
          <Typography variant="h1" sx={{ mb: 0.75 }}>
            {title}
          </Typography>
          <Typography sx={{ mb: 3, color: 'text.secondary' }}>{lead}</Typography>
          {children}
        </Paper>
      </Box>
    </Box>
  );
}
