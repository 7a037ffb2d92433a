import { useId } from 'react';
import { useForm } from 'react-hook-form';
import Alert from '@mui/material/Alert';
import Button from '@mui/material/Button';
import Dialog from '@mui/material/Dialog';
import DialogActions from '@mui/material/DialogActions';
import DialogContent from '@mui/material/DialogContent';
import DialogTitle from '@mui/material/DialogTitle';
import Stack from '@mui/material/Stack';
import TextField from '@mui/material/TextField';
import Typography from '@mui/material/Typography';
import { SUMMARY_MESSAGE_MAX_LENGTH, type SummaryResponse } from '@kinpath/contracts';
import { apiMessage, httpStatus } from '../../../lib/api-client';
import { fieldProps } from '../../../lib/form';
import { useSendSummary } from '../api/students';

const EMAIL_PATTERN = /^[^\s@]+@[^\s@]+\.[^\s@]+$/;

interface SummaryFields {
  to: string;
  message: string;
}

export interface SummaryCourse {
  courseCode: string;
  title: string;
}

interface SendSummaryDialogProps {
  open: boolean;
  studentRef: string;
  term: string | null;
  courses: SummaryCourse[];
  onClose: () => void;
  onSent: (response: SummaryResponse) => void;
}

function sendFailure(error: unknown): string {
  const status = httpStatus(error);
  if (status === 400) return apiMessage(error) ?? 'The server refused these details.';
  if (status === 403) return 'Only advisors can send summaries.';
  return 'The summary could not be sent. Try again in a moment.';
}

export function SendSummaryDialog({
  open,
  studentRef,
  term,
  courses,
  onClose,
  onSent,
}: SendSummaryDialogProps) {
  const titleId = useId();
  const listId = useId();
  const send = useSendSummary(studentRef);
  const {
    register,
    handleSubmit,
    reset,
    formState: { errors, isSubmitting },
  } = useForm<SummaryFields>({ defaultValues: { to: '', message: '' } });

  const close = () => {
    send.reset();
    onClose();
  };

  const onSubmit = handleSubmit(async (values) => {
    const message = values.message.trim();
    try {
      const response = await send.mutateAsync({
        to: values.to.trim(),
        courseCodes: courses.map((c) => c.courseCode),
        ...(term ? { term } : {}),
        ...(message ? { message } : {}),
      });
      reset({ to: '', message: '' });
      send.reset();
      onSent(response);
    } catch {
      // Shown from the mutation's error below.
    }
  });

  return (
    <Dialog open={open} onClose={close} aria-labelledby={titleId} fullWidth maxWidth="sm">
      <form onSubmit={onSubmit} noValidate>
        <DialogTitle id={titleId}>Send a summary to the student</DialogTitle>
        <DialogContent>
          <Stack spacing={2}>
            <Typography>
              The e-mail lists these shortlisted electives{term ? ` for ${term}` : ''} with their
              estimates, kin counts and the cautions that go with them. It carries no student number
              and nothing about other students.
            </Typography>
            <Typography id={listId} component="h3" sx={{ fontWeight: 700 }}>
              Shortlisted electives ({courses.length})
            </Typography>
            <Stack component="ul" aria-labelledby={listId} sx={{ m: 0, pl: 3 }} spacing={0.25}>
              {courses.map((c) => (
                <li key={c.courseCode}>
                  <strong>{c.courseCode}</strong> {c.title}
                </li>
              ))}
            </Stack>
            {send.isError ? (
              <Alert severity="error" role="alert">
                {sendFailure(send.error)}
              </Alert>
            ) : null}
            <TextField
              label="Student’s e-mail address"
              type="email"
              autoComplete="off"
              {...fieldProps(
                register('to', {
                  validate: (value) => {
                    if (!value.trim()) return 'Enter the student’s e-mail address.';
                    return EMAIL_PATTERN.test(value.trim())
                      ? true
                      : 'Enter a complete e-mail address, such as name@university.edu.';
                  },
                  maxLength: {
                    value: 254,
                    message: 'An e-mail address is at most 254 characters.',
                  },
                }),
                errors.to?.message,
              )}
            />
            <TextField
              label="Message (optional)"
              multiline
              minRows={3}
              {...fieldProps(
                register('message', {
                  maxLength: {
                    value: SUMMARY_MESSAGE_MAX_LENGTH,
                    message: `Keep the message under ${SUMMARY_MESSAGE_MAX_LENGTH} characters.`,
                  },
                }),
                errors.message?.message,
              )}
              slotProps={{
                htmlInput: { 'aria-required': false },
                formHelperText: errors.message ? { role: 'alert' } : undefined,
              }}
              helperText={
                errors.message?.message ??
                'Your own words, shown above the electives in the e-mail.'
              }
            />
          </Stack>
        </DialogContent>
        <DialogActions sx={{ px: 3, pb: 2 }}>
          <Button onClick={close}>Cancel</Button>
          <Button
            type="submit"
            variant="contained"
            loading={isSubmitting}
            disabled={courses.length === 0}
          >
            Send summary
          </Button>
        </DialogActions>
      </form>
    </Dialog>
  );
}
