import Box from '@mui/material/Box';
import Button from '@mui/material/Button';

/** An empty filtered table: what happened, and the one step back to every row. */
export function NoMatch({ message, onClear }: { message: string; onClear: () => void }) {
  return (
    <Box sx={{ display: 'flex', alignItems: 'center', gap: 1.5, flexWrap: 'wrap' }}>
      {message}
      <Button size="small" variant="outlined" onClick={onClear}>
        Clear filters
      </Button>
    </Box>
  );
}
