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
import { ConfirmDialog } from '../../../components/ConfirmDialog';
import { useAddNote, useDeleteNote, useEditNote, useNotes } from '../api/students';
import { useAuth } from '../../auth/AuthProvider';
import type { AdvisingNote } from '@kinpath/contracts';
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
  const me = useAuth().user?.email;
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
                  {note.editedAt ? ` · edited ${dateTime(note.editedAt)}` : ''}
                </Typography>
                {note.authorEmail === me ? (
                  <OwnNote note={note} studentRef={studentRef} />
                ) : (
                  <Typography sx={{ whiteSpace: 'pre-wrap', overflowWrap: 'anywhere' }}>
                    {note.text}
                  </Typography>
                )}
              </Box>
            ))}
          </Box>
        )}
      </Box>
    </Paper>
  );
}

/** A note of the signed-in advisor's own: edit in place, or delete after a confirmation. */
function OwnNote({ note, studentRef }: { note: AdvisingNote; studentRef: string }) {
  const edit = useEditNote(studentRef);
  const remove = useDeleteNote(studentRef);
  const [editing, setEditing] = useState(false);
  const [confirming, setConfirming] = useState(false);
  const [text, setText] = useState(note.text);
  const trimmed = text.trim();
  const problem = !trimmed
    ? 'Write the note, or delete it.'
    : trimmed.length > NOTE_MAX_LENGTH
      ? `Keep a note under ${NOTE_MAX_LENGTH} characters.`
      : null;
  const failure = edit.isError ? edit.error : remove.isError ? remove.error : null;

  return (
    <>
      {editing ? (
        <Box
          component="form"
          aria-label="Edit the note"
          noValidate
          onSubmit={async (event) => {
            event.preventDefault();
            if (problem) return;
            try {
              await edit.mutateAsync({ id: note.id, text: trimmed });
              setEditing(false);
            } catch {
              // Shown below.
            }
          }}
        >
          <TextField
            label="Note"
            multiline
            minRows={3}
            fullWidth
            value={text}
            autoFocus
            onChange={(event) => setText(event.target.value)}
            error={Boolean(problem)}
            helperText={problem}
            slotProps={{ formHelperText: problem ? { role: 'alert' } : undefined }}
          />
          <Box sx={{ display: 'flex', gap: 1, mt: 1 }}>
            <Button type="submit" variant="outlined" size="small" loading={edit.isPending}>
              Save note
            </Button>
            <Button
              size="small"
              onClick={() => {
                setText(note.text);
                setEditing(false);
              }}
            >
              Cancel
            </Button>
          </Box>
        </Box>
      ) : (
        <>
          <Typography sx={{ whiteSpace: 'pre-wrap', overflowWrap: 'anywhere' }}>
            {note.text}
          </Typography>
          <Box className="kp-no-print" sx={{ display: 'flex', gap: 1, mt: 0.5 }}>
            <Button size="small" onClick={() => setEditing(true)}>
              Edit
            </Button>
            <Button size="small" color="error" onClick={() => setConfirming(true)}>
              Delete
            </Button>
          </Box>
        </>
      )}
      {failure ? (
        <Alert severity="error" role="alert" sx={{ mt: 1 }}>
          {apiMessage(failure) ?? 'The note could not be changed. Try again in a moment.'}
        </Alert>
      ) : null}
      <ConfirmDialog
        open={confirming}
        title="Delete this note?"
        confirmLabel="Delete note"
        onConfirm={async () => {
          try {
            await remove.mutateAsync(note.id);
            setConfirming(false);
          } catch {
            setConfirming(false);
          }
        }}
        onCancel={() => setConfirming(false)}
        busy={remove.isPending}
        tone="error"
      >
        The note goes for every advisor of this student. The audit trail keeps that it was deleted,
        not its words.
      </ConfirmDialog>
    </>
  );
}
