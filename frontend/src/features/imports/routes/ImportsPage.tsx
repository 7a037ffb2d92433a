import { useId } from 'react';
import { useSearchParams } from 'react-router';
import Alert from '@mui/material/Alert';
import Box from '@mui/material/Box';
import Paper from '@mui/material/Paper';
import Typography from '@mui/material/Typography';
import { EmptyState } from '../../../components/EmptyState';
import { PageHeader } from '../../../components/PageHeader';
import { useImports } from '../api/imports';
import { ImportDetail } from '../components/ImportDetail';
import { ImportHistory } from '../components/ImportHistory';
import { UploadForm } from '../components/UploadForm';
import { IMPORT_ORDER, KIND_LABELS } from '../words';

function NoImportsYet() {
  return (
    <EmptyState heading="No imports yet">
      <Typography sx={{ mb: 1.5 }}>
        Each import is listed here with who ran it, when, its row counts and status. Import a
        catalogue first, then offerings, students and term data, since each kind refers to the one
        before:
      </Typography>
      <Box component="ol" sx={{ mt: 0, mb: 0, pl: 3, '& li + li': { mt: 0.75 } }}>
        {IMPORT_ORDER.map((step) => (
          <li key={step.kind}>
            <strong>{KIND_LABELS[step.kind]}</strong>: {step.what}
          </li>
        ))}
      </Box>
    </EmptyState>
  );
}

function HistorySection({ selectedId }: { selectedId: string | null }) {
  const headingId = useId();
  const imports = useImports();
  if (imports.isSuccess && imports.data.length === 0) return <NoImportsYet />;
  return (
    <Box component="section" aria-labelledby={headingId} sx={{ minWidth: 0 }}>
      <Typography id={headingId} variant="h2" sx={{ mb: 1.5 }}>
        Import history
      </Typography>
      {imports.isPending ? (
        <Typography role="status" sx={{ color: 'text.secondary' }}>
          Loading the import history…
        </Typography>
      ) : imports.isError ? (
        <Alert severity="error" role="alert">
          The import history could not be loaded. Reload the page to try again.
        </Alert>
      ) : (
        <ImportHistory imports={imports.data} labelledBy={headingId} selectedId={selectedId} />
      )}
    </Box>
  );
}

export function ImportsPage() {
  const headingId = useId();
  const [params, setParams] = useSearchParams();
  // The chosen import lives in the address, so a link to it (or a reload) shows it again.
  const selectedId = params.get('import');

  return (
    <>
      <PageHeader
        title="Imports"
        lead="Bring a term’s files into Kinpath. Every row is checked before anything is written; a commit can be rolled back."
      />
      <Box
        sx={{
          display: 'grid',
          gap: 3,
          // Side by side only on wide screens: at 1366 px the report needs the full width.
          gridTemplateColumns: { xs: '1fr', xl: 'minmax(0, 5fr) minmax(0, 6fr)' },
          alignItems: 'start',
          mb: 4,
        }}
      >
        <Paper component="section" aria-labelledby={headingId} variant="outlined" sx={{ p: 2.5 }}>
          <Typography id={headingId} variant="h2" sx={{ mb: 2 }}>
            New import
          </Typography>
          <UploadForm onUploaded={(id) => setParams({ import: id })} />
        </Paper>
        {selectedId ? (
          <ImportDetail key={selectedId} id={selectedId} />
        ) : (
          <Box
            sx={{
              p: 2.5,
              border: 1,
              borderStyle: 'dashed',
              borderColor: 'divider',
              borderRadius: 1,
              color: 'text.secondary',
            }}
          >
            <Typography>
              An uploaded file shows here while it is checked: its progress, the validation report,
              and the buttons to commit or roll back. Open an earlier import from the history.
            </Typography>
          </Box>
        )}
      </Box>
      <HistorySection selectedId={selectedId} />
    </>
  );
}
