import { useId, useState } from 'react';
import { useForm } from 'react-hook-form';
import Alert from '@mui/material/Alert';
import Box from '@mui/material/Box';
import Button from '@mui/material/Button';
import Paper from '@mui/material/Paper';
import TextField from '@mui/material/TextField';
import Typography from '@mui/material/Typography';
import { NOTE_MAX_LENGTH } from '@kinpath/contracts';
import { apiMessage, httpStatus } from '../../../lib/api-client';
import { fieldProps } from '../../../lib/form';
import { useAddNote, useNotes } from '../api/students';
import { dateTime } from '../format';

interface NoteFields {
  text: string;
}

function addFailure(error: unknown): string {
  if (httpStatus(error) === 400) return apiMessage(error) ?? 'The server refused this note.';
  if (httpStatus(error) === 403) return 'Only advisors can write notes.';
  return 'The note could not be saved. Try again in a moment.';
}

/** Dated advising notes, shared by every advisor of the student. */
export function NotesSection({ studentRef }: { studentRef: string }) {
  const headingId = useId();
  const notes = useNotes(studentRef);
  const addNote = useAddNote(studentRef);
  const [saved, setSaved] = useState(false);
  const {
    register,
    handleSubmit,
    reset,
    formState: { errors, isSubmitting },
  } = useForm<NoteFields>({ defaultValues: { text: '' } });

  const onSubmit = handleSubmit(async ({ text }) => {
    setSaved(false);
    try {
      await addNote.mutateAsync({ text: text.trim() });
      reset({ text: '' });
      setSaved(true);
    } catch {
      // Shown from the mutation's error below.
    }
  });

  // Newest first: the last conversation is the one an advisor needs before the next.
  const list = [...(notes.data ?? [])].sort((a, b) => b.createdAt.localeCompare(a.createdAt));

  return (
    <Paper component="section" aria-labelledby={headingId} variant="outlined" sx={{ p: 2.5 }}>
      <Typography id={headingId} variant="h2" sx={{ mb: 0.5 }}>
        Notes
      </Typography>
      <Typography sx={{ mb: 1.5, color: 'text.secondary' }}>
        Every advisor who opens this student reads these notes, with their author and date.
      </Typography>
      <Box
        component="form"
        onSubmit={onSubmit}
        noValidate
        aria-label="Add a note"
        className="kp-no-print"
      >
        <TextField
          label="New note"
          multiline
          minRows={3}
          {...fieldProps(
            register('text', {
              validate: (value) => (value.trim() ? true : 'Write the note before adding it.'),
              maxLength: {
                value: NOTE_MAX_LENGTH,
                message: `Keep a note under ${NOTE_MAX_LENGTH} characters.`,
              },
            }),
            errors.text?.message,
          )}
        />
        <Button type="submit" variant="outlined" loading={isSubmitting} sx={{ mt: 1 }}>
          Add note
        </Button>
        <Box role="status" aria-live="polite" sx={{ mt: 1 }}>
          {saved ? <Alert severity="success">Note added.</Alert> : null}
          {addNote.isError ? <Alert severity="error">{addFailure(addNote.error)}</Alert> : null}
        </Box>
      </Box>
      <Box sx={{ mt: 2 }}>
        {notes.isPending ? (
          <Typography role="status" sx={{ color: 'text.secondary' }}>
            Loading notes…
          </Typography>
        ) : notes.isError ? (
          <Alert severity="error" role="alert">
            The notes could not be loaded. Reload the page to try again.
          </Alert>
        ) : list.length === 0 ? (
          <Typography sx={{ color: 'text.secondary' }}>No notes yet.</Typography>
        ) : (
          <Box component="ol" sx={{ listStyle: 'none', m: 0, p: 0 }}>
            {list.map((note) => (
              <Box
                component="li"
                key={note.id}
                sx={{ borderTop: 1, borderColor: 'divider', py: 1.25 }}
              >
                <Typography
                  className="kp-figures"
                  sx={{ fontSize: '0.85rem', color: 'text.secondary', mb: 0.5 }}
                >
                  <time dateTime={note.createdAt}>{dateTime(note.createdAt)}</time> ·{' '}
                  {note.authorName}
                </Typography>
                <Typography sx={{ whiteSpace: 'pre-wrap' }}>{note.text}</Typography>
              </Box>
            ))}
          </Box>
        )}
      </Box>
    </Paper>
  );
}
