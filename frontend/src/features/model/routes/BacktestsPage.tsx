import { useMemo, useState } from 'react';
import { Controller, useFieldArray, useForm } from 'react-hook-form';
import { Link as RouterLink, useSearchParams } from 'react-router';
import Alert from '@mui/material/Alert';
import Box from '@mui/material/Box';
import Button from '@mui/material/Button';
import IconButton from '@mui/material/IconButton';
import LinearProgress from '@mui/material/LinearProgress';
import Link from '@mui/material/Link';
import MenuItem from '@mui/material/MenuItem';
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
import type { EvaluationDetail, ModelSettingsVersion, TermsResponse } from '@kinpath/contracts';
import { EVALUATION_NAME_MAX_LENGTH, MAX_EVALUATION_CONFIGURATIONS } from '@kinpath/contracts';
import { PAGES } from '../../../app/pages';
import { VisuallyHidden } from '../../advising/components/EstimateCells';
import { ConfirmDialog } from '../../../components/ConfirmDialog';
import { PageHeader } from '../../../components/PageHeader';
import { apiMessage, httpStatus } from '../../../lib/api-client';
import { useTerms } from '../../catalogue/api/catalogue';
import {
  isRunning,
  useEvaluation,
  useEvaluations,
  useModelSettings,
  useSaveSettings,
  useStartEvaluation,
} from '../api/model';
import { BacktestResults } from '../components/BacktestResults';
import { SettingsControls } from '../components/SettingsControls';
import { count, formatWhen } from '../format';
import { toFieldValues, toSettings, type SettingsFieldValues } from '../settings-fields';
import { describeSettings } from '../settings-words';

type Configuration = SettingsFieldValues & { name: string };
interface BacktestForm {
  holdoutTerm: string;
  configurations: Configuration[];
}

export function BacktestsPage() {
  const settings = useModelSettings();
  const terms = useTerms();
  const [params, setParams] = useSearchParams();
  const past = useEvaluations();
  // Without a backtest in the address (a fresh visit or a reload), the latest one is shown.
  const selected = params.get('backtest') ?? past.data?.[0]?.id ?? null;
  const evaluation = useEvaluation(selected);

  return (
    <>
      <PageHeader
        title="Backtests"
        lead="How accurate would the estimates have been? Hold out a past term, predict its grades and satisfaction from the records before it, and compare configurations of the model with simple baselines."
      />
      {settings.isPending || terms.isPending ? (
        <Typography role="status" sx={{ color: 'text.secondary' }}>
          Loading…
        </Typography>
      ) : settings.isError || terms.isError ? (
        <Alert severity="error" role="alert">
          The settings or the terms could not be loaded. Reload the page to try again.
        </Alert>
      ) : (
        <NewBacktest
          current={settings.data}
          terms={terms.data}
          onStarted={(id) => setParams({ backtest: id })}
        />
      )}
      {selected ? (
        <Box sx={{ mt: 4 }}>
          {evaluation.isPending ? (
            <Typography role="status">Loading the backtest…</Typography>
          ) : evaluation.isError ? (
            <Alert severity="error" role="alert">
              This backtest could not be loaded.
            </Alert>
          ) : (
            <Backtest evaluation={evaluation.data} />
          )}
        </Box>
      ) : null}
      <PastBacktests selected={selected} onOpen={(id) => setParams({ backtest: id })} />
    </>
  );
}

function NewBacktest({
  current,
  terms,
  onStarted,
}: {
  current: ModelSettingsVersion;
  terms: TermsResponse;
  onStarted: (id: string) => void;
}) {
  const start = useStartEvaluation();
  // A term can be held out when records exist for it and for some term before it.
  const choices = terms.terms
    .filter((t) => t.records > 0)
    .slice(1)
    .map((t) => t.term)
    .reverse();
  const values = useMemo<BacktestForm>(
    () => ({
      holdoutTerm:
        terms.current && choices.includes(terms.current) ? terms.current : (choices[0] ?? ''),
      configurations: [
        {
          ...toFieldValues(current.settings),
          name: `Current settings (version ${current.version})`,
        },
      ],
    }),
    // Only a new version in force or new term data starts the form again.
    // eslint-disable-next-line react-hooks/exhaustive-deps
    [current.version, terms.current],
  );
  const { control, register, handleSubmit, getValues, formState } = useForm<BacktestForm>({
    values,
  });
  const list = useFieldArray({
    control,
    name: 'configurations',
    rules: {
      validate: (rows) =>
        new Set(rows.map((r) => r.name.trim())).size === rows.length ||
        'Give each configuration a name of its own.',
    },
  });

  const onSubmit = handleSubmit(async (form) => {
    try {
      const accepted = await start.mutateAsync({
        holdoutTerm: form.holdoutTerm,
        configurations: form.configurations.map((c) => ({
          ...toSettings(c),
          // The fit weight changes no estimate; keep the one in force.
          alpha: current.settings.alpha,
          name: c.name.trim(),
        })),
      });
      onStarted(accepted.id);
    } catch {
      // Shown below.
    }
  });

  // A variant starts from the settings in force, as the form says, not from the last row.
  const addVariant = () => {
    const rows = getValues('configurations');
    list.append({ ...toFieldValues(current.settings), name: `Variant ${rows.length + 1}` });
  };

  if (choices.length === 0) {
    return (
      <Alert severity="info">
        A backtest needs term data from at least two terms. Import records first.
      </Alert>
    );
  }

  const failure = start.isError
    ? httpStatus(start.error) === 400
      ? apiMessage(start.error)
      : 'The backtest could not be started. Try again in a moment.'
    : null;

  return (
    <Paper
      component="form"
      variant="outlined"
      onSubmit={onSubmit}
      noValidate
      aria-label="New backtest"
      sx={{ p: { xs: 2, sm: 3 } }}
    >
      <Typography variant="h2" sx={{ mb: 0.5 }}>
        New backtest
      </Typography>
      <Typography variant="body2" sx={{ color: 'text.secondary', mb: 2 }}>
        Start from the settings in force and add variants, changing a field or two in each (up to{' '}
        {MAX_EVALUATION_CONFIGURATIONS}). What each setting does is explained on the{' '}
        <Link component={RouterLink} to={PAGES.modelSettings.path}>
          model settings
        </Link>{' '}
        page. Advisors’ estimates do not change while a backtest runs.
      </Typography>
      <Controller
        control={control}
        name="holdoutTerm"
        render={({ field }) => (
          <TextField
            select
            size="small"
            label="Held-out term"
            value={field.value}
            onChange={field.onChange}
            onBlur={field.onBlur}
            name={field.name}
            inputRef={field.ref}
            helperText="Its outcomes are hidden and predicted from the terms before it."
            sx={{ minWidth: 220, mb: 3 }}
          >
            {choices.map((term) => (
              <MenuItem key={term} value={term}>
                {term}
                {term === terms.current ? ' (last completed)' : ''}
              </MenuItem>
            ))}
          </TextField>
        )}
      />
      <Stack spacing={2}>
        {list.fields.map((field, index) => (
          <Paper
            key={field.id}
            variant="outlined"
            component="fieldset"
            sx={{ p: 2, m: 0, borderStyle: 'solid' }}
          >
            <Box component="legend" sx={{ px: 0.5, fontWeight: 600 }}>
              Configuration {index + 1}
            </Box>
            <Stack direction="row" spacing={1} sx={{ mb: 2, alignItems: 'flex-start' }}>
              <TextField
                size="small"
                label={`Name, configuration ${index + 1}`}
                {...register(`configurations.${index}.name`, {
                  validate: (v) =>
                    (v.trim().length > 0 && v.trim().length <= EVALUATION_NAME_MAX_LENGTH) ||
                    `Enter a name of at most ${EVALUATION_NAME_MAX_LENGTH} characters.`,
                })}
                error={Boolean(formState.errors.configurations?.[index]?.name)}
                helperText={formState.errors.configurations?.[index]?.name?.message}
                sx={{ minWidth: 300 }}
              />
              {list.fields.length > 1 ? (
                <IconButton
                  onClick={() => list.remove(index)}
                  aria-label={`Remove configuration ${index + 1}`}
                >
                  <DeleteOutline />
                </IconButton>
              ) : null}
            </Stack>
            <SettingsControls
              control={control}
              prefix={`configurations.${index}.`}
              withAlpha={false}
              labelSuffix={`configuration ${index + 1}`}
            />
          </Paper>
        ))}
      </Stack>
      {formState.errors.configurations?.root?.message ? (
        <Alert severity="error" role="alert" sx={{ mt: 2 }}>
          {formState.errors.configurations.root.message}
        </Alert>
      ) : null}
      {failure ? (
        <Alert severity="error" role="alert" sx={{ mt: 2 }}>
          {failure}
        </Alert>
      ) : null}
      <Stack direction="row" spacing={1.5} sx={{ mt: 2 }}>
        <Button
          type="button"
          startIcon={<Add />}
          onClick={addVariant}
          disabled={list.fields.length >= MAX_EVALUATION_CONFIGURATIONS}
        >
          Add a variant
        </Button>
        <Button type="submit" variant="contained" loading={start.isPending}>
          Run backtest
        </Button>
      </Stack>
    </Paper>
  );
}

function Backtest({ evaluation }: { evaluation: EvaluationDetail }) {
  const save = useSaveSettings();
  const [using, setUsing] = useState<number | null>(null);
  const [saved, setSaved] = useState<string | null>(null);
  const chosen = using === null ? null : evaluation.configurations[using];

  if (isRunning(evaluation.status)) {
    const value = Math.round(evaluation.progress * 100);
    return (
      <Box role="status" aria-live="polite">
        <Typography variant="h2" sx={{ mb: 1 }}>
          Backtest of {evaluation.holdoutTerm}{' '}
          {evaluation.status === 'queued' ? 'waiting to start' : 'running'}
        </Typography>
        <LinearProgress
          variant="determinate"
          value={value}
          aria-label="Backtest progress"
          sx={{ height: 8, borderRadius: 1, maxWidth: 620 }}
        />
        <Typography variant="body2" className="kp-figures" sx={{ mt: 0.5 }}>
          {value} % done
        </Typography>
      </Box>
    );
  }
  if (evaluation.status === 'failed') {
    return (
      <Alert severity="error" role="alert">
        {evaluation.message ?? 'The backtest failed.'}
      </Alert>
    );
  }

  const confirm = async () => {
    if (!chosen) return;
    try {
      const { name, ...settings } = chosen;
      const version = await save.mutateAsync({
        ...settings,
        note: `From the backtest of ${evaluation.holdoutTerm}: ${name}.`.slice(0, 500),
      });
      setSaved(`${name} is now in force as settings version ${version.version}.`);
      setUsing(null);
    } catch {
      // Shown in the dialog.
    }
  };

  return (
    <>
      {saved ? (
        <Alert severity="success" role="status" sx={{ mb: 2 }}>
          {saved}
        </Alert>
      ) : null}
      <BacktestResults
        evaluation={evaluation}
        onUse={(index) => {
          save.reset();
          setSaved(null);
          setUsing(index);
        }}
      />
      <ConfirmDialog
        open={chosen !== null}
        title={`Make “${chosen?.name ?? ''}” the current settings?`}
        confirmLabel="Use these settings"
        onConfirm={() => void confirm()}
        onCancel={() => setUsing(null)}
        busy={save.isPending}
        error={
          save.isError
            ? (apiMessage(save.error) ?? 'The settings could not be saved; nothing was changed.')
            : null
        }
      >
        They become a new settings version, and advisors’ estimates use them from now on:{' '}
        {chosen ? describeSettings(chosen) : ''}.
      </ConfirmDialog>
    </>
  );
}

function PastBacktests({
  selected,
  onOpen,
}: {
  selected: string | null;
  onOpen: (id: string) => void;
}) {
  const past = useEvaluations();
  if (!past.isSuccess || past.data.length === 0) return null;
  return (
    <Box component="section" aria-labelledby="past-backtests" sx={{ mt: 4 }}>
      <Typography id="past-backtests" variant="h2" sx={{ mb: 1.5 }}>
        Past backtests
      </Typography>
      <TableContainer component={Paper} variant="outlined">
        <Table size="small" aria-label="Past backtests">
          <TableHead>
            <TableRow>
              <TableCell>Asked for</TableCell>
              <TableCell>Held-out term</TableCell>
              <TableCell>Configurations</TableCell>
              <TableCell>Term data</TableCell>
              <TableCell>Status</TableCell>
              <TableCell>By</TableCell>
              <TableCell>
                <VisuallyHidden>Action</VisuallyHidden>
              </TableCell>
            </TableRow>
          </TableHead>
          <TableBody>
            {past.data.map((e) => (
              <TableRow key={e.id} selected={e.id === selected}>
                <TableCell>{formatWhen(e.createdAt)}</TableCell>
                <TableCell>{e.holdoutTerm}</TableCell>
                <TableCell>{e.configurations.map((c) => c.name).join('; ')}</TableCell>
                <TableCell className="kp-figures">
                  {e.dataState.records !== null ? `${count(e.dataState.records)} records` : '—'}
                </TableCell>
                <TableCell>{e.status}</TableCell>
                <TableCell>{e.createdBy ?? ''}</TableCell>
                <TableCell>
                  {e.id === selected ? (
                    'Shown above'
                  ) : (
                    <Button
                      size="small"
                      onClick={() => onOpen(e.id)}
                      aria-label={`Open the backtest of ${formatWhen(e.createdAt)}`}
                    >
                      Open
                    </Button>
                  )}
                </TableCell>
              </TableRow>
            ))}
          </TableBody>
        </Table>
      </TableContainer>
    </Box>
  );
}
