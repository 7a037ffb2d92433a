import { useId, useMemo, useState } from 'react';
import {
  useFieldArray,
  useForm,
  type FieldErrors,
  type UseFormRegisterReturn,
} from 'react-hook-form';
import Alert from '@mui/material/Alert';
import Box from '@mui/material/Box';
import Button from '@mui/material/Button';
import Checkbox from '@mui/material/Checkbox';
import IconButton from '@mui/material/IconButton';
import Paper from '@mui/material/Paper';
import Stack from '@mui/material/Stack';
import Table from '@mui/material/Table';
import TableBody from '@mui/material/TableBody';
import TableCell from '@mui/material/TableCell';
import TableContainer from '@mui/material/TableContainer';
import TableHead from '@mui/material/TableHead';
import TableRow from '@mui/material/TableRow';
import TextField from '@mui/material/TextField';
import Typography from '@mui/material/Typography';
import Add from '@mui/icons-material/Add';
import DeleteOutline from '@mui/icons-material/DeleteOutline';
import {
  DEFAULT_LETTER_GRADES,
  DEFAULT_MARKS,
  DEFAULT_PASSING_THRESHOLD,
  type GradeScale,
  type UpdateGradeScaleRequest,
} from '@kinpath/contracts';
import { ConfirmDialog } from '../../../components/ConfirmDialog';
import { visuallyHidden } from '../../../components/VisuallyHidden';
import { apiMessage, httpStatus } from '../../../lib/api-client';
import { formatCount } from '../../imports/words';
import { useSaveGradeScale } from '../api/gradeScale';

/** Points stay text while edited, so a half-typed "3." is not turned into a number too early. */
export interface ScaleFields {
  letters: { letter: string; points: string }[];
  marks: { letter: string; passing: boolean }[];
  passingThreshold: string;
}

/** The server's rule for letters and marks: 1 to 4 characters, a letter first, then letters, + or -. */
const LETTER = /^[A-Za-z][A-Za-z+-]{0,3}$/;
const POINTS = /^\d{1,3}(\.\d{1,2})?$/;

/** Points with fixed decimals, as the scale is printed: 4.0, 3.7, 3.25. */
function pointsText(points: number): string {
  return Number.isInteger(Math.round(points * 1000) / 100) ? points.toFixed(1) : points.toFixed(2);
}

export function toFields(scale: Pick<GradeScale, 'letters' | 'marks' | 'passingThreshold'>) {
  return {
    letters: scale.letters.map((l) => ({ letter: l.letter, points: pointsText(l.points) })),
    marks: scale.marks.map((m) => ({ letter: m.letter, passing: m.passing })),
    passingThreshold: scale.passingThreshold,
  } satisfies ScaleFields;
}

export const DEFAULT_FIELDS: ScaleFields = {
  letters: DEFAULT_LETTER_GRADES.map((g) => ({
    letter: g.letter,
    points: pointsText(g.points ?? 0),
  })),
  marks: DEFAULT_MARKS.map((m) => ({ letter: m.letter, passing: m.passing })),
  passingThreshold: DEFAULT_PASSING_THRESHOLD,
};

/** Letters go out best first by points, so a letter added at the bottom lands in its place. */
export function toRequest(values: ScaleFields): UpdateGradeScaleRequest {
  return {
    letters: values.letters
      .map((l) => ({ letter: l.letter.trim().toUpperCase(), points: Number(l.points) }))
      .sort((a, b) => b.points - a.points),
    marks: values.marks.map((m) => ({ letter: m.letter.trim().toUpperCase(), passing: m.passing })),
    passingThreshold: values.passingThreshold,
  };
}

const norm = (letter: string) => letter.trim().toUpperCase();

/** A letter or mark that is well formed and appears once on the whole scale. */
function checkLetter(value: string, all: ScaleFields, what: 'letter' | 'mark') {
  const letter = norm(value);
  if (!letter) return `Enter the ${what}.`;
  if (!LETTER.test(letter)) return 'Use 1 to 4 characters: a letter, then letters, + or -.';
  const uses = [...all.letters, ...all.marks].filter((e) => norm(e.letter) === letter).length;
  return uses > 1 ? `${letter} appears more than once on the scale.` : true;
}

function checkPoints(value: string) {
  const text = value.trim();
  if (!text) return 'Enter the grade points.';
  if (!POINTS.test(text)) return 'Use a number from 0 to 999 with at most two decimals.';
  return true;
}

/** A registration for an MUI control: the ref goes to the input element itself. */
function bind(registration: UseFormRegisterReturn) {
  const { ref, ...rest } = registration;
  return { ...rest, inputRef: ref };
}

function rowError(errors: FieldErrors<ScaleFields>, list: 'letters' | 'marks', index: number) {
  const row = errors[list]?.[index];
  return row as Record<string, { message?: string } | undefined> | undefined;
}

interface GradeScaleFormProps {
  scale: GradeScale;
  /** Stored records whose grade points a save re-derives; null when unknown. */
  storedRecords: number | null;
}

/** The scale as a table form: letters with points (saved best first), marks, and the passing letter. */
export function GradeScaleForm({ scale, storedRecords }: GradeScaleFormProps) {
  const save = useSaveGradeScale();
  const lettersHeadingId = useId();
  const marksHeadingId = useId();
  const [confirming, setConfirming] = useState<ScaleFields | null>(null);
  const [saved, setSaved] = useState<string | null>(null);
  const {
    register,
    control,
    handleSubmit,
    watch,
    reset,
    formState: { errors, isDirty },
  } = useForm<ScaleFields>({ values: useMemo(() => toFields(scale), [scale]) });
  const letters = useFieldArray({
    control,
    name: 'letters',
    rules: { minLength: { value: 2, message: 'Keep at least two letters on the scale.' } },
  });
  const marks = useFieldArray({ control, name: 'marks' });
  const values = watch();
  const threshold = values.letters.find((l) => norm(l.letter) === norm(values.passingThreshold));
  const thresholdPoints =
    threshold && POINTS.test(threshold.points) ? Number(threshold.points) : null;

  const onSubmit = handleSubmit((checked) => {
    setSaved(null);
    save.reset();
    setConfirming(checked);
  });

  const confirm = async () => {
    if (!confirming) return;
    try {
      const result = await save.mutateAsync(toRequest(confirming));
      setConfirming(null);
      setSaved(
        `Grade scale saved. The grade points of ${formatCount(result.recordsUpdated)} stored ${
          result.recordsUpdated === 1 ? 'record were' : 'records were'
        } derived again from it.`,
      );
    } catch {
      // Shown in the dialog from the mutation's error.
    }
  };

  const saveFailure = (error: unknown) => {
    const status = httpStatus(error);
    if ((status === 400 || status === 409) && apiMessage(error)) return apiMessage(error) ?? null;
    return 'The grade scale could not be saved; nothing was changed. Try again in a moment.';
  };

  const cellInput = { size: 'small' as const, fullWidth: true };

  return (
    <form onSubmit={onSubmit} noValidate aria-label="Grade scale">
      <Stack spacing={3}>
        {saved ? (
          <Alert severity="success" role="status">
            {saved}
          </Alert>
        ) : null}

        <Box component="section" aria-labelledby={lettersHeadingId}>
          <Typography id={lettersHeadingId} variant="h2" sx={{ mb: 0.5 }}>
            Letters
          </Typography>
          <Typography variant="body2" sx={{ color: 'text.secondary', mb: 1.5 }}>
            In any order: saving puts them best first, by points. The lowest and highest points
            bound every predicted grade; a number in the scale’s range in a term data file is taken
            as grade points.
          </Typography>
          <TableContainer component={Paper} variant="outlined" sx={{ maxWidth: 620 }}>
            <Table aria-labelledby={lettersHeadingId}>
              <TableHead>
                <TableRow>
                  <TableCell>Letter</TableCell>
                  <TableCell align="right">Grade points</TableCell>
                  <TableCell>Passes</TableCell>
                  <TableCell>
                    <Box component="span" sx={visuallyHidden}>
                      Remove
                    </Box>
                  </TableCell>
                </TableRow>
              </TableHead>
              <TableBody>
                {letters.fields.map((field, index) => {
                  const rowErrors = rowError(errors, 'letters', index);
                  const row = values.letters[index];
                  const points = row && POINTS.test(row.points.trim()) ? Number(row.points) : null;
                  const passes =
                    thresholdPoints !== null && points !== null ? points >= thresholdPoints : null;
                  const name = norm(row?.letter ?? '') || `row ${index + 1}`;
                  const letterField = bind(
                    register(`letters.${index}.letter`, {
                      validate: (value, all) => checkLetter(value, all, 'letter'),
                    }),
                  );
                  const pointsField = bind(
                    register(`letters.${index}.points`, {
                      validate: checkPoints,
                    }),
                  );
                  return (
                    <TableRow key={field.id}>
                      <TableCell sx={{ width: 140, verticalAlign: 'top' }}>
                        <TextField
                          {...cellInput}
                          {...letterField}
                          error={Boolean(rowErrors?.letter)}
                          helperText={rowErrors?.letter?.message}
                          slotProps={{
                            htmlInput: {
                              'aria-label': `Letter, row ${index + 1}`,
                              'aria-required': true,
                              maxLength: 4,
                            },
                            formHelperText: rowErrors?.letter ? { role: 'alert' } : undefined,
                          }}
                        />
                      </TableCell>
                      <TableCell align="right" sx={{ width: 180, verticalAlign: 'top' }}>
                        <TextField
                          {...cellInput}
                          {...pointsField}
                          error={Boolean(rowErrors?.points)}
                          helperText={rowErrors?.points?.message}
                          slotProps={{
                            htmlInput: {
                              'aria-label': `Grade points of ${name}`,
                              'aria-required': true,
                              inputMode: 'decimal',
                              style: { textAlign: 'right' },
                              className: 'kp-figures',
                            },
                            formHelperText: rowErrors?.points ? { role: 'alert' } : undefined,
                          }}
                        />
                      </TableCell>
                      <TableCell sx={{ verticalAlign: 'top', pt: 1.5 }}>
                        {passes === null ? '—' : passes ? 'Passes' : 'Does not pass'}
                      </TableCell>
                      <TableCell sx={{ width: 56, verticalAlign: 'top' }}>
                        <IconButton
                          aria-label={`Remove letter ${name}`}
                          onClick={() => letters.remove(index)}
                          size="small"
                        >
                          <DeleteOutline aria-hidden fontSize="small" />
                        </IconButton>
                      </TableCell>
                    </TableRow>
                  );
                })}
              </TableBody>
            </Table>
          </TableContainer>
          {errors.letters?.root?.message ? (
            <Typography role="alert" variant="body2" sx={{ color: 'error.main', mt: 1 }}>
              {errors.letters.root.message}
            </Typography>
          ) : null}
          <Button
            startIcon={<Add aria-hidden />}
            onClick={() => letters.append({ letter: '', points: '' })}
            sx={{ mt: 1 }}
          >
            Add a letter
          </Button>
        </Box>

        <Box>
          <TextField
            select
            label="Lowest passing letter"
            {...bind(
              register('passingThreshold', {
                validate: (value, all) =>
                  all.letters.some((l) => norm(l.letter) === norm(value))
                    ? true
                    : 'Choose one of the letters above.',
              }),
            )}
            error={Boolean(errors.passingThreshold)}
            helperText={
              errors.passingThreshold?.message ??
              'Letters with at least its points pass. Among the marks, only those ticked below pass.'
            }
            sx={{ maxWidth: 320 }}
            slotProps={{
              select: { native: true },
              inputLabel: { shrink: true },
              formHelperText: errors.passingThreshold ? { role: 'alert' } : undefined,
            }}
          >
            {threshold ? null : <option value={values.passingThreshold}>Choose a letter…</option>}
            {values.letters
              .filter((l) => LETTER.test(norm(l.letter)))
              .map((l, i) => (
                <option key={`${norm(l.letter)}-${i}`} value={norm(l.letter)}>
                  {norm(l.letter)}
                </option>
              ))}
          </TextField>
        </Box>

        <Box component="section" aria-labelledby={marksHeadingId}>
          <Typography id={marksHeadingId} variant="h2" sx={{ mb: 0.5 }}>
            Marks
          </Typography>
          <Typography variant="body2" sx={{ color: 'text.secondary', mb: 1.5 }}>
            Marks carry no grade points. They count as attempts; a ticked mark passes the course.
          </Typography>
          <TableContainer component={Paper} variant="outlined" sx={{ maxWidth: 620 }}>
            <Table aria-labelledby={marksHeadingId}>
              <TableHead>
                <TableRow>
                  <TableCell>Mark</TableCell>
                  <TableCell>Passes</TableCell>
                  <TableCell>
                    <Box component="span" sx={visuallyHidden}>
                      Remove
                    </Box>
                  </TableCell>
                </TableRow>
              </TableHead>
              <TableBody>
                {marks.fields.map((field, index) => {
                  const rowErrors = rowError(errors, 'marks', index);
                  const name = norm(values.marks[index]?.letter ?? '') || `row ${index + 1}`;
                  const letterField = bind(
                    register(`marks.${index}.letter`, {
                      validate: (value, all) => checkLetter(value, all, 'mark'),
                    }),
                  );
                  const passingField = bind(register(`marks.${index}.passing`));
                  return (
                    <TableRow key={field.id}>
                      <TableCell sx={{ width: 140, verticalAlign: 'top' }}>
                        <TextField
                          {...cellInput}
                          {...letterField}
                          error={Boolean(rowErrors?.letter)}
                          helperText={rowErrors?.letter?.message}
                          slotProps={{
                            htmlInput: {
                              'aria-label': `Mark, row ${index + 1}`,
                              'aria-required': true,
                              maxLength: 4,
                            },
                            formHelperText: rowErrors?.letter ? { role: 'alert' } : undefined,
                          }}
                        />
                      </TableCell>
                      <TableCell sx={{ verticalAlign: 'top' }}>
                        <Checkbox
                          {...passingField}
                          checked={Boolean(values.marks[index]?.passing)}
                          slotProps={{ input: { 'aria-label': `${name} passes` } }}
                        />
                      </TableCell>
                      <TableCell sx={{ width: 56, verticalAlign: 'top' }}>
                        <IconButton
                          aria-label={`Remove mark ${name}`}
                          onClick={() => marks.remove(index)}
                          size="small"
                        >
                          <DeleteOutline aria-hidden fontSize="small" />
                        </IconButton>
                      </TableCell>
                    </TableRow>
                  );
                })}
                {marks.fields.length === 0 ? (
                  <TableRow>
                    <TableCell colSpan={3}>No marks: every grade carries points.</TableCell>
                  </TableRow>
                ) : null}
              </TableBody>
            </Table>
          </TableContainer>
          <Button
            startIcon={<Add aria-hidden />}
            onClick={() => marks.append({ letter: '', passing: false })}
            sx={{ mt: 1 }}
          >
            Add a mark
          </Button>
        </Box>

        <Box sx={{ display: 'flex', gap: 1.5, flexWrap: 'wrap' }}>
          <Button type="submit" variant="contained">
            Save grade scale
          </Button>
          <Button variant="outlined" onClick={() => reset(toFields(scale))} disabled={!isDirty}>
            Discard changes
          </Button>
          <Button onClick={() => reset(DEFAULT_FIELDS, { keepDefaultValues: true })}>
            Fill in the default scale
          </Button>
        </Box>
      </Stack>

      <ConfirmDialog
        open={confirming !== null}
        title="Save the grade scale?"
        confirmLabel="Save and re-derive"
        onConfirm={confirm}
        onCancel={() => setConfirming(null)}
        busy={save.isPending}
        error={save.isError ? saveFailure(save.error) : null}
      >
        {confirmationText(storedRecords)}
      </ConfirmDialog>
    </form>
  );
}

/** What a save changes beyond the scale itself. */
export function confirmationText(storedRecords: number | null): string {
  const records =
    storedRecords === null
      ? 'every stored record of term data'
      : `all ${formatCount(storedRecords)} stored ${storedRecords === 1 ? 'record' : 'records'} of term data`;
  return (
    `Saving re-derives the grade points of ${records} from the new scale, in one step. ` +
    'Estimates are rebuilt afterwards. A letter that stored records still use cannot be removed.'
  );
}
