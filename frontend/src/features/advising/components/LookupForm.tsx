import { useForm } from 'react-hook-form';
import { useNavigate } from 'react-router';
import Alert from '@mui/material/Alert';
import Box from '@mui/material/Box';
import Button from '@mui/material/Button';
import TextField from '@mui/material/TextField';
import Search from '@mui/icons-material/Search';
import { STUDENT_NOT_FOUND_MESSAGE } from '@kinpath/contracts';
import { httpStatus } from '../../../lib/api-client';
import { fieldProps } from '../../../lib/form';
import { useStudentLookup } from '../api/students';
import { studentPagePath } from '../paths';

interface LookupFields {
  studentId: string;
}

function lookupFailure(error: unknown): string {
  const status = httpStatus(error);
  // An unknown number gets this sentence and nothing else: no hint of near matches.
  if (status === 404) return STUDENT_NOT_FOUND_MESSAGE;
  if (status === 403) return 'Your role may not look students up.';
  if (status === 400) return 'Kinpath could not read this student number. Check it and try again.';
  return 'The lookup did not go through. Try again in a moment.';
}

export function LookupForm() {
  const lookup = useStudentLookup();
  const navigate = useNavigate();
  const {
    register,
    handleSubmit,
    reset,
    formState: { errors, isSubmitting },
  } = useForm<LookupFields>({ defaultValues: { studentId: '' } });

  const onSubmit = handleSubmit(async ({ studentId }) => {
    try {
      const student = await lookup.mutateAsync({ studentId: studentId.trim() });
      // Clear the field first so the number is not left in the form's state behind the page.
      reset({ studentId: '' });
      await navigate(studentPagePath(student.ref));
    } catch {
      // Shown from the mutation's error below.
    }
  });

  return (
    <Box component="form" onSubmit={onSubmit} noValidate aria-label="Student lookup">
      <Box sx={{ display: 'flex', gap: 1.5, alignItems: 'flex-start', flexWrap: 'wrap' }}>
        <TextField
          label="Student number"
          autoComplete="off"
          sx={{ maxWidth: 320 }}
          {...fieldProps(
            register('studentId', {
              validate: (value) => (value.trim() ? true : 'Enter the student number.'),
              maxLength: { value: 64, message: 'A student number is at most 64 characters.' },
            }),
            errors.studentId?.message,
          )}
          slotProps={{
            htmlInput: { 'aria-required': true, spellCheck: false, autoCapitalize: 'characters' },
            formHelperText: errors.studentId ? { role: 'alert' } : undefined,
          }}
        />
        <Button
          type="submit"
          variant="contained"
          loading={isSubmitting}
          startIcon={<Search aria-hidden />}
          sx={{ mt: '2px' }}
        >
          Look up
        </Button>
      </Box>
      <Box role="status" aria-live="polite" sx={{ mt: lookup.isError ? 1.5 : 0 }}>
        {lookup.isError ? (
          <Alert severity={httpStatus(lookup.error) === 404 ? 'info' : 'error'}>
            {lookupFailure(lookup.error)}
          </Alert>
        ) : null}
      </Box>
    </Box>
  );
}
