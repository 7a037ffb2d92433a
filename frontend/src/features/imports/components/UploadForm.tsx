import { useEffect, useId, useMemo, useState } from 'react';
import { Controller, useForm } from 'react-hook-form';
import { Link as RouterLink } from 'react-router';
import Alert from '@mui/material/Alert';
import Box from '@mui/material/Box';
import Button from '@mui/material/Button';
import Checkbox from '@mui/material/Checkbox';
import FormControlLabel from '@mui/material/FormControlLabel';
import LinearProgress from '@mui/material/LinearProgress';
import Link from '@mui/material/Link';
import Stack from '@mui/material/Stack';
import TextField from '@mui/material/TextField';
import Typography from '@mui/material/Typography';
import {
  IMPORT_FIELDS,
  IMPORT_KINDS,
  type ImportEncoding,
  type ImportKind,
} from '@kinpath/contracts';
import { apiMessage, httpStatus } from '../../../lib/api-client';
import { fieldProps } from '../../../lib/form';
import { usePreview, useUpload } from '../api/imports';
import {
  columnsFromSuggestion,
  encodingQuestion,
  headersDiffer,
  leftOutOf,
  leftOutSentence,
  mappingProblems,
  toMapping,
  uploadFailure,
  type FieldColumns,
  type UploadFailure,
} from '../messages';
import { KIND_LABELS } from '../words';
import { ColumnMapping } from './ColumnMapping';
import { FileDropZone } from './FileDropZone';

interface UploadFields {
  kind: ImportKind | '';
  file: File | null;
  commitAtOnce: boolean;
}

const EMPTY: UploadFields = { kind: '', file: null, commitAtOnce: false };

interface UploadFormProps {
  /** Called with the new import's id once the server has taken the file. */
  onUploaded: (id: string) => void;
}

/** Chooses a file and its kind, maps its columns when needed, and sends it with a progress bar. */
export function UploadForm({ onUploaded }: UploadFormProps) {
  const upload = useUpload();
  const preview = usePreview();
  // The share of the file sent so far; null while the browser cannot tell.
  const [progress, setProgress] = useState<number | null>(null);
  const progressLabelId = useId();
  const [failure, setFailure] = useState<UploadFailure | null>(null);
  const [columns, setColumns] = useState<FieldColumns>({});
  const [showMapping, setShowMapping] = useState(false);
  const [mappingTried, setMappingTried] = useState(false);
  const [encoding, setEncoding] = useState<ImportEncoding | null>(null);
  const [leftOutConfirmed, setLeftOutConfirmed] = useState(false);
  const [leftOutTried, setLeftOutTried] = useState(false);
  const leftOutId = useId();
  const {
    control,
    register,
    handleSubmit,
    watch,
    reset,
    setValue,
    formState: { errors, isSubmitting },
  } = useForm<UploadFields>({ defaultValues: EMPTY });
  const kind = watch('kind');
  const file = watch('file');

  // The preview is read once per chosen file; it serves every kind.
  const { mutate: readPreview, reset: resetPreview } = preview;
  useEffect(() => {
    setEncoding(null);
  }, [file]);
  useEffect(() => {
    if (file) readPreview({ file, encoding });
    else resetPreview();
  }, [file, encoding, readPreview, resetPreview]);
  const question = file && preview.isError ? encodingQuestion(preview.error) : null;

  const previewData = preview.data && file ? preview.data : null;
  const differs = useMemo(
    () => (kind && previewData ? headersDiffer(kind, previewData) : false),
    [kind, previewData],
  );
  // A new file or kind starts from the server's suggestion.
  useEffect(() => {
    if (kind && previewData) setColumns(columnsFromSuggestion(kind, previewData));
    setMappingTried(false);
    setShowMapping(false);
  }, [kind, previewData]);
  useEffect(() => {
    setLeftOutConfirmed(false);
    setLeftOutTried(false);
  }, [kind, previewData, columns]);

  const problems = kind && previewData ? mappingProblems(kind, columns) : {};
  const leftOut = kind && previewData ? leftOutOf(kind, previewData.headers, columns) : null;
  const leftOutText = leftOut ? leftOutSentence(leftOut) : null;
  const likely =
    kind && previewData?.likelyKind && previewData.likelyKind !== kind
      ? previewData.likelyKind
      : null;
  const mappingVisible = Boolean(kind && previewData && (differs || showMapping));

  const onSubmit = handleSubmit(async (values) => {
    if (!values.file || !values.kind) return;
    setFailure(null);
    if (previewData && Object.keys(problems).length > 0) {
      setMappingTried(true);
      setShowMapping(true);
      return;
    }
    if (leftOutText && !leftOutConfirmed) {
      setLeftOutTried(true);
      return;
    }
    setProgress(null);
    try {
      const accepted = await upload.mutateAsync({
        file: values.file,
        kind: values.kind,
        mapping: previewData ? toMapping(columns) : null,
        commit: values.commitAtOnce,
        encoding,
        onProgress: setProgress,
      });
      reset(EMPTY);
      onUploaded(accepted.id);
    } catch (error) {
      setFailure(uploadFailure(error));
    }
  });

  const kindField = fieldProps(
    register('kind', { required: 'Choose what kind of file this is.' }),
    errors.kind?.message,
  );
  const required = kind ? IMPORT_FIELDS[kind].filter((f) => f.required).map((f) => f.name) : [];

  return (
    <form onSubmit={onSubmit} noValidate aria-label="New import">
      <Stack spacing={2}>
        <TextField
          select
          label="Kind of file"
          {...kindField}
          slotProps={{
            ...kindField.slotProps,
            select: { native: true },
            inputLabel: { shrink: true },
          }}
          sx={{ maxWidth: 320 }}
        >
          <option value="">Choose a kind…</option>
          {IMPORT_KINDS.map((value) => (
            <option key={value} value={value}>
              {KIND_LABELS[value]}
            </option>
          ))}
        </TextField>
        {kind ? (
          <Typography variant="body2" sx={{ color: 'text.secondary', mt: -1 }}>
            Required columns: {required.join(', ')}.
          </Typography>
        ) : null}

        <Controller
          control={control}
          name="file"
          rules={{ validate: (value) => (value ? true : 'Choose a CSV file to import.') }}
          render={({ field, fieldState }) => (
            <FileDropZone
              file={field.value}
              onChange={(chosen) => {
                setFailure(null);
                field.onChange(chosen);
              }}
              inputRef={field.ref}
              error={fieldState.error?.message}
              disabled={isSubmitting}
            />
          )}
        />

        {file && preview.isPending ? (
          <Typography role="status" variant="body2" sx={{ color: 'text.secondary' }}>
            Reading the file’s header…
          </Typography>
        ) : null}
        {question ? (
          <Alert
            severity="warning"
            role="alert"
            action={
              <Button color="inherit" size="small" onClick={() => setEncoding(question.encoding)}>
                Read it as {question.name}
              </Button>
            }
          >
            {question.message} Characters are never replaced: a byte that {question.name} does not
            define stops the import with its line.
          </Alert>
        ) : null}
        {encoding && previewData ? (
          <Typography variant="body2" role="status">
            Read as {encoding === 'utf-8' ? 'UTF-8' : encoding}; check the first rows below.
          </Typography>
        ) : null}
        {file && preview.isError && !question && httpStatus(preview.error) === 400 ? (
          // An empty or binary file: the server says what it is, and it cannot be imported.
          <Alert severity="error" role="alert">
            {apiMessage(preview.error)}
          </Alert>
        ) : file && preview.isError && !question ? (
          <Alert severity="warning" role="alert">
            The file’s first rows could not be read ({apiMessage(preview.error) ?? 'no answer'}). It
            can still be uploaded; the server checks every row.
          </Alert>
        ) : null}

        {likely && kind && previewData && previewData.missingFields[kind].length > 0 ? (
          <Alert
            severity="warning"
            action={
              <Button
                color="inherit"
                size="small"
                onClick={() => setValue('kind', likely, { shouldValidate: true })}
              >
                Import as {KIND_LABELS[likely].toLowerCase()}
              </Button>
            }
          >
            The columns look like a {KIND_LABELS[likely].toLowerCase()} file, not{' '}
            {KIND_LABELS[kind].toLowerCase()}.
          </Alert>
        ) : null}
        {kind && previewData && !mappingVisible ? (
          <Box sx={{ display: 'flex', gap: 1, alignItems: 'center', flexWrap: 'wrap' }}>
            <Typography variant="body2" role="status">
              Every {KIND_LABELS[kind].toLowerCase()} column was found by its name.
            </Typography>
            <Button size="small" onClick={() => setShowMapping(true)}>
              Review columns
            </Button>
          </Box>
        ) : null}
        {mappingVisible && kind && previewData ? (
          <ColumnMapping
            kind={kind}
            preview={previewData}
            columns={columns}
            onChange={setColumns}
            problems={mappingTried ? problems : {}}
            differs={differs}
          />
        ) : null}

        {leftOutText ? (
          <Alert
            severity={leftOutTried ? 'error' : 'info'}
            role={leftOutTried ? 'alert' : undefined}
          >
            <Typography id={leftOutId} variant="body2" sx={{ mb: 0.5 }}>
              {leftOutText}
            </Typography>
            <FormControlLabel
              control={
                <Checkbox
                  checked={leftOutConfirmed}
                  onChange={(event) => setLeftOutConfirmed(event.target.checked)}
                  slotProps={{ input: { 'aria-describedby': leftOutId } }}
                />
              }
              label="Import without them"
            />
            {leftOutTried && !leftOutConfirmed ? (
              <Typography variant="body2">
                Confirm that these are meant to be left out, or choose their columns above.
              </Typography>
            ) : null}
          </Alert>
        ) : null}

        <Controller
          control={control}
          name="commitAtOnce"
          render={({ field }) => (
            <FormControlLabel
              control={
                <Checkbox
                  checked={field.value}
                  onChange={(event) => field.onChange(event.target.checked)}
                  onBlur={field.onBlur}
                  inputRef={field.ref}
                />
              }
              label="Commit at once when no row is rejected"
            />
          )}
        />

        {failure ? (
          <Alert severity="error" role="alert">
            {failure.text}
            {failure.earlierImportId ? (
              <>
                {' '}
                <Link component={RouterLink} to={`?import=${failure.earlierImportId}`}>
                  Open the earlier import
                </Link>
              </>
            ) : null}
          </Alert>
        ) : null}

        {upload.isPending ? (
          <Box>
            <Box sx={{ display: 'flex', justifyContent: 'space-between', mb: 0.5 }}>
              <Typography id={progressLabelId} variant="body2">
                Uploading {file?.name}
              </Typography>
              {/* The bar carries the value for assistive technology. */}
              <Typography variant="body2" aria-hidden className="kp-figures">
                {progress === null ? '' : `${Math.round(progress * 100)} %`}
              </Typography>
            </Box>
            {progress === null ? (
              <LinearProgress aria-labelledby={progressLabelId} />
            ) : (
              <LinearProgress
                variant="determinate"
                value={Math.round(progress * 100)}
                aria-labelledby={progressLabelId}
              />
            )}
          </Box>
        ) : null}

        <Button
          type="submit"
          variant="contained"
          loading={isSubmitting}
          sx={{ alignSelf: 'flex-start' }}
        >
          Upload and check
        </Button>
      </Stack>
    </form>
  );
}
