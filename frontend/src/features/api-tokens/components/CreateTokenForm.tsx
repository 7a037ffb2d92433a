import { useId, useState } from 'react';
import { Controller, useForm } from 'react-hook-form';
import Alert from '@mui/material/Alert';
import Button from '@mui/material/Button';
import Checkbox from '@mui/material/Checkbox';
import FormControl from '@mui/material/FormControl';
import FormControlLabel from '@mui/material/FormControlLabel';
import FormGroup from '@mui/material/FormGroup';
import FormHelperText from '@mui/material/FormHelperText';
import FormLabel from '@mui/material/FormLabel';
import Stack from '@mui/material/Stack';
import TextField from '@mui/material/TextField';
import {
  API_TOKEN_DEFAULT_DAYS,
  API_TOKEN_MAX_DAYS,
  API_TOKEN_NAME_MAX_LENGTH,
  API_TOKEN_SCOPE_LABELS,
  API_TOKEN_SCOPES,
  ROLE_LABELS,
  type ApiTokenScope,
  type CreatedApiToken,
} from '@kinpath/contracts';
import { apiMessage, httpStatus } from '../../../lib/api-client';
import { fieldProps } from '../../../lib/form';
import { useCreateApiToken, useTokenOwners } from '../api/api-tokens';
import { SecretDialog } from './SecretDialog';

interface TokenFields {
  name: string;
  scopes: ApiTokenScope[];
  expiresOn: string;
  ownerId: string;
}

const DAY_MS = 86_400_000;
/** A day `days` from today, as the date field holds it (UTC, like the server). */
export function dayFromToday(days: number, now = Date.now()): string {
  return new Date(now + days * DAY_MS).toISOString().slice(0, 10);
}

function createFailureMessage(error: unknown): string {
  const status = httpStatus(error);
  if (status === 400) return apiMessage(error) ?? 'The server refused these details.';
  if (status === 403) return apiMessage(error) ?? 'You may not create this token.';
  return 'The token could not be created. Try again in a moment.';
}

/** Admins pick the owner; registrar staff make tokens for themselves. */
export function CreateTokenForm({ isAdmin, selfId }: { isAdmin: boolean; selfId: string }) {
  const scopesLabelId = useId();
  const create = useCreateApiToken();
  const owners = useTokenOwners(isAdmin);
  const [created, setCreated] = useState<CreatedApiToken | null>(null);
  const empty: TokenFields = {
    name: '',
    scopes: [],
    expiresOn: dayFromToday(API_TOKEN_DEFAULT_DAYS),
    ownerId: selfId,
  };
  const {
    register,
    control,
    handleSubmit,
    reset,
    formState: { errors, isSubmitting },
  } = useForm<TokenFields>({ defaultValues: empty });
  const ownerField = fieldProps(register('ownerId'), errors.ownerId?.message);
  const expiryField = fieldProps(
    register('expiresOn', {
      validate: (value) => {
        if (!/^\d{4}-\d{2}-\d{2}$/.test(value)) return 'Enter a date.';
        if (value < dayFromToday(0)) return 'Choose today or a later day.';
        if (value > dayFromToday(API_TOKEN_MAX_DAYS))
          return `Choose a day at most ${API_TOKEN_MAX_DAYS} days ahead.`;
        return true;
      },
    }),
    errors.expiresOn?.message,
  );

  const onSubmit = handleSubmit(async (values) => {
    try {
      const answer = await create.mutateAsync({
        name: values.name.trim(),
        scopes: values.scopes,
        expiresOn: values.expiresOn,
        ...(isAdmin && values.ownerId !== selfId ? { ownerId: values.ownerId } : {}),
      });
      setCreated(answer);
      reset(empty);
    } catch {
      // Shown from the mutation's error below.
    }
  });

  return (
    <form onSubmit={onSubmit} noValidate>
      <Stack spacing={2}>
        {create.isError ? (
          <Alert severity="error" role="alert">
            {createFailureMessage(create.error)}
          </Alert>
        ) : null}
        <TextField
          label="Name"
          autoComplete="off"
          {...fieldProps(
            register('name', {
              validate: (value) => (value.trim() ? true : 'Enter a name for the token.'),
              maxLength: {
                value: API_TOKEN_NAME_MAX_LENGTH,
                message: `Keep the name under ${API_TOKEN_NAME_MAX_LENGTH} characters.`,
              },
            }),
            errors.name?.message,
          )}
          helperText={
            errors.name?.message ??
            'Say which script uses it, e.g. “Student information system, nightly”.'
          }
        />
        <Controller
          control={control}
          name="scopes"
          rules={{ validate: (value) => (value.length > 0 ? true : 'Choose at least one scope.') }}
          render={({ field }) => (
            <FormControl component="fieldset" error={Boolean(errors.scopes)}>
              <FormLabel component="legend" id={scopesLabelId}>
                What the script may do
              </FormLabel>
              <FormGroup>
                {API_TOKEN_SCOPES.map((scope) => (
                  <FormControlLabel
                    key={scope}
                    label={`${API_TOKEN_SCOPE_LABELS[scope]} (${scope})`}
                    control={
                      <Checkbox
                        checked={field.value.includes(scope)}
                        onBlur={field.onBlur}
                        onChange={(event) =>
                          field.onChange(
                            event.target.checked
                              ? [...field.value, scope]
                              : field.value.filter((s) => s !== scope),
                          )
                        }
                      />
                    }
                  />
                ))}
              </FormGroup>
              {errors.scopes ? (
                <FormHelperText role="alert">{errors.scopes.message}</FormHelperText>
              ) : null}
            </FormControl>
          )}
        />
        <TextField
          label="Last day it works"
          type="date"
          {...expiryField}
          helperText={
            errors.expiresOn?.message ??
            `At most a year ahead; ${API_TOKEN_DEFAULT_DAYS} days unless you choose.`
          }
          slotProps={{
            ...expiryField.slotProps,
            inputLabel: { shrink: true },
            htmlInput: {
              'aria-required': true,
              min: dayFromToday(0),
              max: dayFromToday(API_TOKEN_MAX_DAYS),
            },
          }}
        />
        {isAdmin ? (
          <TextField
            select
            label="Acts as"
            {...ownerField}
            helperText="The token acts with this person’s role, limited by its scopes."
            slotProps={{ ...ownerField.slotProps, select: { native: true } }}
          >
            {(owners.data ?? []).map((owner) => (
              <option key={owner.id} value={owner.id}>
                {owner.displayName} ({ROLE_LABELS[owner.role]}, {owner.email})
              </option>
            ))}
            {owners.data?.some((owner) => owner.id === selfId) ? null : (
              <option value={selfId}>Yourself</option>
            )}
          </TextField>
        ) : null}
        <Button type="submit" variant="contained" disabled={isSubmitting}>
          Create token
        </Button>
      </Stack>
      {created ? <SecretDialog created={created} onClose={() => setCreated(null)} /> : null}
    </form>
  );
}
