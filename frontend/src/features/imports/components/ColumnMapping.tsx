import { useId, useState } from 'react';
import Alert from '@mui/material/Alert';
import Box from '@mui/material/Box';
import Button from '@mui/material/Button';
import Paper from '@mui/material/Paper';
import Table from '@mui/material/Table';
import TableBody from '@mui/material/TableBody';
import TableCell from '@mui/material/TableCell';
import TableContainer from '@mui/material/TableContainer';
import TableHead from '@mui/material/TableHead';
import TableRow from '@mui/material/TableRow';
import TextField from '@mui/material/TextField';
import Typography from '@mui/material/Typography';
import { IMPORT_FIELDS, type ImportKind, type ImportPreview } from '@kinpath/contracts';
import { apiMessage } from '../../../lib/api-client';
import { useSavedMappings, useSaveMapping } from '../api/imports';
import { columnsFromSaved, toMapping, type FieldColumns } from '../messages';
import { KIND_LABELS } from '../words';

/** How many of the file's rows to show while choosing columns. */
const SAMPLE_ROWS = 5;

interface ColumnMappingProps {
  kind: ImportKind;
  preview: ImportPreview;
  columns: FieldColumns;
  onChange: (columns: FieldColumns) => void;
  /** Problems by field, shown once an upload was attempted. */
  problems: Record<string, string>;
  /** Whether the headers differ from the kind's defaults (then the step explains why it is here). */
  differs: boolean;
}

function FirstRows({ preview }: { preview: ImportPreview }) {
  const captionId = useId();
  const sample = preview.rows.slice(0, SAMPLE_ROWS);
  return (
    <Box>
      <Typography id={captionId} variant="h3" component="h4" sx={{ mb: 1 }}>
        First rows of the file
      </Typography>
      {/* Focusable so keyboard users can scroll a wide file sideways. */}
      <TableContainer
        component={Paper}
        variant="outlined"
        tabIndex={0}
        role="region"
        aria-labelledby={captionId}
        sx={{ maxWidth: '100%' }}
      >
        <Table aria-labelledby={captionId}>
          <TableHead>
            <TableRow>
              {preview.headers.map((header, i) => (
                <TableCell key={`${header}-${i}`}>{header || `(column ${i + 1})`}</TableCell>
              ))}
            </TableRow>
          </TableHead>
          <TableBody>
            {sample.map((row, r) => (
              <TableRow key={r}>
                {preview.headers.map((_, c) => (
                  <TableCell key={c} sx={{ whiteSpace: 'nowrap' }}>
                    {row[c] ?? ''}
                  </TableCell>
                ))}
              </TableRow>
            ))}
            {sample.length === 0 ? (
              <TableRow>
                <TableCell colSpan={Math.max(1, preview.headers.length)}>
                  The file has a header row but no rows under it.
                </TableCell>
              </TableRow>
            ) : null}
          </TableBody>
        </Table>
      </TableContainer>
    </Box>
  );
}

function SavedMappings({
  kind,
  preview,
  columns,
  onChange,
}: Omit<ColumnMappingProps, 'problems' | 'differs'>) {
  const saved = useSavedMappings();
  const save = useSaveMapping();
  const [chosen, setChosen] = useState('');
  const [name, setName] = useState('');
  const [notice, setNotice] = useState<string | null>(null);
  const [nameError, setNameError] = useState<string | null>(null);
  const ofKind = (saved.data ?? []).filter((m) => m.kind === kind);

  const apply = () => {
    const mapping = ofKind.find((m) => m.id === chosen);
    if (!mapping) return;
    const next = columnsFromSaved(kind, mapping.mapping, preview.headers);
    const absent = Object.keys(mapping.mapping).filter((h) => !preview.headers.includes(h));
    onChange(next);
    setNotice(
      absent.length === 0
        ? `Mapping “${mapping.name}” applied.`
        : `Mapping “${mapping.name}” applied; this file has no ${absent
            .map((h) => `‘${h}’`)
            .join(', ')} column, so check the fields left empty.`,
    );
  };

  const onSave = async () => {
    const trimmed = name.trim();
    if (!trimmed) {
      setNameError('Give the mapping a name, such as “SIS export, autumn”.');
      return;
    }
    setNameError(null);
    try {
      const result = await save.mutateAsync({ name: trimmed, kind, mapping: toMapping(columns) });
      setNotice(`Mapping saved as “${result.name}” for ${KIND_LABELS[kind].toLowerCase()} files.`);
      setName('');
    } catch (error) {
      setNotice(null);
      setNameError(apiMessage(error) ?? 'The mapping could not be saved. Try again in a moment.');
    }
  };

  return (
    <Box sx={{ display: 'grid', gap: 1.5 }}>
      {ofKind.length > 0 ? (
        <Box sx={{ display: 'flex', gap: 1, alignItems: 'flex-start', flexWrap: 'wrap' }}>
          <TextField
            select
            label="Saved mapping"
            value={chosen}
            onChange={(event) => setChosen(event.target.value)}
            sx={{ maxWidth: 320 }}
            slotProps={{ select: { native: true }, inputLabel: { shrink: true } }}
          >
            <option value="">Choose a saved mapping…</option>
            {ofKind.map((m) => (
              <option key={m.id} value={m.id}>
                {m.name}
              </option>
            ))}
          </TextField>
          <Button variant="outlined" onClick={apply} disabled={!chosen}>
            Use this mapping
          </Button>
        </Box>
      ) : null}
      <Box sx={{ display: 'flex', gap: 1, alignItems: 'flex-start', flexWrap: 'wrap' }}>
        <TextField
          label="Save this mapping as"
          value={name}
          onChange={(event) => setName(event.target.value)}
          error={Boolean(nameError)}
          helperText={nameError ?? 'To reuse it for next term’s file.'}
          sx={{ maxWidth: 320 }}
          slotProps={{
            htmlInput: { maxLength: 100 },
            formHelperText: nameError ? { role: 'alert' } : undefined,
          }}
        />
        <Button variant="outlined" onClick={onSave} loading={save.isPending}>
          Save mapping
        </Button>
      </Box>
      <Typography role="status" variant="body2">
        {notice ?? ''}
      </Typography>
    </Box>
  );
}

/** Which column of the file holds each field of the kind, chosen with the file's rows in view. */
export function ColumnMapping(props: ColumnMappingProps) {
  const { kind, preview, columns, onChange, problems, differs } = props;
  const headingId = useId();
  const firstRow = preview.rows[0] ?? [];
  const sampleOf = (header: string) => {
    const index = preview.headers.indexOf(header);
    const value = index >= 0 ? firstRow[index] : undefined;
    return value ? `First row: ${value}` : undefined;
  };

  return (
    <Box
      component="section"
      aria-labelledby={headingId}
      sx={{
        display: 'grid',
        // minmax(0, …) keeps a wide file inside the box; its rows scroll instead.
        gridTemplateColumns: 'minmax(0, 1fr)',
        gap: 2,
        p: 2,
        border: 1,
        borderColor: 'divider',
        borderRadius: 1,
      }}
    >
      <Typography id={headingId} variant="h3">
        Columns
      </Typography>
      {differs ? (
        <Alert severity="info">
          This file’s headers differ from the {KIND_LABELS[kind].toLowerCase()} defaults. Choose the
          column that holds each field; required fields are marked.
        </Alert>
      ) : null}
      <FirstRows preview={preview} />
      <Box
        sx={{
          display: 'grid',
          gap: 1.5,
          gridTemplateColumns: { xs: '1fr', sm: 'repeat(2, minmax(0, 1fr))' },
        }}
      >
        {IMPORT_FIELDS[kind].map((field) => {
          const problem = problems[field.name];
          const header = columns[field.name] ?? '';
          return (
            <TextField
              key={field.name}
              select
              label={field.required ? `${field.name} (required)` : field.name}
              value={header}
              onChange={(event) => onChange({ ...columns, [field.name]: event.target.value })}
              error={Boolean(problem)}
              helperText={problem ?? sampleOf(header) ?? (field.required ? ' ' : 'Optional')}
              slotProps={{
                select: { native: true },
                inputLabel: { shrink: true },
                htmlInput: { 'aria-required': field.required || undefined },
                formHelperText: problem ? { role: 'alert' } : undefined,
              }}
            >
              <option value="">— not in this file —</option>
              {preview.headers.map((h, i) => (
                <option key={`${h}-${i}`} value={h}>
                  {h || `(column ${i + 1})`}
                </option>
              ))}
            </TextField>
          );
        })}
      </Box>
      <SavedMappings kind={kind} preview={preview} columns={columns} onChange={onChange} />
    </Box>
  );
}
