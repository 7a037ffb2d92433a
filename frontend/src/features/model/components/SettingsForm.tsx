import { useMemo, useState } from 'react';
import { useForm } from 'react-hook-form';
import Alert from '@mui/material/Alert';
import Button from '@mui/material/Button';
import Stack from '@mui/material/Stack';
import TextField from '@mui/material/TextField';
import type { ModelSettingsVersion } from '@kinpath/contracts';
import { DEFAULT_MODEL_SETTINGS, MODEL_SETTINGS_LIMITS } from '@kinpath/contracts';
import { apiMessage, httpStatus } from '../../../lib/api-client';
import { useSaveSettings } from '../api/model';
import { toFieldValues, toSettings, type SettingsFieldValues } from '../settings-fields';
import { SettingsControls } from './SettingsControls';

type FormValues = SettingsFieldValues & { note: string };

/** The settings in force as a form; saving makes a new version (the same settings keep the version). */
export function SettingsForm({ current }: { current: ModelSettingsVersion }) {
  const save = useSaveSettings();
  const [saved, setSaved] = useState<string | null>(null);
  const values = useMemo(
    () => ({ ...toFieldValues(current.settings), note: '' }),
    [current.settings],
  );
  const {
    control,
    register,
    handleSubmit,
    reset,
    formState: { isDirty, errors },
  } = useForm<FormValues>({ values });

  const onSubmit = handleSubmit(async ({ note, ...fields }) => {
    setSaved(null);
    try {
      const result = await save.mutateAsync({
        ...toSettings(fields),
        note: note.trim() || undefined,
      });
      setSaved(
        result.version === current.version
          ? `Nothing changed: version ${result.version} stays in force.`
          : `Saved as version ${result.version}; advisors' estimates use it from now on.`,
      );
    } catch {
      // Shown below from the mutation's error.
    }
  });

  const failure = save.isError
    ? httpStatus(save.error) === 400 && apiMessage(save.error)
      ? apiMessage(save.error)
      : 'The settings could not be saved; nothing was changed. Try again in a moment.'
    : null;

  return (
    <form onSubmit={onSubmit} noValidate aria-label="Model settings">
      <Stack spacing={2.5}>
        <SettingsControls control={control} explain />
        <TextField
          size="small"
          label="Why the change (optional)"
          {...register('note', {
            maxLength: {
              value: MODEL_SETTINGS_LIMITS.noteMaxLength,
              message: `Keep the note to ${MODEL_SETTINGS_LIMITS.noteMaxLength} characters.`,
            },
          })}
          error={Boolean(errors.note)}
          helperText={
            errors.note?.message ?? 'Kept with the version in the history and the audit trail.'
          }
          sx={{ maxWidth: 620 }}
        />
        {failure ? (
          <Alert severity="error" role="alert">
            {failure}
          </Alert>
        ) : null}
        {saved ? (
          <Alert severity="success" role="status">
            {saved}
          </Alert>
        ) : null}
        <Stack direction="row" spacing={1.5}>
          <Button type="submit" variant="contained" loading={save.isPending} disabled={!isDirty}>
            Save settings
          </Button>
          <Button type="button" onClick={() => reset(values)} disabled={!isDirty || save.isPending}>
            Undo changes
          </Button>
          <Button
            type="button"
            onClick={() =>
              reset(
                { ...toFieldValues(DEFAULT_MODEL_SETTINGS), note: 'Back to the defaults.' },
                { keepDefaultValues: true },
              )
            }
            disabled={save.isPending}
          >
            Fill in the defaults
          </Button>
        </Stack>
      </Stack>
    </form>
  );
}
