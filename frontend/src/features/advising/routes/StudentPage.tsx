import { useCallback, useId, useMemo, useState } from 'react';
import { Link as RouterLink, useParams } from 'react-router';
import Alert from '@mui/material/Alert';
import Box from '@mui/material/Box';
import Button from '@mui/material/Button';
import Paper from '@mui/material/Paper';
import TextField from '@mui/material/TextField';
import Typography from '@mui/material/Typography';
import ArrowBack from '@mui/icons-material/ArrowBack';
import Print from '@mui/icons-material/Print';
import type { ElectiveEstimate, StudentStatus } from '@kinpath/contracts';
import { EstimateCautions } from '../../../components/EstimateCautions';
import { PageHeader } from '../../../components/PageHeader';
import { useAuth } from '../../auth/AuthProvider';
import { httpStatus } from '../../../lib/api-client';
import {
  useElectives,
  useHistory,
  useOfferedTerms,
  useShortlist,
  useStudent,
  useUpdateShortlist,
} from '../api/students';
import { ElectivesTable } from '../components/ElectivesTable';
import { HistoryTable } from '../components/HistoryTable';
import { NotesSection } from '../components/NotesSection';
import { PrintStyles } from '../components/PrintStyles';
import { SentSummaries } from '../components/SentSummaries';
import { ShortlistSection } from '../components/ShortlistSection';
import { StudentSummary } from '../components/StudentSummary';
import { WhyDrawer } from '../components/WhyDrawer';
import { dateTime, statusLabel } from '../format';

function TermPicker({ value, onChange }: { value: string; onChange: (term: string) => void }) {
  const terms = useOfferedTerms();
  const options = terms.data?.offered ?? [];
  // The term on screen is always an option, even before the term list arrives.
  const all = options.includes(value) ? options : [...options, value];
  return (
    <TextField
      select
      label="Term"
      value={value}
      onChange={(event) => onChange(event.target.value)}
      slotProps={{ select: { native: true } }}
      sx={{ width: 190 }}
      className="kp-no-print"
    >
      {all.map((term) => (
        <option key={term} value={term}>
          {term}
          {term === terms.data?.next ? ' (next term)' : ''}
        </option>
      ))}
    </TextField>
  );
}

function ElectivesSection({
  studentRef,
  term,
  onTermChange,
  shortlisted,
  onShortlistChange,
  onWhy,
  status,
}: {
  studentRef: string;
  /** The student's standing; anything but active is said above the list. */
  status: StudentStatus | undefined;
  term: string | null;
  onTermChange: (term: string) => void;
  shortlisted: ReadonlySet<string>;
  /** Absent for roles that keep no shortlist: the table has no shortlist column then. */
  onShortlistChange?: (courseCode: string, shortlisted: boolean) => void;
  onWhy: (elective: ElectiveEstimate) => void;
}) {
  const headingId = useId();
  const electives = useElectives(studentRef, term);
  const data = electives.data;
  return (
    <Box component="section" aria-labelledby={headingId} className="kp-no-print">
      <Box sx={{ display: 'flex', alignItems: 'center', gap: 2, flexWrap: 'wrap', mb: 1 }}>
        <Typography id={headingId} variant="h2" sx={{ mr: 'auto' }}>
          Electives{data ? ` for ${data.term}` : ''}
        </Typography>
        {data ? <TermPicker value={data.term} onChange={onTermChange} /> : null}
      </Box>
      {status && status !== 'active' ? (
        <Alert severity="warning" sx={{ mb: 1.5, maxWidth: '110ch' }}>
          <strong>{statusLabel(status)}:</strong> {STANDING_NOTES[status]} The electives below are
          worked out as for an enrolled student; confirm the student’s plans before using them.
        </Alert>
      ) : null}
      {data ? (
        <Box
          sx={{
            mb: 1.5,
            p: 1.5,
            bgcolor: 'background.paper',
            border: 1,
            borderColor: 'divider',
            borderRadius: 1,
            maxWidth: '110ch',
          }}
        >
          <Typography sx={{ mb: 0.5 }}>
            <strong>Fit</strong> (0–100) combines the predicted grade and the predicted
            satisfaction. <strong>Kin</strong> counts the similar past students behind each
            estimate. A <em>baseline</em> estimate (in italics) stands in when there are too few
            kin.
          </Typography>
          <Typography>
            <strong>Confidence:</strong> {data.confidenceRule}
          </Typography>
          <Typography
            className="kp-figures"
            sx={{ mt: 0.5, fontSize: '0.8rem', color: 'text.secondary' }}
          >
            Model settings version {data.settingsVersion}, built {dateTime(data.modelBuiltAt)}.
          </Typography>
        </Box>
      ) : null}
      <Box role="status" aria-live="polite">
        {electives.isPending ? (
          <Typography sx={{ color: 'text.secondary' }}>Computing the electives…</Typography>
        ) : null}
        {electives.isFetching && !electives.isPending ? (
          <Typography sx={{ color: 'text.secondary', mb: 1 }}>Updating the electives…</Typography>
        ) : null}
        {electives.isError ? (
          <Alert severity="error">
            {httpStatus(electives.error) === 409
              ? 'Estimates are not available until the registrar’s office has imported term data.'
              : 'The electives could not be loaded. Reload the page to try again.'}
          </Alert>
        ) : null}
      </Box>
      {data ? (
        <ElectivesTable
          electives={data.electives}
          term={data.term}
          labelledBy={headingId}
          shortlisted={shortlisted}
          onShortlistChange={onShortlistChange}
          onWhy={onWhy}
        />
      ) : null}
    </Box>
  );
}

function HistorySection({ studentRef }: { studentRef: string }) {
  const headingId = useId();
  const history = useHistory(studentRef);
  return (
    <Box component="section" aria-labelledby={headingId} className="kp-print-order-2">
      <Typography id={headingId} variant="h2" sx={{ mb: 1 }}>
        Course history
      </Typography>
      {history.isPending ? (
        <Typography role="status" sx={{ color: 'text.secondary' }}>
          Loading the course history…
        </Typography>
      ) : history.isError ? (
        <Alert severity="error" role="alert">
          The course history could not be loaded. Reload the page to try again.
        </Alert>
      ) : (
        <HistoryTable history={history.data} labelledBy={headingId} />
      )}
    </Box>
  );
}

/** What each standing other than active means for next term's electives. */
const STANDING_NOTES: Record<Exclude<StudentStatus, 'active'>, string> = {
  withdrawn: 'this student has left the university and is not registered for next term.',
  graduated: 'this student has completed their program.',
  on_leave: 'this student is on leave and may not return next term.',
};

function studentTitle(program: string | null | undefined, entryTerm: string | null | undefined) {
  if (!program) return 'Student';
  return entryTerm ? `${program} student, entered ${entryTerm}` : `${program} student`;
}

/** One student, by opaque ref: header, electives with their why, shortlist, notes, history. */
export function StudentPage() {
  const { ref = '' } = useParams();
  const student = useStudent(ref);
  const [term, setTerm] = useState<string | null>(null);
  const [why, setWhy] = useState<ElectiveEstimate | null>(null);
  // Shortlists, notes and summaries are advisors' work; registrar staff read the rest.
  const me = useAuth().user;
  const advises = me?.role === 'advisor';
  const shortlist = useShortlist(ref, advises);
  const updateShortlist = useUpdateShortlist(ref);
  const electives = useElectives(ref, term);
  const byCode = useMemo(
    () => new Map((electives.data?.electives ?? []).map((e) => [e.courseCode, e])),
    [electives.data],
  );
  const shortlisted = useMemo(() => new Set(shortlist.data?.courseCodes ?? []), [shortlist.data]);

  const { mutate } = updateShortlist;
  const current = shortlist.data?.courseCodes;
  const changeShortlist = useCallback(
    (courseCode: string, add: boolean) => {
      const codes = current ?? [];
      const next = add
        ? [...codes.filter((c) => c !== courseCode), courseCode]
        : codes.filter((c) => c !== courseCode);
      mutate({ courseCodes: next });
    },
    [current, mutate],
  );
  const closeWhy = useCallback(() => setWhy(null), []);

  if (student.isError) {
    const missing = httpStatus(student.error) === 404;
    return (
      <>
        <PageHeader title={missing ? 'Student not found' : 'Student'} />
        <Alert severity={missing ? 'info' : 'error'} role="alert" sx={{ maxWidth: '78ch', mb: 2 }}>
          {missing
            ? 'This student page does not exist or is no longer available. Look the student up again.'
            : 'The student could not be loaded. Reload the page to try again.'}
        </Alert>
        <Button component={RouterLink} to="/advising" startIcon={<ArrowBack aria-hidden />}>
          Back to student lookup
        </Button>
      </>
    );
  }

  const shownTerm = electives.data?.term ?? term;
  return (
    <>
      <PrintStyles />
      <PageHeader
        title={studentTitle(student.data?.program, student.data?.entryTerm)}
        lead="Course history and next term’s electives, with the estimates behind each one."
        actions={
          <Box className="kp-no-print" sx={{ display: 'flex', gap: 1 }}>
            <Button component={RouterLink} to="/advising" startIcon={<ArrowBack aria-hidden />}>
              Student lookup
            </Button>
            <Button
              variant="outlined"
              startIcon={<Print aria-hidden />}
              onClick={() => window.print()}
            >
              Print
            </Button>
          </Box>
        }
      />
      <Typography className="kp-print-only kp-figures" sx={{ mb: 1 }}>
        Printed {dateTime(new Date().toISOString())} by {me?.displayName ?? 'an advisor'}
        {me?.email ? ` (${me.email})` : ''}
      </Typography>
      <Box
        className="kp-student-page"
        sx={{ display: 'grid', gap: 3, gridTemplateColumns: 'minmax(0, 1fr)' }}
      >
        <Paper variant="outlined" sx={{ p: 2.5 }} className="kp-print-order-1">
          {student.isPending ? (
            <Typography role="status" sx={{ color: 'text.secondary' }}>
              Loading the student…
            </Typography>
          ) : (
            <StudentSummary student={student.data} />
          )}
        </Paper>
        <ElectivesSection
          studentRef={ref}
          status={student.data?.status}
          term={term}
          onTermChange={setTerm}
          shortlisted={shortlisted}
          onShortlistChange={advises ? changeShortlist : undefined}
          onWhy={setWhy}
        />
        <Box className="kp-print-order-4">
          <EstimateCautions />
        </Box>
        <Box
          className="kp-print-order-3"
          sx={{
            display: 'grid',
            gap: 3,
            gridTemplateColumns: { xs: 'minmax(0, 1fr)', xl: 'minmax(0, 3fr) minmax(320px, 2fr)' },
            alignItems: 'start',
          }}
        >
          {advises ? (
            <ShortlistSection
              studentRef={ref}
              term={shownTerm}
              shortlist={shortlist.data}
              loadError={shortlist.isError}
              saveError={updateShortlist.isError}
              electivesError={electives.isError}
              electives={byCode}
              onRemove={(courseCode) => changeShortlist(courseCode, false)}
            />
          ) : null}
          {advises ? (
            <Box
              className="kp-no-print"
              sx={{ display: 'grid', gap: 3, minWidth: 0, gridTemplateColumns: 'minmax(0, 1fr)' }}
            >
              <NotesSection studentRef={ref} />
              <SentSummaries studentRef={ref} />
            </Box>
          ) : null}
        </Box>
        <HistorySection studentRef={ref} />
      </Box>
      <WhyDrawer studentRef={ref} elective={why} onClose={closeWhy} />
    </>
  );
}
