import { useId } from 'react';
import { Link as RouterLink } from 'react-router';
import Alert from '@mui/material/Alert';
import Box from '@mui/material/Box';
import Link from '@mui/material/Link';
import Typography from '@mui/material/Typography';
import { EmptyState } from '../../../components/EmptyState';
import { PageHeader } from '../../../components/PageHeader';
import { useCourses, useTerms } from '../api/catalogue';
import { CoursesTable } from '../components/CoursesTable';
import { TermsTable } from '../components/TermsTable';

const IMPORTS_PATH = '/registrar/imports';

function Loading({ what }: { what: string }) {
  return (
    <Typography role="status" sx={{ color: 'text.secondary' }}>
      Loading {what}…
    </Typography>
  );
}

function CoursesSection() {
  const headingId = useId();
  const courses = useCourses();
  if (courses.isSuccess && courses.data.length === 0) {
    return (
      <EmptyState heading="No catalogue yet">
        <Typography>
          Courses appear here once a catalogue file is imported: each course with its department,
          credits, level, whether it is an elective, and its prerequisites.{' '}
          <Link component={RouterLink} to={IMPORTS_PATH}>
            Import a catalogue
          </Link>
          .
        </Typography>
      </EmptyState>
    );
  }
  return (
    <Box component="section" aria-labelledby={headingId} sx={{ minWidth: 0 }}>
      <Typography id={headingId} variant="h2" sx={{ mb: 1.5 }}>
        Courses
      </Typography>
      {courses.isPending ? (
        <Loading what="the catalogue" />
      ) : courses.isError ? (
        <Alert severity="error" role="alert">
          The catalogue could not be loaded. Reload the page to try again.
        </Alert>
      ) : (
        <CoursesTable courses={courses.data} labelledBy={headingId} />
      )}
    </Box>
  );
}

function TermsSection() {
  const headingId = useId();
  const terms = useTerms();
  if (terms.isSuccess && terms.data.terms.length === 0) {
    return (
      <EmptyState heading="No terms yet">
        <Typography>
          Terms appear with the first offerings or term data import. The latest term with term data
          is the current term.{' '}
          <Link component={RouterLink} to={IMPORTS_PATH}>
            Go to imports
          </Link>
          .
        </Typography>
      </EmptyState>
    );
  }
  return (
    <Box component="section" aria-labelledby={headingId} sx={{ minWidth: 0 }}>
      <Typography id={headingId} variant="h2" sx={{ mb: 0.5 }}>
        Terms
      </Typography>
      {terms.isPending ? (
        <Loading what="the terms" />
      ) : terms.isError ? (
        <Alert severity="error" role="alert">
          The terms could not be loaded. Reload the page to try again.
        </Alert>
      ) : (
        <>
          <Typography variant="body2" sx={{ color: 'text.secondary', mb: 1.5 }}>
            Newest first. The current term is the latest with term data
            {terms.data.current ? ` (${terms.data.current})` : ''}; the next term is the one
            estimates and the demand outlook look ahead to
            {terms.data.next ? ` (${terms.data.next})` : ''}.
          </Typography>
          <TermsTable terms={terms.data} labelledBy={headingId} />
        </>
      )}
    </Box>
  );
}

export function CataloguePage() {
  return (
    <>
      <PageHeader
        title="Catalogue and terms"
        lead="The courses and terms Kinpath knows, as the imports left them."
      />
      <Box
        sx={{
          display: 'grid',
          gap: 3,
          // Side by side only where the courses table still has room for every column.
          gridTemplateColumns: { xs: '1fr', xl: 'minmax(0, 1fr) 400px' },
          alignItems: 'start',
        }}
      >
        <CoursesSection />
        <TermsSection />
      </Box>
    </>
  );
}
