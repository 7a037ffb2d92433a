import { useEffect, useId, useRef, useState } from 'react';
import Alert from '@mui/material/Alert';
import Box from '@mui/material/Box';
import Button from '@mui/material/Button';
import Paper from '@mui/material/Paper';
import Table from '@mui/material/Table';
import TableBody from '@mui/material/TableBody';
import TableCell from '@mui/material/TableCell';
import TableContainer from '@mui/material/TableContainer';
import TableHead from '@mui/material/TableHead';
import TableRow from '@mui/material/TableRow';
import Typography from '@mui/material/Typography';
import Send from '@mui/icons-material/Send';
import type { ElectiveEstimate, Shortlist, SummaryResponse } from '@kinpath/contracts';
import { dateTime } from '../format';
import {
  BasisChip,
  ConfidenceLabel,
  Fit,
  KinCount,
  PredictedGrade,
  PredictedSatisfaction,
  VisuallyHidden,
} from './EstimateCells';
import { SendSummaryDialog } from './SendSummaryDialog';

interface ShortlistSectionProps {
  studentRef: string;
  /** The electives' term; null until the server has said which term "next" is. */
  term: string | null;
  shortlist: Shortlist | undefined;
  loadError: boolean;
  saveError: boolean;
  /** The electives request failed: rows have no estimates to show, and no summary can go out. */
  electivesError: boolean;
  electives: ReadonlyMap<string, ElectiveEstimate>;
  onRemove: (courseCode: string) => void;
}

export function ShortlistSection({
  studentRef,
  term,
  shortlist,
  loadError,
  saveError,
  electivesError,
  electives,
  onRemove,
}: ShortlistSectionProps) {
  const headingId = useId();
  const [dialogOpen, setDialogOpen] = useState(false);
  const [sent, setSent] = useState<SummaryResponse | null>(null);
  const codes = shortlist?.courseCodes ?? [];
  const sectionRef = useRef<HTMLElement>(null);
  // Where focus goes once a removed row has gone: the next row's "Remove", else the heading.
  const focusAfterRemoval = useRef<number | null>(null);
  const count = codes.length;
  useEffect(() => {
    const index = focusAfterRemoval.current;
    const section = sectionRef.current;
    if (index === null || !section) return;
    focusAfterRemoval.current = null;
    const buttons = section.querySelectorAll<HTMLElement>('[data-remove]');
    const next = buttons[Math.min(index, buttons.length - 1)];
    (next ?? section.querySelector<HTMLElement>('h2'))?.focus();
  }, [count]);
  const titles = new Map(shortlist?.items.map((i) => [i.courseCode, i.title]) ?? []);
  const courses = codes.map((code) => ({
    courseCode: code,
    title: electives.get(code)?.title ?? titles.get(code) ?? '',
  }));

  return (
    <Paper
      component="section"
      ref={sectionRef}
      aria-labelledby={headingId}
      variant="outlined"
      sx={{ p: 2.5 }}
    >
      <Box sx={{ display: 'flex', alignItems: 'center', gap: 2, flexWrap: 'wrap', mb: 1 }}>
        <Typography id={headingId} variant="h2" tabIndex={-1} sx={{ mr: 'auto' }}>
          Shortlist{term ? ` for ${term}` : ''}
        </Typography>
        <Button
          className="kp-no-print"
          variant="contained"
          startIcon={<Send aria-hidden />}
          onClick={() => {
            setSent(null);
            setDialogOpen(true);
          }}
          disabled={codes.length === 0 || electivesError}
          aria-haspopup="dialog"
        >
          Send summary
        </Button>
      </Box>
      <Box role="status" aria-live="polite" className="kp-no-print">
        {sent ? (
          <Alert severity="success" sx={{ mb: 1.5 }} onClose={() => setSent(null)}>
            Summary sent to {sent.to} at {dateTime(sent.sentAt)} ({sent.courseCodes.length}{' '}
            {sent.courseCodes.length === 1 ? 'elective' : 'electives'}).
          </Alert>
        ) : null}
        {electivesError && codes.length > 0 ? (
          <Alert severity="error" sx={{ mb: 1.5 }}>
            The estimates could not be loaded, so the shortlist shows none and no summary can be
            sent. Reload the page to try again.
          </Alert>
        ) : null}
        {saveError ? (
          <Alert severity="error" sx={{ mb: 1.5 }}>
            The shortlist could not be saved. It shows what is stored now; try the change again.
          </Alert>
        ) : null}
      </Box>
      {loadError ? (
        <Alert severity="error" role="alert">
          The shortlist could not be loaded. Reload the page to try again.
        </Alert>
      ) : codes.length === 0 ? (
        <>
          <Typography className="kp-no-print" sx={{ color: 'text.secondary' }}>
            Nothing shortlisted yet. Tick “Shortlist” on an elective above; every advisor of this
            student sees the same shortlist.
          </Typography>
          <Typography className="kp-print-only">No electives shortlisted.</Typography>
        </>
      ) : (
        <>
          <TableContainer component={Paper} variant="outlined">
            <Table aria-labelledby={headingId} sx={{ '& td, & th': { px: 1 } }}>
              <TableHead>
                <TableRow>
                  <TableCell scope="col">Course</TableCell>
                  <TableCell scope="col">Title</TableCell>
                  <TableCell scope="col" align="right">
                    Predicted grade
                  </TableCell>
                  <TableCell scope="col" align="right">
                    Kin<VisuallyHidden> for grade</VisuallyHidden>
                  </TableCell>
                  <TableCell scope="col" align="right">
                    Predicted satisfaction
                  </TableCell>
                  <TableCell scope="col" align="right">
                    Kin<VisuallyHidden> for satisfaction</VisuallyHidden>
                  </TableCell>
                  <TableCell scope="col" align="right">
                    Fit
                  </TableCell>
                  <TableCell scope="col">Confidence</TableCell>
                  <TableCell scope="col">Basis</TableCell>
                  <TableCell scope="col" className="kp-no-print">
                    <VisuallyHidden>Remove</VisuallyHidden>
                  </TableCell>
                </TableRow>
              </TableHead>
              <TableBody>
                {courses.map(({ courseCode, title }, index) => {
                  const e = electives.get(courseCode);
                  return (
                    <TableRow key={courseCode}>
                      <TableCell sx={{ fontWeight: 700, whiteSpace: 'nowrap' }}>
                        {courseCode}
                      </TableCell>
                      <TableCell>{title}</TableCell>
                      {e ? (
                        <>
                          <TableCell align="right">
                            <PredictedGrade elective={e} />
                          </TableCell>
                          <TableCell align="right">
                            <KinCount count={e.neighbours.grade} />
                          </TableCell>
                          <TableCell align="right">
                            <PredictedSatisfaction elective={e} />
                          </TableCell>
                          <TableCell align="right">
                            <KinCount count={e.neighbours.satisfaction} />
                          </TableCell>
                          <TableCell align="right">
                            <Fit elective={e} />
                          </TableCell>
                          <TableCell>
                            <ConfidenceLabel confidence={e.confidence} />
                          </TableCell>
                          <TableCell>
                            <BasisChip basis={e.basis} />
                          </TableCell>
                        </>
                      ) : (
                        <TableCell colSpan={7} sx={{ color: 'text.secondary' }}>
                          {electivesError
                            ? 'Estimates not loaded.'
                            : `Not among the electives of ${term ?? 'this term'}: no estimate for this term.`}
                        </TableCell>
                      )}
                      <TableCell className="kp-no-print">
                        <Button
                          size="small"
                          data-remove
                          onClick={() => {
                            focusAfterRemoval.current = index;
                            onRemove(courseCode);
                          }}
                          aria-label={`Remove ${courseCode} from the shortlist`}
                        >
                          Remove
                        </Button>
                      </TableCell>
                    </TableRow>
                  );
                })}
              </TableBody>
            </Table>
          </TableContainer>
          {shortlist?.updatedAt ? (
            <Typography
              className="kp-figures"
              sx={{ mt: 1, fontSize: '0.85rem', color: 'text.secondary' }}
            >
              Last changed {dateTime(shortlist.updatedAt)} by{' '}
              {shortlist.updatedByName ?? shortlist.updatedByEmail ?? 'an advisor'}.
            </Typography>
          ) : null}
        </>
      )}
      <SendSummaryDialog
        open={dialogOpen}
        studentRef={studentRef}
        term={term}
        courses={courses}
        onClose={() => setDialogOpen(false)}
        onSent={(response) => {
          setDialogOpen(false);
          setSent(response);
        }}
      />
    </Paper>
  );
}
