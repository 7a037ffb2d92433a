import { Controller, type Control, type FieldValues, type Path } from 'react-hook-form';
import Box from '@mui/material/Box';
import Checkbox from '@mui/material/Checkbox';
import FormControlLabel from '@mui/material/FormControlLabel';
import FormHelperText from '@mui/material/FormHelperText';
import MenuItem from '@mui/material/MenuItem';
import TextField from '@mui/material/TextField';
import { useId } from 'react';
import { checkNumber, type NumberField, type SettingsFieldValues } from '../settings-fields';
import { SETTING_TEXT, SOURCE_WORDS } from '../settings-words';

interface SettingsControlsProps<T extends FieldValues> {
  control: Control<T>;
  /** Where the settings sit in the form: '' for a settings form, 'configurations.2.' in a list. */
  prefix?: string;
  /** Shows the sentence on what each setting does under its control. */
  explain?: boolean;
  /** The fit weight changes no estimate, so backtests leave it out. */
  withAlpha?: boolean;
  /** Added to each label when several sets of controls share a page, e.g. "configuration 2". */
  labelSuffix?: string;
}

const NUMBER_FIELDS: NumberField[] = [
  'k',
  'minNeighbours',
  'minSimilarity',
  'significance',
  'shrinkage',
  'tieDigits',
  'gradeDampingStudent',
  'gradeDampingCourse',
  'satisfactionDampingStudent',
  'satisfactionDampingCourse',
  'alpha',
];

const WHOLE_FIELDS: NumberField[] = ['k', 'minNeighbours', 'significance', 'tieDigits'];

/** The choices of each select besides similarity. */
const SELECTS: {
  field: 'centring' | 'gradeSimilarity' | 'satisfactionSimilarity';
  options: [string, string][];
}[] = [
  {
    field: 'centring',
    options: [
      ['baseline', 'On the baseline'],
      ['studentMean', "On the student's own average"],
      ['none', 'None'],
    ],
  },
  ...(['gradeSimilarity', 'satisfactionSimilarity'] as const).map((field) => ({
    field,
    options: Object.entries(SOURCE_WORDS) as [string, string][],
  })),
];

/** Every model setting as a control; each explains itself when `explain` is on. */
export function SettingsControls<T extends FieldValues>({
  control,
  prefix = '',
  explain = false,
  withAlpha = true,
  labelSuffix,
}: SettingsControlsProps<T>) {
  const baseId = useId();
  const name = (field: keyof SettingsFieldValues) => `${prefix}${field}` as Path<T>;
  const label = (field: keyof SettingsFieldValues) =>
    labelSuffix ? `${SETTING_TEXT[field].label}, ${labelSuffix}` : SETTING_TEXT[field].label;
  /** The settings this set of controls edits, for the checks that compare two of them. */
  const own = (values: T): SettingsFieldValues => {
    let at: unknown = values;
    for (const part of prefix.split('.').filter(Boolean))
      at = (at as Record<string, unknown>)[part];
    return at as SettingsFieldValues;
  };
  const help = (field: keyof SettingsFieldValues) =>
    explain ? SETTING_TEXT[field].help : undefined;

  return (
    <Box
      sx={{
        display: 'grid',
        gap: 2,
        gridTemplateColumns: explain
          ? { xs: '1fr', md: 'repeat(2, minmax(0, 1fr))' }
          : { xs: '1fr', sm: 'repeat(2, minmax(0, 1fr))', lg: 'repeat(4, minmax(0, 1fr))' },
      }}
    >
      <Controller
        control={control}
        name={name('similarity')}
        render={({ field }) => (
          <TextField
            select
            size="small"
            label={label('similarity')}
            helperText={help('similarity')}
            value={field.value}
            onChange={field.onChange}
            onBlur={field.onBlur}
            name={field.name}
            inputRef={field.ref}
          >
            <MenuItem value="cosine">Cosine similarity</MenuItem>
            <MenuItem value="pearson">Pearson correlation</MenuItem>
          </TextField>
        )}
      />
      {SELECTS.map(({ field, options }) => (
        <Controller
          key={field}
          control={control}
          name={name(field)}
          render={({ field: f }) => (
            <TextField
              select
              size="small"
              label={label(field)}
              helperText={help(field)}
              value={f.value}
              onChange={f.onChange}
              onBlur={f.onBlur}
              name={f.name}
              inputRef={f.ref}
            >
              {options.map(([value, text]) => (
                <MenuItem key={value} value={value}>
                  {text}
                </MenuItem>
              ))}
            </TextField>
          )}
        />
      ))}
      {(['iuf'] as const).map((field) => (
        <Controller
          key={field}
          control={control}
          name={name(field)}
          render={({ field: f }) => (
            <Box>
              <FormControlLabel
                label={label(field)}
                control={
                  <Checkbox
                    checked={Boolean(f.value)}
                    onChange={(e) => f.onChange(e.target.checked)}
                    onBlur={f.onBlur}
                    name={f.name}
                    inputRef={f.ref}
                    slotProps={{
                      input: explain ? { 'aria-describedby': `${baseId}-${field}` } : undefined,
                    }}
                  />
                }
              />
              {explain ? (
                <FormHelperText id={`${baseId}-${field}`} sx={{ mt: 0, mx: 1.75 }}>
                  {SETTING_TEXT[field].help}
                </FormHelperText>
              ) : null}
            </Box>
          )}
        />
      ))}
      {NUMBER_FIELDS.filter((f) => withAlpha || f !== 'alpha').map((field) => (
        <Controller
          key={field}
          control={control}
          name={name(field)}
          rules={{ validate: (value, values) => checkNumber(field, String(value), own(values)) }}
          render={({ field: f, fieldState }) => (
            <TextField
              size="small"
              label={label(field)}
              value={f.value}
              onChange={f.onChange}
              onBlur={f.onBlur}
              name={f.name}
              inputRef={f.ref}
              error={Boolean(fieldState.error)}
              helperText={
                fieldState.error ? (
                  <>
                    <Box component="span" role="alert" sx={{ display: 'block' }}>
                      {fieldState.error.message}
                    </Box>
                    {help(field)}
                  </>
                ) : (
                  help(field)
                )
              }
              slotProps={{
                htmlInput: {
                  inputMode: WHOLE_FIELDS.includes(field) ? 'numeric' : 'decimal',
                  'aria-required': true,
                },
              }}
            />
          )}
        />
      ))}
    </Box>
  );
}
