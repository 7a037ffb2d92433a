import { useId, useState, type DragEvent, type Ref } from 'react';
import Box from '@mui/material/Box';
import { visuallyHidden } from '../../../components/VisuallyHidden';
import Typography from '@mui/material/Typography';
import UploadFile from '@mui/icons-material/UploadFile';
import { fileSize } from '../words';

interface FileDropZoneProps {
  file: File | null;
  onChange: (file: File | null) => void;
  inputRef?: Ref<HTMLInputElement>;
  error?: string;
  disabled?: boolean;
}

/**
 * A file can be dropped anywhere on the zone or chosen with the picker. The picker is a real
 * file input, kept in the tab order and labelled; its label is what sighted users see and click.
 */
export function FileDropZone({ file, onChange, inputRef, error, disabled }: FileDropZoneProps) {
  const inputId = useId();
  const hintId = useId();
  const errorId = useId();
  const [dragging, setDragging] = useState(false);

  const onDrop = (event: DragEvent) => {
    event.preventDefault();
    setDragging(false);
    if (disabled) return;
    const dropped = event.dataTransfer.files[0];
    if (dropped) onChange(dropped);
  };

  return (
    <Box>
      <Box
        onDragOver={(event) => {
          event.preventDefault();
          if (!disabled) setDragging(true);
        }}
        onDragLeave={() => setDragging(false)}
        onDrop={onDrop}
        data-dragging={dragging || undefined}
        sx={{
          display: 'flex',
          alignItems: 'center',
          gap: 2,
          flexWrap: 'wrap',
          p: 2,
          border: 2,
          borderStyle: 'dashed',
          borderRadius: 1,
          borderColor: error ? 'error.main' : dragging ? 'primary.main' : 'divider',
          bgcolor: dragging ? 'action.hover' : 'background.paper',
          // The input is visually hidden; its focus ring is drawn on the label beside it.
          '& input:focus-visible + label': {
            outline: '3px solid var(--kp-focus-ring)',
            outlineOffset: 2,
          },
        }}
      >
        <UploadFile aria-hidden sx={{ color: 'text.secondary', fontSize: 32 }} />
        <Box sx={{ flex: 1, minWidth: 200 }}>
          <Typography id={hintId} sx={{ fontWeight: 700 }}>
            {dragging ? 'Drop the file to choose it' : 'Drop a CSV file here, or choose one'}
          </Typography>
          <Typography variant="body2" sx={{ color: 'text.secondary' }}>
            UTF-8, comma or semicolon separated, with a header row.
          </Typography>
          {file ? (
            <Typography variant="body2" sx={{ mt: 0.5 }} className="kp-figures">
              Chosen: <strong>{file.name}</strong> ({fileSize(file.size)})
            </Typography>
          ) : null}
        </Box>
        <Box>
          <input
            ref={inputRef}
            id={inputId}
            type="file"
            accept=".csv,.txt,text/csv,text/plain"
            disabled={disabled}
            aria-describedby={error ? `${hintId} ${errorId}` : hintId}
            aria-invalid={error ? true : undefined}
            aria-required
            onChange={(event) => {
              onChange(event.target.files?.[0] ?? null);
              // Lets the same file be chosen again after it was cleared.
              event.target.value = '';
            }}
            style={visuallyHidden}
          />
          <Box
            component="label"
            htmlFor={inputId}
            sx={{
              display: 'inline-block',
              px: 2,
              py: 0.75,
              border: 1,
              borderColor: 'primary.main',
              borderRadius: 1,
              color: 'primary.main',
              fontWeight: 700,
              cursor: disabled ? 'default' : 'pointer',
              opacity: disabled ? 0.6 : 1,
              '&:hover': { bgcolor: disabled ? undefined : 'action.hover' },
            }}
          >
            Choose a CSV file
          </Box>
        </Box>
      </Box>
      {error ? (
        <Typography id={errorId} role="alert" variant="body2" sx={{ color: 'error.main', mt: 0.5 }}>
          {error}
        </Typography>
      ) : null}
    </Box>
  );
}
