import { useId } from 'react';
import { BarChart } from '@mui/x-charts/BarChart';
import Alert from '@mui/material/Alert';
import Box from '@mui/material/Box';
import Button from '@mui/material/Button';
import Divider from '@mui/material/Divider';
import Drawer from '@mui/material/Drawer';
import IconButton from '@mui/material/IconButton';
import Typography from '@mui/material/Typography';
import useMediaQuery from '@mui/material/useMediaQuery';
import Close from '@mui/icons-material/Close';
import type { ElectiveEstimate, ElectiveExplanation, SignalExplanation } from '@kinpath/contracts';
import { KINPATH_COLOURS } from '../../../app/theme';
import { httpStatus } from '../../../lib/api-client';
import { useExplanation } from '../api/students';
import { BASIS_DESCRIPTIONS, CONFIDENCE_LABELS, fixed, plural } from '../format';
import { likelyText, VisuallyHidden } from './EstimateCells';

interface WhyDrawerProps {
  studentRef: string;
  /** The elective asked about; null keeps the panel closed. */
  elective: ElectiveEstimate | null;
  onClose: () => void;
}

const SIGNALS = {
  grade: { name: 'Grade', unit: 'grade points', decimals: 2 },
  satisfaction: { name: 'Satisfaction', unit: 'points on the 1-5 scale', decimals: 2 },
} as const;

/** Plain words first: how many kin, how alike, how much they disagreed. */
function summary(signal: keyof typeof SIGNALS, s: SignalExplanation): string {
  const what = signal === 'grade' ? 'grade' : 'satisfaction';
  if (s.basis === 'none')
    return `No past student has a ${what} in this course, so there is no estimate.`;
  if (s.basis === 'baseline') {
    return `Only ${plural(s.kinCount, 'similar past student')} ${
      s.kinCount === 1 ? 'has' : 'have'
    } a ${what} in this course, too few to lean on. The estimate comes from the course's average and this student's own record instead (the baseline).`;
  }
  return `${plural(s.kinCount, 'past student')} whose course histories resemble this student's took this course. The estimate starts from what this student's record leads one to expect and adds how the kin's ${what} compared with what was expected of them, the more alike counting more.`;
}

function OutcomeChart({
  signal,
  explanation,
  s,
}: {
  signal: keyof typeof SIGNALS;
  explanation: ElectiveExplanation;
  s: SignalExplanation;
}) {
  const headingId = useId();
  // Bars need 3:1 against the panel in either colour scheme (WCAG 1.4.11).
  const dark = useMediaQuery('(prefers-color-scheme: dark)');
  if (!s.outcomes) {
    return (
      <Alert severity="info" variant="outlined" sx={{ mt: 1 }}>
        {s.outcomesSuppressed ??
          `The kin's results are shown only when at least ${explanation.disclosureMinimum} contributed, so that no one's result can be read off.`}
      </Alert>
    );
  }
  const label = `How the kin did in ${explanation.courseCode}: ${SIGNALS[signal].name.toLowerCase()}`;
  return (
    <Box component="figure" aria-labelledby={headingId} sx={{ m: 0, mt: 1 }}>
      <Typography
        id={headingId}
        component="figcaption"
        sx={{ fontSize: '0.85rem', fontWeight: 700 }}
      >
        {label}
      </Typography>
      {/* The bars repeat the list below for sighted readers; assistive technology reads the list. */}
      <Box aria-hidden>
        <BarChart
          height={150}
          hideLegend
          skipAnimation
          disableAxisListener
          margin={{ top: 8, right: 8, bottom: 4, left: 4 }}
          xAxis={[{ scaleType: 'band', data: s.outcomes.map((o) => o.label) }]}
          yAxis={[{ tickMinStep: 1, width: 28 }]}
          series={[
            {
              data: s.outcomes.map((o) => o.count),
              label: 'Kin',
              color: dark ? KINPATH_COLOURS.pineLight : KINPATH_COLOURS.pine,
            },
          ]}
          slots={{ tooltip: () => null }}
        />
      </Box>
      <VisuallyHidden>
        <ul>
          {s.outcomes.map((o) => (
            <li key={o.label}>
              {o.label}: {plural(o.count, 'student')}
            </li>
          ))}
        </ul>
      </VisuallyHidden>
    </Box>
  );
}

function SignalSection({
  signal,
  explanation,
}: {
  signal: keyof typeof SIGNALS;
  explanation: ElectiveExplanation;
}) {
  const s = explanation[signal];
  const meta = SIGNALS[signal];
  const headingId = useId();
  return (
    <Box component="section" aria-labelledby={headingId} sx={{ mt: 2.5 }}>
      <Typography id={headingId} variant="h3" sx={{ mb: 0.75 }}>
        {meta.name}
        {/* A real space: the margin alone would make "Gradeestimate" of the heading's name. */}
        {s.value !== null ? ' ' : null}
        {s.value !== null ? (
          <Box component="span" className="kp-figures" sx={{ fontWeight: 400, ml: 0.5 }}>
            estimate {fixed(s.value, meta.decimals)}
          </Box>
        ) : null}
      </Typography>
      <Typography sx={{ mb: 1 }}>{summary(signal, s)}</Typography>
      <Box
        component="dl"
        className="kp-figures"
        sx={{
          display: 'grid',
          gridTemplateColumns: 'max-content 1fr',
          columnGap: 2,
          rowGap: 0.25,
          m: 0,
          '& dt': { color: 'text.secondary' },
          '& dd': { m: 0 },
        }}
      >
        <dt>Basis</dt>
        <dd>{BASIS_DESCRIPTIONS[s.basis]}</dd>
        <dt>Likely range</dt>
        <dd>
          {s.likelyRange
            ? `${likelyText(s.likelyRange)}: four in five past estimates like this one were this close`
            : '—'}
        </dd>
        <dt>Confidence</dt>
        <dd>{CONFIDENCE_LABELS[s.confidence]}</dd>
        <dt>Kin count</dt>
        <dd>{s.kinCount}</dd>
        <dt>Kin strength</dt>
        <dd>
          {s.basis === 'neighbours'
            ? `${fixed(s.kinStrength, 2)}: the kin's similarities added up (30 identical kin would give 30)`
            : '—'}
        </dd>
        <dt>Similarity</dt>
        <dd>
          {s.similarityRange
            ? `${fixed(s.similarityRange.min, 2)} to ${fixed(s.similarityRange.max, 2)} (1 would be identical)`
            : '—'}
        </dd>
        <dt>Spread</dt>
        <dd>
          {s.spread !== null
            ? `${fixed(s.spread, 2)} ${meta.unit}: how far the kin's results scatter around their own averages`
            : '—'}
        </dd>
      </Box>
      {s.basis !== 'none' ? <OutcomeChart signal={signal} explanation={explanation} s={s} /> : null}
    </Box>
  );
}

function SharedCourses({ signal, s }: { signal: keyof typeof SIGNALS; s: SignalExplanation }) {
  const headingId = useId();
  const courses = s.sharedCourses;
  return (
    <Box component="section" aria-labelledby={headingId} sx={{ mt: 2.5 }}>
      <Typography id={headingId} variant="h3" sx={{ mb: 0.75 }}>
        What made these students alike ({SIGNALS[signal].name.toLowerCase()})
      </Typography>
      {courses.length === 0 ? (
        <Typography sx={{ color: 'text.secondary' }}>No shared courses to show.</Typography>
      ) : (
        <>
          <Typography sx={{ mb: 0.75 }}>
            Courses this student and the kin shared where they did alike, with each course&apos;s
            share of the likeness those courses built up (all such courses together make 100%); the
            first counted most.
            {s.againstShare > 0
              ? ` Courses where they differed took ${fixed(s.againstShare * 100, 0)}% of it away again.`
              : ''}
          </Typography>
          <Box component="ol" sx={{ m: 0, pl: 3 }}>
            {courses.map((c) => (
              <li key={c.courseCode}>
                <strong>{c.courseCode}</strong> {c.title}{' '}
                <Box component="span" className="kp-figures" sx={{ color: 'text.secondary' }}>
                  ({fixed(c.contribution * 100, 0)}% of the likeness built up)
                </Box>
              </li>
            ))}
          </Box>
        </>
      )}
    </Box>
  );
}

function Method({ explanation }: { explanation: ElectiveExplanation }) {
  const headingId = useId();
  return (
    <Box component="section" aria-labelledby={headingId} sx={{ mt: 2.5 }}>
      <Typography id={headingId} variant="h3" sx={{ mb: 0.75 }}>
        The method
      </Typography>
      <Typography sx={{ mb: 0.5 }}>{explanation.method.description}</Typography>
      <Typography sx={{ color: 'text.secondary', fontSize: '0.875rem' }}>
        {explanation.method.name}: {explanation.method.similarity}. Model settings version{' '}
        {explanation.settingsVersion}.
      </Typography>
    </Box>
  );
}

/** The "why" of one elective's estimates, in a side panel over the student page. */
export function WhyDrawer({ studentRef, elective, onClose }: WhyDrawerProps) {
  const titleId = useId();
  const explanation = useExplanation(studentRef, elective?.courseCode ?? null);
  const open = elective !== null;

  return (
    <Drawer
      anchor="right"
      open={open}
      onClose={onClose}
      className="kp-no-print"
      slotProps={{
        paper: {
          role: 'dialog',
          'aria-modal': true,
          'aria-labelledby': titleId,
          sx: { width: { xs: '100%', sm: 480 }, p: 3 },
        },
      }}
    >
      <Box sx={{ display: 'flex', alignItems: 'flex-start', gap: 1 }}>
        <Typography id={titleId} variant="h2" component="h2" sx={{ flex: 1 }}>
          Why these estimates for {elective?.courseCode ?? 'this elective'}?
        </Typography>
        <IconButton onClick={onClose} aria-label="Close the explanation" size="small">
          <Close />
        </IconButton>
      </Box>
      {elective ? (
        <Typography sx={{ color: 'text.secondary', mb: 1 }}>{elective.title}</Typography>
      ) : null}
      <Divider />
      <Box role="status" aria-live="polite">
        {explanation.isPending && open ? (
          <Typography sx={{ mt: 2, color: 'text.secondary' }}>Loading the explanation…</Typography>
        ) : null}
        {explanation.isError ? (
          <Alert severity="error" sx={{ mt: 2 }}>
            {httpStatus(explanation.error) === 404
              ? 'There is no explanation for this elective in this term.'
              : 'The explanation could not be loaded. Close the panel and try again.'}
          </Alert>
        ) : null}
      </Box>
      {explanation.data ? (
        <>
          <SignalSection signal="grade" explanation={explanation.data} />
          <SignalSection signal="satisfaction" explanation={explanation.data} />
          <SharedCourses signal="grade" s={explanation.data.grade} />
          <SharedCourses signal="satisfaction" s={explanation.data.satisfaction} />
          <Method explanation={explanation.data} />
        </>
      ) : null}
      <Box sx={{ mt: 3 }}>
        <Button variant="outlined" onClick={onClose}>
          Close
        </Button>
      </Box>
    </Drawer>
  );
}
