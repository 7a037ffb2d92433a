import Box from '@mui/material/Box';
import Stack from '@mui/material/Stack';
import Typography from '@mui/material/Typography';
import { EmptyState } from '../../../components/EmptyState';
import { PageHeader } from '../../../components/PageHeader';
import { useTermData } from '../../terms/api/useTerms';
import { TermDataStatus } from '../../terms/components/TermDataStatus';

/** The four kinds of import, in the order each one depends on the one before. */
const IMPORT_ORDER = [
  {
    kind: 'Catalogue',
    what: 'courses with their department, credits, whether they are electives, and prerequisites.',
  },
  { kind: 'Offerings', what: 'which courses run in which term, with sections and seats.' },
  {
    kind: 'Students',
    what: 'program, entry term and status. Student numbers are replaced by pseudonyms as they are imported.',
  },
  {
    kind: 'Term data',
    what: 'each student’s grade and satisfaction per course and term, the records every estimate rests on.',
  },
] as const;

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
        <EmptyState heading={hasTermData ? 'Imports' : 'Import a catalogue first'}>
          <Typography sx={{ mb: 1.5 }}>
            Imports will be listed here with who ran them, when, their row counts and status. Each
            file is checked row by row before anything is written: rejected rows come back with
            line, column and reason, and a committed import can be rolled back.{' '}
            {hasTermData ? 'Each term, import in this order:' : 'Import in this order:'}
          </Typography>
          <Box component="ol" sx={{ mt: 0, mb: 2, pl: 3, '& li + li': { mt: 0.75 } }}>
            {IMPORT_ORDER.map((step) => (
              <li key={step.kind}>
                <strong>{step.kind}</strong>: {step.what}
              </li>
            ))}
          </Box>
          <TermDataStatus whenEmpty="No term data has been imported yet. Advisors and department heads see no estimates until it is." />
        </EmptyState>
      </Stack>
    </>
  );
}
