import { useId } from 'react';
import { Link as RouterLink } from 'react-router';
import Box from '@mui/material/Box';
import Link from '@mui/material/Link';
import Paper from '@mui/material/Paper';
import Stack from '@mui/material/Stack';
import Typography from '@mui/material/Typography';
import { PAGES } from '../../../app/pages';
import { EmptyState } from '../../../components/EmptyState';
import { PageHeader } from '../../../components/PageHeader';
import { IMPORT_ORDER, KIND_LABELS } from '../../imports/words';
import { useTermData } from '../../terms/api/useTerms';
import { TermDataStatus } from '../../terms/components/TermDataStatus';

/** The registrar's pages, each with the one job it does. */
const REGISTRAR_PAGES = [
  {
    page: PAGES.imports,
    what: 'Upload catalogue, offerings, students and term data files; check, commit or roll back each import; see the history.',
  },
  {
    page: PAGES.catalogue,
    what: 'The courses and terms Kinpath holds, with the current and next term marked.',
  },
  {
    page: PAGES.gradeScale,
    what: 'Letters, grade points, marks and the lowest passing letter.',
  },
  {
    page: PAGES.modelSettings,
    what: 'How kin are found and weighed: the settings behind every estimate, with their versions.',
  },
  {
    page: PAGES.backtests,
    what: 'How accurate the estimates would have been on a held-out term, beside simple baselines.',
  },
  {
    page: PAGES.outlook,
    what: 'Expected demand for next term’s electives against the seats offered, per department.',
  },
  {
    page: PAGES.audit,
    what: 'Who did what, and when: sign-ins, student lookups, imports and settings changes.',
  },
  {
    page: PAGES.advising,
    what: 'Look a student up by number to read their history and next term’s estimates.',
  },
  {
    page: PAGES.scriptTokens,
    what: 'Tokens that let the student information system’s scripts import term data overnight.',
  },
] as const;

function RegistrarPages() {
  const headingId = useId();
  return (
    <Box component="section" aria-labelledby={headingId}>
      <Typography id={headingId} variant="h2" sx={{ mb: 1.5 }}>
        Registrar pages
      </Typography>
      <Box
        component="ul"
        sx={{
          listStyle: 'none',
          m: 0,
          p: 0,
          display: 'grid',
          gap: 1.5,
          gridTemplateColumns: 'repeat(auto-fill, minmax(240px, 1fr))',
        }}
      >
        {REGISTRAR_PAGES.map(({ page, what }) => (
          <Paper component="li" key={page.path} variant="outlined" sx={{ p: 2 }}>
            <Link
              component={RouterLink}
              to={page.path}
              sx={{ fontWeight: 700, fontSize: '1.05rem' }}
            >
              {page.navLabel}
            </Link>
            <Typography variant="body2" sx={{ mt: 0.5, color: 'text.secondary' }}>
              {what}
            </Typography>
          </Paper>
        ))}
      </Box>
    </Box>
  );
}

export function RegistrarPage() {
  const termData = useTermData();
  // Until Kinpath knows it holds term data, the first step is the catalogue.
  const hasTermData = termData.isSuccess && termData.data.current !== null;
  return (
    <>
      <PageHeader
        title="Registrar"
        lead="Bring each term's data into Kinpath, check it, and keep the estimates honest."
      />
      <Stack spacing={3}>
        <RegistrarPages />
        <EmptyState heading={hasTermData ? 'Imports' : 'Import a catalogue first'}>
          <Typography sx={{ mb: 1.5 }}>
            Each file is checked row by row before anything is written: rejected rows come back with
            line, column and reason, and a committed import can be rolled back.{' '}
            {hasTermData ? 'Each term, import in this order:' : 'Import in this order:'}
          </Typography>
          <Box component="ol" sx={{ mt: 0, mb: 2, pl: 3, '& li + li': { mt: 0.75 } }}>
            {IMPORT_ORDER.map((step) => (
              <li key={step.kind}>
                <strong>{KIND_LABELS[step.kind]}</strong>: {step.what}
              </li>
            ))}
          </Box>
          <Typography sx={{ mb: 2 }}>
            <Link component={RouterLink} to={PAGES.imports.path}>
              Go to imports
            </Link>
          </Typography>
          <TermDataStatus whenEmpty="No term data has been imported yet. Advisors and department heads see no estimates until it is." />
        </EmptyState>
      </Stack>
    </>
  );
}
