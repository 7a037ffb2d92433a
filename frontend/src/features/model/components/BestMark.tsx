import Box from '@mui/material/Box';
import EmojiEventsOutlined from '@mui/icons-material/EmojiEventsOutlined';

/** Marks the best value in words and with an icon, never by colour alone. */
export function BestMark({ label = 'lowest' }: { label?: string }) {
  return (
    <Box
      component="span"
      sx={{
        display: 'inline-flex',
        alignItems: 'center',
        gap: 0.25,
        ml: 0.75,
        px: 0.5,
        borderRadius: 1,
        border: 1,
        borderColor: 'text.primary',
        fontSize: '0.75rem',
        fontWeight: 600,
        lineHeight: 1.5,
        verticalAlign: 'middle',
      }}
    >
      <EmojiEventsOutlined aria-hidden sx={{ fontSize: '0.95rem' }} />
      {label}
    </Box>
  );
}
